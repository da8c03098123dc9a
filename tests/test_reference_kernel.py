"""The benchmarks' reference kernel (benchmarks/reference_kernel.py) computes what convlib computes.

The kernel is a second, independent implementation of convlib's default physics, written point by point from the
published formulas (Churchill & Chu 1975 eq. 4, doi:10.1016/0017-9310(75)90222-7; Churchill & Bernstein 1977
eq. 25, doi:10.1115/1.3450685; Churchill 1977 mixing, doi:10.1002/aic.690230103; grey-body exchange, Bergman et
al., Fundamentals of Heat and Mass Transfer, 7th ed., sec. 1.2.3) on the same shipped air table. The benchmarks
time convlib against it, so the two must agree: here its plain-Python form (the source numba compiles in
``make bench``; no numba needed) is run against convlib. Tolerance 1e-5 relative on q (the issue's figure); the
bare surface agrees to rounding, and the insulated pipe is solved to 1e-9 K on both sides so that the
comparison is of the physics, not of where two root finders stop.
"""
import importlib.util
from pathlib import Path

import numpy as np
import pytest

import convlib as cl

_PATH = Path(__file__).resolve().parents[1] / "benchmarks" / "reference_kernel.py"
_spec = importlib.util.spec_from_file_location("reference_kernel", _PATH)
rk = importlib.util.module_from_spec(_spec)
_spec.loader.exec_module(rk)

BARE, INSULATED = rk.make_kernels(jit=False)


def _cases(n, seed):
    """Random outdoor cases: hot and cold surfaces, still air (wind exactly 0) and wind up to 15 m/s."""
    rng = np.random.default_rng(seed)
    wind = rng.uniform(0.0, 15.0, n)
    wind[rng.random(n) < 0.15] = 0.0
    wind[:3] = (1e-3, 0.05, 30.0)  # barely moving air and strong wind: every convection mode
    return dict(diameter=rng.uniform(0.01, 0.8, n), surface_temperature=rng.uniform(240.0, 700.0, n),
                air_temperature=rng.uniform(240.0, 320.0, n), wind_speed=wind, emissivity=rng.uniform(0.0, 1.0, n))


def _relative(a, b):
    a, b = np.asarray(a, float), np.asarray(b, float)
    same = (a == b) | (np.isnan(a) & np.isnan(b))
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(same, 0.0, np.abs(a - b) / np.abs(b))


def test_bare_cylinder_every_field_agrees():
    c = _cases(300, 11)
    c["surface_temperature"][3] = c["air_temperature"][3]  # no temperature difference: the limits of h_radiation, Ra
    r = cl.bare_surface("horizontal_cylinder", length=2.5, **c)
    k = rk.run_bare(BARE, c["surface_temperature"], c["air_temperature"], c["diameter"], c["wind_speed"],
                    c["emissivity"], length=2.5)
    for name in rk.FIELDS:
        assert _relative(k[name], getattr(r, name)).max() <= 1e-12, name
    for name in rk.CODES:
        np.testing.assert_array_equal(k[name], getattr(r, name), err_msg=name)
    assert len(set(r.regime.tolist())) == 3 and r.warnings.any()  # the cases reach every mode and a warning
    assert _relative(k["q_per_length"], r.q_per_length).max() <= 1e-5


def test_insulated_pipe_agrees_on_q_and_every_field():
    rng = np.random.default_rng(12)
    n = 150
    c = _cases(n, 13)
    hot = rng.random(n) < 0.7
    fluid = c["air_temperature"] + np.where(hot, rng.uniform(0.5, 300.0, n), -rng.uniform(0.5, 120.0, n))
    thickness, conductivity = rng.uniform(0.005, 0.2, n), rng.uniform(0.02, 0.2, n)
    p = cl.insulated_pipe(c["diameter"], fluid, [cl.Layer(thickness, conductivity)],
                          air_temperature=c["air_temperature"], wind_speed=c["wind_speed"],
                          jacket_emissivity=c["emissivity"], tolerance=1e-9)
    k, evaluations = rk.run_insulated(INSULATED, c["diameter"], fluid, thickness, conductivity,
                                      c["air_temperature"], c["wind_speed"], c["emissivity"], tolerance=1e-9)
    assert _relative(k["q_per_length"], p.q_per_length).max() <= 1e-5
    np.testing.assert_allclose(k["surface_temperature"], p.surface_temperature, rtol=0.0, atol=2e-9)
    np.testing.assert_allclose(k["outer_diameter"], p.outer_diameter, rtol=1e-15)
    for name in rk.FIELDS:
        if name != "richardson":  # inf in still air on both sides
            assert _relative(k[name], getattr(p, name)).max() <= 1e-5, name
    for name in rk.CODES:
        np.testing.assert_array_equal(k[name], getattr(p, name), err_msg=name)
    assert n < evaluations < 20 * n  # a few Newton steps per point


def test_insulated_kernel_at_the_default_tolerance():
    """At convlib's default 1e-6 K both surfaces lie within 1e-6 K of the root, so within 2e-6 K of each other."""
    c = _cases(60, 14)
    fluid = c["air_temperature"] + 150.0
    p = cl.insulated_pipe(c["diameter"], fluid, [cl.Layer(0.05, 0.04)], air_temperature=c["air_temperature"],
                          wind_speed=c["wind_speed"], jacket_emissivity=c["emissivity"])
    k, _ = rk.run_insulated(INSULATED, c["diameter"], fluid, 0.05, 0.04, c["air_temperature"], c["wind_speed"],
                            c["emissivity"])
    np.testing.assert_allclose(k["surface_temperature"], p.surface_temperature, rtol=0.0, atol=2e-6)
    assert _relative(k["q_per_length"], p.q_per_length).max() <= 1e-5


@pytest.mark.parametrize("fluid", [293.15, 400.0])
def test_insulated_kernel_edge_cases(fluid):
    """No layer thickness: the surface is at the fluid temperature; fluid at the air temperature: no flow."""
    k, _ = rk.run_insulated(INSULATED, 0.1, fluid, 0.0, 0.04, 293.15, 0.0, 0.9)
    assert k["surface_temperature"][0] == fluid
    p = cl.insulated_pipe(0.1, fluid, [cl.Layer(0.0, 0.04)], air_temperature=293.15)
    assert _relative(k["q_per_length"], p.q_per_length).max() <= 1e-12
