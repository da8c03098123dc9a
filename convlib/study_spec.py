"""Study specifications: what a sensitivity study asks for, validated (pydantic), with units and guards.

:class:`StudySpec` holds a base :class:`CaseSpec` (a bare surface at a known temperature or an insulated
line with a known fluid temperature), sweep axes, 2-D maps, tornado ranges and input uncertainties. Values
may be written with units (``"150 mm"``, ``"90 degC"``); :func:`check_plausible` refuses values outside the
range engineers use unless told otherwise. Running a spec is :mod:`convlib.study`'s job.
"""
from __future__ import annotations

from typing import Literal

import numpy as np
from pydantic import BaseModel, ConfigDict, Field, field_validator, model_validator

from . import correlations as corr
from .errors import InputError
from .geometry import SHAPES

__all__ = ["SCHEMA_VERSION", "INPUTS", "CaseSpec", "SweepAxis", "MapSpec", "TornadoInput", "Distribution",
           "UncertaintySpec", "StudySpec", "axis_values", "load_demo_study", "check_plausible"]

SCHEMA_VERSION = 1

#: Numeric inputs a study may sweep, map, tornado or sample: name -> (unit, low, high, kinds it applies to).
INPUTS: dict[str, tuple[str, float, float, tuple[str, ...]]] = {
    "diameter": ("m", 1e-4, 10.0, ("bare", "insulated")),
    "surface_temperature": ("K", 1.0, 2000.0, ("bare",)),
    "fluid_temperature": ("K", 1.0, 2000.0, ("insulated",)),
    "air_temperature": ("K", 150.0, 400.0, ("bare", "insulated")),
    "surroundings_temperature": ("K", 150.0, 1000.0, ("bare", "insulated")),
    "wind_speed": ("m/s", 0.0, 60.0, ("bare", "insulated")),
    "emissivity": ("-", 0.0, 1.0, ("bare", "insulated")),
    "sky_view_fraction": ("-", 0.0, 1.0, ("bare", "insulated")),
    "solar_irradiance": ("W/m2", 0.0, 1400.0, ("bare", "insulated")),
    "pressure": ("Pa", 2e4, 2e5, ("bare", "insulated")),
    "insulation_thickness": ("m", 0.0, 1.0, ("insulated",)),
    "insulation_conductivity": ("W/m/K", 1e-3, 5.0, ("insulated",)),
    "convection_factor": ("-", 0.1, 5.0, ("bare", "insulated")),
}

#: Quantities reported per point; the first is the main output.
QUANTITIES = ("q_per_length", "surface_temperature", "h_convection", "h_radiation", "nusselt",
              "q_convection_per_length", "q_radiation_per_length")


def _unknown_input(name) -> InputError:
    rule = f"one of: {', '.join(INPUTS)}"
    return InputError(f"unknown input {name!r}; choose {rule}", field="input", rule=rule, value=name)


def check_input(name: str, kind: str) -> str:
    """``name`` if it is one of :data:`INPUTS` and applies to a ``kind`` case ("bare" or "insulated"), else InputError."""
    if name not in INPUTS:
        raise _unknown_input(name)
    if kind not in INPUTS[name][3]:
        allowed = [k for k, v in INPUTS.items() if kind in v[3]]
        raise InputError(f"input {name!r} does not apply to a {kind} case; choose one of: {', '.join(allowed)}",
                         field="input", rule=f"one of: {', '.join(allowed)}", value=name)
    return name


class StrictModel(BaseModel):
    """A pydantic model that refuses unknown fields (a misspelt key must not go unnoticed)."""

    model_config = ConfigDict(extra="forbid")


#: Kind of quantity of each unit in :data:`INPUTS`, for values written with a unit in a study file.
_UNIT_KINDS = {"m": "length", "K": "temperature", "m/s": "speed", "-": "dimensionless", "W/m2": "heat_flux",
               "Pa": "pressure", "W/m/K": "conductivity"}
