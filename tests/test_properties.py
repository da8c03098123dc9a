"""Tests of convlib.properties.

Reference values come from outside convlib: CoolProp called directly
(Bell et al. (2014), Ind. Eng. Chem. Res. 53:2498, doi:10.1021/ie4033999),
handbook tables, physical laws, and the Magnus formulas of Alduchov &
Eskridge (1996), doi:10.1175/1520-0450(1996)035<0601:IMFAOS>2.0.CO;2.
"""
import numpy as np
import pytest
from CoolProp import CoolProp as CP

from convlib.properties import FluidProperties, PropertyTable, air, dew_point, fluid_properties

NAMES = ("rho", "mu", "nu", "k", "cp", "pr", "alpha", "beta")
TABLE_TOLERANCE = 5e-4  # design requirement: interpolation error < 0.05 % for every property
PRESSURES = [101325.0, 79500.0, 200000.0]  # sea level, about 2000 m altitude, a pressurised space


def max_relative_difference(a: FluidProperties, b: FluidProperties) -> dict:
    return {name: float(np.max(np.abs(getattr(a, name) / getattr(b, name) - 1))) for name in NAMES}


def off_node_temperatures(pressure: float) -> np.ndarray:
    """Midpoints between table nodes (worst case for linear interpolation) plus random points."""
    grid = PropertyTable.get("Air", pressure).temperature
    middle = 0.5 * (grid[:-1] + grid[1:])
    middle = middle[(middle >= 200.0) & (middle <= 1000.0)]
    random = np.random.default_rng(1).uniform(200.0, 1000.0, 2000)
    return np.concatenate([middle, random])


# --- table against exact CoolProp -------------------------------------------------------------

@pytest.mark.parametrize("beta", [None, "coolprop"])
@pytest.mark.parametrize("pressure", PRESSURES)
def test_table_matches_exact_coolprop(pressure, beta):
    T = off_node_temperatures(pressure)
    fast = air(T, pressure, beta=beta)
    exact = air(T, pressure, exact=True, beta=beta)
    errors = max_relative_difference(fast, exact)
    assert all(e < TABLE_TOLERANCE for e in errors.values()), errors


@pytest.mark.parametrize("p_low, p_high, T_low", [(60e3, 110e3, 200.0), (20e3, 1e6, 150.0)])
def test_many_pressures_node_interpolation_matches_exact(p_low, p_high, T_low):
    rng = np.random.default_rng(7)
    T = rng.uniform(T_low, 1000.0, 5000)
    pressure = rng.uniform(p_low, p_high, T.size)  # > 8 distinct values: pressure-node path
    for beta in (None, "coolprop"):
        errors = max_relative_difference(air(T, pressure, beta=beta),
                                         air(T, pressure, exact=True, beta=beta))
        assert all(e < TABLE_TOLERANCE for e in errors.values()), errors


def test_exact_mode_is_coolprop_propssi():
    # CoolProp PropsSI, called directly (Bell et al. 2014)
    T = np.array([250.0, 300.0, 600.0])
    p = fluid_properties("Nitrogen", T, 90000.0, exact=True, beta="coolprop")
    for field, key in [("rho", "D"), ("mu", "V"), ("k", "L"), ("cp", "C"),
                       ("beta", "isobaric_expansion_coefficient")]:
        expected = [CP.PropsSI(key, "T", t, "P", 90000.0, "Nitrogen") for t in T]
        np.testing.assert_allclose(getattr(p, field), expected, rtol=1e-12)
    # derived groups against CoolProp's own Prandtl number and its primary outputs
    prandtl = [CP.PropsSI("Prandtl", "T", t, "P", 90000.0, "Nitrogen") for t in T]
    np.testing.assert_allclose(p.pr, prandtl, rtol=1e-10)
    for t, nu, alpha in zip(T, p.nu, p.alpha):
        rho, mu, k, cp = (CP.PropsSI(key, "T", t, "P", 90000.0, "Nitrogen") for key in "DVLC")
        assert nu == pytest.approx(mu / rho, rel=1e-12)
        assert alpha == pytest.approx(k / (rho * cp), rel=1e-12)


