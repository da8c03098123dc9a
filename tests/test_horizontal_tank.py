"""convlib.vessels.horizontal_tank and head_area against hand calculations and outside references.

References used below:
- Churchill & Chu (1975), horizontal cylinder, Int. J. Heat Mass Transfer 18:1049, eq. (4):
  Nu = {0.60 + 0.387 Ra^(1/6) / [1 + (0.559/Pr)^(9/16)]^(8/27)}^2; vertical plate, ibid. 18:1323, eq. (4):
  Nu = {0.825 + 0.387 Ra^(1/6) / [1 + (0.492/Pr)^(9/16)]^(8/27)}^2 -- written out here, and the same laws from the
  `ht` package (Nu_horizontal_cylinder_Churchill_Chu, Nu_vertical_plate_Churchill). Churchill (1983) sphere from `ht`
  (Nu_sphere_Churchill). Air properties from CoolProp called directly at the film temperature; beta = 1/T_film
  (ideal gas).
- Grey body in large surroundings, q'' = eps sigma (Ts^4 - Tsur^4), sigma = 5.670374419e-8 W/m2/K4 (CODATA 2018).
- Oblate spheroid area 2 pi a^2 + pi (c^2/e) ln((1 + e)/(1 - e)) (Weisstein, MathWorld "Oblate Spheroid", from memory);
  spherical cap 2 pi R h (Archimedes); torus zone by numerical integration of its profile (scipy quad); head areas
  from the `fluids` package (fluids.geometry.SA_ellipsoidal_head, SA_torispheroidal, after the Honeywell white paper
  "Calculate Surface Areas and Cross-sectional Areas in Vessels with Dished Heads", 2014).
- 2:1 ellipsoidal head outside area ~ 1.09 D^2 and ASME F&D head depth ~ 0.169 D (common practice, no source).
- Spherical shell R = (1/r1 - 1/r2)/(4 pi k) and flat layer t/k (Incropera et al., 6th ed., eqs. 3.36 and 3.6,
  from memory).
"""
import math

import numpy as np
import pytest
from CoolProp.CoolProp import PropsSI
from fluids.geometry import SA_ellipsoidal_head, SA_torispheroidal
from ht.conv_free_immersed import Nu_horizontal_cylinder_Churchill_Chu, Nu_sphere_Churchill, Nu_vertical_plate_Churchill
from scipy.integrate import quad
from scipy.optimize import brentq

import convlib as cl
from convlib import Layer
from convlib import vessels as v
from convlib.errors import InputError

SIGMA = 5.670374419e-8   # CODATA 2018
G = 9.80665              # standard gravity (CGPM 1901)


def _air(film):
    """k, nu, Pr of air at 1 atm from CoolProp directly."""
    k, mu, rho, pr = (PropsSI(key, "T", film, "P", 101325.0, "Air") for key in ("L", "V", "D", "PRANDTL"))
    return k, mu / rho, pr


def _grashof(ts, ta, length):
    film = 0.5 * (ts + ta)
    k, nu, pr = _air(film)
    return G * abs(ts - ta) / film * length ** 3 / nu ** 2, pr, k


# --------------------------------------------------------------------------- head areas
def test_head_areas_equal_the_closed_forms():
    for d in (0.8, 3.0, 4.2):
        a, c = d / 2, d / 4
        e = math.sqrt(1 - c ** 2 / a ** 2)
        spheroid = 2 * math.pi * a ** 2 + math.pi * c ** 2 / e * math.log((1 + e) / (1 - e))  # MathWorld form
        assert float(v.head_area(d, "ellipsoidal_2to1")) == pytest.approx(spheroid / 2, rel=1e-12)
        assert float(v.head_area(d, "ellipsoidal_2to1")) == pytest.approx(SA_ellipsoidal_head(d, d / 4), rel=1e-9)
        assert float(v.head_area(d, "hemispherical")) == pytest.approx(2 * math.pi * a * a, rel=1e-12)  # cap, h = R
        assert float(v.head_area(d, "flat")) == pytest.approx(math.pi * a * a, rel=1e-12)
    # common practice: a 2:1 ellipsoidal head's outside area is about 1.09 D^2
    assert float(v.head_area(1.0, "ellipsoidal_2to1")) == pytest.approx(1.09, abs=0.01)


