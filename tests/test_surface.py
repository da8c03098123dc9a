"""convlib.bare_surface re-computed independently of convlib.

The reference below takes air properties from CoolProp ``PropsSI`` at the film
temperature (beta = 1/T_film, ideal gas), forms Gr, Ra, Re by hand, takes Nu
from ``ht``'s individual correlation functions (or the paper's formula where
``ht`` has none), mixes by Churchill (1977) and adds grey-body radiation. With
convlib's interpolated property tables (documented error < 0.05 %) results must
agree to 0.1 %; with ``exact_properties=True`` to rounding (1e-9).
"""
import math
from types import SimpleNamespace

import numpy as np
import pytest
from CoolProp.CoolProp import PropsSI
from ht import conv_external as hte
from ht import conv_free_immersed as htf

import convlib as cl
from convlib.regimes import FORCED, NATURAL, Flag

G = 9.80665  # standard acceleration of gravity [m/s2], 3rd CGPM (1901), exact
H_PLANCK, K_BOLTZMANN, C_LIGHT = 6.62607015e-34, 1.380649e-23, 299792458.0  # SI 2019, exact
SIGMA = 2 * math.pi ** 5 * K_BOLTZMANN ** 4 / (15 * H_PLANCK ** 3 * C_LIGHT ** 2)  # Stefan-Boltzmann
P_ATM = 101325.0
TABLE_RTOL = 1e-3  # property tables interpolate CoolProp within 0.05 %


def air(T, p=P_ATM):
    rho, mu, k, cp = (PropsSI(key, "T", T, "P", p, "Air") for key in ("D", "V", "L", "C"))
    return SimpleNamespace(rho=rho, mu=mu, k=k, cp=cp, nu=mu / rho, pr=cp * mu / k, beta=1.0 / T)


def reference(shape, Ts, Ta, wind=0.0, eps=0.9, p=P_ATM, **size):
    """Heat loss of one surface, written out from the sources (scalars only)."""
    f = air(0.5 * (Ts + Ta), p)
    dT = Ts - Ta
    if shape in ("horizontal_cylinder", "vertical_cylinder", "sphere"):
        D = size["diameter"]
        L_frc, area_per_run = D, math.pi * D  # side area per metre of run; sphere: pi D^2 per D
        L_nat = size["length"] if shape == "vertical_cylinder" else D
    elif shape == "vertical_plate":
        L_nat, L_frc, area_per_run = size["height"], size["width"], size["height"]
    else:
        L, W = size["length"], size["width"]
        L_nat, L_frc, area_per_run = L * W / (2 * (L + W)), L, W  # A/P: Goldstein et al. (1973)
    Gr = G * f.beta * abs(dT) * L_nat ** 3 / f.nu ** 2
    Ra = Gr * f.pr
    if shape == "horizontal_cylinder":  # Churchill & Chu (1975) 18:1049 eq. 4 (via ht)
        Nu_n = htf.Nu_horizontal_cylinder_Churchill_Chu(f.pr, Gr)
    elif shape == "sphere":  # Churchill (1983) (via ht)
        Nu_n = htf.Nu_sphere_Churchill(f.pr, Gr)
    elif shape == "vertical_plate":  # Churchill & Chu (1975) 18:1323 eq. 6 (via ht)
        Nu_n = htf.Nu_vertical_plate_Churchill(f.pr, Gr)
    elif shape == "vertical_cylinder":  # Popiel (2007) factor on Churchill & Chu at every D/L (via ht)
        D, L = size["diameter"], size["length"]
        Nu_n = htf.Nu_vertical_cylinder_Popiel_Churchill(f.pr, Gr, L, D)
    else:  # McAdams (1954) via ht: a hot face up or a cold face down is "buoyancy assisted"
        Nu_n = htf.Nu_horizontal_plate_McAdams(f.pr, Gr, buoyancy=(shape == "horizontal_plate_up") == (dT > 0))
    h_n = Nu_n * f.k / L_nat
    h_f, Re, n = 0.0, 0.0, 4.0 if shape in ("horizontal_cylinder", "vertical_cylinder", "sphere") else 3.0
    if wind > 0:
        if shape == "sphere":  # Whitaker (1972), AIChE J. 18:361: free-stream properties, mu_s at the surface
            s = air(Ta, p)
            Re = wind * D / s.nu
            Nu_f = 2 + (0.4 * Re ** 0.5 + 0.06 * Re ** (2 / 3)) * s.pr ** 0.4 * (s.mu / air(Ts, p).mu) ** 0.25
            h_f = Nu_f * s.k / D
        else:
            Re = wind * L_frc / f.nu
            if "cylinder" in shape:  # Churchill & Bernstein (1977) eq. 25 (via ht)
                Nu_f = hte.Nu_cylinder_Churchill_Bernstein(Re, f.pr)
            else:  # laminar flat plate 0.664 Re^1/2 Pr^1/3 (via ht, Baehr); the cases keep Re < 5e5
                assert Re < 5e5
                Nu_f = hte.Nu_horizontal_plate_laminar_Baehr(Re, f.pr)
            h_f = Nu_f * f.k / L_frc
    h = (h_f ** n + h_n ** n) ** (1 / n)  # Churchill (1977), transverse: n = 4 round bodies, 3 otherwise
    q_rad = eps * SIGMA * (Ts ** 4 - Ta ** 4)  # small grey body in large surroundings at T_air
    Ri = G * f.beta * abs(dT) * L_frc ** 3 / f.nu ** 2 / Re ** 2 if wind > 0 else math.inf  # Gr / Re^2
    return dict(q_per_length=(h * dT + q_rad) * area_per_run, h_convection=h, h_natural=h_n, h_forced=h_f,
                rayleigh=Ra, grashof=Gr, reynolds=Re, nusselt=h * L_nat / f.k, richardson=Ri)


