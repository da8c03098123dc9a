"""Property-based tests of the outer-surface model, the correlation registry and the air properties.

Every input drawn over wide ranges (zero temperature difference, zero and near-zero wind, sizes from
micrometres to kilometres, temperatures near absolute zero to thousands of kelvin) gives finite
results or an InputError naming the field: never NaN, inf, a numpy warning or another exception.
The physical properties are those of any convection model (e.g. Incropera et al., Fundamentals of
Heat and Mass Transfer, 6th ed., ch. 9 and 7, from memory): the loss grows with the temperature
difference and with the wind and changes sign with the temperature difference.
"""
from __future__ import annotations

import numpy as np
import pytest
from hypothesis import assume, given, strategies as st

from convlib.correlations import registry
from convlib.errors import InputError
from convlib.geometry import SHAPES
from convlib.properties import air, fluid_properties
from convlib.surface import bare_surface
from fuzz_helpers import assert_finite, finite_or_input_error, outcome, temperatures, wide

pytestmark = pytest.mark.fuzz

SIZES = {"horizontal_cylinder": ("diameter", "length"), "vertical_cylinder": ("diameter", "length"),
         "sphere": ("diameter",), "vertical_plate": ("height", "width"),
         "horizontal_plate_up": ("length", "width"), "horizontal_plate_down": ("length", "width")}
#: Still air: the Richardson number is infinite by definition (documented on SurfaceResult).
STILL_AIR_FIELDS = ("richardson",)


def test_sizes_cover_every_shape():
    assert set(SIZES) == set(SHAPES)


size = st.one_of(wide(1e-9, 1e9), st.sampled_from([1e-300, 1e300]))
wind = st.one_of(st.just(0.0), st.sampled_from([1e-300, 5e-324, 1e-12, 1e300]), wide(1e-6, 1e4))


@st.composite
def surface_inputs(draw):
    shape = draw(st.sampled_from(sorted(SHAPES)))
    kwargs = {name: draw(size) for name in SIZES[shape]}
    ta = draw(temperatures)
    kwargs.update(
        shape=shape, air_temperature=ta,
        surface_temperature=draw(st.one_of(temperatures, st.just(ta), st.floats(-1.0, 1.0).map(lambda d: ta + d))),
        wind_speed=draw(wind), emissivity=draw(st.floats(0.0, 1.0)),
        pressure=draw(st.one_of(st.just(101325.0), wide(1.0, 1e9))),
        solar_irradiance=draw(st.one_of(st.just(0.0), wide(1e-3, 1e6), st.just(1e300))),
        sky_view_fraction=draw(st.sampled_from([0.0, 0.5, 1.0])),
    )
    if draw(st.booleans()):
        kwargs["surroundings_temperature"] = draw(temperatures)
    if draw(st.booleans()):  # any registered law of the shape, not only the default
        info = SHAPES[shape]
        both = set(registry.methods(info.natural_geometry, "natural")) & set(
            registry.methods(info.natural_geometry_cold, "natural"))
        kwargs["natural"] = draw(st.sampled_from(sorted(both)))
        kwargs["forced"] = draw(st.sampled_from(registry.methods(info.forced_geometry, "forced")))
    if draw(st.booleans()):
        kwargs["mixing_exponent"] = draw(st.one_of(st.floats(0.0, 30.0), wide(1e-300, 1e300)))
    if draw(st.booleans()):
        kwargs["convection_factor"] = draw(wide(1e-300, 1e300))
    if draw(st.booleans()):
        kwargs["convection_coefficient"] = draw(wide(1e-300, 1e300))
    if draw(st.booleans()):
        kwargs["flow_direction"] = draw(st.sampled_from(["transverse", "assisting", "opposing"]))
    return kwargs


@given(surface_inputs())
def test_bare_surface_finite_or_input_error(kwargs):
    out = outcome(bare_surface, **kwargs)
    if isinstance(out, InputError):
        # the error names the caller's own arguments, not an internal quantity
        assert set(out.field.split(", ")) <= set(kwargs) | {"inputs"}, out.field
        return
    moving = np.asarray(kwargs["wind_speed"]) > 0
    assert_finite(out, skip=STILL_AIR_FIELDS)
    ri = np.asarray(out.richardson)
    assert not np.isnan(ri).any()
    assert np.all(np.isfinite(ri) | ~moving | (ri == np.inf))


@given(shape=st.sampled_from(sorted(SHAPES)), d=wide(0.01, 10.0), ta=st.floats(230.0, 330.0),
       dt=st.floats(0.5, 60.0), extra=st.floats(0.5, 60.0), u=st.one_of(st.just(0.0), st.floats(0.0, 30.0)),
       eps=st.floats(0.0, 1.0))
def test_loss_rises_with_temperature_difference_and_changes_sign(shape, d, ta, dt, extra, u, eps):
    kwargs = {name: d for name in SIZES[shape]}
    ts = np.array([ta - dt - extra, ta - dt, ta, ta + dt, ta + dt + extra])
    r = outcome(bare_surface, shape=shape, surface_temperature=ts, air_temperature=ta, wind_speed=u,
                emissivity=eps, **kwargs)
    assert not isinstance(r, InputError), r
    q = r.q_per_area
    # no sun, surroundings at the air: heat flows from the warmer to the colder, more for a larger difference
    assert q[2] == pytest.approx(0.0, abs=1e-9)
    assert q[0] < q[1] < 0.0 < q[3] < q[4]


