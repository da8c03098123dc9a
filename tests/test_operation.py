"""convlib.operation checked against analytic solutions, an independent reference model, textbooks and tables.

References used below:
- Constant coefficient line: T(x) = Ta + (Tin - Ta) exp(-U' x / (m cp)) (analytic solution; Incropera et al.,
  Fundamentals of Heat and Mass Transfer, 6th ed., eq. 8.46a, from memory).
- Independent reference model: the outer surface of an insulated line solved per temperature with
  scipy's brentq, natural convection from the `ht` package's Churchill-Chu function, air and water properties
  from CoolProp called directly, the line marched with scipy's solve_ivp.
- Steam tables (IAPWS), latent heat of fusion of ice (IAPWS-95 and IAPWS R10-06 through the `iapws` package; the CRC
  Handbook's rounded value), as named beside each check.
"""
import math

import numpy as np
import pytest
from CoolProp.CoolProp import PropsSI
from ht.conv_free_immersed import Nu_horizontal_cylinder_Churchill_Chu
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

import convlib as cl
from convlib import Layer
from convlib import operation as op

G = 9.80665  # standard gravity [m/s2], 3rd CGPM (1901), exact
SIGMA = 5.670374419e-8  # Stefan-Boltzmann [W/m2/K4], CODATA 2018 (exact since SI 2019)
L_FUSION_CRC = 333.55e3  # CRC Handbook of Chemistry and Physics, latent heat of fusion of ice 333.55 kJ/kg (from memory)


def _latent_heat_of_fusion_iapws():
    """h(liquid, IAPWS-95) - h(ice Ih, IAPWS R10-06(2009)) at 273.15 K, 101325 Pa, with the `iapws` package [J/kg]."""
    from iapws import IAPWS95, _Ice
    return 1e3 * (IAPWS95(T=273.15, P=0.101325).h - _Ice(273.15, 0.101325)["h"])


L_FUSION = _latent_heat_of_fusion_iapws()

INSULATED = dict(pipe_outer_diameter=0.0603, layers=[Layer(0.03, 0.04)])  # 2 in line, 30 mm of k = 0.04


# --------------------------------------------------------------------------- temperature along a line
@pytest.mark.parametrize("wind", [0.0, 6.0])
def test_constant_coefficient_profile_is_the_exponential(wind):
    # analytic solution: T(x) = Ta + (Tin - Ta) exp(-U' x / (m cp)), U' = q'(Tin)/(Tin - Ta) of the insulated line.
    # m and L chosen for U'L/(m cp) between about 1 and 3, so the march must adapt its steps.
    tin, ta, cp = np.array([353.15, 333.15, 393.15]), 263.15, 4190.0
    flow, run = np.array([0.02, 0.01, 0.05]), np.array([400.0, 300.0, 1500.0])
    p = op.line_temperature_profile(INSULATED["pipe_outer_diameter"], tin, INSULATED["layers"], mass_flow=flow,
                                    length=run, air_temperature=ta, wind_speed=wind, specific_heat=cp,
                                    constant_coefficient=True)
    u = cl.insulated_pipe(INSULATED["pipe_outer_diameter"], tin, INSULATED["layers"], air_temperature=ta,
                          wind_speed=wind).q_per_length / (tin - ta)
    ntu = u * run / (flow * cp)
    assert ntu.min() > 0.5 and ntu.max() < 5
    exact = ta + (tin - ta) * np.exp(-u * p.position / (flow * cp))
    np.testing.assert_allclose(p.temperature - ta, exact - ta, rtol=1e-6)
    np.testing.assert_allclose(p.outlet_temperature - ta, (tin - ta) * np.exp(-ntu), rtol=1e-6)
    # total loss of the exponential: m cp (Tin - Tout)
    np.testing.assert_allclose(p.q_total, flow * cp * (tin - ta) * (1 - np.exp(-ntu)), rtol=1e-6)
    assert p.fraction[0] == 0.0 and p.fraction[-1] == 1.0 and np.all(np.diff(p.fraction) > 0)


def test_energy_conservation_against_coolprop_enthalpy():
    # m (h(Tin, p) - h(Tout, p)) from CoolProp (IAPWS-95) called directly must equal the integrated loss: the
    # library's cp comes from 1 K tables (< 0.05 % error, DESIGN.md), so 5e-4 relative.
    tin, flow, p_fluid = 363.15, 0.05, 3.0e5
    p = op.line_temperature_profile(INSULATED["pipe_outer_diameter"], tin, INSULATED["layers"], mass_flow=flow,
                                    length=400.0, air_temperature=258.15, wind_speed=3.0, fluid_pressure=p_fluid)
    h_in = PropsSI("H", "T", tin, "P", p_fluid, "Water")
    h_out = PropsSI("H", "T", float(p.outlet_temperature), "P", p_fluid, "Water")
    assert tin - p.outlet_temperature > 10.0  # a real drop, not a rounding
    assert float(p.q_total) == pytest.approx(flow * (h_in - h_out), rel=5e-4)
    # inlet minus outlet enthalpy equals the integrated loss to the integrator tolerance: 1e-6 K per step
    # on a drop of more than 10 K over at most a few dozen steps -> well below 1e-5 relative
    assert abs(float(p.energy_balance_error)) < 1e-5
    assert float(p.enthalpy_drop) == pytest.approx(float(p.q_total), rel=1e-5)


