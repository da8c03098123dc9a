"""convlib.study: spec validation, JSON, determinism, Monte Carlo, tornado, correlation spread, bands.

Analytic anchors: on a bare surface at a fixed temperature the heat flow is
q' = q'_rad + f q'_conv with the convection factor f (the radiation does not see
f), so q' is a linear function of f. A normal f gives a normal q' (a linear
function of a normal variable is normal), whose quantiles are mean + z_p sd with
z_0.95 = 1.6449 (standard normal table). Radiation by hand: grey body to
surroundings at the air temperature, q'_rad = eps sigma (Ts^4 - Ta^4) pi D.
"""
import json
import math
from statistics import NormalDist

import numpy as np
import pydantic
import pytest

import convlib as cl
from convlib import study as S

SIGMA = 5.670374419e-8  # W/m2/K4, CODATA 2018 (exact since the 2019 SI)
G = 9.80665             # m/s2, standard gravity, 3rd CGPM (1901)
Z95 = NormalDist().inv_cdf(0.95)  # 1.6449 (standard normal quantile)

TS, TA, D, EPS = 353.15, 293.15, 0.1, 0.9  # bare 100 mm line at 80 degC in still air at 20 degC


def _bare_case(**kw):
    return S.CaseSpec(**{**dict(kind="bare", surface_temperature=TS, diameter=D, air_temperature=TA,
                                emissivity=EPS), **kw})


def _bare_parts():
    """(q'_rad by hand, q'_conv from one base evaluation) of the bare case [W/m]."""
    r = cl.bare_surface(surface_temperature=TS, air_temperature=TA, diameter=D, emissivity=EPS)
    q_rad = EPS * SIGMA * (TS**4 - TA**4) * math.pi * D
    assert float(r.q_radiation_per_length) == pytest.approx(q_rad, rel=1e-12)  # the split is what we think
    return q_rad, float(r.q_convection_per_length)


def _message(exc_info) -> str:
    """The library's own messages of a pydantic ValidationError (not pydantic's input echo)."""
    return " | ".join(e["msg"] for e in exc_info.value.errors())


def _no_nan_anywhere(result: S.StudyResult):
    """NaN/inf neither in the JSON text nor in the Python values (pydantic would write NaN as null)."""
    def refuse(constant):
        raise AssertionError(f"{constant} in the JSON of the result")

    json.loads(result.model_dump_json(), parse_constant=refuse)
    json.dumps(result.model_dump(), allow_nan=False)  # raises ValueError on NaN / inf


# ----------------------------------------------------------------------------- validation
def test_unknown_input_names_it_and_lists_choices():
    with pytest.raises(pydantic.ValidationError) as info:
        S.SweepAxis(input="speed", start=0, stop=1)
    msg = _message(info)
    assert "unknown input 'speed'" in msg
    for name in S.INPUTS:
        assert name in msg


def test_axis_start_outside_range_names_end_input_range_and_value():
    with pytest.raises(pydantic.ValidationError) as info:
        S.SweepAxis(input="emissivity", start=-0.1, stop=1.0)
    msg = _message(info)
    assert "start" in msg and "emissivity" in msg and "between 0 and 1" in msg and "-0.1" in msg
    with pytest.raises(pydantic.ValidationError) as info:
        S.SweepAxis(input="wind_speed", start=0.0, stop=75.0)
    msg = _message(info)
    assert "stop" in msg and "wind_speed" in msg and "75" in msg


def test_triangular_mode_outside_is_refused():
    with pytest.raises(pydantic.ValidationError) as info:
        S.Distribution(input="emissivity", kind="triangular", low=0.1, mode=0.5, high=0.3)
    msg = _message(info)
    assert "triangular" in msg and "emissivity" in msg and "mode" in msg


def test_triangular_error_gives_the_values():
    with pytest.raises(pydantic.ValidationError) as info:
        S.Distribution(input="emissivity", kind="triangular", low=0.1, mode=0.5, high=0.3)
    assert "0.5" in _message(info)


def test_missing_distribution_parameter_is_named():
    with pytest.raises(pydantic.ValidationError) as info:
        S.Distribution(input="emissivity", kind="normal", mean=0.5)
    assert "normal distribution of emissivity needs std" in _message(info)


def test_duplicate_distributions_are_refused():
    one = dict(input="emissivity", kind="uniform", low=0.1, high=0.2)
    with pytest.raises(pydantic.ValidationError) as info:
        S.UncertaintySpec(distributions=[one, one])
    assert "repeated" in _message(info) and "emissivity" in _message(info)
    assert info.value.errors()[0]["loc"] == ("distributions",)


