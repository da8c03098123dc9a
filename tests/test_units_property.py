"""Property test: the command line and a line-list CSV read the same typed text as the same SI value.

Random values written in random spellings of every unit an input takes go through the argument parser of
``convlib`` (:func:`convlib.cli.build_parser` and the option reader of :mod:`convlib.cli_common`) and through
:func:`convlib.linelist.read_line_list`. Both must give the same SI value, or both refuse it (a command-line
:class:`~convlib.errors.InputError`, a row error naming the column). Issue 12 point 1: the two disagreed on
``W/m/degC``. The expected values themselves are checked against NIST SP 811 factors in tests/test_units.py
and tests/test_cli_units.py; here the two entry points are checked against each other, and the value against
the unit's definition where it is a plain scale (``_exact`` below).
"""
import pytest
import re

from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from convlib.cli import _join_negative_values, build_parser
from convlib.cli_common import layers, value
from convlib.errors import InputError
from convlib.linelist import read_line_list

# spellings engineers use, per kind of quantity
SPELLINGS = {
    "temperature": ["degC", "°C", "C", "degF", "°F", "F", "K", "celsius"],
    "length": ["mm", "m", "in", "inch", "ft", "cm"],
    "speed": ["m/s", "km/h", "mph", "ft/s"],
    "pressure": ["bar", "barg", "bar(g)", "psi", "psig", "psia", "kPa", "MPa", "kPag"],
    "conductivity": ["W/m/K", "W/m/degC", "W/(m*K)", "W/m.K", "W/mK", "W/m·°C", "mW/m/K",
                     "Btu*in/(hr*ft**2*degF)", "Btu.in/h.ft2.F", "Btu in/(h ft² °F)"],
    "mass_flow": ["kg/s", "kg/h", "lb/h", "g/s"],
    "dimensionless": ["%", ""],
}
BASE_CLI = ["--nps", "4", "--fluid-temperature", "90degC", "--air-temperature", "20degC"]
BASE_ROW = {"tag": "P-1", "nps": "4", "length": "10m", "fluid_temperature": "90degC", "air_temperature": "20degC"}

# quantity: (kind, command-line argv with {text}, reader of the parsed arguments, CSV cells, reader of the row)
CASES = {
    "fluid temperature": ("temperature", ["line", "--nps", "4", "--air-temperature", "20degC",
                                          "--fluid-temperature", "{text}"],
                          lambda a: value(a, "fluid_temperature"), {"fluid_temperature": "{text}"},
                          lambda p: p.spec.fluid_temperature),
    "air temperature": ("temperature", ["line", "--nps", "4", "--fluid-temperature", "90degC",
                                        "--air-temperature", "{text}"],
                        lambda a: value(a, "air_temperature"), {"air_temperature": "{text}"},
                        lambda p: p.spec.air_temperature),
    "layer thickness": ("length", ["line", *BASE_CLI, "--layer", "{text},0.04"],
                        lambda a: layers(a)[0].thickness, {"layers": "{text}@0.04"},
                        lambda p: p.spec.layers[0].thickness),
    "layer conductivity": ("conductivity", ["line", *BASE_CLI, "--layer", "50mm,{text}"],
                           lambda a: float(layers(a)[0].conductivity.coefficients[0]), {"layers": "50mm@{text}"},
                           lambda p: p.spec.layers[0].conductivity),
    "pipe diameter": ("length", ["line", "--fluid-temperature", "90degC", "--air-temperature", "20degC",
                                 "--pipe-outer-diameter", "{text}"],   # --pipe-diameter before 0.3
                      lambda a: value(a, "pipe_outer_diameter"), {"nps": "", "outer_diameter": "{text}"},
                      lambda p: p.spec.pipe_outer_diameter),
    "line length": ("length", ["line", *BASE_CLI, "--length", "{text}"], lambda a: value(a, "length"),
                    {"length": "{text}"}, lambda p: p.spec.length),
    "wind speed": ("speed", ["line", *BASE_CLI, "--wind-speed", "{text}"], lambda a: value(a, "wind_speed"),
                   {"wind_speed": "{text}"}, lambda p: p.spec.wind_speed),
    "mass flow": ("mass_flow", ["outlet", "--nps", "4", "--inlet-temperature", "90degC", "--air-temperature",
                                "20degC", "--length", "100m", "--mass-flow", "{text}"],
                  lambda a: value(a, "mass_flow"), {"mass_flow": "{text}"}, lambda p: p.operation["mass_flow"]),
    "steam pressure": ("pressure", ["steam", "--nps", "4", "--air-temperature", "20degC", "--steam-pressure",
                                    "{text}"],
                       lambda a: value(a, "steam_pressure"), {"steam_pressure": "{text}"},
                       lambda p: p.operation["steam_pressure"]),
    "minimum ambient": ("temperature", ["trace", "--nps", "4", "--maintain-temperature", "5degC",
                                        "--air-temperature", "{text}"],   # --minimum-ambient before 0.3
                        lambda a: value(a, "air_temperature"), {"minimum_ambient": "{text}"},
                        lambda p: p.operation["minimum_ambient"]),
    "relative humidity": ("dimensionless", ["size", *BASE_CLI, "--insulation-conductivity", "0.04",
                                            "--relative-humidity", "{text}"],
                          lambda a: value(a, "relative_humidity"), {"relative_humidity": "{text}"},
                          lambda p: p.spec.relative_humidity),
}