def _reference_loss(tf, d, t_ins, k_ins, ta, eps):
    """q' [W/m] of an insulated line, fluid at tf: brentq on (tf - ts)/R = pi D_o (h (ts - ta) + eps sigma (ts^4 - ta^4)).

    h from the ht package's Churchill-Chu function with CoolProp air properties at the film temperature,
    beta = 1/T_film (ideal gas).
    """
    d_out = d + 2 * t_ins
    r_ins = math.log(d_out / d) / (2 * math.pi * k_ins)  # Incropera et al. 6th ed. eq. 3.28 (from memory)

    def out(ts):
        film = 0.5 * (ts + ta)
        rho = PropsSI("D", "T", film, "P", 101325.0, "Air")
        mu = PropsSI("V", "T", film, "P", 101325.0, "Air")
        k = PropsSI("L", "T", film, "P", 101325.0, "Air")
        pr = PropsSI("PRANDTL", "T", film, "P", 101325.0, "Air")
        gr = G * (1 / film) * abs(ts - ta) * d_out ** 3 / (mu / rho) ** 2
        h = Nu_horizontal_cylinder_Churchill_Chu(pr, gr) * k / d_out
        return math.pi * d_out * (h * (ts - ta) + eps * SIGMA * (ts ** 4 - ta ** 4))

    ts = brentq(lambda t: (tf - t) / r_ins - out(t), ta, tf, xtol=1e-10)
    return (tf - ts) / r_ins


def test_outlet_against_independent_reference_model():
    # Reference: brentq surface + ht Churchill-Chu + CoolProp (exact) + solve_ivp (rtol 1e-10), water cp from
    # CoolProp at 1 atm. Differences come from the library's property tables (< 0.05 % on air properties, which
    # move q' by far less because the insulation carries most of the resistance): 2e-4 on the temperature drop.
    d, t_ins, k_ins, ta, eps, flow, run, tin = 0.0603, 0.03, 0.04, 268.15, 0.9, 0.03, 600.0, 358.15

    def rhs(x, y):
        cp = PropsSI("C", "T", y[0], "P", 101325.0, "Water")
        return [-_reference_loss(y[0], d, t_ins, k_ins, ta, eps) / (flow * cp)]

    ref = solve_ivp(rhs, (0.0, run), [tin], rtol=1e-10, atol=1e-8)
    t_out_ref = ref.y[0, -1]
    p = op.line_temperature_profile(d, tin, [Layer(t_ins, k_ins)], mass_flow=flow, length=run, air_temperature=ta,
                                    jacket_emissivity=eps)
    assert tin - t_out_ref > 15.0
    assert float(tin - p.outlet_temperature) == pytest.approx(tin - t_out_ref, rel=2e-4)
    # the profile follows the reference along the line too
    mid = np.argmin(np.abs(p.fraction - 0.5))
    ref_mid = solve_ivp(rhs, (0.0, float(p.position[mid])), [tin], rtol=1e-10, atol=1e-8).y[0, -1]
    assert float(tin - p.temperature[mid]) == pytest.approx(tin - ref_mid, rel=2e-4)


def test_textbook_hot_water_pipe_outlet():
    # Cengel, Heat and Mass Transfer, Example 9-2 "Heat loss from hot water pipes" (from memory): 6 m of a
    # horizontal 8 cm pipe at 70 C in a room at 20 C, emissivity 0.8: Q_conv = 443 W (air at the 45 C film from
    # the book's Table A-15: k = 0.02699 W/m/K, 2 % below CoolProp's; Churchill-Chu, Nu = 17.4).
    # Radiation to the room, sigma eps A (Ts^4 - Tsur^4) = 443 W, computed here (analytic).
    # A bare line carrying 10 kg/s of water at 70 C stays within 0.03 K of it, so its outlet drop is
    # Q / (m cp) with the book's Q; tolerance 2 % (the book's conductivity and rounding).
    area = math.pi * 0.08 * 6.0
    q_rad = 0.8 * SIGMA * area * (343.15 ** 4 - 293.15 ** 4)
    q_book = 443.0 + q_rad
    cp = 4190.0  # Incropera et al., 6th ed., Table A.6, saturated water at 345 K: 4.191 kJ/kg/K (from memory)
    p = op.line_temperature_profile(0.08, 343.15, mass_flow=10.0, length=6.0, air_temperature=293.15,
                                    jacket_emissivity=0.8, specific_heat=cp, max_step=1.0)
    assert float(p.q_total) == pytest.approx(q_book, rel=0.02)
    assert float(343.15 - p.outlet_temperature) == pytest.approx(q_book / (10.0 * cp), rel=0.02)