def test_torispherical_head_is_a_cap_and_a_torus_zone():
    d = 2.5
    crown, knuckle, radius = 1.0 * d, 0.06 * d, d / 2
    # tangency of crown and knuckle (geometry): the knuckle centre lies on the crown's radius, crown - knuckle away
    z0 = math.sqrt((crown - knuckle) ** 2 - (radius - knuckle) ** 2)     # crown centre behind the tangent line
    depth = crown - z0
    assert depth / d == pytest.approx(0.169, abs=0.001)                  # common practice: F&D depth ~ 0.169 D
    alpha = math.asin((radius - knuckle) / (crown - knuckle))
    cap = 2 * math.pi * crown * (crown - crown * math.cos(alpha))        # 2 pi R h
    # knuckle: surface of revolution of the arc rho = (R - r) + r sin(psi), ds = r dpsi, psi from alpha to pi/2
    zone = quad(lambda psi: 2 * math.pi * ((radius - knuckle) + knuckle * math.sin(psi)) * knuckle, alpha,
                math.pi / 2)[0]
    assert float(v.head_area(d, "torispherical")) == pytest.approx(cap + zone, rel=1e-10)
    assert float(v.head_area(d, "torispherical")) == pytest.approx(SA_torispheroidal(D=d, f=1.0, k=0.06), rel=1e-9)


def test_bare_heads_face_has_both_heads_area():
    for heads in v.HEADS:
        r = v.horizontal_tank(2.4, 6.0, heads=heads, surface_temperature=330.0, air_temperature=290.0)
        assert float(r.face("heads").area) == pytest.approx(2 * float(v.head_area(2.4, heads)), rel=1e-12)
        assert float(r.face("shell").area) == pytest.approx(math.pi * 2.4 * 6.0, rel=1e-12)
        assert float(r.area) == pytest.approx(float(r.face("heads").area) + float(r.face("shell").area), rel=1e-12)


def test_flat_head_height_is_the_chord_average_of_the_laminar_plate_law():
    # sum over the disc's vertical chords c(x) = 2 sqrt(R^2 - x^2) of c^(3/4) dx equals A L^(-1/4) (h ~ c^(-1/4))
    integral = quad(lambda x: (2 * math.sqrt(0.25 - x * x)) ** 0.75, -0.5, 0.5)[0]
    assert v.FLAT_HEAD_HEIGHT_RATIO == pytest.approx((integral / (math.pi / 4)) ** -4, rel=1e-9)


# --------------------------------------------------------------------------- bare tank, hand calculation
@pytest.mark.parametrize("heads", ["hemispherical", "flat"])
def test_bare_tank_equals_a_hand_calculation(heads):
    d, length, ts, ta, eps = 2.0, 7.0, 348.15, 288.15, 0.85
    r = v.horizontal_tank(d, length, heads=heads, surface_temperature=ts, air_temperature=ta, emissivity=eps,
                          exact_properties=True)
    radiation = eps * SIGMA * (ts ** 4 - ta ** 4)
    # shell: Churchill & Chu (1975) horizontal cylinder, written out
    gr, pr, k = _grashof(ts, ta, d)
    ra = gr * pr
    nu = (0.60 + 0.387 * ra ** (1 / 6) / (1 + (0.559 / pr) ** (9 / 16)) ** (8 / 27)) ** 2
    assert nu == pytest.approx(Nu_horizontal_cylinder_Churchill_Chu(pr, gr), rel=1e-12)
    h = nu * k / d
    shell = r.face("shell")
    assert float(shell.h_convection) == pytest.approx(h, rel=1e-6)
    assert float(shell.q_total) == pytest.approx(math.pi * d * length * (h * (ts - ta) + radiation), rel=1e-6)
    # heads
    if heads == "hemispherical":   # two halves of a sphere of diameter D: Churchill (1983)
        gr, pr, k = _grashof(ts, ta, d)
        h_head, area = Nu_sphere_Churchill(pr, gr) * k / d, math.pi * d * d
    else:                          # vertical plates of height 0.8164 D: Churchill & Chu (1975), written out
        height = (quad(lambda x: (2 * math.sqrt(0.25 - x * x)) ** 0.75, -0.5, 0.5)[0] / (math.pi / 4)) ** -4 * d
        gr, pr, k = _grashof(ts, ta, height)
        ra = gr * pr
        nu = (0.825 + 0.387 * ra ** (1 / 6) / (1 + (0.492 / pr) ** (9 / 16)) ** (8 / 27)) ** 2
        assert nu == pytest.approx(Nu_vertical_plate_Churchill(pr, gr), rel=1e-12)
        h_head, area = nu * k / height, 2 * math.pi * d * d / 4
    assert float(r.face("heads").h_convection) == pytest.approx(h_head, rel=1e-6)
    assert float(r.face("heads").q_total) == pytest.approx(area * (h_head * (ts - ta) + radiation), rel=1e-6)
    # with the interpolated property tables (error < 0.05 %, convlib.properties)
    tables = v.horizontal_tank(d, length, heads=heads, surface_temperature=ts, air_temperature=ta, emissivity=eps)
    assert float(tables.q_total) == pytest.approx(float(r.q_total), rel=5e-4)


