"""Cool-down of a stopped line and warm-up condensate of a steam line (convlib.transients)."""
import numpy as np
import pytest
from CoolProp.CoolProp import PropsSI

import convlib as cl
from convlib.errors import InputError
from convlib.pipe import Layer
from convlib.transients import cool_down_time, warm_up_condensate

D, WALL = 0.1143, 0.00602          # NPS 4 schedule 40, ASME B36.10M-2018 Table 1
K, T_INS, H = 0.04, 0.05, 8.0


def _closed_form(t0, t1, ta, c_fluid=4200.0, rho_wall=7800.0, c_wall=450.0):
    """Lumped capacitance, Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., eq. 5.6:
    t = (C'/U') ln((T0 - Ta)/(T1 - Ta)); U' = 1/R', R' = ln(r2/r1)/(2 pi k) + 1/(2 pi r2 h) (eq. 3.28 and
    convection on the outside); water density at T0 from CoolProp (IAPWS-95) as a reference library."""
    bore = D - 2 * WALL
    rho = PropsSI("D", "T", t0, "P", 101325.0, "Water")
    capacity = rho * np.pi * bore ** 2 / 4 * c_fluid + rho_wall * np.pi * (D ** 2 - bore ** 2) / 4 * c_wall
    r2 = D / 2 + T_INS
    resistance = np.log(r2 / (D / 2)) / (2 * np.pi * K) + 1 / (2 * np.pi * r2 * H)
    return capacity * resistance * np.log((t0 - ta) / (t1 - ta))


@pytest.mark.parametrize("t0, t1, ta", [(363.15, 313.15, 283.15), (353.15, 284.15, 283.15), (278.15, 290.15, 298.15)])
def test_constant_coefficient_matches_lumped_capacitance(t0, t1, ta):
    r = cool_down_time(D, WALL, t0, t1, [Layer(T_INS, K)], air_temperature=ta, specific_heat=4200.0,
                       jacket_emissivity=0.0, convection_coefficient=H)
    assert float(r.time) == pytest.approx(_closed_form(t0, t1, ta), rel=1e-6)
    assert not bool(r.never_reaches)


def test_with_correlations_between_the_bounding_constant_coefficients():
    """q'/(T - Ta) rises with T in natural convection and radiation, so the time lies between the constant-U'
    times taken at the initial and at the final temperature (a property of the lumped equation)."""
    t0, t1, ta = 363.15, 303.15, 283.15
    r = cool_down_time(D, WALL, t0, t1, [Layer(T_INS, K)], air_temperature=ta, specific_heat=4200.0)
    c = float(r.heat_capacity_per_length)
    u0, u1 = float(r.q_initial) / (t0 - ta), float(r.q_final) / (t1 - ta)
    fast, slow = c / u0 * np.log((t0 - ta) / (t1 - ta)), c / u1 * np.log((t0 - ta) / (t1 - ta))
    assert fast < float(r.time) < slow


def test_arrays_broadcast_like_scalar_calls():
    t0 = np.array([343.15, 363.15, 383.15])
    r = cool_down_time(D, WALL, t0, 313.15, [Layer(T_INS, K)], air_temperature=283.15, fluid_pressure=3e5)
    for i, value in enumerate(t0):
        one = cool_down_time(D, WALL, value, 313.15, [Layer(T_INS, K)], air_temperature=283.15, fluid_pressure=3e5)
        assert float(r.time[i]) == pytest.approx(float(one.time), rel=1e-9)


def test_a_line_the_sun_holds_warm_never_reaches_the_final_temperature():
    r = cool_down_time(D, WALL, 330.0, 288.65, [], air_temperature=288.15, solar_irradiance=900.0,
                       sky_view_fraction=0.0, jacket_emissivity=0.9)
    assert bool(r.never_reaches) and np.isinf(r.time) and r.notes


