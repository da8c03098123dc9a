"""Everything broadcasts: every numeric parameter of every public function takes an array.

For each public function and each of its numeric parameters, a call with an array of 3 values (the others
scalar) must give, element by element, what the three scalar calls give. The parameters are found by
introspection: a new parameter fails here until its valid values are listed below (or it is declared
non-numeric or a solver setting). This is a property of the vectorized API, so no outside value is needed; the
physics of each function is checked against published values in its own test module.
"""
import inspect

import numpy as np
import pytest

import convlib as cl
from convlib import design, ducts, economics, face_sizing, fittings, operation, survey, transients, vessels
from convlib.pipe import Layer

LAYERS = [Layer(0.05, 0.04)]
BINS = design.WeatherBins([268.15, 283.15], [4.0, 2.0], [3000.0, 5760.0])
TARIFF, FINANCE = economics.Tariff("gas", 0.05, 0.85), economics.Finance(0.08, 0.02, 15.0)

#: Not numbers (choices, flags, objects, lists of layers) -- they select, they do not broadcast.
NOT_NUMERIC = {"shape", "natural", "forced", "flow_direction", "fluid", "fluid_phase", "exact_properties", "strict",
               "surroundings", "layers", "outer_layers", "wall_layers", "roof_layers", "floor_layers", "bins",
               "tariff", "finance", "fittings", "factors", "floor", "outdoor", "wind_direction", "heads",
               "shell_layers", "head_layers",
               "constant_coefficient", "resolvable"}
#: Settings of a solve or a catalogue (one per call by design: a tolerance, a search bound, the list of thicknesses
#: a sizing picks from or an economic study prices, class limits).
SETTINGS = {"tolerance", "max_step", "time_limit", "max_thickness", "commercial_thicknesses", "thicknesses",
            "thresholds", "installed_cost"}

#: Three valid values per numeric parameter (SI, kelvin), realistic for the base cases below.
VALUES = {
    "surface_temperature": [330.0, 360.0, 400.0], "air_temperature": [263.15, 283.15, 298.15],
    "diameter": [0.06, 0.11, 0.3], "length": [1.0, 10.0, 100.0], "height": [2.0, 5.0, 10.0],
    "width": [0.4, 0.6, 1.0], "wind_speed": [0.0, 2.0, 8.0], "emissivity": [0.1, 0.5, 0.9],
    "surroundings_temperature": [273.15, 283.15, 293.15], "sky_view_fraction": [0.0, 0.5, 1.0],
    "sky_temperature": [250.0, 260.0, 270.0], "solar_irradiance": [0.0, 300.0, 800.0],
    "solar_absorptivity": [0.2, 0.5, 0.9], "pressure": [80e3, 95e3, 101325.0], "mixing_exponent": [2.0, 3.0, 4.0],
    "convection_factor": [0.8, 1.0, 1.2], "convection_coefficient": [5.0, 10.0, 20.0],
    "pipe_outer_diameter": [0.0603, 0.1143, 0.2191], "fluid_temperature": [353.15, 393.15, 433.15],
    "jacket_emissivity": [0.1, 0.5, 0.9], "pipe_wall_thickness": [0.003, 0.005, 0.008],
    "pipe_conductivity": [15.0, 45.0, 50.0], "inner_coefficient": [50.0, 500.0, 5000.0],
    "insulation_conductivity": [0.03, 0.04, 0.06], "surface_limit": [318.15, 323.15, 333.15],
    "hottest_air_temperature": [298.15, 308.15, 318.15], "heat_loss_limit": [40.0, 60.0, 80.0],
    "relative_humidity": [0.6, 0.75, 0.9], "margin": [0.5, 1.0, 2.0], "energy_price": [0.03, 0.05, 0.08],
    "heating_efficiency": [0.7, 0.85, 0.95], "cooling_cop": [2.5, 3.0, 4.0], "co2_per_kwh": [0.0, 0.2, 0.4],
    "inlet_temperature": [343.15, 353.15, 363.15], "mass_flow": [0.5, 1.0, 2.0],
    "fluid_pressure": [3e5, 4e5, 5e5], "specific_heat": [4100.0, 4180.0, 4200.0],
    "freezing_temperature": [272.15, 273.15, 273.65], "outlet_limit": [318.15, 323.15, 328.15],
    "steam_pressure": [3e5, 6e5, 1e6], "q_total": [100.0, 1000.0, 5000.0],
    "maintain_temperature": [278.15, 283.15, 293.15], "initial_temperature": [280.15, 283.15, 288.15],
    "pipe_density": [7800.0, 7850.0, 8000.0], "pipe_specific_heat": [434.0, 450.0, 500.0],
    "water_specific_heat": [4180.0, 4200.0, 4220.0], "latent_heat": [330e3, 333.42e3, 334e3],
    "final_temperature": [303.15, 313.15, 323.15], "start_temperature": [273.15, 283.15, 293.15],
    "warm_up_time": [900.0, 1800.0, 3600.0], "ground_temperature": [278.15, 283.15, 288.15],
    "ground_conductivity": [0.5, 1.5, 2.0], "wall_thickness": [0.01, 0.02, 0.03],
    "wall_conductivity": [15.0, 45.0, 50.0], "discount_rate": [0.03, 0.08, 0.12], "escalation": [0.0, 0.02, 0.04],
    "years": [5.0, 10.0, 20.0], "return_temperature": [333.15, 353.15, 363.15],
    "enthalpy_difference": [2.2e6, 2.4e6, 2.6e6], "saved_kwh": [1e3, 1e4, 1e5], "investment": [100.0, 1e3, 1e4],
    "annual_heat_kwh": [1e3, 1e4, 1e5], "insulation_thickness": [0.03, 0.05, 0.08], "ratio": [0.9, 1.5, 3.0],
    "nps": [1.0, 4.0, 8.0], "pressure_class": [150, 300, 150],
}

