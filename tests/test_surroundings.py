"""The surroundings object: one validated description of what a surface exchanges heat with.

These are structural checks (the object and the plain keywords give the same numbers; bad input is refused
with a message naming the field). The physics behind the numbers is checked against published values in
tests/test_surface.py and tests/test_pipe.py.
"""
import numpy as np
import pytest

import convlib as cl
from convlib.errors import InputError
from convlib.surroundings import SURROUNDINGS_FIELDS, Surroundings, resolve

OUTDOOR = dict(air_temperature=268.15, wind_speed=np.array([0.0, 2.0, 8.0]), sky_view_fraction=0.5,
               surroundings_temperature=263.15, solar_irradiance=300.0, pressure=95000.0)


def test_object_and_keywords_give_identical_bare_surface():
    by_keywords = cl.bare_surface(surface_temperature=330.0, diameter=0.1683, length=2.0, **OUTDOOR)
    by_object = cl.bare_surface(surface_temperature=330.0, diameter=0.1683, length=2.0,
                                surroundings=cl.Surroundings(**OUTDOOR))
    for name, value in by_keywords.as_dict().items():
        np.testing.assert_array_equal(value, getattr(by_object, name), err_msg=name)


def test_object_and_keywords_give_identical_insulated_pipe():
    layers = [cl.Layer(0.05, 0.04)]
    by_keywords = cl.insulated_pipe(0.1143, 423.15, layers, **OUTDOOR)
    by_object = cl.insulated_pipe(0.1143, 423.15, layers, surroundings=Surroundings(**OUTDOOR))
    np.testing.assert_array_equal(by_keywords.q_per_length, by_object.q_per_length)
    np.testing.assert_array_equal(by_keywords.surface_temperature, by_object.surface_temperature)


def test_defaults_are_still_air_indoors_at_standard_pressure():
    s = Surroundings(air_temperature=293.15)
    assert float(s.wind_speed) == 0.0 and float(s.sky_view_fraction) == 0.0 and float(s.solar_irradiance) == 0.0
    assert float(s.pressure) == 101325.0  # ISO 2533:1975 standard atmosphere at sea level
    np.testing.assert_array_equal(s.radiant_temperature, 293.15)
    np.testing.assert_array_equal(s.soil_temperature, 293.15)
    plain = cl.bare_surface(surface_temperature=350.0, air_temperature=293.15, diameter=0.1, length=1.0)
    explicit = cl.bare_surface(surface_temperature=350.0, air_temperature=293.15, diameter=0.1, length=1.0,
                               wind_speed=0.0, sky_view_fraction=0.0, solar_irradiance=0.0, pressure=101325.0)
    np.testing.assert_array_equal(plain.q_per_length, explicit.q_per_length)


def test_both_forms_at_once_are_refused():
    with pytest.raises(InputError, match="not both.*wind_speed") as info:
        cl.bare_surface(surface_temperature=330.0, diameter=0.1, length=1.0, wind_speed=3.0,
                        surroundings=Surroundings(air_temperature=293.15))
    assert info.value.field == "wind_speed"


def test_air_temperature_required_in_either_form():
    with pytest.raises(InputError, match="air_temperature is required"):
        cl.insulated_pipe(0.1, 400.0, [cl.Layer(0.03, 0.04)])


@pytest.mark.parametrize("field, value, words", [
    ("air_temperature", -5.0, "air_temperature"),
    ("wind_speed", -1.0, "wind_speed"),
    ("wind_speed", 250.0, "wind_speed"),
    ("sky_view_fraction", 1.5, "sky_view_fraction"),
    ("solar_irradiance", 5000.0, "solar_irradiance"),
    ("relative_humidity", 80.0, "80 % is 0.8"),
    ("relative_humidity", 150.0, "relative_humidity"),
    ("wind_direction", "diagonal", "wind_direction"),
    ("pressure", 0.0, "pressure"),
    ("ground_temperature", float("nan"), "ground_temperature"),
])
def test_bad_fields_name_field_and_value(field, value, words):
    kwargs = {"air_temperature": 293.15, field: value}
    with pytest.raises(InputError, match=words):
        Surroundings(**kwargs)