def test_table_nodes_and_range_come_from_coolprop():
    table = PropertyTable.get("Air", 101325.0)
    assert table.phase == "gas"
    assert np.all(np.diff(table.temperature) <= 1.0)
    # range: 0.5 K above CoolProp's dew temperature of air at 1 atm, up to CoolProp's Tmax
    dew = CP.PropsSI("T", "P", 101325.0, "Q", 1, "Air")
    assert table.T_low == pytest.approx(dew + 0.5, abs=1e-5)
    assert table.T_high == pytest.approx(CP.PropsSI("Tmax", "Air"))
    i = 500
    T = table.temperature[i]
    for column, key in enumerate("DVLC"):
        expected = CP.PropsSI(key, "T", T, "P", 101325.0, "Air")
        assert table.values[i, column] == pytest.approx(expected, rel=1e-12)


# --- published values and physical laws -------------------------------------------------------

def test_air_300K_against_incropera_table_a4():
    # Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., Table A.4, air at
    # 300 K and 1 atm -- from memory. Tolerance 1.5 %: the table predates the Lemmon et al.
    # (2000) / Lemmon & Jacobsen (2004) formulations used by CoolProp; its density 1.1614 is
    # 1.3 % below the ideal-gas value p M / (R T) = 1.177 kg/m3, so rho, nu and alpha differ by
    # about 1 %, mu and k by < 0.5 %.
    p = air(300.0)
    table = {"rho": 1.1614, "cp": 1007.0, "mu": 184.6e-7, "nu": 15.89e-6, "k": 26.3e-3,
             "pr": 0.707, "alpha": 22.5e-6}
    for name, value in table.items():
        assert float(getattr(p, name)) == pytest.approx(value, rel=0.015), name


def test_air_density_is_ideal_gas_at_ambient_conditions():
    # Ideal-gas law with R = 8.314462618 J/mol/K (CODATA 2018) and the molar mass of air
    # 28.9586 g/mol (Lemmon et al. (2000), J. Phys. Chem. Ref. Data 29:331). Tolerance 0.2 %:
    # the second virial coefficient of air, about -20 cm3/mol at 250 K (from memory), makes
    # the compressibility factor differ from 1 by about 0.1 % at 250 K and 1 atm.
    T = np.array([250.0, 300.0, 400.0])
    pressure = np.array([[101325.0], [79500.0]])
    expected = pressure * 28.9586e-3 / (8.314462618 * T)
    np.testing.assert_allclose(air(T, pressure).rho, expected, rtol=2e-3)


def test_altitude_raises_kinematic_viscosity_by_pressure_ratio():
    # At 2000 m (about 79.5 kPa) rho falls in proportion to p (ideal gas) while mu and k of a
    # dilute gas do not depend on pressure (kinetic theory), so nu and alpha rise by
    # 101325 / 79500 = 1.2745 (+27 %), to within 0.1 %.
    T = np.array([280.0, 320.0, 400.0])
    sea, high = air(T, 101325.0), air(T, 79500.0)
    ratio = 101325.0 / 79500.0
    np.testing.assert_allclose(high.nu / sea.nu, ratio, rtol=1e-3)
    np.testing.assert_allclose(high.alpha / sea.alpha, ratio, rtol=1e-3)
    np.testing.assert_allclose(high.rho / sea.rho, 1 / ratio, rtol=1e-3)


def test_default_beta_of_gas_is_ideal_gas():
    T = np.array([250.0, 500.0, 900.0])
    np.testing.assert_allclose(air(T).beta, 1.0 / T, rtol=1e-15)  # definition: beta = 1/T
    # the equation-of-state value is within 0.5 % of 1/T for air at 1 atm, 250-900 K
    np.testing.assert_allclose(air(T, beta="coolprop").beta, 1.0 / T, rtol=5e-3)


def test_liquid_water_350K():
    p = fluid_properties("Water", 350.0)
    # CoolProp isobaric expansion coefficient, called directly (Bell et al. 2014)
    beta = CP.PropsSI("isobaric_expansion_coefficient", "T", 350.0, "P", 101325.0, "Water")
    assert float(p.beta) == pytest.approx(beta, rel=TABLE_TOLERANCE)
    exact = fluid_properties("Water", 350.0, exact=True)
    assert float(exact.beta) == pytest.approx(beta, rel=1e-12)
    # Incropera et al., 6th ed., Table A.6, saturated water at 350 K -- from memory:
    # v_f = 1.027e-3 m3/kg, beta = 624.2e-6 1/K. 0.5 %: compressed vs saturated liquid.
    assert float(p.rho) == pytest.approx(1 / 1.027e-3, rel=5e-3)
    assert float(p.beta) == pytest.approx(624.2e-6, rel=5e-3)