def test_textbook_duct_outlet_temperature():
    # Cengel, Heat and Mass Transfer, Ch. 8 example "Heat loss from the ducts of a heating system" (from memory):
    # air at 80 C enters an 8 m uninsulated 0.2 m x 0.2 m duct in an attic at 0.15 m3/s, the duct nearly isothermal
    # at 60 C; book properties at 80 C: rho = 0.9994 kg/m3, cp = 1008 J/kg/K; Dittus-Boelter h = 13.5 W/m2/K.
    # Book: exit 71.3 C, loss 1313 W. Here a round line of the same perimeter (0.8 m, same inner area 6.4 m2)
    # with the book's inner h; the wall held at 60 C by a very large outer coefficient to air at 60 C.
    p = op.line_temperature_profile(0.8 / math.pi, 353.15, mass_flow=0.9994 * 0.15, length=8.0,
                                    air_temperature=333.15, fluid="Air", fluid_phase="gas", specific_heat=1008.0,
                                    inner_coefficient=13.5, convection_coefficient=1e7, jacket_emissivity=0.0)
    assert float(p.outlet_temperature) - 273.15 == pytest.approx(71.3, abs=0.05)
    assert float(p.q_total) == pytest.approx(1313.0, rel=0.005)


def test_fluid_warms_in_hot_surroundings_and_profile_is_monotonic():
    # a cold line gains heat: the temperature rises towards the air and never passes it (analytic bound)
    p = op.line_temperature_profile(0.0603, 280.15, [Layer(0.02, 0.035)], mass_flow=0.01, length=600.0,
                                    air_temperature=308.15)
    assert np.all(np.diff(p.temperature) > 0) and float(p.outlet_temperature) < 308.15
    assert float(p.q_total) < 0 and np.all(p.q_per_length < 0)


def test_stiff_line_settles_at_the_air_temperature_without_leaving_the_liquid_range():
    # analytic: with constant U' the fluid decays to Ta and never passes it; U'L/(m cp) of a few hundred makes the
    # first trial stages overshoot below 0 C (outside the water tables); the march must retry, not fail
    p = op.line_temperature_profile(0.0603, 281.15, [Layer(0.01, 0.04)], mass_flow=0.001, length=2000.0,
                                    air_temperature=275.15, constant_coefficient=True)
    ntu = float(p.inlet_loss_coefficient) * 2000.0 / (0.001 * 4200.0)
    assert ntu > 200 and p.rejected_steps > 0
    # within the marching tolerance (1e-6 K per step) of the analytic bound T >= Ta, and settled at Ta
    assert np.all(p.temperature >= 275.15 - 1e-5)
    assert float(p.outlet_temperature) == pytest.approx(275.15, abs=1e-5)


def test_cases_march_together_as_they_would_alone():
    # vectorized cases on one grid agree with each case alone, to the marching tolerance (1e-6 K per step)
    tin, flow = [353.15, 373.15], [0.05, 0.3]
    kw = dict(length=500.0, air_temperature=263.15, wind_speed=4.0, fluid_pressure=2e5)
    together = op.line_temperature_profile(0.0603, tin, [Layer(0.03, 0.04)], mass_flow=flow, **kw)
    for i in range(2):
        alone = op.line_temperature_profile(0.0603, tin[i], [Layer(0.03, 0.04)], mass_flow=flow[i], **kw)
        assert float(together.outlet_temperature[i]) == pytest.approx(float(alone.outlet_temperature), abs=1e-5)


def test_scalar_list_ndarray_inputs_agree():
    kw = dict(length=300.0, air_temperature=263.15, specific_heat=4190.0, constant_coefficient=True)
    lists = op.line_temperature_profile(0.0603, [353.15, 333.15], [Layer(0.03, 0.04)], mass_flow=[0.05, 0.02], **kw)
    arrays = op.line_temperature_profile(0.0603, np.array([353.15, 333.15]), [Layer(0.03, 0.04)],
                                         mass_flow=np.array([0.05, 0.02]), **kw)
    np.testing.assert_array_equal(arrays.outlet_temperature, lists.outlet_temperature)
    assert lists.temperature.shape == (lists.fraction.size, 2) == lists.position.shape


# --------------------------------------------------------------------------- trickle flow, freezing, minimum flow
# The line of issue 12: NPS 8 schedule 40 (219.1 mm outer diameter, ASME B36.10M) under 80 mm of k = 0.03 W/m/K.
NPS8 = dict(pipe_outer_diameter=0.2191, layers=[Layer(0.08, 0.03)])


def _inlet_coefficient(tin, ta, **kw):
    """U' = q'(Tin)/(Tin - Ta) of the NPS 8 line [W/m/K], the coefficient of the constant-coefficient model."""
    return cl.insulated_pipe(NPS8["pipe_outer_diameter"], tin, NPS8["layers"], air_temperature=ta,
                             **kw).q_per_length / (tin - ta)