@pytest.mark.parametrize("part", [
    dict(sweeps=[dict(input="insulation_thickness", start=0.0, stop=0.1)]),
    dict(tornado=[dict(input="fluid_temperature", low=300.0, high=400.0)]),
    dict(maps=[dict(x=dict(input="insulation_conductivity", start=0.03, stop=0.05),
                    y=dict(input="wind_speed", start=0.0, stop=5.0))]),
    dict(uncertainty=dict(distributions=[dict(input="insulation_thickness", kind="normal", mean=0.05,
                                              std=0.005)])),
])
def test_insulated_input_on_a_bare_case_is_refused(part):
    with pytest.raises(pydantic.ValidationError) as info:
        S.StudySpec(case=_bare_case(), **part)
    msg = _message(info)
    assert "does not apply to a bare case" in msg
    assert "surface_temperature" in msg  # the inputs that do apply are listed


def test_unknown_correlation_in_case_names_field_and_choices():
    with pytest.raises(pydantic.ValidationError) as info:
        _bare_case(natural="foo")
    msg = _message(info)
    assert "natural" in msg and "'foo'" in msg
    for key in cl.correlations.methods("horizontal_cylinder"):
        assert key in msg


def test_unknown_correlation_in_compared_methods_lists_choices():
    with pytest.raises(pydantic.ValidationError) as info:
        S.StudySpec(case=_bare_case(), forced_methods=["churchill_chu"])
    msg = _message(info)
    assert "'churchill_chu'" in msg
    for key in cl.correlations.methods("cylinder_crossflow"):
        assert key in msg


def test_unknown_correlation_in_compared_methods_names_the_field():
    with pytest.raises(pydantic.ValidationError) as info:
        S.StudySpec(case=_bare_case(), natural_methods=["foo"])
    assert "natural_methods" in _message(info) or "natural_methods" in str(info.value.errors()[0]["loc"])


def test_schema_version_mismatch():
    text = json.dumps({"schema_version": 2, "case": {"kind": "bare", "surface_temperature": 350.0}})
    with pytest.raises(pydantic.ValidationError) as info:
        S.StudySpec.model_validate_json(text)
    msg = _message(info)
    assert "schema_version 2" in msg and str(S.SCHEMA_VERSION) in msg


def test_extra_field_is_refused_with_its_path():
    text = json.dumps({"case": {"kind": "bare", "surface_temperature": 350.0, "colour": "red"}})
    with pytest.raises(pydantic.ValidationError) as info:
        S.StudySpec.model_validate_json(text)
    assert info.value.errors()[0]["loc"] == ("case", "colour")


def test_tornado_low_above_high_is_refused():
    with pytest.raises(pydantic.ValidationError) as info:
        S.TornadoInput(input="emissivity", low=0.9, high=0.5)
    msg = _message(info)
    assert "emissivity" in msg and "0.9" in msg and "0.5" in msg


# ----------------------------------------------------------------------------- JSON and determinism
def test_demo_spec_json_round_trip():
    spec = S.load_demo_study()
    again = S.StudySpec.model_validate_json(spec.model_dump_json())
    assert again == spec
    assert again.model_dump_json() == spec.model_dump_json()


def test_run_study_is_deterministic_and_result_round_trips():
    spec = S.load_demo_study()
    first, second = S.run_study(spec), S.run_study(spec)
    assert first == second
    assert first.monte_carlo is not None and first.sweeps and first.maps and first.tornado
    assert S.StudyResult.model_validate_json(first.model_dump_json()) == first
    _no_nan_anywhere(first)
    # a different seed gives a different sample (the seed is really used)
    other = spec.model_copy(update={"uncertainty": spec.uncertainty.model_copy(update={"seed": 7})})
    assert S.run_study(other).monte_carlo.mean != first.monte_carlo.mean


