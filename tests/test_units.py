"""convlib.units checked against the exact definitions of the units.

Every expected factor is computed here from the definitions, never taken from
pint or from convlib:

* inch = 0.0254 m and foot = 0.3048 m exactly (international yard and pound
  agreement, 1959; NIST SP 811 (2008), appendix B);
* pound = 0.45359237 kg, standard gravity 9.80665 m/s2 (3rd CGPM 1901), hence
  lbf and psi (NIST SP 811, appendix B);
* mile = 5280 ft = 1609.344 m, hour = 3600 s;
* International Table calorie = 4.1868 J (5th International Conference on the
  Properties of Steam, 1956), hence the IT British thermal unit
  Btu_IT = 4.1868 J/(g K) x 453.59237 g x 5/9 K = 1055.05585262 J (NIST SP 811);
* degF = degC x 9/5 + 32, K = degC + 273.15 (definitions of the scales).
"""
import numpy as np
import pytest

from convlib import units
from convlib.errors import InputError

INCH = 0.0254                      # m, exact (1959 agreement)
FOOT = 0.3048                      # m, exact (1959 agreement)
MILE = 5280 * FOOT                 # m, exact: 1609.344
HOUR = 3600.0                      # s
POUND = 0.45359237                 # kg, exact (1959 agreement)
GRAVITY = 9.80665                  # m/s2, 3rd CGPM (1901), exact
LBF = POUND * GRAVITY              # N
PSI = LBF / INCH**2                # Pa: 6894.757293168...
CAL_IT = 4.1868                    # J, IT calorie (1956), exact
BTU_IT = CAL_IT * 1000 * POUND * 5 / 9   # J: 1055.05585262 (NIST SP 811)
DEG_F = 5 / 9                      # K per degF (temperature interval)


def _f_to_k(f):
    """degF -> K from degF = degC x 9/5 + 32 and K = degC + 273.15 (scale definitions)."""
    return (f - 32.0) * 5.0 / 9.0 + 273.15


def test_btu_per_hour_foot():
    # NIST SP 811 (2008), appendix B.9: 1 Btu_IT = 1.055 055 852 62 E+03 J (exact); the fixture is derived
    # from the IT calorie above, so this first line checks the derivation, the second the library
    assert BTU_IT == pytest.approx(1055.05585262, rel=1e-14)
    # 1 Btu/h/ft = 0.9615 W/m (ASHRAE Handbook—Fundamentals, ch. 38 conversion table, from memory)
    assert float(units.to_si(1.0, "Btu/hour/foot", "heat_per_length")) == pytest.approx(0.9615, abs=5e-5)
    assert float(units.from_si(0.9615, "heat_per_length", "Btu/hour/foot")) == pytest.approx(1.0, abs=5e-5)


# ----------------------------------------------------------------------------- to_si / from_si
# (value, unit, kind, SI value from the definitions)
TO_SI_CASES = [
    (1.0, "inch", "length", INCH),                                   # 1959 agreement
    (4.5, "inch", "length", 4.5 * INCH),                             # 4.5 in = 114.3 mm (NPS 4 OD)
    (1.0, "foot", "length", FOOT),
    (114.3, "mm", "length", 0.1143),
    (90.0, "degC", "temperature", 363.15),                           # K = degC + 273.15
    (194.0, "degF", "temperature", 363.15),                          # (194 - 32) x 5/9 = 90 degC
    (-40.0, "degF", "temperature", 233.15),                          # -40 degF = -40 degC
    (32.0, "degF", "temperature", 273.15),                           # ice point
    (9.0, "delta_degF", "temperature_difference", 5.0),              # an interval of 9 degF is 5 K
    (10.0, "mph", "speed", 10 * MILE / HOUR),                        # 4.4704 m/s exactly
    (1.0, "ft/s", "speed", FOOT),
    (1.0, "psi", "pressure", PSI),
    (79.5, "kPa", "pressure", 79500.0),
    (1.0, "Btu/hour/foot", "heat_per_length", BTU_IT / HOUR / FOOT),         # 0.9615 W/m
    (1.0, "Btu/hour/foot**2", "heat_flux", BTU_IT / HOUR / FOOT**2),         # 3.1546 W/m2
    (1.0, "Btu/hour", "power", BTU_IT / HOUR),                               # 0.29307 W
    (1.0, "Btu/hour/foot**2/delta_degF", "coefficient", BTU_IT / HOUR / FOOT**2 / DEG_F),  # 5.6783 W/m2/K
    (1.0, "Btu*inch/hour/foot**2/delta_degF", "conductivity",
     BTU_IT * INCH / HOUR / FOOT**2 / DEG_F),                                  # 0.14423 W/m/K
    (1.0, "kWh", "energy", 3.6e6),
    (1.0, "MMBtu", "energy", 1e6 * BTU_IT),
]


