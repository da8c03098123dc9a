"""convlib: heat lost (or gained) by pipes, ducts and vessels to the air around them.

The public surface (names are stable; see DEVELOPERS.md):

>>> import convlib as cl
>>> r = cl.bare_surface(surface_temperature=353.15, air_temperature=293.15, diameter=0.1, length=1.0)
>>> round(float(r.q_per_length))
245
"""
__version__ = "0.3.0"  # the one place of the version: pyproject.toml reads it (tool.setuptools.dynamic)

import importlib  # noqa: E402
import importlib.util  # noqa: E402

from .errors import InputError  # noqa: E402

# Public names are imported on first access (PEP 562), so that `import convlib` and the command line start
# fast: CoolProp, pydantic and the study layer load only when a name that needs them is used.
_LAZY = {
    "correlations": None, "geometry": None, "radiation": None, "regimes": None, "snapshot": None, "snapshot_check": None,
    "operation": None, "vessels": None,
    "catalog": "correlations", "nusselt": "correlations",
    "FluidProperties": "properties", "air": "properties", "dew_point": "properties", "fluid_properties": "properties",
    "Conductivity": "conductivity",
    "Layer": "pipe", "PipeResult": "pipe", "insulated_pipe": "pipe",
    "nominal_pipe": "pipe_sizes",
    "SurfaceResult": "surface", "bare_surface": "surface",
    "Surroundings": "surroundings",
    "CaseSpec": "study", "StudyResult": "study", "StudySpec": "study", "run_study": "study",
    "LineListResult": "linelist", "read_line_list": "linelist", "run_line_list": "linelist",
    "write_results_csv": "linelist",
    "condensate_rate": "operation", "freeze_time": "operation", "line_temperature_profile": "operation",
    "minimum_flow": "operation",
    "steam_line": "operation", "tracing_duty": "operation",
    "cool_down_time": "transients", "warm_up_condensate": "transients",
    "bare_flange_pair": "fittings", "bare_valve": "fittings",
    "rectangular_duct": "vessels", "spherical_tank": "vessels", "vertical_tank": "vessels",
}


def __getattr__(name: str):
    """A public name (or any submodule, e.g. ``convlib.pipe``), imported on first access."""
    if name in _LAZY:
        module = _LAZY[name]
        value = importlib.import_module(f"{__name__}.{module or name}")
        if module is not None:
            value = getattr(value, name)
    elif not name.startswith("__") and _is_module(name):
        value = importlib.import_module(f"{__name__}.{name}")
    else:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    globals()[name] = value
    return value


def _is_module(name: str) -> bool:
    spec = importlib.util.find_spec(f"{__name__}.{name}")
    return spec is not None and spec.has_location  # a module file, not e.g. the data folder


def __dir__():
    return sorted(set(globals()) | set(__all__))


__all__ = [
    "air", "fluid_properties", "FluidProperties", "dew_point", "nusselt", "catalog", "correlations",
    "bare_surface", "SurfaceResult", "Surroundings", "geometry", "radiation", "regimes", "__version__", "InputError",
    "insulated_pipe", "Layer", "PipeResult", "Conductivity", "nominal_pipe",
    "StudySpec", "CaseSpec", "StudyResult", "run_study", "snapshot",
    "run_line_list", "read_line_list", "write_results_csv", "LineListResult",
    "operation", "vessels", "line_temperature_profile", "minimum_flow", "steam_line", "condensate_rate",
    "tracing_duty", "freeze_time", "cool_down_time", "warm_up_condensate",
    "bare_flange_pair", "bare_valve", "vertical_tank", "spherical_tank", "rectangular_duct",
]