@pytest.mark.parametrize("flow", [0.002, 0.02, 0.2, 2.0])
def test_outlet_is_the_exponential_from_trickle_to_full_flow(flow):
    # Incropera et al., Fundamentals of Heat and Mass Transfer, eq. 8.45b (constant ambient temperature form, with
    # U' in place of h P): T_out = Ta + (Tin - Ta) exp(-U' L / (m cp)). U'L/(m cp) runs from about 0.04 (full flow)
    # to about 100 (trickle): the outlet excess over the air is then ~1e-42 K; the march carries ln(T - Ta), so the
    # profile follows the exponential to 1e-6 relative down to 1e-12 K (a double near 300 K resolves 6e-14 K).
    tin, ta, cp, run = 368.15, 293.15, 4190.0, 2500.0
    p = op.line_temperature_profile(**NPS8, inlet_temperature=tin, mass_flow=flow, length=run, air_temperature=ta,
                                    specific_heat=cp, constant_coefficient=True)
    ntu = _inlet_coefficient(tin, ta) * run / (flow * cp)
    excess = (tin - ta) * np.exp(-ntu)
    assert float(p.outlet_temperature - ta) == pytest.approx(float(excess), rel=1e-6, abs=1e-12)
    exact = (tin - ta) * np.exp(-ntu * p.position / run)
    np.testing.assert_allclose(p.temperature - ta, exact, rtol=1e-6, atol=1e-12)
    assert np.all(p.temperature >= ta) and np.all(np.diff(p.temperature) <= 0)   # never below the air
    assert float(p.q_total) == pytest.approx(float(flow * cp * (tin - ta - excess)), rel=1e-6)
    assert not bool(p.freezes) and np.isnan(p.freezing_position)


def test_trickle_flow_of_issue_12_settles_at_the_air_temperature():
    # issue 12: `outlet --nps 8 --inlet-temperature 95degC --air-temperature=20degC --mass-flow 0.002 --length 2500m
    # --layer 80mm,0.03` failed with "fluid_temperature must be greater than 0 K". Analytic bound: the water decays
    # towards the air and never passes it; with U'L/(m cp) near 100 it arrives within 1e-6 K. The heat lost is the
    # enthalpy drop, m (h(Tin) - h(Tout)) from CoolProp (IAPWS-95) directly, to the 5e-4 of the cp tables.
    tin, ta, flow = 368.15, 293.15, 0.002
    p = op.line_temperature_profile(**NPS8, inlet_temperature=tin, mass_flow=flow, length=2500.0, air_temperature=ta)
    assert np.all(p.temperature >= ta) and np.all(np.diff(p.temperature) <= 0)
    assert float(p.outlet_temperature) == pytest.approx(ta, abs=1e-6)
    h_in, h_out = (PropsSI("H", "T", t, "P", 101325.0, "Water") for t in (tin, float(p.outlet_temperature)))
    assert float(p.q_total) == pytest.approx(flow * (h_in - h_out), rel=5e-4)
    assert abs(float(p.energy_balance_error)) < 1e-6 and float(p.equilibrium_temperature) == ta


def test_freezing_position_is_the_exponential_one():
    # constant U' and cp: the water reaches Tf where (Tf - Ta) = (Tin - Ta) exp(-U' x / (m cp)), i.e.
    # x_f = m cp / U' ln((Tin - Ta)/(Tf - Ta)) (Incropera et al., eq. 8.45b solved for x).
    tin, ta, cp, tf = np.array([368.15, 333.15]), 263.15, 4190.0, 273.15
    flow = np.array([0.002, 0.02])
    p = op.line_temperature_profile(**NPS8, inlet_temperature=tin, mass_flow=flow, length=2500.0, air_temperature=ta,
                                    specific_heat=cp, constant_coefficient=True, freezing_temperature=tf)
    x_f = flow * cp / _inlet_coefficient(tin, ta) * np.log((tin - ta) / (tf - ta))
    assert np.all(p.freezes) and np.all(x_f < 2500.0)
    np.testing.assert_allclose(p.freezing_position, x_f, rtol=1e-9)
    np.testing.assert_array_equal(p.outlet_temperature, tf)
    np.testing.assert_allclose(p.q_total, flow * cp * (tin - tf), rtol=1e-6)   # heat lost up to the freezing point
    # the profile stops at the freezing point: last point (x_f, Tf), nothing below it
    np.testing.assert_allclose(np.nanmax(p.position, axis=0), x_f, rtol=1e-9)
    assert np.nanmin(p.temperature) == tf and op.CAUTION_LINE_FREEZE in p.cautions


def test_freezing_position_of_issue_12_against_independent_reference_model():
    # issue 12: at -10 degC air the same line reported -1684 K. Reference: the brentq surface + ht Churchill-Chu +
    # CoolProp model above, marched with solve_ivp (rtol 1e-10) to the event T = 273.15 K (water cp taken at
    # 273.16 K, the triple point, below it). Tolerance 2e-4 as for the outlet (property tables).
    d, t_ins, k_ins, ta, eps, flow, tin = 0.2191, 0.08, 0.03, 263.15, 0.9, 0.002, 368.15

    def rhs(x, y):
        cp = PropsSI("C", "T", max(y[0], 273.16), "P", 101325.0, "Water")
        return [-_reference_loss(y[0], d, t_ins, k_ins, ta, eps) / (flow * cp)]

    def frozen(x, y):
        return y[0] - 273.15
    frozen.terminal = True

    ref = solve_ivp(rhs, (0.0, 2500.0), [tin], rtol=1e-10, atol=1e-8, events=frozen)
    x_ref = float(ref.t_events[0][0])
    p = op.line_temperature_profile(d, tin, [Layer(t_ins, k_ins)], mass_flow=flow, length=2500.0, air_temperature=ta,
                                    jacket_emissivity=eps)
    assert bool(p.freezes) and float(p.outlet_temperature) == 273.15
    assert float(p.freezing_position) == pytest.approx(x_ref, rel=2e-4)
    assert np.nanmin(p.temperature) >= 273.15 and np.all(np.isfinite(p.q_total))
    # heat lost up to the freezing point: the march's integral of q' agrees with m (h(Tin) - h(0 degC))
    assert abs(float(p.energy_balance_error)) < 1e-5