#: Base case of each function (scalars); a parameter's own value replaces the base. Output: the numbers compared.
CASES = {
    cl.bare_surface: (dict(surface_temperature=360.0, air_temperature=283.15, diameter=0.1143, length=1.0),
                      lambda r: r.q_per_length),
    cl.insulated_pipe: (dict(pipe_outer_diameter=0.1143, fluid_temperature=423.15, layers=LAYERS,
                             air_temperature=283.15), lambda r: r.q_per_length),
    design.thickness_for_surface_temperature: (dict(pipe_outer_diameter=0.1143, fluid_temperature=473.15,
                                                    insulation_conductivity=0.04, air_temperature=298.15),
                                               lambda r: r.required_thickness),
    design.thickness_for_heat_loss: (dict(pipe_outer_diameter=0.1143, fluid_temperature=453.15,
                                          insulation_conductivity=0.04, heat_loss_limit=60.0,
                                          air_temperature=293.15), lambda r: r.required_thickness),
    design.thickness_against_condensation: (dict(pipe_outer_diameter=0.1683, fluid_temperature=279.15,
                                                 insulation_conductivity=0.035, relative_humidity=0.8,
                                                 air_temperature=303.15), lambda r: r.required_thickness),
    design.critical_thickness: (dict(pipe_outer_diameter=0.006, fluid_temperature=353.15, insulation_conductivity=0.2,
                                     air_temperature=293.15), lambda r: r),
    design.annual_energy: (dict(pipe_outer_diameter=0.0603, fluid_temperature=343.15, layers=[Layer(0.04, 0.04)],
                                bins=BINS, length=100.0, energy_price=0.08), lambda r: (r.heat_kwh, r.cost, r.co2_kg)),
    design.equivalent_length: (dict(length=40.0, fittings={"valve": 2}), lambda r: r),
    operation.line_temperature_profile: (dict(pipe_outer_diameter=0.0603, inlet_temperature=353.15,
                                              layers=[Layer(0.04, 0.04)], mass_flow=0.2, length=200.0,
                                              fluid_pressure=3e5, air_temperature=273.15),
                                         lambda r: r.outlet_temperature),
    operation.minimum_flow: (dict(pipe_outer_diameter=0.2191, inlet_temperature=368.15, layers=[Layer(0.08, 0.03)],
                                  outlet_limit=300.15, length=2500.0, fluid_pressure=3e5, air_temperature=263.15),
                             lambda r: r.mass_flow),
    operation.steam_line: (dict(pipe_outer_diameter=0.1143, steam_pressure=1e6, layers=[Layer(0.08, 0.045)],
                                air_temperature=273.15, length=100.0), lambda r: (r.q_total, r.condensate_rate)),
    operation.condensate_rate: (dict(q_total=1000.0, steam_pressure=1e6), lambda r: r),
    operation.saturation_temperature: (dict(steam_pressure=1e6), lambda r: r),
    operation.latent_heat_of_vaporization: (dict(steam_pressure=1e6), lambda r: r),
    operation.tracing_duty: (dict(pipe_outer_diameter=0.0603, maintain_temperature=278.15,
                                  layers=[Layer(0.025, 0.04)], air_temperature=253.15, wind_speed=10.0),
                             lambda r: r.duty_per_length),
    operation.freeze_time: (dict(pipe_outer_diameter=0.0603, pipe_wall_thickness=0.00391, initial_temperature=283.15,
                                 layers=[Layer(0.025, 0.04)], air_temperature=258.15),
                            lambda r: (r.time_to_freezing_point, r.time_total)),
    transients.cool_down_time: (dict(pipe_outer_diameter=0.1143, pipe_wall_thickness=0.00602,
                                     initial_temperature=363.15, final_temperature=313.15, layers=LAYERS,
                                     fluid_pressure=3e5, air_temperature=283.15), lambda r: r.time),
    transients.warm_up_condensate: (dict(pipe_outer_diameter=0.1683, pipe_wall_thickness=0.00711, steam_pressure=1e6,
                                         start_temperature=283.15, warm_up_time=1800.0, layers=LAYERS,
                                         air_temperature=283.15, length=100.0),
                                    lambda r: (r.warm_up_condensate, r.mean_condensate_rate)),
    vessels.vertical_tank: (dict(diameter=6.0, height=8.0, fluid_temperature=353.15, wall_layers=LAYERS,
                                 roof_layers=LAYERS, air_temperature=283.15), lambda r: r.q_total),
    vessels.spherical_tank: (dict(diameter=12.0, fluid_temperature=243.15, layers=[Layer(0.1, 0.03)],
                                  air_temperature=298.15), lambda r: r.q_total),
    vessels.horizontal_tank: (dict(diameter=3.0, length=8.0, fluid_temperature=353.15, shell_layers=LAYERS,
                                   head_layers=LAYERS, air_temperature=283.15), lambda r: r.q_total),
    vessels.head_area: (dict(diameter=3.0, heads="torispherical"), lambda r: r),
    vessels.rectangular_duct: (dict(width=0.6, height=0.4, length=20.0, fluid_temperature=313.15, layers=LAYERS,
                                    air_temperature=293.15), lambda r: r.q_total),
    economics.present_worth_factor: (dict(discount_rate=0.08, escalation=0.02, years=15.0), lambda r: r),
    economics.steam_kwh_per_tonne: (dict(steam_pressure=1e6, return_temperature=353.15), lambda r: r),
    economics.appraise: (dict(saved_kwh=1e4, investment=1e3, tariff=TARIFF, finance=FINANCE),
                         lambda r: (r.npv, r.simple_payback)),
    economics.life_cycle_cost: (dict(annual_heat_kwh=1e4, investment=1e3, tariff=TARIFF, finance=FINANCE),
                                lambda r: r),
    economics.economic_thickness: (dict(pipe_outer_diameter=0.1143, fluid_temperature=453.15,
                                        thicknesses=[0.04, 0.06, 0.08, 0.1], installed_cost=[20.0, 26.0, 33.0, 41.0],
                                        insulation_conductivity=0.045, bins=BINS, tariff=TARIFF, finance=FINANCE),
                                   lambda r: r["life_cycle_cost"]),
    survey.effective_conductivity: (dict(pipe_outer_diameter=0.1143, fluid_temperature=453.15,
                                         insulation_thickness=0.05, surface_temperature=313.15,
                                         air_temperature=293.15), lambda r: r),
    survey.condition_class: (dict(ratio=1.5), lambda r: r),
    fittings.bare_flange_pair: (dict(nps=4.0, fluid_temperature=453.15, layers=LAYERS, air_temperature=283.15),
                                lambda r: (r.q_item, r.extra_heat, r.equivalent_length)),
    fittings.bare_valve: (dict(nps=4.0, fluid_temperature=453.15, layers=LAYERS, air_temperature=283.15),
                          lambda r: (r.q_item, r.extra_heat, r.equivalent_length)),
    fittings.flange_dimensions: (dict(nps=4.0), lambda r: r),
    fittings.valve_face_to_face: (dict(nps=4.0), lambda r: r),
}
#: Values that only make sense for one function (a cold line, a steam line...).
OWN_VALUES = {
    (design.thickness_against_condensation, "fluid_temperature"): [275.15, 279.15, 283.15],
    (operation.minimum_flow, "outlet_limit"): [290.15, 300.15, 310.15],
    (operation.tracing_duty, "air_temperature"): [243.15, 253.15, 263.15],
    (operation.freeze_time, "air_temperature"): [248.15, 258.15, 263.15],
    (operation.freeze_time, "pipe_wall_thickness"): [0.003, 0.00391, 0.005],
    (vessels.spherical_tank, "fluid_temperature"): [233.15, 243.15, 253.15],
    (vessels.spherical_tank, "diameter"): [8.0, 12.0, 16.0],
    (vessels.vertical_tank, "diameter"): [3.0, 6.0, 10.0],
    (vessels.horizontal_tank, "diameter"): [2.0, 3.0, 4.0],
    (vessels.rectangular_duct, "fluid_temperature"): [303.15, 313.15, 323.15],
    (survey.effective_conductivity, "surface_temperature"): [303.15, 313.15, 323.15],
    (transients.cool_down_time, "air_temperature"): [273.15, 283.15, 293.15],
    (transients.warm_up_condensate, "pipe_outer_diameter"): [0.1143, 0.1683, 0.2191],
    (operation.line_temperature_profile, "pipe_wall_thickness"): [0.003, 0.004, 0.005],
    (operation.minimum_flow, "pipe_wall_thickness"): [0.005, 0.008, 0.01],
    (design.thickness_for_surface_temperature, "fluid_temperature"): [453.15, 473.15, 523.15],
    (design.critical_thickness, "pipe_wall_thickness"): [0.0005, 0.001, 0.0015],
    (transients.cool_down_time, "initial_temperature"): [343.15, 353.15, 363.15],
    (design.thickness_for_surface_temperature, "air_temperature"): [293.15, 298.15, 303.15],
    (economics.steam_kwh_per_tonne, "enthalpy_difference"): None,   # replaces the steam tables: alone below
}
#: Base cases for a parameter that needs another form of the case (a plate's sizes, a bare vessel).
BASE_FOR = {
    (cl.bare_surface, "height"): dict(shape="vertical_plate", surface_temperature=360.0, air_temperature=283.15,
                                      height=2.0, width=1.0),
    (cl.bare_surface, "width"): dict(shape="vertical_plate", surface_temperature=360.0, air_temperature=283.15,
                                     height=2.0, width=1.0),
    (vessels.vertical_tank, "surface_temperature"): dict(diameter=6.0, height=8.0, air_temperature=283.15),
    (vessels.spherical_tank, "surface_temperature"): dict(diameter=12.0, air_temperature=298.15),
    (vessels.horizontal_tank, "surface_temperature"): dict(diameter=3.0, length=8.0, air_temperature=283.15),
    (vessels.rectangular_duct, "surface_temperature"): dict(width=0.6, height=0.4, length=20.0,
                                                            air_temperature=293.15),
}
#: Marched solutions share one step grid across the cases of a call: an element then agrees with its scalar call
#: to the march's tolerance, not to rounding (convlib.operation, module docstring).
MARCHED = {operation.line_temperature_profile, operation.freeze_time}