# ----------------------------------------------------------------------------- Monte Carlo
@pytest.mark.parametrize("seed", [1, 2, 3, 4, 5])
def test_monte_carlo_percentiles_of_a_linear_normal_case(seed):
    """f ~ N(1, s) on a bare surface: q' ~ N(q_rad + q_conv, s q_conv) exactly.

    Tolerances: 4 standard errors. Mean: sd / sqrt(n); standard deviation: sd / sqrt(2 (n - 1));
    p-quantile: sqrt(p (1 - p) / n) / phi(z_p) * sd (asymptotic standard error of a sample quantile).
    """
    n, s = 20_000, 0.1
    q_rad, q_conv = _bare_parts()
    mean, sd = q_rad + q_conv, s * q_conv
    spec = S.StudySpec(case=_bare_case(), uncertainty=S.UncertaintySpec(
        model_form="none", samples=n, seed=seed,
        distributions=[S.Distribution(input="convection_factor", kind="normal", mean=1.0, std=s)]))
    mc = S.run_study(spec).monte_carlo
    assert mc.samples == n and mc.seed == seed and mc.clipped == {"convection_factor": 0}  # 1 +- 9 sd within 0.1..5
    assert mc.mean == pytest.approx(mean, abs=4 * sd / math.sqrt(n))
    assert mc.std == pytest.approx(sd, abs=4 * sd / math.sqrt(2 * (n - 1)))
    for p, got in ((0.05, mc.p5), (0.5, mc.p50), (0.95, mc.p95)):
        z = NormalDist().inv_cdf(p)
        se = math.sqrt(p * (1 - p) / n) / NormalDist().pdf(z) * sd
        assert got == pytest.approx(mean + z * sd, abs=4 * se), p
    # internal consistency of the reported figures
    assert mc.standard_error_mean == pytest.approx(mc.std / math.sqrt(n), rel=1e-12)
    assert sum(mc.histogram_counts) == n
    assert mc.convergence_n[-1] == n and mc.convergence_mean[-1] == pytest.approx(mc.mean, rel=1e-12)
    assert mc.surface_temperature_p5 == mc.surface_temperature_p95 == TS  # a bare surface keeps its temperature


def test_monte_carlo_stated_accuracy_is_a_95_percent_band():
    """model_form='stated_accuracy': factor 1 + N(0, acc/1.96), acc the default correlation's stated accuracy.

    The module docstring reads a published +-figure as a 95 % band; so sd = acc / 1.96 * q_conv.
    """
    n = 40_000
    q_rad, q_conv = _bare_parts()
    acc = cl.correlations.get("horizontal_cylinder", "churchill_chu").accuracy_percent / 100.0
    sd = acc / 1.96 * q_conv
    spec = S.StudySpec(case=_bare_case(), uncertainty=S.UncertaintySpec(model_form="stated_accuracy", samples=n,
                                                                        seed=11))
    mc = S.run_study(spec).monte_carlo
    assert mc.mean == pytest.approx(q_rad + q_conv, abs=4 * sd / math.sqrt(n))
    assert mc.std == pytest.approx(sd, abs=4 * sd / math.sqrt(2 * (n - 1)))
    se = math.sqrt(0.05 * 0.95 / n) / NormalDist().pdf(Z95) * sd
    assert mc.p95 == pytest.approx(q_rad + q_conv + Z95 * sd, abs=4 * se)
    assert mc.p5 == pytest.approx(q_rad + q_conv - Z95 * sd, abs=4 * se)


def test_monte_carlo_stated_accuracy_keeps_the_case_convection_factor():
    n = 20_000
    q_rad, q_conv = _bare_parts()
    spec = S.StudySpec(case=_bare_case(convection_factor=1.5),
                       uncertainty=S.UncertaintySpec(model_form="stated_accuracy", samples=n, seed=3))
    res = S.run_study(spec)
    assert res.base.q_per_length[0] == pytest.approx(q_rad + 1.5 * q_conv, rel=1e-9)
    sd = 0.2 / 1.96 * 1.5 * q_conv
    assert res.monte_carlo.mean == pytest.approx(q_rad + 1.5 * q_conv, abs=4 * sd / math.sqrt(n))