def test_outdoor_trickle_settles_at_the_sky_equilibrium_not_below():
    # a line that also radiates to a sky colder than the air settles where q'(T) = 0, below the air temperature;
    # the fluid approaches that equilibrium and never passes it (same analytic argument as for the air)
    kw = dict(air_temperature=283.15, sky_view_fraction=0.5)
    p = op.line_temperature_profile(**NPS8, inlet_temperature=368.15, mass_flow=0.002, length=2500.0, **kw)
    t_eq = float(p.equilibrium_temperature)
    assert t_eq < 283.15 - 1.0
    q_eq = cl.insulated_pipe(NPS8["pipe_outer_diameter"], t_eq, NPS8["layers"], **kw).q_per_length
    assert abs(float(q_eq)) < 1e-5   # W/m: the definition of the equilibrium
    assert np.all(p.temperature >= t_eq) and float(p.outlet_temperature) == pytest.approx(t_eq, abs=1e-6)


def test_minimum_flow_is_the_exponential_one():
    # constant U' and cp: T_out = T_lim at m = U' L / (cp ln((Tin - Ta)/(T_lim - Ta))) (eq. 8.45b solved for m);
    # a hot line kept above its limit and a chilled line (6 degC in 30 degC air) kept below 8 degC
    tin, limit, ta = np.array([368.15, 279.15]), np.array([278.15, 281.15]), np.array([263.15, 303.15])
    cp, run = 4190.0, 2500.0
    m = op.minimum_flow(**NPS8, inlet_temperature=tin, outlet_limit=limit, length=run, air_temperature=ta,
                        specific_heat=cp, constant_coefficient=True)
    exact = _inlet_coefficient(tin, ta) * run / (cp * np.log((tin - ta) / (limit - ta)))
    # 1e-7: U' here is from insulated_pipe's default surface tolerance, the library's from a 1e-8 K solve
    np.testing.assert_allclose(m.mass_flow, exact, rtol=1e-7)
    assert not np.any(m.any_flow)


def test_minimum_flow_against_independent_reference_model():
    # the outlet of the reference model (brentq surface + ht Churchill-Chu + CoolProp, solve_ivp) at the minimum
    # flow is the limit, to the 2e-4 of the property tables on the temperature drop
    d, t_ins, k_ins, ta, eps, tin, limit = 0.2191, 0.08, 0.03, 263.15, 0.9, 368.15, 278.15
    m = float(op.minimum_flow(d, tin, [Layer(t_ins, k_ins)], outlet_limit=limit, length=2500.0, air_temperature=ta,
                              jacket_emissivity=eps).mass_flow)

    def rhs(x, y):
        return [-_reference_loss(y[0], d, t_ins, k_ins, ta, eps) / (m * PropsSI("C", "T", y[0], "P", 101325.0,
                                                                                  "Water"))]

    t_out = solve_ivp(rhs, (0.0, 2500.0), [tin], rtol=1e-10, atol=1e-8).y[0, -1]
    assert tin - t_out == pytest.approx(tin - limit, rel=2e-4)
    # and the library's own march at that flow lands on the limit (two different algorithms)
    p = op.line_temperature_profile(d, tin, [Layer(t_ins, k_ins)], mass_flow=m, length=2500.0, air_temperature=ta,
                                    jacket_emissivity=eps)
    assert float(p.outlet_temperature) == pytest.approx(limit, abs=1e-4) and not bool(p.freezes)


def test_minimum_flow_any_flow_and_refusals():
    # the line settles at the air (10 degC): an outlet kept above 5 degC holds at any flow (0 returned, flagged)
    m = op.minimum_flow(**NPS8, inlet_temperature=368.15, outlet_limit=278.15, length=2500.0, air_temperature=283.15)
    assert float(m.mass_flow) == 0.0 and bool(m.any_flow) and m.notes
    with pytest.raises(ValueError, match="outlet_limit"):   # no flow keeps the outlet above its inlet
        op.minimum_flow(**NPS8, inlet_temperature=368.15, outlet_limit=370.0, length=100.0, air_temperature=263.15)
    with pytest.raises(ValueError, match="outlet_limit"):   # water below 0 degC has frozen
        op.minimum_flow(**NPS8, inlet_temperature=368.15, outlet_limit=272.0, length=100.0, air_temperature=263.15)