def test_wind_along_a_horizontal_cylinder_is_refused_not_guessed():
    with pytest.raises(InputError, match="across") as info:
        cl.bare_surface(surface_temperature=330.0, diameter=0.1, length=1.0,
                        surroundings=Surroundings(air_temperature=293.15, wind_speed=3.0, wind_direction="along"))
    assert info.value.field == "wind_direction"


def test_fields_broadcast_and_unknown_names_are_listed():
    s = Surroundings(air_temperature=np.array([[270.0], [290.0]]), wind_speed=np.array([0.0, 1.0, 5.0]))
    assert s.shape == (2, 3)
    with pytest.raises(TypeError, match="wind"):
        resolve(air_temperature=293.15, wind=3.0)
    assert set(SURROUNDINGS_FIELDS) >= {"air_temperature", "wind_speed", "relative_humidity", "sky_temperature",
                                        "ground_temperature", "solar_irradiance", "pressure", "wind_direction"}


def test_replace_validates_again():
    s = Surroundings(air_temperature=293.15)
    assert float(s.replace(wind_speed=4.0).wind_speed) == 4.0
    with pytest.raises(InputError, match="emissivity|sky_view_fraction"):
        s.replace(sky_view_fraction=-0.1)


def test_vessels_take_the_surroundings_object_like_their_keywords():
    around = dict(air_temperature=268.15, wind_speed=4.0, surroundings_temperature=263.15, pressure=95000.0)
    layers = [cl.Layer(0.1, 0.04)]
    a = cl.vertical_tank(6.0, 8.0, fluid_temperature=353.15, wall_layers=layers, roof_layers=layers, outdoor=True,
                         **around)
    b = cl.vertical_tank(6.0, 8.0, fluid_temperature=353.15, wall_layers=layers, roof_layers=layers, outdoor=True,
                         surroundings=Surroundings(**around))
    np.testing.assert_array_equal(a.q_total, b.q_total)
    s1 = cl.spherical_tank(12.0, fluid_temperature=243.15, layers=layers, **around)
    s2 = cl.spherical_tank(12.0, fluid_temperature=243.15, layers=layers, surroundings=Surroundings(**around))
    np.testing.assert_array_equal(s1.q_total, s2.q_total)


def test_a_duct_takes_its_wind_direction_from_the_surroundings_object():
    across = Surroundings(air_temperature=268.15, wind_speed=5.0, wind_direction="across")
    by_object = cl.rectangular_duct(0.6, 0.6, 20.0, surface_temperature=313.15, surroundings=across)
    by_keyword = cl.rectangular_duct(0.6, 0.6, 20.0, surface_temperature=313.15, air_temperature=268.15,
                                     wind_speed=5.0, wind_direction="across")
    along = cl.rectangular_duct(0.6, 0.6, 20.0, surface_temperature=313.15, air_temperature=268.15, wind_speed=5.0)
    np.testing.assert_array_equal(by_object.q_total, by_keyword.q_total)
    assert float(by_object.q_total) != float(along.q_total)


def test_the_duct_cross_flow_law_is_in_the_registry():
    # Jakob (1949) as tabulated by Incropera et al., 6th ed., Table 7.3: square, face to the flow, C = 0.102,
    # m = 0.675 for 5e3 <= Re <= 1e5 (from memory); Nu = 0.102 x 2e4^0.675 x 0.71^(1/3) = 72.8 by hand
    record = next(r for r in cl.catalog("square_cylinder_crossflow") if r["key"] == "jakob")
    assert record["re_range"] == (5e3, 1e5)
    assert float(cl.nusselt("square_cylinder_crossflow", "jakob", Re=2e4, Pr=0.71)) == pytest.approx(72.8, abs=0.05)