CASES = [  # shape, sizes, surface and air temperature [K], wind [m/s]
    ("horizontal_cylinder", dict(diameter=0.1143, length=1.0), 363.15, 288.15, 0.0),
    ("horizontal_cylinder", dict(diameter=0.1143, length=1.0), 363.15, 288.15, 3.0),
    ("horizontal_cylinder", dict(diameter=0.0603, length=2.0), 278.15, 303.15, 0.7),
    ("vertical_plate", dict(height=1.0, width=0.8), 340.0, 293.15, 0.0),
    ("vertical_plate", dict(height=1.0, width=0.8), 340.0, 293.15, 1.5),
    ("horizontal_plate_up", dict(length=1.2, width=0.8), 350.0, 293.15, 0.0),
    ("horizontal_plate_up", dict(length=1.2, width=0.8), 275.0, 300.0, 0.0),  # cold face up: hot-face-down law
    ("horizontal_plate_up", dict(length=1.2, width=0.8), 350.0, 293.15, 1.0),
    ("horizontal_plate_down", dict(length=1.2, width=0.8), 350.0, 293.15, 0.0),
    ("horizontal_plate_down", dict(length=1.2, width=0.8), 275.0, 300.0, 0.0),
    ("sphere", dict(diameter=0.5), 330.0, 293.15, 0.0),
    ("sphere", dict(diameter=0.5), 330.0, 293.15, 2.0),
    ("vertical_cylinder", dict(diameter=0.1, length=2.0), 353.15, 293.15, 0.0),  # slender: Popiel
    ("vertical_cylinder", dict(diameter=0.6, length=1.0), 353.15, 293.15, 0.0),  # thick: factor near 1
    ("vertical_cylinder", dict(diameter=0.1, length=2.0), 353.15, 293.15, 2.0),
]
CASE_IDS = [f"{c[0]}-{c[2]:.0f}K-{c[4]}ms" for c in CASES]