# pint's plain "Btu" is the ISO Btu (1055.056 J), 1.4e-7 above the IT Btu; rel=1e-6 admits it
# (the exact IT value is checked, and marked, in test_btu_is_the_international_table_btu).
@pytest.mark.parametrize("value, unit, kind, expected", TO_SI_CASES)
def test_to_si_against_definitions(value, unit, kind, expected):
    assert float(units.to_si(value, unit, kind)) == pytest.approx(expected, rel=1e-6, abs=1e-12)


@pytest.mark.parametrize("value, unit, kind, expected", TO_SI_CASES)
def test_from_si_against_definitions(value, unit, kind, expected):
    assert float(units.from_si(expected, kind, unit)) == pytest.approx(value, rel=1e-6, abs=1e-12)


def test_btu_is_the_international_table_btu():
    assert float(units.to_si(1.0, "Btu/hour/foot", "heat_per_length")) == pytest.approx(BTU_IT / HOUR / FOOT,
                                                                                         rel=1e-12)


def test_exact_length_and_temperature_definitions_to_rounding():
    # exact definitions: only floating-point rounding may separate them
    assert float(units.to_si(1.0, "inch", "length")) == pytest.approx(0.0254, rel=1e-15)
    assert float(units.to_si(10.0, "mph", "speed")) == pytest.approx(4.4704, rel=1e-15)
    assert float(units.from_si(373.15, "temperature", "degF")) == pytest.approx(212.0, rel=1e-14)  # boiling point


def test_to_si_vectorized_and_list_input():
    f = np.array([-40.0, 32.0, 212.0])
    expected = _f_to_k(f)  # scale definitions
    for given in (f, f.tolist()):
        out = units.to_si(given, "degF", "temperature")
        assert isinstance(out, np.ndarray) and out.shape == (3,)
        np.testing.assert_allclose(out, expected, rtol=1e-14)
    grid = np.array([[0.0, 1.0], [2.0, 4.5]])
    np.testing.assert_allclose(units.to_si(grid, "inch", "length"), grid * INCH, rtol=1e-14)


@pytest.mark.parametrize("system", sorted(units.DISPLAY_UNITS))
@pytest.mark.parametrize("kind", sorted(units.KIND_SI_UNIT))
def test_display_round_trip(system, kind):
    unit = units.display_unit(kind, system)
    x = np.array([0.5, 3.0, 350.0])  # arbitrary SI values (temperatures in K)
    back = units.to_si(units.from_si(x, kind, unit), unit, kind)
    np.testing.assert_allclose(back, x, rtol=1e-12)


# every display unit of the US system against its definition: SI value of one display unit
US_ONE_UNIT_IN_SI = {
    "temperature_difference": DEG_F,
    "length": INCH,
    "speed": MILE / HOUR,  # mph, the US trade unit of wind (exact: 0.44704 m/s)
    "pressure": PSI,
    "heat_per_length": BTU_IT / HOUR / FOOT,
    "heat_flux": BTU_IT / HOUR / FOOT**2,
    "power": BTU_IT / HOUR,
    "coefficient": BTU_IT / HOUR / FOOT**2 / DEG_F,
    "conductivity": BTU_IT * INCH / HOUR / FOOT**2 / DEG_F,
    "energy": 1e6 * BTU_IT,
    "area": FOOT**2,
    "time": HOUR,
    "mass_flow": POUND / HOUR,
    "dimensionless": 1.0,
}
SI_ONE_UNIT_IN_SI = {"length": 1e-3, "pressure": 1e3, "energy": 3.6e6, "temperature_difference": 1.0,
                     "time": HOUR, "mass_flow": 1 / HOUR}


@pytest.mark.parametrize("kind", sorted(US_ONE_UNIT_IN_SI))
def test_us_display_units_against_definitions(kind):
    unit = units.display_unit(kind, "US")
    # exact definitions on both sides (International Table Btu): only rounding remains
    assert float(units.to_si(1.0, unit, kind)) == pytest.approx(US_ONE_UNIT_IN_SI[kind], rel=1e-12)


