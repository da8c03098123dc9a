"""Heat tracing: the duty a tracer must supply to hold a line at its maintain temperature with no flow.

Tracer selection, sheath temperature, hazardous-area rating and control are governed by IEEE 515 /
IEC/IEEE 60079-30, the manufacturer's design and local codes.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .marching import pipe_keywords, positive
from .pipe import PipeResult, insulated_pipe
from .surroundings import Surroundings, resolve
from .validation import SIZE_RANGE, as_bounded

__all__ = ["TRACING_MARGIN", "MARGIN_MAX", "CAUTION_TRACING", "TracingDuty", "tracing_duty"]

#: Design margin on the calculated heat loss of a traced line [-] (duty = loss x (1 + margin)).
#: IEEE Std 515 and IEC/IEEE 60079-30-2 recommend a safety factor of roughly 10-25 % on the
#: calculated loss for electric trace heating (from memory; check the edition that governs).
TRACING_MARGIN = 0.20

#: Largest design margin on a tracing duty [-] (1000 %).
MARGIN_MAX = 10.0

CAUTION_TRACING = ("Tracing duty is the heat the tracer must replace at the design minimum ambient and maximum "
                   "wind; tracer selection, sheath temperature, hazardous-area rating, control and installation "
                   "are governed by IEEE 515 / IEC/IEEE 60079-30, the manufacturer's design and local codes.")
@dataclass(frozen=True)
class TracingDuty:
    """Power a tracer must supply (arrays over the cases)."""

    heat_loss_per_length: np.ndarray     # q' of the line at the maintain temperature [W/m]
    duty_per_length: np.ndarray          # max(q', 0) x (1 + margin) [W/m]
    duty_total: np.ndarray               # duty_per_length x length [W]
    margin: np.ndarray                   # [-]
    surface_temperature: np.ndarray      # jacket temperature at the maintain temperature [K]
    pipe: PipeResult
    notes: tuple[str, ...]
    cautions: tuple[str, ...]

    @property
    def warnings(self) -> np.ndarray:
        return self.pipe.warnings

    def warning_messages(self) -> list[str]:
        return self.pipe.warning_messages()


def tracing_duty(pipe_outer_diameter, maintain_temperature, layers=(), *, margin=TRACING_MARGIN, length=1.0,
                 jacket_emissivity=0.9, solar_absorptivity=None, pipe_wall_thickness=None, pipe_conductivity=None,
                 inner_coefficient=None, natural=None, forced=None, mixing_exponent=None, convection_factor=None,
                 convection_coefficient=None, exact_properties=False, surroundings: Surroundings | None = None,
                 air_temperature=None, wind_speed=None, surroundings_temperature=None, sky_view_fraction=None,
                 sky_temperature=None, solar_irradiance=None, pressure=None) -> TracingDuty:
    r"""Heat-tracing duty to hold a line at its maintain temperature with no flow [W/m].

    .. math:: P' = (1 + m)\, \max(q'(T_{maintain}),\ 0)

    with :math:`q'` from :func:`convlib.pipe.insulated_pipe` with the fluid (and pipe) at the
    maintain temperature -- the tracer replaces what the insulated line loses -- evaluated at
    the design minimum ambient and maximum wind, and :math:`m` the design margin.

    Parameters
    ----------
    pipe_outer_diameter, maintain_temperature : numeric
        Pipe [m]; temperature the tracer holds [K] (e.g. 278.15 K = 5 degC against freezing).
    layers : sequence of Layer
        Insulation and jacket (a traced line usually takes the next larger insulation size).
    margin : numeric
        Design margin on the loss [-], >= 0; default :data:`TRACING_MARGIN`.
    length : numeric
        Traced length [m], fittings as equivalent length.
    jacket_emissivity, solar_absorptivity, pipe_wall_thickness, pipe_conductivity, inner_coefficient, natural,
    forced, mixing_exponent, convection_factor, convection_coefficient, exact_properties
        As in :func:`convlib.pipe.insulated_pipe`.
    surroundings, air_temperature, wind_speed, surroundings_temperature, sky_view_fraction, sky_temperature,
    solar_irradiance, pressure
        The surroundings (:class:`convlib.surroundings.Surroundings`), or its fields as keywords: the design
        minimum ambient and maximum wind (0 indoors).

    Examples
    --------
    A 2 in line held at 5 degC under 25 mm of insulation, at -20 degC and 10 m/s:

    >>> from convlib.pipe import Layer
    >>> d = tracing_duty(0.0603, 278.15, [Layer(0.025, 0.04)], air_temperature=253.15, wind_speed=10.0)
    >>> round(float(d.heat_loss_per_length), 2), round(float(d.duty_per_length), 2)
    (10.14, 12.17)
    """
    t_maintain = positive("maintain_temperature", maintain_temperature, "K")
    m = as_bounded("margin", margin, accepted=(0.0, MARGIN_MAX))
    run = as_bounded("length", length, unit="m", accepted=(0.0, SIZE_RANGE[1]))
    r = insulated_pipe(pipe_outer_diameter, t_maintain, layers, length=1.0, surroundings=resolve(surroundings,
                       air_temperature=air_temperature, wind_speed=wind_speed,
                       surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                       sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure),
                       **pipe_keywords(jacket_emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity,
                                       pipe_wall_thickness=pipe_wall_thickness, pipe_conductivity=pipe_conductivity,
                                       inner_coefficient=inner_coefficient, natural=natural, forced=forced,
                                       mixing_exponent=mixing_exponent, convection_factor=convection_factor,
                                       convection_coefficient=convection_coefficient,
                                       exact_properties=exact_properties))
    shape = np.broadcast_shapes(r.q_per_length.shape, m.shape, run.shape)
    loss = np.broadcast_to(r.q_per_length, shape)
    duty = np.maximum(loss, 0.0) * (1.0 + m)
    notes = []
    if np.any(loss <= 0):
        notes.append(f"{int(np.count_nonzero(loss <= 0))} case(s): the line at its maintain temperature gains heat "
                     f"from its surroundings; no tracing duty")
    return TracingDuty(heat_loss_per_length=loss.copy(), duty_per_length=np.broadcast_to(duty, shape).copy(),
                       duty_total=np.broadcast_to(duty * run, shape).copy(), margin=np.broadcast_to(m, shape).copy(),
                       surface_temperature=np.broadcast_to(r.surface_temperature, shape).copy(), pipe=r,
                       notes=tuple(notes), cautions=(CAUTION_TRACING,))