#: Fields of a case that may be written with a unit ("90degC", "4.5in", "50mm", "0.045W/m/degC").
_CASE_KINDS = {"diameter": "length", "length": "length", "height": "length", "width": "length",
               "surface_temperature": "temperature", "fluid_temperature": "temperature",
               "air_temperature": "temperature", "surroundings_temperature": "temperature", "wind_speed": "speed",
               "solar_irradiance": "heat_flux", "pressure": "pressure", "relative_humidity": "dimensionless",
               "insulation_thickness": "length", "insulation_conductivity": "conductivity",
               "jacket_thickness": "length", "jacket_conductivity": "conductivity"}


def _with_unit(value, kind: str, field: str):
    """A study-file value: a number stays as it is (SI, kelvin); text is read with its unit by
    :func:`convlib.units.parse`, the reader of the command line and the line lists."""
    if isinstance(value, str):
        from .units import parse  # the edge reader (pint only for units it does not know by heart)

        return parse(value, kind, field, plain_unit=None)
    return value


#: Plausibility guard of a study file's case (the ranges of :data:`convlib.units.INPUTS`): field -> input name.
_CASE_GUARDS = {"diameter": "pipe_diameter", "length": "length", "height": "size", "width": "size",
                "surface_temperature": "temperature", "fluid_temperature": "temperature",
                "air_temperature": "air_temperature", "surroundings_temperature": "temperature",
                "wind_speed": "wind_speed", "pressure": "air_pressure", "insulation_thickness": "thickness",
                "insulation_conductivity": "insulation_conductivity", "jacket_thickness": "thickness"}


def check_plausible(spec: "StudySpec", *, allow_unusual: bool = False, override: str = "allow_unusual=True",
                    label: str = "case") -> None:
    """Refuse a study whose case holds a value outside the range engineers use (a plain number in a study file
    is SI: 95 for a temperature is 95 K, 168 for a diameter is 168 m), with a hint in the user's units
    ("did you mean 95 degC?"), unless ``allow_unusual``. Raises :class:`~convlib.errors.InputError`.

    Examples
    --------
    >>> spec = StudySpec(case=CaseSpec(kind="bare", surface_temperature=95.0, air_temperature=293.15))
    >>> check_plausible(spec)
    Traceback (most recent call last):
    ...
    convlib.errors.InputError: case.surface_temperature: '95.0' (read as 95 K) is below the range engineers use for a temperature (150 to 1300 K); did you mean 95 degC or 95 degF? Write the unit, or give allow_unusual=True to compute it anyway
    >>> check_plausible(spec, allow_unusual=True)
    """
    from .units import KIND_SI_UNIT, INPUTS, read

    if allow_unusual:
        return
    case = spec.case
    for field_name, input_name in _CASE_GUARDS.items():
        value = getattr(case, field_name)
        if value is None or (field_name == "jacket_thickness" and value == 0.0):
            continue
        read(repr(float(value)), input_name, f"{label}.{field_name}", override=override,
             plain_unit=KIND_SI_UNIT[INPUTS[input_name].kind])


def _input_with_units(data, input_field: str, value_fields: tuple[str, ...]):
    """Values of an axis, tornado bar or distribution written with units, in the unit kind of their input."""
    name = data.get(input_field) if isinstance(data, dict) else None
    if isinstance(name, str) and name in INPUTS:  # anything else is left to the model's own validation
        kind = _UNIT_KINDS[INPUTS[data[input_field]][0]]
        data = {k: _with_unit(v, kind, k) if k in value_fields else v for k, v in data.items()}
    return data