def test_display_temperatures_against_scale_definitions():
    t_k = 310.0
    assert float(units.from_si(t_k, "temperature", units.display_unit("temperature", "US"))) == pytest.approx(
        (t_k - 273.15) * 9 / 5 + 32, rel=1e-13)
    assert float(units.from_si(t_k, "temperature", units.display_unit("temperature", "SI"))) == pytest.approx(
        t_k - 273.15, rel=1e-13)


# temperature (an offset scale) is checked in test_display_temperatures_against_scale_definitions
@pytest.mark.parametrize("kind", sorted(set(units.KIND_SI_UNIT) - {"temperature"}))
def test_si_display_units_against_definitions(kind):
    unit = units.display_unit(kind, "SI")
    assert float(units.to_si(2.0, unit, kind)) == pytest.approx(2.0 * SI_ONE_UNIT_IN_SI.get(kind, 1.0), rel=1e-13)


# ----------------------------------------------------------------------------- parse
@pytest.mark.parametrize("text, kind, expected", [
    ("0.1", "length", 0.1),                         # plain numbers are SI
    ("363.15", "temperature", 363.15),
    ("4.5 in", "length", 4.5 * INCH),               # 1959 agreement
    ("4.5in", "length", 4.5 * INCH),
    ("114.3 mm", "length", 0.1143),
    ("2 ft", "length", 2 * FOOT),
    ("90degC", "temperature", 363.15),              # K = degC + 273.15
    ("90 degC", "temperature", 363.15),
    ("194 degF", "temperature", _f_to_k(194.0)),    # 363.15 K
    ("-40 degF", "temperature", 233.15),
    ("10 mph", "speed", 10 * MILE / HOUR),          # 4.4704 m/s
    ("3 m/s", "speed", 3.0),
    ("79.5 kPa", "pressure", 79500.0),
    ("1 atm", "pressure", 101325.0),                # standard atmosphere, 10th CGPM (1954), exact
    ("14.7 psi", "pressure", 14.7 * PSI),
    ("100 Btu/hour/foot", "heat_per_length", 100 * BTU_IT / HOUR / FOOT),
    ("0.3 Btu*inch/hour/foot**2/delta_degF", "conductivity", 0.3 * BTU_IT * INCH / HOUR / FOOT**2 / DEG_F),
])
def test_parse_against_definitions(text, kind, expected):
    value = units.parse(text, kind, "field")
    assert isinstance(value, float)
    assert value == pytest.approx(expected, rel=1e-6)   # 1e-6: ISO vs IT Btu, see above


@pytest.mark.parametrize("text, kind, field", [
    ("3 kg", "length", "pipe-diameter"),            # wrong dimension
    ("4.5 in", "temperature", "air-temperature"),   # a length is not a temperature
    ("10 mph", "length", "length"),
    ("abc", "speed", "wind-speed"),                 # no such unit
    ("", "temperature", "fluid-temperature"),       # empty
    ("3 furlongz", "length", "layer 1 thickness"),
    ("0.04 W/m/K", "heat_per_length", "heat-loss-limit"),
])
def test_parse_errors_name_the_field(text, kind, field):
    with pytest.raises(ValueError) as info:
        units.parse(text, kind, field)
    message = str(info.value)
    assert message.startswith(f"{field}: ")
    assert repr(text.strip()) in message                 # the value given
    assert kind.replace("_", " ") in message             # what was expected


def test_parse_error_gives_examples_for_common_kinds():
    with pytest.raises(ValueError, match=r"diameter: '3 kg' is not a length \(expected e\.g\. .*in"):
        units.parse("3 kg", "length", "diameter")


@pytest.mark.parametrize("text", ["nan", "inf"])
def test_parse_rejects_non_finite_text(text):
    with pytest.raises(ValueError, match="pipe-diameter"):
        units.parse(text, "length", "pipe-diameter")


# ----------------------------------------------------------------------------- display_unit
def test_display_unit_unknown_system_lists_choices():
    with pytest.raises(ValueError) as info:
        units.display_unit("length", "imperial")
    message = str(info.value)
    assert "'imperial'" in message
    for system in units.DISPLAY_UNITS:
        assert system in message


def test_display_unit_unknown_kind_lists_choices():
    with pytest.raises(ValueError) as info:
        units.display_unit("heat", "SI")
    message = str(info.value)
    assert "'heat'" in message
    for kind in units.KIND_SI_UNIT:
        assert kind in message