@pytest.mark.parametrize("exact,rtol", [(False, TABLE_RTOL), (True, 1e-9)], ids=["tables", "exact"])
@pytest.mark.parametrize("shape,size,Ts,Ta,wind", CASES, ids=CASE_IDS)
def test_bare_surface_matches_independent_recomputation(shape, size, Ts, Ta, wind, exact, rtol):
    expected = reference(shape, Ts, Ta, wind, eps=0.8, **size)
    r = cl.bare_surface(shape, surface_temperature=Ts, air_temperature=Ta, wind_speed=wind, emissivity=0.8,
                        exact_properties=exact, **size)
    for name, value in expected.items():
        assert getattr(r, name) == pytest.approx(value, rel=rtol, abs=1e-300), name
    assert r.regime == (NATURAL if wind == 0 else r.regime)


def test_slender_and_thick_vertical_cylinder_cases_take_both_laws():
    # guards the two vertical-cylinder cases above: they must sit on either side of 35/Gr^(1/4)
    for (D, L), slender in (((0.1, 2.0), True), ((0.6, 1.0), False)):
        r = cl.bare_surface("vertical_cylinder", surface_temperature=353.15, air_temperature=293.15,
                            diameter=D, length=L)
        assert (D / L < 35 * float(r.grashof) ** -0.25) == slender
        assert bool(r.warnings & Flag.SLENDER_CYLINDER_CORRECTED) == slender


def test_cold_upper_face_uses_hot_face_down_law():
    # McAdams (1954): cold face up behaves as hot face down, Nu = 0.27 Ra^1/4 on L = A/P
    r = cl.bare_surface("horizontal_plate_up", surface_temperature=275.0, air_temperature=300.0, length=1.2, width=0.8)
    f, L = air(287.5), 0.96 / 4.0
    assert r.h_natural == pytest.approx(0.27 * float(r.rayleigh) ** 0.25 * f.k / L, rel=TABLE_RTOL)


def test_textbook_steam_pipe_in_still_air():
    # Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., Example 9.3 (from memory): D = 0.1 m,
    # Ts = 165 C, air and walls 23 C, eps = 0.85: Ra_D ~ 5.07e6, q' = 325 (conv.) + 441 (rad.) = 766 W/m.
    # The book's properties come from its Table A.4 at 367 K (about 1 % from CoolProp), sigma = 5.67e-8:
    # 3 % on convection and the total, 1 % on radiation.
    r = cl.bare_surface(surface_temperature=438.15, air_temperature=296.15, diameter=0.1, length=1.0,
                        emissivity=0.85)
    assert float(r.rayleigh) == pytest.approx(5.07e6, rel=0.05)
    assert float(r.q_convection_per_length) == pytest.approx(325.0, rel=0.03)
    assert float(r.q_radiation_per_length) == pytest.approx(441.0, rel=0.01)
    assert float(r.q_per_length) == pytest.approx(766.0, rel=0.03)


# --------------------------------------------------------------------------- cold, zero difference
def test_cold_surface_gains_heat_with_gr_from_absolute_difference():
    r = cl.bare_surface(surface_temperature=263.15, air_temperature=293.15, diameter=0.1, length=1.0)
    f = air(278.15)
    assert float(r.grashof) == pytest.approx(G * (1 / 278.15) * 30.0 * 0.1 ** 3 / f.nu ** 2, rel=TABLE_RTOL)
    assert r.q_per_length < 0 and r.q_convection_per_length < 0 and r.q_radiation_per_length < 0
    assert r.h_convection > 0 and r.h_natural > 0


@pytest.mark.parametrize("wind", [0.0, 2.0])
@pytest.mark.parametrize("shape,size", [(c[0], c[1]) for c in CASES[::3]] + [("sphere", dict(diameter=0.5))])
def test_zero_difference_gives_zero_convection_and_no_nan(shape, size, wind):
    r = cl.bare_surface(shape, surface_temperature=300.0, air_temperature=300.0, wind_speed=wind, **size)
    assert float(r.q_convection_per_length) == 0.0 and float(r.q_per_length) == 0.0
    for name, value in r.as_dict().items():
        assert not np.isnan(value).any(), name
        assert name == "richardson" or np.isfinite(value).all(), name  # Ri = inf in still air, by definition