def through_cli(case, text):
    _, argv, get, _, _ = CASES[case]
    argv = _join_negative_values([a.replace("{text}", text) for a in argv])
    try:
        return get(build_parser().parse_args(argv))
    except InputError:
        return InputError
    except SystemExit:  # argparse refuses text like '-:' as an unknown option: exit 2 as for an InputError
        return InputError


def through_csv(case, text):
    _, _, _, cells, get = CASES[case]
    row = {**BASE_ROW, **{k: v.replace("{text}", text) for k, v in cells.items()}}
    lines, errors = read_line_list([row])
    if errors:
        return InputError
    return get(lines[0])


def _same(cli, csv):
    if cli is InputError or csv is InputError:
        return cli is csv
    return cli == pytest.approx(csv, rel=1e-12, abs=1e-15)


numbers = st.one_of(st.floats(-300, 3000, allow_nan=False).map(lambda x: f"{x:.6g}"),
                    st.integers(-50, 2000).map(str))


@st.composite
def typed(draw):
    case = draw(st.sampled_from(sorted(CASES)))
    unit = draw(st.sampled_from(SPELLINGS[CASES[case][0]]))
    gap = draw(st.sampled_from(["", " "])) if unit else ""
    return case, f"{draw(numbers)}{gap}{unit}"


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(typed())
def test_cli_and_csv_read_unit_strings_alike(sample):
    case, text = sample
    cli, csv = through_cli(case, text), through_csv(case, text)
    assert _same(cli, csv), (case, text, cli, csv)


# text that is not a number with a unit: lists, brackets, divisions by zero, stray signs, unknown units
junk = st.text(alphabet="0123456789.,;:/*()[]{}-+e %°CFKmsW", min_size=1, max_size=14)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.sampled_from(sorted(CASES)), junk)
def test_cli_and_csv_refuse_the_same_malformed_text(case, text):
    # a plain number is read in the --units system on the command line and in SI in a file, by design
    assume(not re.fullmatch(r"\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*", text))
    # ',' separates a layer's fields on the command line, ';' the layers in a file: the formats, not the units
    assume(not (case.startswith("layer") and re.search("[,;]", text)))
    cli, csv = through_cli(case, text.strip() or "?"), through_csv(case, text.strip() or "?")
    assert _same(cli, csv), (case, text, cli, csv)


# exact scale definitions: inch 0.0254 m, foot 0.3048 m (1959 agreement); K = degC + 273.15;
# degF = degC x 9/5 + 32; mile 1609.344 m; bar 1e5 Pa; gauge adds 101 325 Pa (standard atmosphere, 10th CGPM)
_EXACT = {("temperature", "degC"): lambda x: x + 273.15, ("temperature", "degF"): lambda x: (x - 32) * 5 / 9 + 273.15,
          ("length", "in"): lambda x: x * 0.0254, ("length", "ft"): lambda x: x * 0.3048,
          ("speed", "mph"): lambda x: x * 1609.344 / 3600, ("pressure", "barg"): lambda x: x * 1e5 + 101325.0}


@settings(max_examples=100, deadline=None)
@given(st.sampled_from(sorted(CASES)), st.floats(0.5, 500, allow_nan=False))
def test_values_against_the_unit_definitions(case, number):
    kind = CASES[case][0]
    for (k, unit), exact in _EXACT.items():
        if k != kind:
            continue
        text = f"{number!r}{unit}"
        cli, csv = through_cli(case, text), through_csv(case, text)
        assert _same(cli, csv), (case, text)
        if cli is not InputError:
            assert cli == pytest.approx(exact(number), rel=1e-12)