def test_display_units_cover_every_kind_in_every_system():
    for system, table in units.DISPLAY_UNITS.items():
        assert set(table) == set(units.KIND_SI_UNIT), system


# ----------------------------------------------------------------------------- degrees inside compound units
# NIST SP 811 (2008), appendix B.8: Btu_IT in/(h ft2 degF) = 1.442 279 E-01 W/(m K);
# Btu_IT/(h ft2 degF) = 5.678 263 E+00 W/(m2 K); Btu_IT/(h ft degF) = 1.730 735 E+00 W/(m K).
# A Celsius interval equals a kelvin interval (NIST SP 811, 4.2.1.1), so W/m/degC = W/m/K.
@pytest.mark.parametrize("text, kind, expected", [
    ("0.045W/m/degC", "conductivity", 0.045),
    ("0.045 W/m/°C", "conductivity", 0.045),
    ("0.045 W/m·K", "conductivity", 0.045),
    ("0.045 W/mK", "conductivity", 0.045),              # W/(m K), not W per millikelvin
    ("45 mW/m/K", "conductivity", 0.045),
    ("1 Btu*in/(hr*ft**2*degF)", "conductivity", 0.1442279),
    ("1 Btu·in/h·ft²·°F", "conductivity", 0.1442279),
    ("1 Btu/(h*ft*degF)", "conductivity", 1.730735),
    ("10W/m**2/degC", "coefficient", 10.0),
    ("10 W/m2K", "coefficient", 10.0),
    ("1 Btu/(hr*ft**2*degF)", "coefficient", 5.678263),
    ("1 Btu/hr-ft2-F", "coefficient", 5.678263),
    ("9 delta_degF", "temperature_difference", 5.0),    # 9 degF interval = 5 K (scale definitions)
    ("9 F", "temperature_difference", 5.0),
])
def test_degrees_inside_compound_units_are_intervals(text, kind, expected):
    # rel 5e-7: the NIST factors are given to 7 significant digits
    assert units.parse(text, kind, "field") == pytest.approx(expected, rel=5e-7)


@pytest.mark.parametrize("text, expected", [
    ("95C", 368.15), ("95 °C", 368.15), ("203F", _f_to_k(203.0)), ("368.15K", 368.15), ("95 celsius", 368.15),
])
def test_whole_temperature_units_are_absolute(text, expected):
    assert units.parse(text, "temperature", "t") == pytest.approx(expected, rel=1e-12)  # scale definitions


@pytest.mark.parametrize("text", [
    "0.045 W/(m*K", "0.045 W/m/K)", "1/0 W/m/K", "0.045 W/(m*0)", "[0.04, 0.05]", "0.04,0.05", "0.04;0.05",
    "0.04 W/m/K extra", "{0.04}", "W/m/K", "", "--0.04", "0.04 W/m/K/0",
])
def test_malformed_text_is_one_line_input_error(text):
    with pytest.raises(InputError) as info:
        units.parse(text, "conductivity", "layer 1 conductivity")
    assert str(info.value).startswith("layer 1 conductivity: ") and "\n" not in str(info.value)
    assert info.value.field == "layer 1 conductivity"


def test_a_temperature_difference_is_not_a_temperature():
    with pytest.raises(InputError, match="temperature difference"):
        units.parse("10 delta_degC", "temperature", "air")


# ----------------------------------------------------------------------------- gauge pressure and percent
@pytest.mark.parametrize("text, expected", [
    ("6 barg", 6e5 + 101325.0),          # gauge: + standard atmosphere 101 325 Pa (10th CGPM, 1954), documented
    ("6 bar(g)", 6e5 + 101325.0),
    ("6 bara", 6e5),
    ("0 psig", 101325.0),
    ("50 psig", 50 * PSI + 101325.0),
    ("14.7 psia", 14.7 * PSI),
    ("500 kPag", 5e5 + 101325.0),
    ("6 bar", 6e5),
])
def test_gauge_and_absolute_pressures(text, expected):
    assert units.parse(text, "pressure", "p") == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("text, expected", [("80%", 0.8), ("80 %", 0.8), ("0.8", 0.8), ("80 percent", 0.8)])
def test_humidity_in_percent_or_fraction(text, expected):
    assert units.read(text, "relative_humidity", "rh") == pytest.approx(expected, rel=1e-12)


