"""Thermal survey: inversion of the effective conductivity, condition classes, sampling, reading."""
import numpy as np
import pytest

from convlib.design import WeatherBins
from convlib.errors import InputError
from convlib.pipe import Layer, insulated_pipe
from convlib.surface import bare_surface
from convlib.survey import (CONDITIONS, Measurement, condition_class, demo_survey_path, effective_conductivity,
                            line_samples, read_survey, run_survey)

# synthetic cases: (pipe OD m, fluid K, thickness m, k W/m/K, air K, wind m/s, emissivity)
CASES = np.array([
    (0.0603, 453.15, 0.040, 0.040, 293.15, 0.0, 0.10),
    (0.1143, 423.15, 0.080, 0.120, 278.15, 4.0, 0.90),
    (0.2191, 373.15, 0.050, 0.045, 263.15, 8.0, 0.30),
    (0.3239, 563.15, 0.150, 0.070, 298.15, 1.0, 0.15),
    (0.0889, 280.15, 0.030, 0.035, 303.15, 0.0, 0.90),   # cold line
    (0.1683, 268.15, 0.040, 0.300, 298.15, 2.0, 0.90),   # cold line, wet insulation
    (0.0483, 393.15, 0.025, 2.000, 288.15, 3.0, 0.85),   # insulation barely there
])


def _forward(k):
    d, tf, t, _, ta, w, e = CASES.T
    return insulated_pipe(d, tf, [Layer(t, k)], air_temperature=ta, wind_speed=w, jacket_emissivity=e,
                          tolerance=1e-10).surface_temperature


def test_inversion_recovers_known_conductivity():
    # synthetic: surface temperatures from the forward solve at a known k, then inverted
    d, tf, t, k, ta, w, e = CASES.T
    k_back, q = effective_conductivity(d, tf, t, _forward(k), air_temperature=ta, jacket_emissivity=e, wind_speed=w)
    np.testing.assert_allclose(k_back, k, rtol=1e-6)  # stated tolerance: the forward solve's 1e-10 K on T_s


def test_inversion_agrees_with_bracketed_root_over_k():
    # independent inverse: scipy's brentq on k of insulated_pipe's surface temperature, case by case (test only)
    optimize = pytest.importorskip("scipy.optimize")
    d, tf, t, k, ta, w, e = CASES.T
    measured = _forward(k) + np.array([0.5, -0.3, 0.2, 1.0, -0.4, 0.3, -0.2])  # off the forward values
    k_closed, _ = effective_conductivity(d, tf, t, measured, air_temperature=ta, jacket_emissivity=e, wind_speed=w)
    for c in range(len(CASES)):
        def residual(kk):
            return float(insulated_pipe(d[c], tf[c], [Layer(t[c], kk)], air_temperature=ta[c], wind_speed=w[c],
                                        jacket_emissivity=e[c], tolerance=1e-10).surface_temperature) - measured[c]
        root = optimize.brentq(residual, 1e-3, 50.0, xtol=1e-12, rtol=1e-12)
        assert k_closed[c] == pytest.approx(root, rel=1e-6)


def test_heat_flow_now_is_the_outer_exchange_at_the_measured_temperature():
    d, tf, t, k, ta, w, e = CASES.T
    ts = _forward(k)
    _, q = effective_conductivity(d, tf, t, ts, air_temperature=ta, jacket_emissivity=e, wind_speed=w)
    direct = bare_surface("horizontal_cylinder", surface_temperature=ts, air_temperature=ta, diameter=d + 2 * t,
                          length=1.0, wind_speed=w, emissivity=e).q_per_length
    np.testing.assert_allclose(q, direct, rtol=1e-12)


def test_surface_beyond_air_gives_no_conductivity():
    k, q = effective_conductivity(0.1, 400.0, 0.05, 290.0, air_temperature=295.0, jacket_emissivity=0.9)
    assert np.isnan(k) and q < 0


@pytest.mark.parametrize("ratio, name", [(1.3, "as designed"), (1.3001, "degraded"), (2.0, "degraded"),
                                         (2.0001, "wet or damaged"), (6.0, "wet or damaged"), (6.0001, "missing")])
def test_condition_boundaries(ratio, name):
    # our own thresholds (convlib.survey.CONDITION_THRESHOLDS), both sides of each; common practice, no source
    assert CONDITIONS[int(condition_class(ratio))] == name


def test_seeds_per_line_follow_seedsequence_spawn_and_ignore_chunks():
    m = Measurement(samples=7, seed=42)
    children = np.random.SeedSequence(42).spawn(10)
    draws = line_samples(np.arange(10), m)
    for i in (0, 3, 9):
        expected = np.random.Generator(np.random.PCG64(children[i])).uniform(-1, 1, (3, 7))
        np.testing.assert_array_equal(draws[i], expected)
    np.testing.assert_array_equal(line_samples([3, 9], m), draws[[3, 9]])


def _bins():
    return WeatherBins([268.15, 281.15, 293.15], [4.0, 2.0, 1.0], [1500, 4500, 2760])


def test_chunked_survey_is_bit_identical():
    lines, _ = read_survey(demo_survey_path())
    m = Measurement(samples=30)
    whole = run_survey(lines, _bins(), m)
    part = run_survey(lines.take(slice(4, 9)), _bins(), m)
    np.testing.assert_array_equal(part.annual_now_samples, whole.annual_now_samples[4:9])
    np.testing.assert_array_equal(part.k_samples, whole.k_samples[4:9])


