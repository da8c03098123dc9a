"""convlib: heat lost (or gained) by pipes, ducts and vessels to the air around them.

The public surface (names are stable; see DEVELOPERS.md):

>>> import convlib as cl
>>> r = cl.bare_surface(surface_temperature=353.15, air_temperature=293.15, diameter=0.1, length=1.0)
>>> round(float(r.q_per_length))
245
"""
__version__ = "0.2.0"  # the one place of the version: pyproject.toml reads it (tool.setuptools.dynamic)

from .errors import InputError  # noqa: E402
from . import correlations, geometry, radiation, regimes  # noqa: E402
from .correlations import catalog, nusselt
from .properties import FluidProperties, air, dew_point, fluid_properties
from .conductivity import Conductivity
from .pipe import Layer, PipeResult, insulated_pipe
from .pipe_sizes import nominal_pipe
from .surface import SurfaceResult, bare_surface
from .study import CaseSpec, StudyResult, StudySpec, run_study
from . import snapshot  # noqa: E402  (after study: it builds on it)
from .linelist import LineListResult, read_line_list, run_line_list, write_results_csv
from . import operation, vessels  # noqa: E402
from .operation import (condensate_rate, freeze_time, line_temperature_profile, minimum_flow, steam_line,
                        tracing_duty)
from .vessels import rectangular_duct, spherical_tank, vertical_tank

__all__ = [
    "air", "fluid_properties", "FluidProperties", "dew_point", "nusselt", "catalog", "correlations",
    "bare_surface", "SurfaceResult", "geometry", "radiation", "regimes", "__version__", "InputError",
    "insulated_pipe", "Layer", "PipeResult", "Conductivity", "nominal_pipe",
    "StudySpec", "CaseSpec", "StudyResult", "run_study", "snapshot",
    "run_line_list", "read_line_list", "write_results_csv", "LineListResult",
    "operation", "vessels", "line_temperature_profile", "minimum_flow", "steam_line", "condensate_rate",
    "tracing_duty", "freeze_time", "vertical_tank", "spherical_tank", "rectangular_duct",
]