# ----------------------------------------------------------------------------- tornado
def test_tornado_swings_by_hand_and_sorted():
    q_rad, q_conv = _bare_parts()
    tornado = [S.TornadoInput(input="convection_factor", low=0.8, high=1.2),
               S.TornadoInput(input="emissivity", low=0.5, high=0.9),
               S.TornadoInput(input="solar_irradiance", low=0.0, high=800.0)]
    res = S.run_study(S.StudySpec(case=_bare_case(), tornado=tornado))
    bars = {b.input: b for b in res.tornado}
    # convection factor: q' = q_rad + f q_conv  ->  swing = 2 * 0.2 * q_conv
    cf = bars["convection_factor"]
    assert cf.q_low == pytest.approx(q_rad + 0.8 * q_conv, rel=1e-9)
    assert cf.q_high == pytest.approx(q_rad + 1.2 * q_conv, rel=1e-9)
    assert cf.swing == pytest.approx(0.4 * q_conv, rel=1e-9)
    # emissivity: swing = 0.4 sigma (Ts^4 - Ta^4) pi D (grey body, by hand)
    em = bars["emissivity"]
    assert em.swing == pytest.approx(0.4 * SIGMA * (TS**4 - TA**4) * math.pi * D, rel=1e-9)
    assert em.q_high - em.q_low == pytest.approx(em.swing, rel=1e-12)   # more emissivity, more loss
    # sun on the projected area D per metre, absorptivity = emissivity (grey): swing = eps G D
    sun = bars["solar_irradiance"]
    assert sun.swing == pytest.approx(EPS * 800.0 * D, rel=1e-9)
    assert sun.q_high < sun.q_low                                        # the sun reduces the loss
    # bars sorted by swing, largest first; here sun 72 > emissivity 58 > convection 46 W/m
    swings = [b.swing for b in res.tornado]
    assert swings == sorted(swings, reverse=True)
    assert [b.input for b in res.tornado] == ["solar_irradiance", "emissivity", "convection_factor"]
    for b in res.tornado:
        assert b.surface_temperature_low == b.surface_temperature_high == TS
        assert b.swing == pytest.approx(abs(b.q_high - b.q_low), rel=1e-12)


def test_demo_tornado_sorted_and_consistent():
    res = S.run_study(S.load_demo_study().model_copy(update={"uncertainty": None, "sweeps": [], "maps": []}))
    swings = [b.swing for b in res.tornado]
    assert swings == sorted(swings, reverse=True)
    case = S.load_demo_study().case
    for b in res.tornado:
        r = S.evaluate_case(case, **{b.input: np.array([b.low, b.high])})  # re-evaluation, consistency
        assert [b.q_low, b.q_high] == pytest.approx(np.asarray(r.q_per_length).tolist(), rel=1e-9)


# ----------------------------------------------------------------------------- correlation spread
def _hand_natural(ts, ta, d, eps):
    """Nu and q' of every natural correlation of a horizontal cylinder, and which are in range.

    Ra = g beta (Ts - Ta) D^3 / (nu alpha) with air properties at the film temperature;
    Nu of each law through convlib.nusselt (the registry, called directly); q' = q_rad + Nu k/D dT pi D.
    """
    p = cl.air(0.5 * (ts + ta))
    ra = float(G * p.beta * abs(ts - ta) * d**3 / (p.nu * p.alpha))
    pr = float(p.pr)
    out = {}
    for key in cl.correlations.methods("horizontal_cylinder"):
        nu, flags = cl.nusselt("horizontal_cylinder", key, Ra=ra, Pr=pr, full_output=True)
        q = eps * SIGMA * (ts**4 - ta**4) * math.pi * d + float(nu) * float(p.k) / d * (ts - ta) * math.pi * d
        out[key] = (float(nu), q, int(flags) == 0)
    return ra, out


def _hand_spread(values):
    return (max(values) - min(values)) / abs(float(np.median(values)))


def test_base_spread_equals_hand_computation():
    res = S.run_study(S.StudySpec(case=_bare_case()))
    ra, laws = _hand_natural(TS, TA, D, EPS)
    assert res.base.rayleigh[0] == pytest.approx(ra, rel=1e-6)
    ok = [k for k, (_, _, good) in laws.items() if good]
    assert len(ok) >= 2
    natural = [s for s in res.base_spreads if s.mode == "natural"][0]
    assert natural.applicable_count == [len(ok)]
    assert natural.nusselt[0] == pytest.approx(_hand_spread([laws[k][0] for k in ok]), rel=1e-6)
    assert natural.q_per_length[0] == pytest.approx(_hand_spread([laws[k][1] for k in ok]), rel=1e-6)
    assert not [s for s in res.base_spreads if s.mode == "forced"]  # still air: no forced comparison
    for curve in res.base_methods:
        assert curve.values.nusselt[0] == pytest.approx(laws[curve.method][0], rel=1e-6)
        assert curve.in_range == [laws[curve.method][2]]