def test_random_lines_from_trickle_to_full_flow_stay_between_inlet_and_equilibrium():
    # analytic bounds of m cp dT/dx = -q'(T) with q' increasing in T and zero at T_eq: T moves monotonically from
    # T_in towards T_eq and never passes it; where it reaches 0 degC first the water freezes there. 40 random lines
    # at once (fixed seed): flows 1e-4 to 10 kg/s, 10 m to 5 km, air -30 to 40 degC, inlet 5 to 95 degC, some outdoors.
    rng = np.random.default_rng(12)
    n = 40
    tin, ta = 278.15 + 90.0 * rng.random(n), 243.15 + 70.0 * rng.random(n)
    flow, run = 10.0 ** rng.uniform(-4, 1, n), 10.0 ** rng.uniform(1, np.log10(5000.0), n)
    sky = np.where(rng.random(n) < 0.3, 0.5, 0.0)
    p = op.line_temperature_profile(0.1143, tin, [Layer(0.05, 0.04)], mass_flow=flow, length=run, air_temperature=ta,
                                    sky_view_fraction=sky)
    t_eq, t = p.equilibrium_temperature, p.temperature
    low, high = np.minimum(tin, t_eq), np.maximum(tin, t_eq)
    finite = ~np.isnan(t)
    assert np.all((t >= low - 1e-9) | ~finite) and np.all((t <= high + 1e-9) | ~finite)
    step = np.diff(np.where(finite, t, np.nan), axis=0) * np.sign(t_eq - tin)
    assert np.all((step >= -1e-9) | np.isnan(step))                     # monotone towards the equilibrium
    # freezing exactly where the water, cooling towards an equilibrium below 0 degC, gets to 0 degC within the line
    assert np.all(p.freezes <= (t_eq < 273.15)) and np.all(p.outlet_temperature[p.freezes] == 273.15)
    assert np.all(p.freezing_position[p.freezes] <= run[p.freezes])
    assert np.all(p.outlet_temperature[~p.freezes] >= 273.15 - 1e-9)
    assert p.freezes.any() and (~p.freezes).any() and np.nanmax(np.abs(p.energy_balance_error)) < 1e-5


def test_random_minimum_flows_put_the_outlet_on_the_limit():
    # the quadrature of minimum_flow and the march of line_temperature_profile are two algorithms for one energy
    # balance: at the minimum flow the march's outlet is the limit (to the marching tolerance, 1e-6 K per step)
    rng = np.random.default_rng(7)
    n = 30
    tin, ta = 278.15 + 90.0 * rng.random(n), 243.15 + 70.0 * rng.random(n)
    run = 10.0 ** rng.uniform(1, np.log10(5000.0), n)
    floor = np.maximum(ta, 273.15)   # a hot line kept above 0 degC and the air; a cold one below the air
    limit = np.where(tin > ta, floor + (tin - floor) * rng.uniform(0.05, 0.95, n),
                     tin + (ta - tin) * rng.uniform(0.05, 0.95, n))
    kw = dict(length=run, air_temperature=ta, wind_speed=3.0)
    m = op.minimum_flow(0.1143, tin, [Layer(0.05, 0.04)], outlet_limit=limit, **kw)
    assert not m.any_flow.any() and np.all(m.mass_flow > 0)
    p = op.line_temperature_profile(0.1143, tin, [Layer(0.05, 0.04)], mass_flow=m.mass_flow, **kw)
    np.testing.assert_allclose(p.outlet_temperature, limit, atol=5e-5)   # 6e-6 K seen with this seed


# --------------------------------------------------------------------------- steam
def test_condensate_rate_from_steam_tables():
    # IAPWS-IF97 steam tables (e.g. Cengel, Table A-5, from memory): h_fg = 2256.5 kJ/kg at 101.325 kPa,
    # 2014.6 kJ/kg and Tsat = 179.88 C at 1000 kPa; 1 kW lost condenses 3600 kJ/h / h_fg.
    np.testing.assert_allclose(3600.0 * op.condensate_rate([1000.0, 1000.0], [101325.0, 1.0e6]),  # kg/s -> kg/h
                               [3600.0 / 2256.5, 3600.0 / 2014.6], rtol=2e-4)
    s = op.steam_line(0.1143, 1.0e6, air_temperature=273.15)
    assert float(s.saturation_temperature) == pytest.approx(179.88 + 273.15, abs=0.02)
    assert float(op.condensate_rate(-50.0, 1.0e6)) == 0.0  # a net gain condenses nothing


def test_steam_line_is_the_pipe_at_saturation():
    # the loss of insulated_pipe at Tsat from CoolProp (called directly), and condensate = loss / h_fg
    p = 1.0e6
    t_sat = PropsSI("T", "P", p, "Q", 0, "Water")
    h_fg = PropsSI("H", "P", p, "Q", 1, "Water") - PropsSI("H", "P", p, "Q", 0, "Water")
    s = op.steam_line(0.1143, p, [Layer(0.08, 0.045)], air_temperature=273.15, length=250.0, jacket_emissivity=0.1)
    q = cl.insulated_pipe(0.1143, t_sat, [Layer(0.08, 0.045)], air_temperature=273.15, jacket_emissivity=0.1)
    assert float(s.saturation_temperature) == pytest.approx(t_sat, abs=1e-6)
    assert float(s.q_total) == pytest.approx(250.0 * float(q.q_per_length), rel=1e-6)
    assert float(s.condensate_rate) == pytest.approx(float(s.q_total) / h_fg, rel=1e-9)  # kg/s
    assert s.cautions