# --------------------------------------------------------------------------- broadcasting
def test_scalar_list_ndarray_inputs_agree():
    kw = dict(air_temperature=293.15, diameter=0.1, length=1.0, wind_speed=1.0)
    singles = [float(cl.bare_surface(surface_temperature=t, **kw).q_per_length) for t in (330.0, 360.0)]
    for ts in ([330.0, 360.0], np.array([330.0, 360.0])):
        r = cl.bare_surface(surface_temperature=ts, **kw)
        assert r.q_per_length.shape == (2,)
        np.testing.assert_allclose(r.q_per_length, singles, rtol=1e-12)


def test_two_dimensional_broadcast_of_temperature_and_wind():
    ts, wind = np.array([[310.0], [350.0], [400.0]]), np.array([0.5, 1.0, 5.0, 10.0])
    r = cl.bare_surface(surface_temperature=ts, air_temperature=293.15, diameter=0.1, length=1.0, wind_speed=wind)
    for name, value in r.as_dict().items():
        assert value.shape == (3, 4), name
        assert np.isfinite(value).all(), name
    one = cl.bare_surface(surface_temperature=350.0, air_temperature=293.15, diameter=0.1, length=1.0, wind_speed=5.0)
    for name, value in one.as_dict().items():
        assert r.as_dict()[name][1, 2] == pytest.approx(value, rel=1e-12), name


# --------------------------------------------------------------------------- regimes in bare_surface
def test_still_air_is_natural_without_forced_flags():
    r = cl.bare_surface(surface_temperature=[300.0, 400.0], air_temperature=293.15, diameter=[1e-3, 2.0], length=1.0)
    assert (r.reynolds == 0).all() and (r.h_forced == 0).all() and (r.regime == NATURAL).all()
    assert not (r.warnings & Flag.FORCED_OUT_OF_RANGE).any()
    np.testing.assert_array_equal(r.h_convection, r.h_natural)


def test_strong_wind_is_forced():
    r = cl.bare_surface(surface_temperature=330.0, air_temperature=293.15, diameter=0.1, length=1.0, wind_speed=15.0)
    assert r.regime == FORCED and r.richardson < 0.1  # Ri = Gr/Re^2 on the diameter
    f = air(311.575)
    assert float(r.reynolds) == pytest.approx(15.0 * 0.1 / f.nu, rel=TABLE_RTOL)
    # flow regime of the dominant mode: cylinder cross-flow critical Re ~ 2e5 (Zukauskas 1972); Ra ~ 1e9 natural
    assert r.flow_regime_names().item() == "laminar"  # Re ~ 9e4
    big = cl.bare_surface(surface_temperature=330.0, air_temperature=293.15, diameter=3.0, length=1.0, wind_speed=20.0)
    assert big.reynolds > 1e6 and big.flow_regime_names().item() == "turbulent"
    still = cl.bare_surface(surface_temperature=330.0, air_temperature=293.15, diameter=3.0, length=1.0)
    assert still.rayleigh > 1e10 and still.flow_regime_names().item() == "turbulent"


def test_lower_pressure_weakens_natural_convection():
    # Gr ~ rho^2 ~ p^2 and Nu ~ Ra^m with m between 1/4 (laminar) and 1/3 (turbulent), k independent of p;
    # 2000 m altitude: p = 79.5 kPa (US Standard Atmosphere 1976, from memory)
    kw = dict(surface_temperature=353.15, air_temperature=293.15, diameter=0.1, length=1.0)
    sea, high = cl.bare_surface(**kw), cl.bare_surface(pressure=79500.0, **kw)
    ratio, x = float(high.h_natural / sea.h_natural), (79500.0 / P_ATM) ** 2
    assert x ** (1 / 3) * 0.995 < ratio < x ** (1 / 4) * 1.005
    assert float(high.h_natural) == pytest.approx(reference("horizontal_cylinder", 353.15, 293.15, p=79500.0,
                                                            diameter=0.1)["h_natural"], rel=TABLE_RTOL)


# --------------------------------------------------------------------------- bad inputs
GOOD = dict(shape="horizontal_cylinder", surface_temperature=350.0, air_temperature=293.15, diameter=0.1, length=1.0)