class CaseSpec(StrictModel):
    """The base case. SI units, kelvin.

    ``kind="bare"``: a surface of ``shape`` at ``surface_temperature``.
    ``kind="insulated"``: a horizontal pipe of outer ``diameter`` carrying fluid at
    ``fluid_temperature`` under ``insulation_thickness`` of ``insulation_conductivity``
    (thickness 0: bare pipe) -- or of ``insulation_material``'s k(T) (:mod:`convlib.materials`) -- and an optional
    thin jacket.
    """

    kind: Literal["bare", "insulated"] = "insulated"
    shape: str = "horizontal_cylinder"
    diameter: float = Field(0.1143, gt=0.0, le=10.0, description="outer (bare) or pipe outer (insulated) diameter [m]")
    length: float = Field(1.0, gt=0.0, description="run length [m]")
    height: float | None = Field(None, gt=0.0, description="vertical plate height [m]")
    width: float | None = Field(None, gt=0.0, description="plate width [m]")
    surface_temperature: float | None = Field(None, gt=0.0, description="[K], bare cases")
    fluid_temperature: float | None = Field(None, gt=0.0, description="[K], insulated cases")
    air_temperature: float = Field(293.15, gt=0.0, description="[K]")
    surroundings_temperature: float | None = Field(None, gt=0.0, description="[K]; default the air temperature")
    wind_speed: float = Field(0.0, ge=0.0, le=60.0, description="[m/s]")
    emissivity: float = Field(0.9, ge=0.0, le=1.0, description="outer surface (jacket) emissivity [-]")
    sky_view_fraction: float = Field(0.0, ge=0.0, le=1.0)
    solar_irradiance: float = Field(0.0, ge=0.0, le=1400.0, description="[W/m2]")
    pressure: float = Field(101325.0, ge=2e4, le=2e5, description="[Pa]")
    relative_humidity: float = Field(0.6, gt=0.0, le=1.0, description="for the dew-point check [-]")
    insulation_thickness: float = Field(0.05, ge=0.0, le=1.0, description="[m]")
    insulation_conductivity: float = Field(0.04, gt=0.0, le=5.0, description="[W/m/K]")
    insulation_material: str | None = Field(None, description="a material of convlib.materials: its k(T) instead of "
                                                              "insulation_conductivity")
    jacket_thickness: float = Field(0.0, ge=0.0, le=0.05, description="[m], 0 for none")
    jacket_conductivity: float = Field(50.0, gt=0.0, description="[W/m/K]")
    convection_factor: float = Field(1.0, ge=0.1, le=5.0, description="multiplier on h_convection [-]")
    natural: str | None = None
    forced: str | None = None

    @field_validator(*_CASE_KINDS, mode="before")
    @classmethod
    def _units(cls, value, info):
        return _with_unit(value, _CASE_KINDS[info.field_name], info.field_name)

    @model_validator(mode="after")
    def _consistent(self):
        if self.shape not in SHAPES:
            rule = f"one of: {', '.join(SHAPES)}"
            raise InputError(f"unknown shape {self.shape!r}; choose {rule}", field="shape", rule=rule,
                             value=self.shape)
        if self.kind == "bare" and self.surface_temperature is None:
            raise InputError("a bare case needs surface_temperature [K]", field="surface_temperature",
                             rule="given for a bare case", value=None)
        if self.kind == "insulated":
            if self.fluid_temperature is None:
                raise InputError("an insulated case needs fluid_temperature [K]", field="fluid_temperature",
                                 rule="given for an insulated case", value=None)
            if self.shape != "horizontal_cylinder":
                raise InputError("insulated cases are horizontal pipes: shape must be 'horizontal_cylinder'",
                                 field="shape", rule="'horizontal_cylinder' for an insulated case", value=self.shape)
        if self.insulation_material is not None:
            from .materials import material  # raises listing the names

            if self.kind != "insulated":
                raise InputError("insulation_material applies to an insulated case", field="insulation_material",
                                 rule="only for an insulated case", value=self.insulation_material)
            try:
                material(self.insulation_material)
            except InputError as exc:
                raise exc.within("insulation_material") from None
        info = SHAPES[self.shape]
        for field_name, geometry, key in (("natural", info.natural_geometry, self.natural),
                                          ("forced", info.forced_geometry, self.forced)):
            if key is not None:
                try:
                    corr.get(geometry, key)
                except InputError as exc:
                    raise exc.within(field_name) from None
        return self

    @property
    def natural_geometry(self) -> str:
        return SHAPES[self.shape].natural_geometry

    @property
    def forced_geometry(self) -> str:
        return SHAPES[self.shape].forced_geometry


