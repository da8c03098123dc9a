"""DN (EN 10220) and copper tube (EN 1057, ASTM B88) sizes beside NPS (issue: metric and copper sizes)."""
import math

import pytest
from fluids.piping import schedule_lookup

from cli_helpers import run_error, run_json
from convlib.errors import InputError
from convlib.pipe_sizes import ASTM_B88, EN10220_OUTSIDE_DIAMETER_MM, pipe_size


@pytest.mark.parametrize("dn", [8, 10, 15, 20, 25, 32, 40, 50, 65, 80, 100, 125])
def test_dn_outside_diameters_sit_just_under_the_bs1387_maximum(dn):
    # BS 1387:1985 medium tube maximum outside diameters, as tabulated by the fluids package (schedule_lookup
    # "BS1387MEDIUM"): the EN 10220 series-1 (ISO 4200) outside diameter is the nominal one, within 1 mm below.
    sizes, _, outer, _ = schedule_lookup["BS1387MEDIUM"]
    maximum = dict(zip(sizes, outer))[float(dn)]
    assert maximum - 1.0 <= EN10220_OUTSIDE_DIAMETER_MM[dn] <= maximum


@pytest.mark.parametrize("dn, nps", [(15, 0.5), (40, 1.5), (50, 2), (80, 3), (100, 4), (150, 6), (200, 8), (250, 10),
                                     (350, 14), (400, 16), (450, 18), (500, 20), (600, 24)])
def test_dn_sizes_that_share_the_nps_outside_diameter(dn, nps):
    # ASME B36.10M outside diameters (fluids package, schedule 40): series 1 shares these (ISO 4200 main series)
    sizes, _, outer, _ = schedule_lookup["40"]
    assert EN10220_OUTSIDE_DIAMETER_MM[dn] == pytest.approx(dict(zip(sizes, outer))[float(nps)], abs=1e-9)
    assert pipe_size(f"DN{dn}").outer_diameter == pytest.approx(EN10220_OUTSIDE_DIAMETER_MM[dn] / 1000)
    assert math.isnan(pipe_size(f"DN{dn}").wall_thickness)   # EN 10220 implies no single wall


def test_astm_b88_outside_diameter_is_nominal_plus_an_eighth_and_walls_k_over_l_over_m():
    # ASTM B88: copper water tube outside diameter = nominal size + 1/8 in; type K heavier than L, L than M
    for nominal, (od, walls) in ASTM_B88.items():
        assert od == pytest.approx(nominal + 0.125)
        ordered = [walls[k] for k in ("K", "L", "M") if k in walls]
        assert ordered == sorted(ordered, reverse=True)
    tube = pipe_size("B88-3/4-L")   # 0.875 in x 0.045 in (ASTM B88 Table 1, from memory)
    assert tube.outer_diameter == pytest.approx(0.875 * 0.0254)
    assert tube.wall_thickness == pytest.approx(0.045 * 0.0254)


def test_en1057_copper_tube_by_outside_diameter_and_wall():
    tube = pipe_size("CU22x1.0")   # EN 1057: 22 mm x 1.0 mm, a common heating size (from memory)
    assert (tube.outer_diameter, tube.wall_thickness, tube.inner_diameter) == pytest.approx((0.022, 0.001, 0.020))
    for bad, words in (("CU23x1.0", "not an EN 1057"), ("CU22x12", "does not fit"), ("DN90", "nearest: DN80, DN100"),
                       ("B88-3/4-X", "no ASTM B88"), ("XYZ", "unknown kind")):
        with pytest.raises(InputError, match=words):
            pipe_size(bad)


def test_size_on_the_command_line_equals_the_outside_diameter(capsys):
    by_size = run_json(capsys, "line", "--size", "DN100", "--fluid-temperature", "180degC", "--air-temperature",
                       "20degC", "--layer", "50mm,0.045")
    by_nps = run_json(capsys, "line", "--nps", "4", "--fluid-temperature", "180degC", "--air-temperature",
                      "20degC", "--layer", "50mm,0.045")
    assert by_size["line"]["results"][0]["q_per_length"] == by_nps["line"]["results"][0]["q_per_length"]
    err = run_error(capsys, "line", "--size", "DN100", "--nps", "4", "--fluid-temperature", "180degC",
                    "--air-temperature", "20degC")
    assert "exactly one" in err or "one of --nps" in err
    freeze = run_json(capsys, "freeze", "--size", "CU22x1.0", "--initial-temperature", "10degC",
                      "--air-temperature=-10degC", "--layer", "20mm,0.035")
    assert freeze["freeze time (stagnant water)"]["results"][0]["freezes"] == "yes"


# ----------------------------------------------------------------------------- the line list's size column
def test_line_list_size_column_gives_the_tables_outside_diameter():
    """A line-list ``size`` cell (DN, copper EN 1057 / ASTM B88, NPS) gives the line the same outside diameter and
    heat flow as ``outer_diameter`` typed from the table; two ways of giving the size is a row error."""
    import io

    from convlib.linelist import run_line_list
    from convlib.pipe_sizes import pipe_size

    head = "tag,size,outer_diameter[mm],length[m],fluid_temperature[degC],air_temperature[degC],layers[mm]\n"
    # EN 10220 series 1: DN100 is 114.3 mm (from memory); EN 1057: 22 mm copper tube
    rows = ("A,DN100,,10,80,20,\"40,0.04\"\n" "B,,114.3,10,80,20,\"40,0.04\"\n"
            "C,CU22x1.0,,5,60,20,\n" "D,,22,5,60,20,\n" "E,DN100,114.3,5,60,20,\n" "F,DN95,,5,60,20,\n")
    result = run_line_list(io.StringIO(head + rows))
    got = dict(zip(result.tag, result.outer_diameter))
    assert got["A"] == pytest.approx(0.1143) and got["A"] == pytest.approx(pipe_size("DN100").outer_diameter)
    q = dict(zip(result.tag, result.q_per_length))
    assert q["A"] == pytest.approx(q["B"], rel=1e-12) and q["C"] == pytest.approx(q["D"], rel=1e-12)
    errors = {e.tag: e.reason for e in result.errors}
    assert "one of them" in errors["E"]
    assert errors["F"].startswith("size: ") and "DN95" in errors["F"]