@given(shape=st.sampled_from(sorted(SHAPES)), d=wide(0.01, 10.0), ta=st.floats(230.0, 330.0),
       dt=st.one_of(st.floats(-100.0, -0.5), st.floats(0.5, 200.0)), u1=st.floats(0.0, 30.0),
       du=st.floats(0.05, 20.0), eps=st.floats(0.0, 1.0), direction=st.sampled_from(["transverse", "assisting"]))
def test_loss_rises_with_wind(shape, d, ta, dt, u1, du, eps, direction):
    """|q| grows with the wind, except across a forced law's published piecewise steps.

    The default forced laws (Churchill-Bernstein for round bodies, Whitaker for a sphere, the
    mixed-layer flat-plate law for plates) rise with Re; the plate law switches from Incropera et al.
    eq. 7.30 to eq. 7.38 at Re = 5e5 with a slight rise (Nu/Pr^1/3 = 469.5 and 469.8 there), so the default
    models rise monotonically; the piecewise Hilpert and Zukauskas tables are tested in the next test.
    Opposing flow is left out: Churchill's (1977) opposing-flow rule dips where the two mechanisms cancel.
    """
    kwargs = {name: d for name in SIZES[shape]}
    r = outcome(bare_surface, shape=shape, surface_temperature=ta + dt, air_temperature=ta,
                wind_speed=np.array([u1, u1 + du]), emissivity=eps, flow_direction=direction, **kwargs)
    assert not isinstance(r, InputError), r
    q = np.abs(r.q_per_area)
    assert q[1] >= q[0] * (1.0 - 1e-9)


@given(method=st.sampled_from(["hilpert", "zukauskas"]), re=wide(1.0, 1e6), factor=st.floats(1.001, 2.0))
def test_piecewise_forced_laws_rise_except_at_their_published_steps(method, re, factor):
    """Hilpert (1933) and Zukauskas (1972) are tables of C Re^m pieces: they rise within each piece
    and may jump (either way) only across the Re boundaries their records list."""
    rec = registry.get("cylinder_crossflow", method)
    steps = [v for group, v, _ in rec.boundaries if group == "Re"]
    re2 = re * factor
    assume(not any(re < b <= re2 or re <= b < re2 for b in steps))
    groups = dict(Re=np.array([re, re2]), Pr=0.71)
    if "Pr_s" in rec.inputs:
        groups["Pr_s"] = 0.71
    nu, _ = registry.evaluate("cylinder_crossflow", method, **groups)
    assert nu[1] > nu[0]


@given(method=st.sampled_from([r.key for r in registry.REGISTRY if r.geometry == "cylinder_crossflow"]),
       re=st.one_of(st.just(0.0), wide(1e-300, 1e300)), pr=st.one_of(st.just(0.0), wide(1e-300, 1e300)))
def test_forced_registry_finite(method, re, pr):
    out = outcome(registry.nusselt, "cylinder_crossflow", method, Re=re, Pr=pr, Pr_s=pr, full_output=True)
    if not isinstance(out, InputError):
        assert_finite(out)
        assert np.all(out[0] >= 0)


@given(rec=st.sampled_from(registry.REGISTRY), ra=st.one_of(st.just(0.0), wide(1e-300, 1e300)),
       re=st.one_of(st.just(0.0), wide(1e-300, 1e300)), pr=wide(1e-6, 1e6), ratio=wide(1e-6, 1e6),
       visc=wide(1e-3, 1e3))
def test_every_registry_record_finite_or_input_error(rec, ra, re, pr, ratio, visc):
    out = outcome(registry.nusselt, rec.geometry, rec.key, Ra=ra, Re=re, Pr=pr, Pr_s=pr, full_output=True,
                  **({"diameter_over_length": ratio} if "diameter_over_length" in rec.inputs else {}),
                  **({"viscosity_ratio": visc} if "viscosity_ratio" in rec.inputs else {}))
    if not isinstance(out, InputError):
        assert_finite(out)
        assert np.all(out[0] >= 0)


@given(fluid=st.sampled_from(["Air", "Nitrogen", "Water", "CO2"]), t=temperatures,
       p=st.one_of(st.just(101325.0), wide(1e-3, 1e10)))
def test_fluid_properties_finite_or_input_error(fluid, t, p):
    out = outcome(fluid_properties, fluid, t, pressure=p)
    if not isinstance(out, InputError):
        assert_finite(out)
        assert out.rho > 0 and out.k > 0 and out.mu > 0 and out.cp > 0


@given(t=st.lists(temperatures, min_size=1, max_size=5), p=st.one_of(st.just(101325.0), wide(1e-3, 1e10)))
def test_air_arrays_finite_or_input_error(t, p):
    finite_or_input_error(air, t, pressure=p)