# --------------------------------------------------------------------------- tracing
def test_tracing_duty_is_loss_at_maintain_temperature_times_margin():
    # definition: duty = q'(maintain) x (1 + margin) at the minimum ambient and maximum wind
    maintain, ta, wind = np.array([278.15, 313.15, 338.15]), 243.15, 12.0
    layers = [Layer(0.04, 0.04), Layer(0.0007, 200.0, name="jacket")]
    q = cl.insulated_pipe(0.1143, maintain, layers, air_temperature=ta, wind_speed=wind,
                          jacket_emissivity=0.2).q_per_length
    d = op.tracing_duty(0.1143, maintain, layers, air_temperature=ta, wind_speed=wind, jacket_emissivity=0.2,
                        length=120.0)
    np.testing.assert_allclose(d.duty_per_length, 1.2 * q, rtol=1e-9)  # default margin 20 %
    np.testing.assert_allclose(d.duty_total, 120.0 * 1.2 * q, rtol=1e-9)
    d10 = op.tracing_duty(0.1143, maintain, layers, air_temperature=ta, wind_speed=wind, jacket_emissivity=0.2,
                          margin=0.1)
    np.testing.assert_allclose(d10.duty_per_length, 1.1 * q, rtol=1e-9)
    assert 0.10 <= op.TRACING_MARGIN <= 0.25  # IEEE 515 / IEC/IEEE 60079-30-2 range (from memory)


def test_tracing_duty_grows_with_wind_and_is_zero_above_ambient():
    # physics: wind raises the outer coefficient, so the duty; a line kept below the air needs none
    d = op.tracing_duty(0.0603, 278.15, [Layer(0.025, 0.04)], air_temperature=[253.15, 253.15, 288.15],
                        wind_speed=[0.0, 15.0, 0.0])
    assert d.duty_per_length[1] > d.duty_per_length[0] > 0
    assert d.duty_per_length[2] == 0.0 and d.notes


# --------------------------------------------------------------------------- freeze
def test_latent_heat_of_fusion_is_the_iapws_value():
    assert op.LATENT_HEAT_OF_FUSION == pytest.approx(L_FUSION, abs=10.0)  # 333.42 kJ/kg, rounded to 10 J/kg
    assert L_FUSION == pytest.approx(L_FUSION_CRC, rel=5e-4)              # the handbook's rounded value


def _hand_freeze(u, water_mass, capacity, t0, tf, ta, latent):
    """Constant U' [W/m/K] and heat capacity [J/m/K]: sensible and latent times [h] (analytic solution)."""
    sensible = capacity / u * math.log((t0 - ta) / (tf - ta))
    solid = water_mass * latent / (u * (tf - ta))
    return sensible / 3600, solid / 3600


@pytest.mark.parametrize("wind", [0.0, 8.0])
def test_freeze_time_constant_coefficient_matches_hand_calculation(wind):
    # t1 = C'/U' ln((T0 - Ta)/(Tf - Ta)), t2 = m_w L / (U'(Tf - Ta)): exact for constant U' and heat capacity
    d, wall, t0, ta, cw = 0.0603, 0.00391, 288.15, 253.15, 4200.0
    layers = [Layer(0.025, 0.04)]
    f = op.freeze_time(d, wall, t0, layers, air_temperature=ta, wind_speed=wind, water_specific_heat=cw,
                       constant_coefficient=True, latent_heat=L_FUSION)  # the default: test above
    u = float(cl.insulated_pipe(d, t0, layers, air_temperature=ta, wind_speed=wind).q_per_length) / (t0 - ta)
    bore = d - 2 * wall
    water = PropsSI("D", "T", t0, "P", 101325.0, "Water") * math.pi * bore ** 2 / 4
    steel = 7800.0 * 450.0 * math.pi * (d ** 2 - bore ** 2) / 4  # steel, DIN EN 12524 (test below)
    sensible, solid = _hand_freeze(u, water, water * cw + steel, t0, 273.15, ta, L_FUSION)
    assert float((f.time_to_freezing_point / 3600)) == pytest.approx(sensible, rel=1e-6)
    assert float((f.time_to_freeze_solid / 3600)) == pytest.approx(solid, rel=1e-6)
    assert float((f.time_total / 3600)) == pytest.approx(sensible + solid, rel=1e-6)
    # cooling curve: T(t) = Ta + (T0 - Ta) exp(-U' t / C') (analytic), last point frozen solid at 0 C
    t = f.curve_time[:-1]
    np.testing.assert_allclose(f.curve_temperature[:-1] - ta, (t0 - ta) * np.exp(-u * t / (water * cw + steel)),
                               rtol=1e-6)
    assert f.curve_temperature[-1] == 273.15 and f.curve_time[-1] / 3600 == pytest.approx(sensible + solid, rel=1e-6)
    assert any("no substitute for draining or heat tracing" in c for c in f.cautions)