@pytest.mark.parametrize("change,message", [
    (dict(diameter=-0.1), r"diameter must be greater than 0 m; got -0\.1"),
    (dict(emissivity=1.5), r"emissivity must be between 0 and 1; got 1\.5"),
    (dict(surface_temperature=float("nan")), r"surface_temperature must be a finite number; got nan"),
    (dict(air_temperature=[293.0, float("inf")]), r"air_temperature must be a finite number"),
    (dict(wind_speed=-1.0), r"wind_speed must be at least 0 m/s; got -1"),
    (dict(shape="cube"), r"unknown shape 'cube'; choose one of: horizontal_cylinder, vertical_cylinder, sphere"),
    (dict(natural="hilpert"), r"unknown method 'hilpert' for geometry 'horizontal_cylinder'; choose one of: churchill_chu"),
    (dict(forced="morgan"), r"unknown method 'morgan' for geometry 'cylinder_crossflow'; choose one of: churchill_bern"),
    (dict(flow_direction="sideways"), r"unknown flow direction 'sideways'; choose one of: transverse"),
    (dict(shape="sphere", diameter=0.1, length=1.0), r"a sphere takes diameter; length does not apply"),
    (dict(shape="vertical_cylinder", length=None), r"a vertical cylinder needs length"),
    (dict(shape="vertical_plate", diameter=None, length=None, height=1.0), r"a vertical plate needs width"),
    (dict(solar_absorptivity=2.0), r"solar_absorptivity must be between 0 and 1"),
    (dict(mixing_exponent=0.0), r"mixing_exponent must be greater than 0"),
])
def test_bad_inputs_raise_naming_the_field(change, message):
    with pytest.raises(ValueError, match=message):
        cl.bare_surface(**{**GOOD, **change})


# --------------------------------------------------------------------------- outdoors
def test_sky_view_increases_loss_by_the_sky_exchange():
    indoor = cl.bare_surface(**GOOD, emissivity=0.9)
    outdoor = cl.bare_surface(**GOOD, emissivity=0.9, sky_view_fraction=0.5)
    assert outdoor.q_per_length > indoor.q_per_length
    t_sky = 0.0552 * 293.15 ** 1.5  # Swinbank (1963), Q. J. R. Meteorol. Soc. 89:339, clear sky
    extra = 0.9 * SIGMA * 0.5 * (293.15 ** 4 - t_sky ** 4) * math.pi * 0.1
    assert float(outdoor.q_per_length - indoor.q_per_length) == pytest.approx(extra, rel=1e-9)


def test_solar_gain_reduces_loss_by_alpha_g_d():
    shade = cl.bare_surface(**GOOD)
    sun = cl.bare_surface(**GOOD, solar_irradiance=800.0, solar_absorptivity=0.3)
    assert float(shade.q_per_length - sun.q_per_length) == pytest.approx(0.3 * 800.0 * 0.1, rel=1e-12)
    assert float(sun.q_solar_per_length) == pytest.approx(0.3 * 800.0 * 0.1, rel=1e-12)
    grey = cl.bare_surface(**GOOD, solar_irradiance=800.0, emissivity=0.6)  # default absorptivity = emissivity
    assert float(cl.bare_surface(**GOOD, emissivity=0.6).q_per_length - grey.q_per_length) == pytest.approx(48.0)


# --------------------------------------------------------------------------- strict
@pytest.mark.parametrize("change,text", [
    (dict(diameter=1e-5), "Rayleigh"),  # Ra ~ 4e-6 < 1e-5, Churchill & Chu's lower limit
    (dict(diameter=5.0, wind_speed=50.0), "Reynolds"),  # Re ~ 1.5e7 > 1e7
])
def test_strict_raises_out_of_range(change, text):
    r = cl.bare_surface(**{**GOOD, **change})
    assert r.warnings & (Flag.NATURAL_OUT_OF_RANGE | Flag.FORCED_OUT_OF_RANGE)
    with pytest.raises(ValueError, match=text):
        cl.bare_surface(**{**GOOD, **change}, strict=True)
    cl.bare_surface(**GOOD, strict=True)  # in range: no error