class SweepAxis(StrictModel):
    """Values of one input from ``start`` to ``stop`` (``count`` points, linear or log spacing)."""

    input: str
    start: float
    stop: float
    count: int = Field(41, ge=2, le=5000)
    scale: Literal["linear", "log"] = "linear"

    @model_validator(mode="before")
    @classmethod
    def _units(cls, data):
        return _input_with_units(data, "input", ("start", "stop"))

    @model_validator(mode="after")
    def _range(self):
        if self.input not in INPUTS:
            raise _unknown_input(self.input)
        unit, low, high, _ = INPUTS[self.input]
        for end in ("start", "stop"):
            value = getattr(self, end)
            if not (low <= value <= high):
                raise InputError(f"{end} of the {self.input} axis must be between {low:g} and {high:g} {unit}; "
                                 f"got {value:g}", field=end, rule=f"between {low:g} and {high:g} {unit}", value=value)
        if self.scale == "log" and min(self.start, self.stop) <= 0:
            raise InputError(f"a log axis of {self.input} needs start and stop > 0", field="start, stop",
                             rule="> 0 on a log axis", value=(self.start, self.stop))
        return self


def axis_values(axis: SweepAxis) -> np.ndarray:
    """The values of a sweep axis.

    >>> axis_values(SweepAxis(input="wind_speed", start=0, stop=10, count=3)).tolist()
    [0.0, 5.0, 10.0]
    """
    if axis.scale == "log":
        return np.geomspace(axis.start, axis.stop, axis.count)
    return np.linspace(axis.start, axis.stop, axis.count)


class MapSpec(StrictModel):
    """A 2-D map over two inputs."""

    x: SweepAxis
    y: SweepAxis

    @model_validator(mode="after")
    def _distinct(self):
        if self.x.input == self.y.input:
            raise InputError(f"a map needs two different inputs; got {self.x.input!r} twice", field="x, y",
                             rule="two different inputs", value=self.x.input)
        if self.x.count * self.y.count > 250_000:
            raise InputError(f"a map may have at most 250000 points; got {self.x.count} x {self.y.count}",
                             field="x.count, y.count", rule="at most 250000 points",
                             value=(self.x.count, self.y.count))
        return self


class TornadoInput(StrictModel):
    """Low and high values of one input for the tornado chart."""

    input: str
    low: float
    high: float

    @model_validator(mode="before")
    @classmethod
    def _units(cls, data):
        return _input_with_units(data, "input", ("low", "high"))

    @model_validator(mode="after")
    def _order(self):
        if self.input not in INPUTS:
            raise _unknown_input(self.input)
        if not self.low < self.high:
            raise InputError(f"tornado range of {self.input}: low must be below high; got {self.low:g}, "
                             f"{self.high:g}", field="low, high", rule="low below high", value=(self.low, self.high))
        return self