# ----------------------------------------------------------------------------- plain numbers and guards
@pytest.mark.parametrize("name, text, system, expected", [
    ("temperature", "95", "SI", 368.15),                    # degC
    ("temperature", "203", "US", _f_to_k(203.0)),           # degF
    ("pipe_diameter", "168", "SI", 0.168),                  # mm
    ("pipe_diameter", "4.5", "US", 4.5 * INCH),             # in
    ("thickness", "50", "SI", 0.05),
    ("thickness", "2", "US", 2 * INCH),
    ("length", "100", "SI", 100.0),                         # m
    ("length", "100", "US", 100 * FOOT),                    # ft
    ("wind_speed", "10", "US", 10 * MILE / HOUR),           # mph
    ("fluid_pressure", "6", "SI", 6e5),                     # bar absolute
    ("fluid_pressure", "100", "US", 100 * PSI),             # psi absolute
    ("air_pressure", "79.5", "SI", 79500.0),                # kPa
    ("conductivity", "0.31", "US", 0.31 * BTU_IT * INCH / HOUR / FOOT**2 / DEG_F),
    ("coefficient", "2", "US", 2 * BTU_IT / HOUR / FOOT**2 / DEG_F),
    ("mass_flow", "3600", "US", 3600 * POUND / HOUR),       # lb/h
    ("heat_per_length", "100", "US", 100 * BTU_IT / HOUR / FOOT),
])
def test_plain_numbers_follow_the_unit_system(name, text, system, expected):
    # rel 1e-6: pint's ISO Btu vs the IT Btu of the fast table where pint is used (see above)
    assert units.read(text, name, "f", system=system) == pytest.approx(expected, rel=1e-6)


@pytest.mark.parametrize("name, text, system, words", [
    ("temperature", "95K", "SI", ["below", "degC", "did you mean 95 degC"]),
    ("temperature", "95K", "US", ["degF", "did you mean 95 degF"]),
    ("temperature", "2000", "SI", ["above", "1027 degC"]),
    ("air_temperature", "-5K", "SI", ["must be greater than -273.1 degC"]),
    ("pipe_diameter", "168m", "SI", ["5000 mm", "did you mean 168 mm"]),
    ("pipe_diameter", "0.1", "SI", ["(read as 0.1 mm)", "did you mean 0.1 m"]),
    ("thickness", "50", "US", ["(read as 50 in)", "39.37 in", "did you mean 50 mm"]),
    ("thickness", "-50", "SI", ["must be at least 0 mm", "'-50 mm'"]),
    ("wind_speed", "100", "SI", ["60 m/s", "did you mean 100 km/h"]),
    ("insulation_conductivity", "45", "SI", ["did you mean 45 mW/m/K"]),
    ("relative_humidity", "80", "SI", ["at most 1", "did you mean 80%"]),
    ("air_pressure", "101325", "SI", ["did you mean 101325 Pa"]),
])
def test_implausible_values_are_refused_with_a_hint(name, text, system, words):
    with pytest.raises(InputError) as info:
        units.read(text, name, "field", system=system)
    message = str(info.value)
    assert message.startswith("field: ") and "\n" not in message
    for w in words:
        assert w in message, message
    assert "liquid" not in message


def test_allow_unusual_lets_an_implausible_value_through_but_not_an_impossible_one():
    assert units.read("6 m", "pipe_diameter", "d", allow_unusual=True) == 6.0
    assert units.read("100K", "temperature", "t", allow_unusual=True) == 100.0
    with pytest.raises(InputError, match="allow_unusual=True"):
        units.read("6 m", "pipe_diameter", "d")
    for text, name in (("-3 mm", "pipe_diameter"), ("-1K", "temperature"), ("120%", "relative_humidity")):
        with pytest.raises(InputError, match="must be"):
            units.read(text, name, "x", allow_unusual=True)


def test_every_input_has_plain_units_in_both_systems_of_its_kind():
    for name, spec in units.INPUTS.items():
        for system in ("SI", "US"):
            factor, _ = units.unit_affine(spec.plain(system), spec.kind)
            assert factor > 0, (name, system)
        assert spec.minimum <= spec.low < spec.high <= spec.maximum, name
        assert "plain number" in units.help_units(name)


def test_files_read_plain_numbers_as_si():
    assert units.read("363.15", "temperature", "t", plain_unit="K") == 363.15
    with pytest.raises(InputError, match="did you mean -5 degC"):
        units.read("-5", "air_temperature", "bins air_temperature", plain_unit="K")


def test_decimal_comma_is_named():
    with pytest.raises(InputError, match="decimal mark"):
        units.parse("0,045 W/m/K", "conductivity", "k")