def test_freeze_time_lies_between_constant_coefficient_bounds():
    # U'(T) = q'/(T - Ta) falls as the line cools (weaker natural convection and radiation), so the sensible time
    # lies between the analytic times with U' at the initial and at the freezing temperature; the latent time is
    # m_w L / q'(Tf) with q' from insulated_pipe
    d, wall, t0, ta, cw = 0.1143, 0.00602, 343.15, 248.15, 4200.0
    layers = [Layer(0.01, 0.04)]
    f = op.freeze_time(d, wall, t0, layers, air_temperature=ta, water_specific_heat=cw)
    q = cl.insulated_pipe(d, [t0, 273.15], layers, air_temperature=ta).q_per_length
    u0, uf = q[0] / (t0 - ta), q[1] / (273.15 - ta)
    assert u0 > uf * 1.02
    bore = d - 2 * wall
    water = PropsSI("D", "T", t0, "P", 101325.0, "Water") * math.pi * bore ** 2 / 4  # IAPWS-95 via CoolProp
    capacity = water * cw + 7800.0 * 450.0 * math.pi * (d ** 2 - bore ** 2) / 4  # steel, DIN EN 12524
    assert float(f.heat_capacity_per_length) == pytest.approx(capacity, rel=5e-4)  # density from the 1 K table
    fast, _ = _hand_freeze(u0, 1.0, capacity, t0, 273.15, ta, 0.0)
    slow, _ = _hand_freeze(uf, 1.0, capacity, t0, 273.15, ta, 0.0)
    assert fast < float((f.time_to_freezing_point / 3600)) < slow
    assert float(f.water_mass_per_length) == pytest.approx(water, rel=5e-4)
    assert float((f.time_to_freeze_solid / 3600)) == pytest.approx(water * L_FUSION / q[1] / 3600, rel=5e-4)
    assert np.all(np.diff(f.curve_time) > 0) and np.all(np.diff(f.curve_temperature) <= 0)


def test_freeze_time_never_when_the_line_stays_above_freezing_and_vectorized():
    f = op.freeze_time(0.0603, 0.00391, [283.15, 283.15, 273.15], [Layer(0.025, 0.04)],
                       air_temperature=[258.15, 278.15, 258.15])
    assert np.isinf((f.time_total[1] / 3600)) and f.never_freezes.tolist() == [False, True, False]
    assert (f.time_to_freezing_point[2] / 3600) == 0.0 and (f.time_to_freeze_solid[2] / 3600) > 0  # starts at 0 C
    alone = op.freeze_time(0.0603, 0.00391, 283.15, [Layer(0.025, 0.04)], air_temperature=258.15)
    assert float((f.time_total[0] / 3600)) == pytest.approx(float(alone.time_total / 3600), rel=1e-6)
    assert f.notes


# --------------------------------------------------------------------------- input checks
@pytest.mark.parametrize("call,field", [
    (lambda: op.line_temperature_profile(0.06, 350.0, mass_flow=0.0, length=10.0, air_temperature=280.0),
     "mass_flow"),
    (lambda: op.line_temperature_profile(0.06, 350.0, mass_flow=1.0, length=-1.0, air_temperature=280.0), "length"),
    (lambda: op.line_temperature_profile(0.06, 350.0, mass_flow=1.0, length=10.0, air_temperature=280.0,
                                         max_step=2.0), "max_step"),
    (lambda: op.line_temperature_profile(0.06, 350.0, mass_flow=1.0, length=10.0, air_temperature=280.0,
                                         specific_heat=-4.0), "specific_heat"),
    (lambda: op.line_temperature_profile(0.06, 350.0, mass_flow=1.0, length=10.0, air_temperature=280.0,
                                         fluid="Unobtainium"), "fluid"),
    (lambda: op.line_temperature_profile(0.06, 350.0, mass_flow=1.0, length=10.0, air_temperature=280.0,
                                         fluid_pressure=0.0), "fluid_pressure"),
    (lambda: op.line_temperature_profile(0.06, 300.0, mass_flow=0.01, length=2000.0, air_temperature=250.0,
                                         constant_coefficient=True, freezing_temperature=None),
     "fluid_pressure leaves its single-phase range"),  # the water would freeze before the outlet, check off
    (lambda: op.line_temperature_profile(0.06, 423.15, mass_flow=1.0, length=10.0, air_temperature=280.0),
     "fluid_pressure"),  # water at 150 C is steam at the default 1 atm: pressurized hot water needs its pressure
    (lambda: op.line_temperature_profile(0.06, 350.0, mass_flow=1.0, length=10.0, air_temperature=280.0,
                                         fluid_phase="gas"), "fluid_phase"),  # water at 77 C and 1 atm is liquid
    (lambda: op.condensate_rate(1000.0, 3.0e7), "steam_pressure"),
    (lambda: op.tracing_duty(0.06, 278.0, air_temperature=250.0, margin=-0.1), "margin"),
    (lambda: op.tracing_duty(0.06, -5.0, air_temperature=250.0), "maintain_temperature"),
    (lambda: op.freeze_time(0.06, 0.004, 270.0, air_temperature=250.0), "initial_temperature"),
    (lambda: op.freeze_time(0.06, 0.03, 280.0, air_temperature=250.0), "pipe_wall_thickness"),
    (lambda: op.freeze_time(0.06, 0.004, 280.0, air_temperature=250.0, pipe_density=0.0), "pipe_density"),
])
def test_bad_inputs_name_the_field(call, field):
    with pytest.raises(ValueError, match=field):
        call()


def test_steel_wall_defaults_are_the_standard_design_values():
    # DIN EN 12524:2000 / EN ISO 10456 design values for steel, as tabulated in the `ht` package (ASHRAE/DIN
    # building materials): 7800 kg/m3, 450 J/kg/K
    from ht.insulation import Cp_material, rho_material
    assert op.CARBON_STEEL_DENSITY == rho_material("Metals, steel") == 7800.0
    assert op.CARBON_STEEL_SPECIFIC_HEAT == Cp_material("Metals, steel") == 450.0