def test_liquid_water_table_matches_exact():
    T = np.random.default_rng(3).uniform(274.0, 372.0, 2000)
    fast, exact = fluid_properties("Water", T), fluid_properties("Water", T, exact=True)
    errors = max_relative_difference(fast, exact)
    # beta of water crosses zero at 277 K (density maximum), so its relative error there is
    # meaningless: compare it to 0.05 % of the largest |beta| over the range instead
    errors.pop("beta")
    assert all(e < TABLE_TOLERANCE for e in errors.values()), errors
    scale = np.max(np.abs(exact.beta))
    np.testing.assert_allclose(fast.beta, exact.beta, rtol=0, atol=TABLE_TOLERANCE * scale)


def test_steam_uses_gas_table():
    # superheated steam at 400 K, 1 atm: CoolProp PropsSI called directly
    p = fluid_properties("Water", 400.0, beta="coolprop")
    expected = CP.PropsSI("D", "T", 400.0, "P", 101325.0, "Water")
    assert float(p.rho) == pytest.approx(expected, rel=5e-4)
    assert float(p.rho) < 1.0  # a vapour, not the liquid (958 kg/m3)


def test_co2_alias_and_below_triple_point_pressure():
    # CO2 at 1 atm has no liquid (triple point 5.18 bar): the gas table starts at CoolProp Tmin
    p = fluid_properties("CO2", 300.0)
    expected = CP.PropsSI("D", "T", 300.0, "P", 101325.0, "CO2")
    assert float(p.rho) == pytest.approx(expected, rel=5e-4)
    assert PropertyTable.get("CO2", 101325.0) is PropertyTable.get("CarbonDioxide", 101325.0)


# --- errors ------------------------------------------------------------------------------------

def test_straddling_saturation_raises():
    with pytest.raises(ValueError, match=r"straddle the boiling point of Water at 101325 Pa, "
                                         r"373\.12 K \(99\.97 °C\)"):
        fluid_properties("Water", [300.0, 400.0])


def test_straddling_saturation_many_pressures_raises():
    pressure = np.linspace(90e3, 110e3, 20)  # > 8 distinct values: pressure-node path
    with pytest.raises(ValueError, match="straddle the boiling point"):
        fluid_properties("Water", np.tile([360.0, 385.0], 10), pressure)


def test_out_of_range_temperature_names_range():
    message = r"between 82\.22 and 2000 K for Air .* at 101325 Pa; got 2500 K"
    with pytest.raises(ValueError, match=message):
        air(2500.0)
    with pytest.raises(ValueError, match=r"between 273\.16 and 372\.62\d* K for Water \(liquid\)"):
        fluid_properties("Water", 273.0)
    with pytest.raises(ValueError, match=r"temperature must be between .* K for Air"):
        air(np.linspace(300.0, 2100.0, 50), exact=True)


def test_unknown_fluid_lists_choices():
    with pytest.raises(ValueError, match=r"unknown fluid 'Unobtainium'.*Air.*Nitrogen.*Water"):
        fluid_properties("Unobtainium", 300.0)


@pytest.mark.parametrize("kwargs, field", [
    ({"T": 300.0, "pressure": -1.0}, "pressure"),
    ({"T": 300.0, "pressure": 0.0}, "pressure"),
    ({"T": -5.0}, "temperature"),
    ({"T": np.nan}, "temperature"),
    ({"T": [300.0, np.inf]}, "temperature"),
])
def test_bad_inputs_name_the_field(kwargs, field):
    with pytest.raises(ValueError, match=field):
        air(**kwargs)


def test_unknown_beta_lists_choices():
    with pytest.raises(ValueError, match="ideal_gas.*coolprop"):
        air(300.0, beta="boussinesq")


# --- input forms and shapes -------------------------------------------------------------------

def test_scalar_list_array_inputs_agree():
    values = [280.0, 350.0, 600.0]
    by_list = air(values)
    by_array = air(np.array(values))
    for i, v in enumerate(values):
        scalar = air(v)
        assert scalar.rho.shape == ()
        for name in NAMES:
            value = float(getattr(scalar, name))
            assert value == getattr(by_list, name)[i] == getattr(by_array, name)[i]