class Distribution(StrictModel):
    """Uncertainty of one input.

    ``normal``: mean, std; ``uniform``: low, high; ``triangular``: low, mode, high;
    ``lognormal``: median, sigma (standard deviation of the natural log). Samples are
    clipped to the input's physical range (the count is reported).
    """

    input: str
    kind: Literal["normal", "uniform", "triangular", "lognormal"]
    mean: float | None = None
    std: float | None = Field(None, gt=0.0)
    low: float | None = None
    high: float | None = None
    mode: float | None = None
    median: float | None = Field(None, gt=0.0)
    sigma: float | None = Field(None, gt=0.0)

    @model_validator(mode="after")
    def _parameters(self):
        if self.input not in INPUTS:
            raise _unknown_input(self.input)
        needed = {"normal": ("mean", "std"), "uniform": ("low", "high"), "triangular": ("low", "mode", "high"),
                  "lognormal": ("median", "sigma")}[self.kind]
        missing = [p for p in needed if getattr(self, p) is None]
        if missing:
            raise InputError(f"a {self.kind} distribution of {self.input} needs {', '.join(missing)}",
                             field=", ".join(missing), rule=f"given for a {self.kind} distribution", value=None)
        if self.kind in ("uniform", "triangular") and not self.low < self.high:
            raise InputError(f"{self.kind} distribution of {self.input}: low must be below high; got low "
                             f"{self.low:g}, high {self.high:g}", field="low, high", rule="low below high",
                             value=(self.low, self.high))
        if self.kind == "triangular" and not self.low <= self.mode <= self.high:
            raise InputError(f"triangular distribution of {self.input}: mode must lie between low and high; got "
                             f"mode {self.mode:g} outside {self.low:g}..{self.high:g}", field="mode",
                             rule="between low and high", value=self.mode)
        return self

    def sample(self, rng: np.random.Generator, n: int) -> np.ndarray:
        if self.kind == "normal":
            return rng.normal(self.mean, self.std, n)
        if self.kind == "uniform":
            return rng.uniform(self.low, self.high, n)
        if self.kind == "triangular":
            return rng.triangular(self.low, self.mode, self.high, n)
        return self.median * np.exp(rng.normal(0.0, self.sigma, n))


class UncertaintySpec(StrictModel):
    """Monte Carlo settings."""

    distributions: list[Distribution] = Field(default_factory=list)
    model_form: Literal["none", "stated_accuracy", "choose_correlation"] = "stated_accuracy"
    samples: int = Field(20_000, ge=100, le=2_000_000)
    seed: int = Field(12345, ge=0)

    @field_validator("distributions")
    @classmethod
    def _unique(cls, value):
        names = [d.input for d in value]
        if len(set(names)) != len(names):
            repeated = sorted({n for n in names if names.count(n) > 1})
            raise InputError(f"each input may have one distribution; repeated: {repeated}", field="distributions",
                             rule="one distribution per input", value=repeated)
        return value


class StudySpec(StrictModel):
    """Everything a study computes, as data (JSON round-trips)."""

    schema_version: int = SCHEMA_VERSION
    name: str = Field("study", min_length=1, max_length=200)
    description: str = ""
    case: CaseSpec
    sweeps: list[SweepAxis] = Field(default_factory=list, max_length=20)
    maps: list[MapSpec] = Field(default_factory=list, max_length=6)
    natural_methods: list[str] | None = Field(None, description="natural correlations to compare; None: all")
    forced_methods: list[str] | None = Field(None, description="forced correlations to compare; None: all")
    tornado: list[TornadoInput] = Field(default_factory=list, max_length=30)
    uncertainty: UncertaintySpec | None = None

    @model_validator(mode="after")
    def _applicable(self):
        if self.schema_version != SCHEMA_VERSION:
            raise InputError(f"schema_version {self.schema_version} is not supported (this convlib reads "
                             f"{SCHEMA_VERSION})", field="schema_version", rule=f"{SCHEMA_VERSION}",
                             value=self.schema_version)
        kind = self.case.kind
        for axis in [*self.sweeps, *(m.x for m in self.maps), *(m.y for m in self.maps), *self.tornado,
                     *(self.uncertainty.distributions if self.uncertainty else [])]:
            check_input(axis.input, kind)
        for field_name, names, geometry in (("natural_methods", self.natural_methods, self.case.natural_geometry),
                                            ("forced_methods", self.forced_methods, self.case.forced_geometry)):
            for key in names or ():
                try:
                    corr.get(geometry, key)
                except InputError as exc:
                    raise exc.within(field_name) from None
        return self

    def compared_methods(self, mode: str) -> list[str]:
        geometry = self.case.natural_geometry if mode == "natural" else self.case.forced_geometry
        chosen = self.natural_methods if mode == "natural" else self.forced_methods
        return list(chosen) if chosen else corr.methods(geometry)


def load_demo_study() -> StudySpec:
    """The invented demo study shipped with the package (a steam main of the Fernhill demo site)."""
    from importlib import resources

    return StudySpec.model_validate_json(resources.files("convlib").joinpath("data/demo_study.json").read_text())