def test_insulated_hemispherical_heads_balance_conduction_with_free_convection():
    # independent: brentq on (Tf - Ts)/R = A (h_N (Ts - Ta) + eps sigma (Ts^4 - Ta^4)) over the sphere the two heads
    # make, spherical shells of insulation, inner film on the inner area; Churchill (1983) from ht
    d, tf, ta, eps, hi = 2.0, 423.15, 283.15, 0.2, 300.0
    r1, r2 = d / 2, d / 2 + 0.08
    resistance = (1 / r1 - 1 / r2) / (4 * math.pi * 0.05) + 1 / (hi * 4 * math.pi * r1 ** 2)

    def out(ts):
        gr, pr, k = _grashof(ts, ta, 2 * r2)
        h = Nu_sphere_Churchill(pr, gr) * k / (2 * r2)
        return 4 * math.pi * r2 ** 2 * (h * (ts - ta) + eps * SIGMA * (ts ** 4 - ta ** 4))

    ts = brentq(lambda t: (tf - t) / resistance - out(t), ta, tf, xtol=1e-10)
    r = v.horizontal_tank(d, 5.0, heads="hemispherical", fluid_temperature=tf, air_temperature=ta, emissivity=eps,
                          head_layers=[Layer(0.08, 0.05)], inner_coefficient=hi, exact_properties=True)
    heads = r.face("heads")
    assert float(heads.surface_temperature) == pytest.approx(ts, abs=1e-4)
    assert float(heads.q_total) == pytest.approx((tf - ts) / resistance, rel=1e-5)


def test_insulated_flat_heads_balance_a_flat_layer():
    # independent: brentq on k/t (Tf - Ts) = h_N (Ts - Ta) + eps sigma (Ts^4 - Ta^4), plate of height 0.8164 D
    d, tf, ta, eps, t, kins = 3.0, 393.15, 278.15, 0.9, 0.05, 0.04
    height = v.FLAT_HEAD_HEIGHT_RATIO * d   # checked against the chord integral above

    def out(ts):
        gr, pr, k = _grashof(ts, ta, height)
        return Nu_vertical_plate_Churchill(pr, gr) * k / height * (ts - ta) + eps * SIGMA * (ts ** 4 - ta ** 4)

    ts = brentq(lambda s: kins / t * (tf - s) - out(s), ta, tf, xtol=1e-10)
    r = v.horizontal_tank(d, 5.0, heads="flat", fluid_temperature=tf, air_temperature=ta, emissivity=eps,
                          head_layers=[Layer(t, kins)], exact_properties=True)
    assert float(r.face("heads").surface_temperature) == pytest.approx(ts, abs=1e-4)
    assert float(r.face("heads").q_total) == pytest.approx(kins / t * (tf - ts) * 2 * math.pi * d * d / 4, rel=1e-5)


# --------------------------------------------------------------------------- the shell is a line
def test_shell_equals_the_bare_and_the_insulated_pipe_of_its_length():
    d, length = 2.5, 12.0
    around = dict(air_temperature=268.15, wind_speed=4.0, sky_view_fraction=0.5)
    bare = v.horizontal_tank(d, length, surface_temperature=358.15, **around)
    pipe = cl.bare_surface("horizontal_cylinder", surface_temperature=358.15, diameter=d, length=length, **around)
    assert float(bare.face("shell").q_total) == pytest.approx(float(pipe.q_total), rel=1e-6)
    layers = [Layer(0.06, 0.04), Layer(0.001, 45.0)]
    tank = v.horizontal_tank(d, length, fluid_temperature=423.15, shell_layers=layers, emissivity=0.3, **around)
    line = cl.insulated_pipe(d, 423.15, layers, jacket_emissivity=0.3, length=length, **around)
    assert float(tank.face("shell").q_total) == pytest.approx(float(line.q_total), rel=1e-6)
    assert float(tank.face("shell").surface_temperature) == pytest.approx(float(line.surface_temperature), abs=1e-5)


