"""A line as engineers describe it (tag, NPS or diameter, layers, conditions), validated.

:class:`LineSpec` is the system-level description shared by the command line,
the demo site, line lists and studies. It turns into keyword arguments of
:func:`convlib.pipe.insulated_pipe`. SI units, kelvin.
"""
from __future__ import annotations

from pydantic import BaseModel, ConfigDict, Field, model_validator

from .design import equivalent_length
from .errors import InputError
from .fittings import flange_dimensions, valve_face_to_face
from .pipe import Layer
from .pipe_sizes import nominal_pipe

__all__ = ["LayerSpec", "LineSpec"]


class LayerSpec(BaseModel):
    """One layer: thickness [m], a constant conductivity [W/m/K] or a material of :mod:`convlib.materials`
    (its k(T)), name."""

    model_config = ConfigDict(extra="forbid", frozen=True)

    thickness: float = Field(ge=0.0, le=2.0, description="radial thickness [m]")
    conductivity: float | None = Field(default=None, gt=0.0, le=500.0, description="thermal conductivity [W/m/K]")
    material: str | None = Field(default=None, description="a material name of convlib.materials, instead of "
                                                           "conductivity")
    name: str = "insulation"

    @model_validator(mode="after")
    def _conductivity_or_material(self):
        if (self.conductivity is None) == (self.material is None):
            raise InputError("give a layer's conductivity [W/m/K] or a material name, one of them",
                             field="conductivity, material", rule="exactly one of them",
                             value=(self.conductivity, self.material))
        if self.material is not None:
            from .materials import material

            object.__setattr__(self, "material", material(self.material).name)  # raises listing the names
        return self

    def layer(self) -> Layer:
        if self.material is not None:
            from .materials import layer

            return layer(self.thickness, self.material, layer_name=self.name)
        return Layer(self.thickness, self.conductivity, name=self.name)


class LineSpec(BaseModel):
    """A horizontal line with a known fluid temperature.

    Give the pipe either as ``nps`` (+ ``schedule``, ASME B36.10M) or as
    ``pipe_outer_diameter`` [m], not both.

    Examples
    --------
    >>> spec = LineSpec(tag="L1", nps=4, fluid_temperature=453.15, air_temperature=293.15,
    ...                 layers=[{"thickness": 0.05, "conductivity": 0.04}])
    >>> spec.pipe_diameter()
    0.1143
    """

    model_config = ConfigDict(extra="forbid")

    tag: str = Field(min_length=1, max_length=64)
    description: str = ""
    nps: float | None = Field(default=None, gt=0.0)
    schedule: str = "40"
    pipe_outer_diameter: float | None = Field(default=None, gt=0.0, le=10.0, description="[m]")
    length: float = Field(default=1.0, gt=0.0, description="[m]")
    fluid_temperature: float = Field(gt=0.0, description="[K]")
    layers: list[LayerSpec] = Field(default_factory=list)
    jacket_emissivity: float = Field(default=0.9, ge=0.0, le=1.0)
    air_temperature: float = Field(gt=0.0, description="[K]")
    wind_speed: float = Field(default=0.0, ge=0.0, le=100.0, description="[m/s]")
    sky_view_fraction: float = Field(default=0.0, ge=0.0, le=1.0)
    relative_humidity: float | None = Field(default=None, gt=0.0, le=1.0)
    fittings: dict[str, float] = Field(default_factory=dict)
    bare_valves: float = Field(default=0.0, ge=0.0, description="uninsulated flanged gate valves (convlib.fittings)")
    bare_flange_pairs: float = Field(default=0.0, ge=0.0, description="uninsulated flange pairs (convlib.fittings)")
    pressure_class: int = Field(default=150, description="ASME B16.5 / B16.10 class of the bare items: 150 or 300")

    @model_validator(mode="after")
    def _one_diameter(self):
        if (self.nps is None) == (self.pipe_outer_diameter is None):
            raise InputError("give the pipe as nps (with schedule) or as pipe_outer_diameter [m], not both",
                             field="nps, pipe_outer_diameter", rule="exactly one of them",
                             value=(self.nps, self.pipe_outer_diameter))
        if self.nps is not None:
            nominal_pipe(self.nps, self.schedule)  # raises with the nearest sizes
        equivalent_length(self.length, self.fittings)  # raises on unknown fittings
        if self.bare_valves or self.bare_flange_pairs:
            if self.nps is None:
                raise InputError("bare valves and flange pairs need the line's nps (their sizes come from the "
                                 "ASME B16.5 / B16.10 tables)", field="nps", rule="given with bare fittings",
                                 value=self.pipe_outer_diameter)
            flange_dimensions(self.nps, self.pressure_class)  # raises naming the sizes and classes known
            if self.bare_valves:
                valve_face_to_face(self.nps, self.pressure_class)
        return self

    def pipe_diameter(self) -> float:
        """Outer diameter of the pipe itself [m] (the glossary's ``pipe_outer_diameter``): given, or from the NPS."""
        if self.pipe_outer_diameter is not None:
            return self.pipe_outer_diameter
        return nominal_pipe(self.nps, self.schedule).outer_diameter

    def outer_diameter(self) -> float:
        """Deprecated name of :meth:`pipe_diameter` (``outer_diameter`` is the outside of the last layer)."""
        import warnings

        warnings.warn("LineSpec.outer_diameter() is deprecated: use pipe_diameter()", DeprecationWarning, stacklevel=2)
        return self.pipe_diameter()

    def equivalent_length(self) -> float:
        """Length plus fittings as equivalent metres [m]."""
        return float(equivalent_length(self.length, self.fittings))

    def pipe_arguments(self) -> dict:
        """Keyword arguments of :func:`convlib.pipe.insulated_pipe` for this line (``q_total`` over its length)."""
        return dict(pipe_outer_diameter=self.pipe_diameter(), fluid_temperature=self.fluid_temperature,
                    length=self.length,
                    layers=[layer.layer() for layer in self.layers], air_temperature=self.air_temperature,
                    jacket_emissivity=self.jacket_emissivity, wind_speed=self.wind_speed,
                    sky_view_fraction=self.sky_view_fraction)