@pytest.mark.parametrize("ts, d, expected_count", [
    (600.0, 10.0, 0),        # Ra ~ 4e12: above every law's upper limit (1e12 or 1e9)
    (TA + 1e-4, 1e-4, 1),    # Ra ~ 1e-8: only Morgan (from 1e-10) applies
])
def test_spread_is_none_where_fewer_than_two_apply(ts, d, expected_count):
    ra, laws = _hand_natural(ts, TA, d, EPS)
    assert sum(good for _, _, good in laws.values()) == expected_count  # by the registry's ranges
    spec = S.StudySpec(case=_bare_case(surface_temperature=ts, diameter=d))
    res = S.run_study(spec)
    natural = [s for s in res.base_spreads if s.mode == "natural"][0]
    assert natural.applicable_count == [expected_count]
    assert natural.nusselt == [None] and natural.q_per_length == [None]
    # every law evaluated regardless: the extrapolated spread exists
    assert natural.extrapolated_nusselt[0] == pytest.approx(_hand_spread([v[0] for v in laws.values()]), rel=1e-6)
    _no_nan_anywhere(res)


def test_sweep_spread_none_points_and_no_nan_in_json():
    # diameter up to 10 m at 600 K (no law applies at the top) and a surface temperature through
    # the air temperature (dT = 0: no natural convection at all)
    spec = S.StudySpec(case=_bare_case(surface_temperature=600.0), sweeps=[
        S.SweepAxis(input="diameter", start=0.01, stop=10.0, count=12, scale="log"),
        S.SweepAxis(input="surface_temperature", start=TA - 10.0, stop=TA + 10.0, count=21)],
        maps=[S.MapSpec(x=S.SweepAxis(input="diameter", start=0.01, stop=10.0, count=4, scale="log"),
                        y=S.SweepAxis(input="surface_temperature", start=TA - 10.0, stop=600.0, count=3))])
    res = S.run_study(spec)
    diameter_sweep = res.sweeps[0].spreads[0]
    assert diameter_sweep.nusselt[-1] is None and diameter_sweep.applicable_count[-1] == 0
    for value, count in zip(diameter_sweep.nusselt, diameter_sweep.applicable_count, strict=True):
        assert (value is None) == (count < 2)
    _no_nan_anywhere(res)
    assert S.StudyResult.model_validate_json(res.model_dump_json()) == res


# ----------------------------------------------------------------------------- sweep band
def test_sweep_band_contains_default_bare():
    spec = S.StudySpec(case=_bare_case(), sweeps=[
        S.SweepAxis(input="diameter", start=0.01, stop=1.0, count=15, scale="log"),
        S.SweepAxis(input="surface_temperature", start=250.0, stop=500.0, count=26),
        S.SweepAxis(input="wind_speed", start=0.0, stop=10.0, count=11)])
    res = S.run_study(spec)
    for sweep in res.sweeps:
        for low, q, high in zip(sweep.band_low, sweep.default.q_per_length, sweep.band_high, strict=True):
            assert low <= q <= high
    # on a bare surface the band is q_rad + (1 -+ acc) q_conv: its width is 2 acc |q_conv| (still air: 20 %)
    acc = cl.correlations.get("horizontal_cylinder", "churchill_chu").accuracy_percent / 100.0
    sweep = res.sweeps[0]
    width = np.subtract(sweep.band_high, sweep.band_low)
    np.testing.assert_allclose(width, 2 * acc * np.abs(sweep.default.q_convection_per_length), rtol=1e-9)


def test_sweep_band_contains_default_demo():
    res = S.run_study(S.load_demo_study().model_copy(update={"uncertainty": None, "maps": [], "tornado": []}))
    assert len(res.sweeps) == 5
    for sweep in res.sweeps:
        assert len(sweep.band_low) == len(sweep.values) == len(sweep.band_high)
        for low, q, high in zip(sweep.band_low, sweep.default.q_per_length, sweep.band_high, strict=True):
            assert low <= q <= high, sweep.input


def test_run_sweep_is_the_sweep_of_run_study():
    spec = S.load_demo_study()
    axis = S.SweepAxis(input="wind_speed", start=0.0, stop=12.0, count=13)
    alone = S.run_sweep(spec, axis)
    full = S.run_study(spec.model_copy(update={"sweeps": [axis], "maps": [], "tornado": [], "uncertainty": None}))
    assert alone.model_dump() == full.sweeps[0].model_dump()  # same code path: identical, not close
    bare = S.StudySpec(case=S.CaseSpec(kind="bare", surface_temperature=353.15, diameter=0.1))
    with pytest.raises(ValueError, match="fluid_temperature"):
        S.run_sweep(bare, S.SweepAxis(input="fluid_temperature", start=300.0, stop=400.0, count=3))
