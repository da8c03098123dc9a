"""Annual energy of a line over weather bins: heat lost or gained, purchased energy, cost and CO2.

:class:`WeatherBins` holds hours per bin of ambient conditions (a single design condition is one bin);
:func:`annual_energy` solves the insulated line in every bin at once. The names are importable from
:mod:`convlib.design` too.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import InputError
from .pipe import Layer, insulated_pipe
from .regimes import summarize_flags
from .validation import as_array

__all__ = ["WeatherBins", "check_bins", "AnnualEnergy", "annual_energy", "DEFAULT_HEATING_EFFICIENCY", "DEFAULT_COOLING_COP"]


@dataclass(frozen=True)
class WeatherBins:
    """Hours per bin of ambient conditions; a single design condition is one bin.

    Examples
    --------
    >>> WeatherBins.single(283.15, hours=8760).hours.tolist()
    [8760.0]
    """

    air_temperature: np.ndarray  # [K]
    wind_speed: np.ndarray       # [m/s]
    hours: np.ndarray            # [h]

    def __post_init__(self):
        # upper bounds: the air and wind a study accepts (convlib.study.INPUTS); beyond them a typing error
        ta = as_array("bin air_temperature", self.air_temperature, unit="K", low=0.0, low_inclusive=False,
                      high=400.0).ravel()
        wind = np.broadcast_to(as_array("bin wind_speed", self.wind_speed, unit="m/s", low=0.0, high=60.0),
                               ta.shape).ravel()
        hours = np.broadcast_to(as_array("bin hours", self.hours, unit="h", low=0.0), ta.shape).ravel()
        if hours.sum() > 8784.0 + 1e-9:
            raise InputError(f"bin hours add up to {hours.sum():g} h, more than a (leap) year of 8784 h",
                             field="bin hours", rule="adding up to at most 8784 h", value=float(hours.sum()))
        object.__setattr__(self, "air_temperature", ta)
        object.__setattr__(self, "wind_speed", wind)
        object.__setattr__(self, "hours", hours)

    @classmethod
    def single(cls, air_temperature, wind_speed=0.0, hours=8760.0) -> "WeatherBins":
        return cls(np.atleast_1d(air_temperature), np.atleast_1d(wind_speed), np.atleast_1d(hours))


def check_bins(bins) -> None:
    """Refuse ``bins`` (InputError) unless it is None or :class:`WeatherBins` whose hours add up to more than 0."""
    if bins is not None and not isinstance(bins, WeatherBins):
        raise InputError(f"bins must be a convlib.design.WeatherBins or None; got {type(bins).__name__}",
                         field="bins", rule="a convlib.design.WeatherBins or None", value=bins)
    if bins is not None and bins.hours.sum() <= 0:
        raise InputError("bins: the hours add up to 0", field="bins", rule="hours adding up to more than 0",
                         value=bins)


@dataclass(frozen=True)
class AnnualEnergy:
    """Annual figures per case (arrays over the cases; the last axis of per-bin arrays is the bin)."""

    heat_kwh: np.ndarray          # heat lost (> 0) or gained (< 0) by the line over the year [kWh]
    purchased_kwh: np.ndarray     # hot line: fuel = net loss / efficiency; cold line: electricity = net gain / COP [kWh]
    cost: np.ndarray              # purchased energy x price [currency]
    co2_kg: np.ndarray            # purchased energy x emission factor [kg]
    q_per_length_by_bin: np.ndarray  # [W/m]
    warnings: np.ndarray = None      # union over the bins of the flags of every solve (Flag mask)

    def warning_messages(self) -> list[str]:
        return [] if self.warnings is None else summarize_flags(self.warnings)


#: Default efficiency of the heat source and COP of the chiller. Common practice, no source.
DEFAULT_HEATING_EFFICIENCY = 0.85
DEFAULT_COOLING_COP = 3.0


def annual_energy(pipe_outer_diameter, fluid_temperature, layers=(), *, bins: WeatherBins, length=1.0,
                  energy_price=0.0, heating_efficiency=DEFAULT_HEATING_EFFICIENCY, cooling_cop=DEFAULT_COOLING_COP,
                  co2_per_kwh=0.0, jacket_emissivity=0.9, solar_absorptivity=None, pipe_wall_thickness=None,
                  pipe_conductivity=None, inner_coefficient=None, natural=None, forced=None, mixing_exponent=None,
                  convection_factor=None, convection_coefficient=None, exact_properties=False,
                  surroundings_temperature=None, sky_view_fraction=None, sky_temperature=None, solar_irradiance=None,
                  pressure=None) -> AnnualEnergy:
    """Annual heat lost (or gained) by lines over weather bins, and what it costs.

    Parameters
    ----------
    pipe_outer_diameter, fluid_temperature : numeric
        Per case [m], [K]; broadcast together (the bins form an extra last axis).
    layers : sequence of Layer
    bins : WeatherBins
        Air temperature, wind and operating hours per bin (the air and wind of the surroundings).
    length : numeric
        Line length [m], fittings included as equivalent length (:func:`equivalent_length`).
    energy_price : numeric
        Price per purchased kWh (fuel for hot lines, electricity for cold ones).
    heating_efficiency : numeric
        Seasonal efficiency of the heat source (0-1]; hot lines.
    cooling_cop : numeric
        Coefficient of performance of the chiller (> 0); cold lines.
    co2_per_kwh : numeric
        Emission factor of the purchased energy [kg/kWh].
    jacket_emissivity, solar_absorptivity, pipe_wall_thickness, pipe_conductivity, inner_coefficient, natural,
    forced, mixing_exponent, convection_factor, convection_coefficient, exact_properties
        As in :func:`convlib.pipe.insulated_pipe`.
    surroundings_temperature, sky_view_fraction, sky_temperature, solar_irradiance, pressure
        The rest of the surroundings (:class:`convlib.surroundings.Surroundings`), the same in every bin.

    Examples
    --------
    >>> bins = WeatherBins([268.15, 283.15, 298.15], [4.0, 3.0, 2.0], [2000, 4000, 2760])
    >>> e = annual_energy(0.0603, 343.15, [Layer(0.04, 0.04)], bins=bins, length=100.0, energy_price=0.08)
    >>> round(float(e.heat_kwh)), round(float(e.cost))
    (14857, 1398)
    """
    pipe_keywords = {name: value for name, value in dict(
        jacket_emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity,
        pipe_wall_thickness=pipe_wall_thickness, pipe_conductivity=pipe_conductivity,
        inner_coefficient=inner_coefficient, natural=natural, forced=forced, mixing_exponent=mixing_exponent,
        convection_factor=convection_factor, convection_coefficient=convection_coefficient,
        surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
        sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure).items()
        if value is not None}
    d = as_array("pipe_outer_diameter", pipe_outer_diameter, unit="m", low=0.0, low_inclusive=False)
    tf = as_array("fluid_temperature", fluid_temperature, unit="K", low=0.0, low_inclusive=False)
    length = as_array("length", length, unit="m", low=0.0)
    eff = as_array("heating_efficiency", heating_efficiency, low=0.0, high=1.0, low_inclusive=False)
    cop = as_array("cooling_cop", cooling_cop, low=0.0, low_inclusive=False)
    price = as_array("energy_price", energy_price, low=0.0)
    co2 = as_array("co2_per_kwh", co2_per_kwh, unit="kg/kWh", low=0.0)
    numeric = {name: np.asarray(value, dtype=float) for name, value in pipe_keywords.items()
               if name not in ("natural", "forced")}
    case_shape = np.broadcast_shapes(d.shape, tf.shape, length.shape, eff.shape, cop.shape, price.shape, co2.shape,
                                     *(v.shape for v in numeric.values()),
                                     *(np.shape(layer.thickness) for layer in layers))
    expand = lambda a: np.broadcast_to(a, case_shape)[..., None]  # noqa: E731  # the bins: a last axis
    per_case = {name: expand(v) for name, v in numeric.items()}
    for layer in layers:
        if not isinstance(layer, Layer):
            raise InputError(f"layers must be Layer objects (thickness, conductivity); got {layer!r}", field="layers",
                             rule="Layer objects", value=layer)
    layers = [Layer(expand(layer.thickness), layer.conductivity if not layer.conductivity.is_constant
                    else expand(layer.conductivity.constant_value), name=layer.name) for layer in layers]
    r = insulated_pipe(expand(d), expand(tf), layers, air_temperature=bins.air_temperature,
                       wind_speed=bins.wind_speed, length=1.0, exact_properties=exact_properties, natural=natural,
                       forced=forced, **per_case)
    q = r.q_per_length
    heat_kwh = (q * bins.hours).sum(axis=-1) * length / 1000.0
    # The service decides what is bought: a line whose fluid is above the hours-weighted air temperature is a
    # hot line (heat lost is fuel), otherwise a cold line (heat gained is chiller electricity).
    mean_air = float(np.sum(bins.air_temperature * bins.hours) / max(float(bins.hours.sum()), 1e-300))
    hot = np.broadcast_to(tf, case_shape) > mean_air
    purchased = np.where(hot, np.maximum(heat_kwh, 0.0) / eff, np.maximum(-heat_kwh, 0.0) / cop)
    return AnnualEnergy(heat_kwh=heat_kwh, purchased_kwh=purchased, cost=purchased * price,
                        co2_kg=purchased * co2, q_per_length_by_bin=q,
                        warnings=np.bitwise_or.reduce(r.warnings, axis=-1))