def test_bad_temperatures_are_refused():
    with pytest.raises(InputError, match="same side"):
        cool_down_time(D, WALL, 350.0, 270.0, [Layer(T_INS, K)], air_temperature=283.15)
    with pytest.raises(InputError, match="air_temperature is required"):
        cool_down_time(D, WALL, 350.0, 300.0, [Layer(T_INS, K)])


def test_flags_of_every_solve_travel():
    r = cool_down_time(D, WALL, 363.15, 313.15, [Layer(T_INS, K)], air_temperature=283.15)
    first = cl.insulated_pipe(D, 363.15, [Layer(T_INS, K)], air_temperature=283.15)
    assert int(r.warnings) & int(first.warnings) == int(first.warnings)


def test_warm_up_condensate_by_hand():
    """Wall mass x c x (Tsat - T0) / h_fg. 10 bar abs: Tsat 179.88 degC, h_fg 2014.6 kJ/kg (IAPWS-IF97 steam
    tables, e.g. Rogers & Mayhew, Thermodynamic and Transport Properties of Fluids; from memory).
    NPS 6 schedule 40: 168.3 mm x 7.11 mm (ASME B36.10M-2018 Table 1)."""
    d, wall, length = 0.1683, 0.00711, 100.0
    w = warm_up_condensate(d, wall, 10e5, 283.15, 1800.0, [Layer(0.08, 0.045)], length=length,
                           air_temperature=283.15, pipe_density=7800.0, pipe_specific_heat=450.0)
    mass = 7800.0 * np.pi / 4 * (d ** 2 - (d - 2 * wall) ** 2) * length
    expected = mass * 450.0 * (179.88 - 10.0) / 2014.6e3
    assert float(w.saturation_temperature) - 273.15 == pytest.approx(179.88, abs=0.02)
    assert float(w.latent_heat) == pytest.approx(2014.6e3, rel=2e-3)
    assert float(w.warm_up_condensate) == pytest.approx(expected, rel=2e-3)
    assert float(w.mean_condensate_rate) == pytest.approx(expected / 1800.0 + 0.5 * float(w.running_condensate_rate), rel=2e-3)
    with pytest.raises(InputError, match="below the saturation"):
        warm_up_condensate(d, wall, 10e5, 460.0, 1800.0, air_temperature=283.15)


def test_cooldown_and_warmup_commands_match_the_python_calls(capsys):
    from cli_helpers import run_json

    out = run_json(capsys, "cooldown", "--nps", "4", "--layer", "50mm,0.04", "--air-temperature", "10degC",
                   "--initial-temperature", "90degC", "--final-temperature", "40degC")
    row = out["cool-down of a stopped line"]["results"][0]
    r = cool_down_time(D, WALL, 363.15, 313.15, [Layer(0.05, 0.04)], air_temperature=283.15)
    assert row["time"] == pytest.approx(float(r.time), rel=1e-9)
    assert out["cool-down of a stopped line"]["units"]["time"] == "s"          # SI in JSON
    out = run_json(capsys, "warmup", "--nps", "6", "--layer", "80mm,0.045", "--air-temperature", "10degC",
                   "--steam-pressure", "10bar", "--warm-up-time", "30min", "--length", "100m")
    row = out["warm-up of a steam line"]["results"][0]
    w = warm_up_condensate(0.1683, 0.00711, 10e5, 283.15, 1800.0, [Layer(0.08, 0.045)], length=100.0,
                           air_temperature=283.15)
    assert row["warm_up_condensate"] == pytest.approx(float(w.warm_up_condensate), rel=1e-9)
    assert row["mean_condensate_rate"] == pytest.approx(float(w.mean_condensate_rate), rel=1e-9)  # kg/s


def test_a_final_temperature_below_the_air_is_refused_on_the_command_line(capsys):
    from cli_helpers import run_error

    err = run_error(capsys, "cooldown", "--nps", "4", "--air-temperature", "10degC", "--initial-temperature",
                    "90degC", "--final-temperature", "5degC")
    assert "same side of the air" in err