#: Parameters that take effect only together with another (the other is added to the base case).
TOGETHER = {"pipe_wall_thickness": {"pipe_conductivity": 45.0}, "pipe_conductivity": {"pipe_wall_thickness": 0.005},
            "wall_thickness": {"wall_conductivity": 45.0}, "wall_conductivity": {"wall_thickness": 0.02}}
TOGETHER_FOR = {(design.critical_thickness, "pipe_conductivity"): {"pipe_wall_thickness": 0.001}}


def _numeric_parameters():
    for function, (base, _) in CASES.items():
        for p in inspect.signature(function).parameters.values():
            if p.name in NOT_NUMERIC or p.name in SETTINGS:
                continue
            yield pytest.param(function, p.name, id=f"{function.__name__}-{p.name}")


def _as_tuple(out):
    return tuple(np.asarray(o, dtype=float) for o in (out if isinstance(out, tuple) else (out,)))


@pytest.mark.parametrize("function, name", list(_numeric_parameters()))
def test_an_array_for_any_numeric_parameter_equals_the_scalar_calls(function, name):
    base, output = CASES[function]
    values = OWN_VALUES.get((function, name), VALUES.get(name))
    if (function, name) == (economics.steam_kwh_per_tonne, "enthalpy_difference"):
        base, values = {"steam_pressure": 1e6}, VALUES[name]
    assert values is not None, f"list three valid values of {name!r} in VALUES"
    base = BASE_FOR.get((function, name), base)
    accepted = inspect.signature(function).parameters
    partner = TOGETHER_FOR.get((function, name), TOGETHER.get(name, {}))
    kwargs = {**base, **{k: v for k, v in partner.items() if k in accepted}}
    if function in (vessels.spherical_tank,) and name == "wall_conductivity":
        kwargs.pop("wall_thickness", None)
        kwargs["wall_thickness"] = 0.02
    array_call = _as_tuple(output(function(**{**kwargs, name: np.array(values)})))
    for i, v in enumerate(values):
        scalar_call = _as_tuple(output(function(**{**kwargs, name: v})))
        for whole, one in zip(array_call, scalar_call):
            got = np.asarray(whole)[..., i] if whole.shape[-1:] == (3,) and one.ndim < whole.ndim else whole[i]
            np.testing.assert_allclose(got, one, rtol=1e-5 if function in MARCHED else 1e-7, atol=1e-12,
                                       err_msg=f"{function.__name__}({name}=[...]) element {i}")


def test_every_public_function_is_covered():
    """Every public function of these modules that takes a number is in CASES (or listed as not broadcasting)."""
    modules = (cl.surface, cl.pipe, design, operation, transients, vessels, ducts, face_sizing, economics, survey,
               fittings)
    not_broadcasting = {"listed_thickness", "disc_as_plate", "nusselt_square_cylinder_jakob", "insulation_per_face",
                        "read_survey", "run_survey", "line_weather", "annual_heat_per_metre", "demo_survey_path",
                        "line_samples", "steam_tariff"}
    covered = {f.__name__ for f in CASES}
    for module in modules:
        for name in getattr(module, "__all__", []):
            obj = getattr(module, name)
            if inspect.isfunction(obj) and name not in not_broadcasting:
                assert name in covered, f"{module.__name__}.{name}: add it to CASES"