def test_strict_accepts_in_range_slender_vertical_pipe():
    # laminar (Gr_L about 7e8 <= 4e9) and curvature about 0.9 <= 5: inside Popiel et al. (2007)'s fit. A 3 m riser
    # (Gr_L 1.5e11, turbulent) is outside it since issue 12 item 7 (tests/test_physics_faults.py).
    r = cl.bare_surface("vertical_cylinder", surface_temperature=353.15, air_temperature=293.15, diameter=0.02,
                        length=0.5, strict=True)
    assert r.warnings & Flag.SLENDER_CYLINDER_CORRECTED


def test_cold_face_up_plate_flow_regime_follows_the_law_used():
    r = cl.bare_surface("horizontal_plate_up", surface_temperature=250.0, air_temperature=300.0, length=3.0, width=3.0)
    assert r.rayleigh > 1e8 and r.flow_regime_names().item() == "laminar"


def test_opposing_flow_tends_to_natural_as_wind_vanishes():
    kw = dict(surface_temperature=353.15, air_temperature=293.15, height=1.0, width=1.0, flow_direction="opposing")
    still = cl.bare_surface("vertical_plate", **kw)
    breath = cl.bare_surface("vertical_plate", wind_speed=1e-6, **kw)
    assert float(breath.h_convection) == pytest.approx(float(still.h_convection), rel=0.01)


@pytest.mark.parametrize("wind", [0.0, 5.0])
def test_given_convection_coefficient_replaces_the_correlations(wind):
    # q'' = h (Ts - Ta) + eps sigma (Ts^4 - Tsur^4) (Newton's law of cooling and the grey-body exchange, analytic)
    ts, ta, tsur, h, eps = np.array([320.0, 260.0]), 290.0, 280.0, 7.5, 0.6
    r = cl.bare_surface(surface_temperature=ts, air_temperature=ta, surroundings_temperature=tsur, diameter=0.2,
                        wind_speed=wind, emissivity=eps, convection_coefficient=h, convection_factor=1.2)
    expected = 1.2 * h * (ts - ta) + eps * 5.670374419e-8 * (ts ** 4 - tsur ** 4)
    np.testing.assert_allclose(r.q_per_area, expected, rtol=1e-12)
    assert (r.warnings == Flag.COEFFICIENT_GIVEN).all()
    assert any("given by the user" in m for m in r.warning_messages())
    # outside every correlation's range, a given coefficient does not make strict raise
    cl.bare_surface(surface_temperature=400.0, air_temperature=290.0, diameter=1e-5, convection_coefficient=h,
                    strict=True)
    with pytest.raises(ValueError, match="convection_coefficient"):
        cl.bare_surface(surface_temperature=320.0, air_temperature=290.0, diameter=0.2, convection_coefficient=-1.0)


def test_textbook_plate_in_different_orientations():
    # Cengel, Heat and Mass Transfer, ch. 9 example "Cooling of a plate in different orientations" (from memory):
    # a 0.6 m x 0.6 m plate at 90 C, one side insulated, air at 30 C, convection only: vertical 115 W (Churchill-Chu),
    # horizontal hot face down 64 W (0.27 Ra^(1/4), L = A/P). The book's air properties at 60 C differ from
    # CoolProp's by about 1 %: tolerance 3 %. (The faces of ducts and the floors of tanks on legs are these plates.)
    kw = dict(surface_temperature=363.15, air_temperature=303.15, emissivity=0.0, length=0.6, width=0.6)
    vertical = cl.bare_surface("vertical_plate", height=0.6, width=0.6, surface_temperature=363.15,
                               air_temperature=303.15, emissivity=0.0)
    down = cl.bare_surface("horizontal_plate_down", **kw)
    assert float(vertical.q_total) == pytest.approx(115.0, rel=0.03)
    assert float(down.q_total) == pytest.approx(64.0, rel=0.03)