def test_output_shape_is_broadcast_shape():
    T = np.array([[280.0], [300.0], [350.0]])
    pressure = np.array([101325.0, 90000.0, 79500.0, 70000.0])
    p = air(T, pressure)
    for name in NAMES + ("T", "pressure"):
        assert getattr(p, name).shape == (3, 4), name
    # each column equals a call at that single pressure
    for j, pj in enumerate(pressure):
        np.testing.assert_allclose(p.nu[:, j], air(T[:, 0], pj).nu, rtol=1e-14)
    assert air(np.empty((0,))).rho.shape == (0,)


# --- dew point ---------------------------------------------------------------------------------

def magnus_dew_point(T_celsius, rh):
    """Dew/frost point [°C] from the Magnus formulas of Alduchov & Eskridge (1996).

    Water: e_w = 6.1094 exp(17.625 t / (243.04 + t)) hPa (their eq. 21);
    ice:   e_i = 6.1121 exp(22.587 t / (273.86 + t)) hPa (their eq. 23; constants from memory).
    Follows CoolProp's convention: RH with respect to ice below 0 °C, frost point below 0 °C.
    """
    t = np.asarray(T_celsius, dtype=float)
    e_w = 6.1094 * np.exp(17.625 * t / (243.04 + t))
    e_i = 6.1121 * np.exp(22.587 * t / (273.86 + t))
    e = rh * np.where(t >= 0, e_w, e_i)
    g_w, g_i = np.log(e / 6.1094), np.log(e / 6.1121)
    dew = 243.04 * g_w / (17.625 - g_w)
    frost = 273.86 * g_i / (22.587 - g_i)
    return np.where(dew >= 0, dew, frost)


def test_dew_point_above_freezing_against_magnus():
    T = np.array([5.0, 10.0, 20.0, 30.0, 40.0, 50.0])[:, None]
    rh = np.array([0.5, 0.7, 0.9, 1.0])
    result = dew_point(T + 273.15, rh) - 273.15
    assert result.shape == (6, 4)
    np.testing.assert_allclose(result, magnus_dew_point(T, rh), atol=0.2)


def test_dew_point_below_freezing_is_frost_point():
    T = np.array([-40.0, -30.0, -20.0, -10.0, -1.0, 5.0, 20.0])[:, None]
    rh = np.array([0.2, 0.5, 0.8])
    result = dew_point(T + 273.15, rh) - 273.15
    assert np.any(result < 0)
    np.testing.assert_allclose(result, magnus_dew_point(T, rh), atol=0.2)


def test_dew_point_relative_humidity_is_over_ice_below_freezing():
    # -10 °C, RH 50 %: over ice (CoolProp) -17.6 °C; if RH were over water (WMO) -16.5 °C
    result = float(dew_point(263.15, 0.5)) - 273.15
    assert result == pytest.approx(float(magnus_dew_point(-10.0, 0.5)), abs=0.2)
    e_water = 0.5 * 6.1094 * np.exp(17.625 * -10.0 / (243.04 - 10.0))
    g = np.log(e_water / 6.1121)
    assert abs(result - 273.86 * g / (22.587 - g)) > 0.5


def test_dew_point_inputs_and_errors():
    assert dew_point(293.15, 0.6).shape == ()
    pressure = np.array([101325.0, 79500.0])
    result = dew_point([293.15, 293.15, 293.15], 0.6, pressure[:, None])
    assert result.shape == (2, 3)
    # Magnus ignores pressure; CoolProp's enhancement factor moves it by < 0.1 K
    np.testing.assert_allclose(result - 273.15, magnus_dew_point(20.0, 0.6), atol=0.2)
    np.testing.assert_array_equal(result[:, 0], result[:, 2])
    with pytest.raises(ValueError, match="relative_humidity"):
        dew_point(293.15, 0.0)
    with pytest.raises(ValueError, match="relative_humidity"):
        dew_point(293.15, 1.2)
    with pytest.raises(ValueError, match="air_temperature"):
        dew_point(-1.0, 0.5)
    with pytest.raises(ValueError, match="pressure"):
        dew_point(293.15, 0.5, pressure=-5.0)
    with pytest.raises(ValueError, match="HAPropsSI"):
        dew_point(400.0, 0.5)
