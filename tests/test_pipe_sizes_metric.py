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