def test_no_uncertainty_collapses_samples_to_the_nominal_inversion():
    lines, _ = read_survey(demo_survey_path())
    r = run_survey(lines, _bins(), Measurement(thermometer=0.0, emissivity=0.0, samples=5))
    ok = np.isfinite(r.k_effective)
    np.testing.assert_allclose(r.k_samples[ok], np.repeat(r.k_effective[ok, None], 5, axis=1), rtol=1e-12)
    # lines surveyed near their design k have little excess next to wet ones (the demo's jackets are rounded to 0.1 K)
    as_designed = r.condition == CONDITIONS.index("as designed")
    wet = r.condition == CONDITIONS.index("wet or damaged")
    assert as_designed.any() and wet.any()
    assert np.all(r.annual_excess_samples[wet] > 0)
    excess_per_m = np.abs(r.annual_excess_samples[:, 0]) / lines.length
    assert excess_per_m[as_designed].max() < 0.2 * excess_per_m[wet & r.hot].min()


def test_uncertainty_widens_with_thermometer():
    lines, _ = read_survey(demo_survey_path())
    narrow = run_survey(lines, _bins(), Measurement(thermometer=0.2, samples=200)).annual_excess_samples
    wide = run_survey(lines, _bins(), Measurement(thermometer=2.0, samples=200)).annual_excess_samples
    spread = lambda a: np.percentile(a, 95, axis=1) - np.percentile(a, 5, axis=1)  # noqa: E731
    assert np.all(spread(wide) > spread(narrow))


def test_bad_rows_are_kept_with_reasons():
    text = ("tag,nps,fluid_temperature[degC],insulation_thickness[mm],design_conductivity[W/m/K],"
            "surface_temperature[degC],air_temperature[degC],length[m],bare_length[m]\n"
            "A,4,150,50,0.04,35,20,10,0\n"
            "B,4,150,50,0.04,15,20,10,0\n"       # surface below the air for a hot line
            "C,4,150,50,abc,35,20,10,0\n"        # not a number
            "D,4,150,50,0.04,35,20,10,12\n"      # bare length beyond the length
            "E,4.3,150,50,0.04,35,20,10,0\n")    # no such NPS
    lines, errors = read_survey(text)
    assert lines.tag.tolist() == ["A"] and lines.index.tolist() == [0]
    assert [e.tag for e in errors] == ["B", "C", "D", "E"] and [e.index for e in errors] == [1, 2, 3, 4]
    assert "surface_temperature" in errors[0].reason and "not a number" in errors[1].reason


def test_unknown_or_missing_columns_raise():
    with pytest.raises(InputError, match="unknown survey column"):
        read_survey("tag,colour\nA,red\n")
    with pytest.raises(InputError, match="lacks required"):
        read_survey("tag,nps\nA,4\n")


def test_parquet_reads_like_csv(tmp_path):
    pa = pytest.importorskip("pyarrow")
    pq = pytest.importorskip("pyarrow.parquet")
    lines, _ = read_survey(demo_survey_path())
    import csv
    text = demo_survey_path().read_text()
    rows = list(csv.reader(line for line in text.splitlines() if not line.startswith("#")))
    table = pa.table({h: [r[j] for r in rows[1:]] for j, h in enumerate(rows[0])})
    pq.write_table(table, tmp_path / "s.parquet")
    again, errors = read_survey(tmp_path / "s.parquet")
    assert errors == []
    np.testing.assert_array_equal(again.surface_temperature, lines.surface_temperature)
    assert again.tag.tolist() == lines.tag.tolist()


def test_indoor_lines_keep_their_surveyed_air_all_year():
    lines, _ = read_survey(demo_survey_path())
    r = run_survey(lines, _bins(), Measurement(samples=3))
    indoor = lines.location == "indoor"
    assert indoor.any() and (~indoor).any()
    # indoor: the survey-condition heat flow as designed times the operating hours (kWh = W h / 1000)
    np.testing.assert_allclose(r.annual_design[indoor], r.q_design[indoor] * lines.operating_hours[indoor] / 1000,
                               rtol=1e-9)
    # outdoor: the design heat over the weather bins differs from the survey-condition figure
    assert not np.allclose(r.annual_design[~indoor], r.q_design[~indoor] * lines.operating_hours[~indoor] / 1000,
                           rtol=1e-3)


def test_location_must_be_indoor_or_outdoor():
    text = ("tag,location,nps,fluid_temperature[degC],insulation_thickness[mm],design_conductivity[W/m/K],"
            "surface_temperature[degC],air_temperature[degC]\nA,cellar,4,150,50,0.04,35,20\n")
    lines, errors = read_survey(text)
    assert len(lines) == 0 and "indoor or outdoor" in errors[0].reason


def test_absurd_survey_values_are_row_errors_not_overflows():
    """A length of 1e306 m or a jacket at 3e205 K is a typing error: a row error naming the field (the physics would
    otherwise overflow). Found by the damaged-snapshot property test of the upgrade snapshots."""
    from convlib.survey import read_survey

    text = demo_survey_path().read_text(encoding="utf-8").splitlines()
    header, good = text[1], text[2]
    cells = good.split(",")
    long_line = ",".join(cells[:5] + ["1e306"] + cells[6:]).replace("FS-101", "X-1", 1)
    lines, errors = read_survey("\n".join([header, good, long_line]) + "\n")
    assert len(lines.tag) == 1 and [e.tag for e in errors] == ["X-1"]
    assert "length" in errors[0].reason
    with pytest.raises(InputError, match="bin air_temperature"):
        WeatherBins(np.array([3e205]), np.array([1.0]), np.array([10.0]))