def test_long_tank_tends_to_the_line():
    # the heads do not grow with the length: per metre the tank tends to the line
    lengths = np.array([5.0, 50.0, 500.0, 5000.0])
    r = v.horizontal_tank(3.0, lengths, heads="torispherical", surface_temperature=333.15, air_temperature=283.15)
    per_metre = float(cl.bare_surface("horizontal_cylinder", surface_temperature=333.15, diameter=3.0,
                                      air_temperature=283.15).q_per_length)
    excess = r.q_total / lengths / per_metre - 1.0
    assert np.all(np.diff(excess) < 0) and excess[-1] < 1e-3 and np.all(excess > 0)


# --------------------------------------------------------------------------- signs and layers
@pytest.mark.parametrize("heads", v.HEADS)
def test_cold_tank_gains_heat_on_every_face(heads):
    r = v.horizontal_tank(2.0, 6.0, heads=heads, fluid_temperature=243.15, air_temperature=298.15,
                          shell_layers=[Layer(0.1, 0.03)], head_layers=[Layer(0.1, 0.03)], emissivity=0.2)
    for face in r.faces:
        assert float(face.q_total) < 0
        assert 243.15 < float(face.surface_temperature) < 298.15
    assert float(r.q_total) == pytest.approx(sum(float(f.q_total) for f in r.faces), rel=1e-12)


@pytest.mark.parametrize("heads", v.HEADS)
def test_thicker_layers_lose_less_on_every_face(heads):
    t = np.array([0.0, 0.02, 0.05, 0.1, 0.2])
    r = v.horizontal_tank(3.0, 8.0, heads=heads, fluid_temperature=423.15, air_temperature=283.15, wind_speed=3.0,
                          shell_layers=[Layer(t, 0.04)], head_layers=[Layer(t, 0.04)])
    for face in r.faces:
        assert np.all(np.diff(face.q_total) < 0), face.name
    bare = v.horizontal_tank(3.0, 8.0, heads=heads, surface_temperature=423.15, air_temperature=283.15,
                             wind_speed=3.0)
    assert float(r.q_total[0]) == pytest.approx(float(bare.q_total), rel=1e-9)   # no layer: the bare tank


# --------------------------------------------------------------------------- arrays and errors
def test_every_input_broadcasts_like_the_scalar_calls():
    d = np.array([1.5, 2.5, 4.0])
    tf = np.array([[313.15], [393.15]])
    together = v.horizontal_tank(d, 6.0, heads="ellipsoidal_2to1", fluid_temperature=tf, air_temperature=283.15,
                                 wind_speed=2.0, shell_layers=[Layer(0.05, 0.04)], head_layers=[Layer(0.04, 0.04)])
    assert together.q_total.shape == (2, 3)
    for i in range(2):
        for j in range(3):
            alone = v.horizontal_tank(d[j], 6.0, heads="ellipsoidal_2to1", fluid_temperature=tf[i, 0],
                                      air_temperature=283.15, wind_speed=2.0, shell_layers=[Layer(0.05, 0.04)],
                                      head_layers=[Layer(0.04, 0.04)])
            for a, b in zip(together.faces, alone.faces):
                assert a.q_total[i, j] == pytest.approx(float(b.q_total), rel=1e-7)


@pytest.mark.parametrize("kwargs, field", [
    (dict(heads="elliptical"), "heads"),
    (dict(diameter=-1.0), "diameter"),
    (dict(length=0.0), "length"),
    (dict(shell_layers=[Layer(0.05, 0.04)]), "shell_layers"),
    (dict(head_layers=[Layer(0.05, 0.04)]), "head_layers"),
    (dict(inner_coefficient=100.0), "inner_coefficient"),
    (dict(emissivity=1.5), "emissivity"),
])
def test_bad_input_names_the_field(kwargs, field):
    base = dict(diameter=2.0, length=6.0, surface_temperature=330.0, air_temperature=290.0)
    with pytest.raises(InputError) as info:
        v.horizontal_tank(**{**base, **kwargs})
    assert field in info.value.field


def test_wind_along_the_axis_is_refused():
    with pytest.raises(InputError) as info:
        v.horizontal_tank(2.0, 6.0, surface_temperature=330.0,
                          surroundings=cl.Surroundings(air_temperature=290.0, wind_speed=3.0, wind_direction="along"))
    assert info.value.field == "wind_direction"
