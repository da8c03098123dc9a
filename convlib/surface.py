"""Heat exchange of an outer surface at a known temperature with the air around it.

Natural, forced or mixed convection plus grey-body radiation to the
surroundings and (outdoors) the sky, for every shape of :mod:`convlib.geometry`,
hot or cold, vectorized over every input.
"""
from __future__ import annotations

from contextlib import contextmanager
from dataclasses import dataclass, fields

import numpy as np

from . import correlations as corr
from .blocks import blocked
from .correlations.mixed import FLOW_DIRECTIONS, combine, default_mixing_exponent
from .errors import InputError
from .geometry import SHAPES, dimensions
from .properties import fluid_properties
from .radiation import effective_coefficient, net_flux, sky_temperature as clear_sky_temperature, solar_gain
from .surroundings import Surroundings, resolve
from .regimes import Flag, convection_mode, flow_names, flow_regime, mode_names, summarize_flags
from .validation import (CONVECTION_COEFFICIENT_MAX, CONVECTION_FACTOR_MAX, MIXING_EXPONENT_RANGE,
                         SOLAR_IRRADIANCE_MAX, WIND_SPEED_MAX, as_array, as_bounded, as_size, check_choice)

__all__ = ["GRAVITY", "POINT_FIELDS", "SurfaceResult", "OuterSurface", "bare_surface"]

#: Standard acceleration of gravity [m/s2] (CGPM 1901, exact by definition).
GRAVITY = 9.80665


@contextmanager
def property_range_named(fields: str):
    """Report the fluid's property range, met at a film, surface or free-stream temperature, under the
    user's inputs ``fields`` instead of the internal ``temperature``."""
    try:
        yield
    except InputError as exc:
        if exc.field != "temperature":
            raise
        raise InputError(f"{' or '.join(fields.split(', '))}: the air (or fluid) around the surface leaves its "
                         f"property range: {exc}", field=fields, rule=exc.rule, value=exc.value) from None


@dataclass(frozen=True)
class SurfaceResult:
    """Outer-surface heat exchange; every field is an array of the broadcast input shape.

    Heat flows are positive from the surface to the surroundings (a loss) and
    negative for a surface colder than its surroundings (a gain).
    """

    surface_temperature: np.ndarray       # [K]
    air_temperature: np.ndarray           # [K]
    film_temperature: np.ndarray          # [K]
    q_per_area: np.ndarray                # net, convection + radiation - solar [W/m2]
    q_per_length: np.ndarray              # [W/m] of run length (see convlib.geometry)
    q_total: np.ndarray                   # [W]
    q_convection_per_length: np.ndarray   # [W/m]
    q_radiation_per_length: np.ndarray    # [W/m]
    q_solar_per_length: np.ndarray        # absorbed sun, reduces the loss [W/m]
    h_convection: np.ndarray              # [W/m2/K]
    h_radiation: np.ndarray               # q_rad / (Ts - Ta) [W/m2/K]
    h_natural: np.ndarray                 # natural-convection limit [W/m2/K]
    h_forced: np.ndarray                  # forced-convection limit, 0 in still air [W/m2/K]
    nusselt: np.ndarray                   # h_convection * natural length / k_film [-]
    rayleigh: np.ndarray                  # on the natural length [-]
    grashof: np.ndarray                   # on the natural length [-]
    reynolds: np.ndarray                  # on the forced length, 0 in still air [-]
    prandtl: np.ndarray                   # at film temperature [-]
    richardson: np.ndarray                # Gr/Re^2 on the forced length, inf in still or vanishing wind [-]
    regime: np.ndarray                    # convection mode code, see convlib.regimes.MODE_NAMES
    flow_regime: np.ndarray               # laminar/transitional/turbulent code of the dominant mode
    warnings: np.ndarray                  # bit mask of convlib.regimes.Flag

    def regime_names(self) -> np.ndarray:
        """'natural' / 'mixed' / 'forced' per point."""
        return mode_names(self.regime)

    def flow_regime_names(self) -> np.ndarray:
        """'laminar' / 'transitional' / 'turbulent' per point."""
        return flow_names(self.flow_regime)

    def warning_messages(self) -> list[str]:
        """Readable warnings that occur at any point, with counts."""
        return summarize_flags(self.warnings)

    def as_dict(self) -> dict[str, np.ndarray]:
        return {f.name: getattr(self, f.name) for f in fields(self)}


#: Per-point inputs of :meth:`OuterSurface.exchange`, by name (:meth:`OuterSurface.point_fields`).
POINT_FIELDS = ("air_temperature", "wind_speed", "emissivity", "surroundings_temperature", "sky_view_fraction",
                 "sky_temperature", "solar_per_area", "pressure", "mixing_exponent", "natural_length",
                 "forced_length", "diameter_over_length", "convection_factor", "given_coefficient")


@dataclass(frozen=True)
class OuterSurface:
    """Everything around an outer surface except its temperature, validated once.

    Built by :meth:`build` from user inputs; :meth:`exchange` then evaluates the
    heat exchange at any surface temperature (a solver calls it repeatedly,
    passing per-point arrays so that converged points can be dropped).
    """

    shape: str
    natural: str
    forced: str
    flow_direction: str
    fluid: str
    exact_properties: bool
    area: np.ndarray                  # exposed area [m2]
    run_length: np.ndarray            # [m]
    air_temperature: np.ndarray
    wind_speed: np.ndarray
    emissivity: np.ndarray
    surroundings_temperature: np.ndarray
    sky_view_fraction: np.ndarray
    sky_temperature: np.ndarray
    solar_per_area: np.ndarray        # absorbed sun per exposed area [W/m2]
    pressure: np.ndarray
    mixing_exponent: np.ndarray
    natural_length: np.ndarray
    forced_length: np.ndarray
    diameter_over_length: np.ndarray  # D/L of a vertical cylinder, 1 otherwise (unused)
    convection_factor: np.ndarray     # multiplier on the convective coefficient (model-form studies)
    given_coefficient: np.ndarray     # convective coefficient given by the user [W/m2/K]; NaN: from correlations

    @classmethod
    def build(cls, shape="horizontal_cylinder", *, air_temperature, diameter=None, length=None, height=None,
              width=None, wind_speed=0.0, emissivity=0.9, surroundings_temperature=None, sky_view_fraction=0.0,
              sky_temperature=None, solar_irradiance=0.0, solar_absorptivity=None, pressure=101325.0,
              natural=None, forced=None, flow_direction="transverse", mixing_exponent=None, fluid="Air",
              exact_properties=False, convection_factor=1.0, convection_coefficient=None) -> "OuterSurface":
        """Validate the surroundings of a surface; arguments as in :func:`bare_surface`."""
        check_choice("shape", shape, SHAPES)
        check_choice("flow direction", flow_direction, FLOW_DIRECTIONS)
        info = SHAPES[shape]
        sizes = {name: None if value is None else as_size(name, value)
                 for name, value in (("diameter", diameter), ("length", length), ("height", height),
                                     ("width", width))}
        dims = dimensions(shape, **sizes)
        ta = as_array("air_temperature", air_temperature, unit="K", low=0.0, low_inclusive=False)
        eps = as_array("emissivity", emissivity, low=0.0, high=1.0)
        tsur = ta if surroundings_temperature is None else as_array(
            "surroundings_temperature", surroundings_temperature, unit="K", low=0.0, low_inclusive=False)
        fraction = as_array("sky_view_fraction", sky_view_fraction, low=0.0, high=1.0)
        if sky_temperature is None:
            t_sky = np.where(fraction > 0, clear_sky_temperature(ta), ta)  # per point: no cross-talk
        else:
            t_sky = as_array("sky_temperature", sky_temperature, unit="K", low=0.0, low_inclusive=False)
        absorptivity = eps if solar_absorptivity is None else as_array(
            "solar_absorptivity", solar_absorptivity, low=0.0, high=1.0)
        irradiance = as_bounded("solar_irradiance", solar_irradiance, unit="W/m2",
                                accepted=(0.0, SOLAR_IRRADIANCE_MAX))
        natural = info.default_natural if natural is None else natural
        forced = info.default_forced if forced is None else forced
        for field_name, geometry, key in (("natural", info.natural_geometry, natural),
                                          ("natural", info.natural_geometry_cold, natural),  # a cold face too
                                          ("forced", info.forced_geometry, forced)):
            try:
                corr.get(geometry, key)
            except InputError as exc:
                raise exc.within(field_name) from None
        n_mix = (np.asarray(default_mixing_exponent(flow_direction, info.round_body)) if mixing_exponent is None
                 else as_bounded("mixing_exponent", mixing_exponent, low_inclusive=False,
                                  accepted=MIXING_EXPONENT_RANGE))
        ratio = np.asarray(1.0) if dims.diameter_over_length is None else dims.diameter_over_length
        return cls(
            shape=shape, natural=natural, forced=forced, flow_direction=flow_direction, fluid=fluid,
            exact_properties=exact_properties, area=dims.area, run_length=dims.run_length,
            air_temperature=ta, emissivity=eps,
            wind_speed=as_bounded("wind_speed", wind_speed, unit="m/s", accepted=(0.0, WIND_SPEED_MAX)),
            surroundings_temperature=tsur, sky_view_fraction=fraction, sky_temperature=np.asarray(t_sky),
            solar_per_area=np.asarray(solar_gain(absorptivity, irradiance, dims.projected_area)) / dims.area,
            pressure=as_array("pressure", pressure, unit="Pa", low=0.0, low_inclusive=False),
            mixing_exponent=n_mix, natural_length=dims.natural_length, forced_length=dims.forced_length,
            diameter_over_length=ratio,
            convection_factor=as_bounded("convection_factor", convection_factor, low_inclusive=False,
                                          accepted=(0.0, CONVECTION_FACTOR_MAX)),
            given_coefficient=np.asarray(np.nan) if convection_coefficient is None else as_bounded(
                "convection_coefficient", convection_coefficient, unit="W/m2/K", low_inclusive=False,
                accepted=(0.0, CONVECTION_COEFFICIENT_MAX)),
        )

    def point_fields(self) -> dict[str, np.ndarray]:
        """The per-point inputs of :meth:`exchange` by name (:data:`POINT_FIELDS`)."""
        return {name: getattr(self, name) for name in POINT_FIELDS}

    def exchange(self, surface_temperature, point: dict | None = None, *, flux_only: bool = False):
        """Heat exchange per unit area at ``surface_temperature`` [K] (no input checks).

        ``point`` holds the per-point inputs by name, default :meth:`point_fields`; a solver passes
        subsets of them (the points still searching).
        Returns a dict of arrays: the :class:`SurfaceResult` fields that do not depend
        on the area (``q_per_area``, ``q_convection_per_area``, ``q_radiation_per_area``, ...);
        with ``flux_only`` just the net flux ``q_per_area`` [W/m2] (a solver's residual:
        no flags, regimes or derived coefficients).
        """
        check = not flux_only
        pt = self.point_fields() if point is None else point
        ta, wind, eps, tsur, fraction = (pt["air_temperature"], pt["wind_speed"], pt["emissivity"],
                                         pt["surroundings_temperature"], pt["sky_view_fraction"])
        t_sky, solar, p, n_mix = pt["sky_temperature"], pt["solar_per_area"], pt["pressure"], pt["mixing_exponent"]
        l_nat, l_frc, ratio = pt["natural_length"], pt["forced_length"], pt["diameter_over_length"]
        factor, given = pt["convection_factor"], pt["given_coefficient"]
        ts = surface_temperature
        info = SHAPES[self.shape]
        nat_hot = corr.get(info.natural_geometry, self.natural)
        frc = corr.get(info.forced_geometry, self.forced)

        # ---- properties at film temperature (and at the free stream / surface where a law wants them)
        film = 0.5 * (ts + ta)
        prop = fluid_properties(self.fluid, film, pressure=p, exact=self.exact_properties)
        delta = ts - ta
        buoyancy = GRAVITY * prop.beta * np.abs(delta) / prop.nu ** 2
        grashof = buoyancy * l_nat ** 3
        rayleigh = grashof * prop.pr

        # ---- natural convection; a horizontal plate switches law with the sign of the temperature difference
        extra = {"diameter_over_length": ratio} if "diameter_over_length" in nat_hot.inputs else {}
        nu_nat, flags = corr.evaluate(nat_hot.geometry, self.natural, Ra=rayleigh, Pr=prop.pr, check=check, **extra)
        if info.natural_geometry_cold != info.natural_geometry:
            nu_cold, flags_cold = corr.evaluate(info.natural_geometry_cold, self.natural, Ra=rayleigh, Pr=prop.pr,
                                                check=check)
            cold = delta < 0
            nu_nat, flags = np.where(cold, nu_cold, nu_nat), np.where(cold, flags_cold, flags)
        h_nat = nu_nat * prop.k / l_nat

        # ---- forced convection (free-stream properties and a surface Pr where the law says so)
        moving = wind > 0
        if frc.property_temperature == "free_stream":
            stream = fluid_properties(self.fluid, ta, pressure=p, exact=self.exact_properties)
            wall = fluid_properties(self.fluid, ts, pressure=p, exact=self.exact_properties)
            forced_groups = {"Pr_s": wall.pr, "viscosity_ratio": stream.mu / wall.mu}
        else:
            stream, forced_groups = prop, {}
        reynolds = wind * l_frc / stream.nu
        nu_frc, flags_frc = corr.evaluate(frc.geometry, self.forced, Re=np.where(moving, reynolds, 1.0),
                                          Pr=stream.pr, check=check,
                                          **{k: v for k, v in forced_groups.items() if k in frc.inputs})
        h_frc = np.where(moving, nu_frc * stream.k / l_frc, 0.0)

        # ---- mixed convection (Churchill 1977) on the coefficients
        h_mix, floored = combine(h_frc, h_nat, n_mix, self.flow_direction)
        is_given = ~np.isnan(given)
        h_conv = factor * np.where(is_given, given, np.where(moving, h_mix, h_nat))
        q_rad = net_flux(ts, eps, fraction, t_sky, tsur)
        q_conv = h_conv * delta
        if flux_only:
            return q_conv + q_rad - solar
        flags = flags | np.where(moving, flags_frc, 0)
        flags = flags | np.where(moving & floored, Flag.OPPOSING_FLOW_FLOORED, 0)
        if nat_hot.fitted_for_air_only and self.fluid.lower() != "air":
            flags = flags | Flag.FLUID_NOT_FITTED
        flags = np.where(is_given, Flag.COEFFICIENT_GIVEN, flags)  # no correlation's range applies
        # Ri = Gr/Re^2 on the forced length; still air, and wind so slight that Re^2 underflows to 0
        # (e.g. 1e-300 m/s: 0/0 at zero temperature difference) or Ri overflows, is natural convection: Ri = inf.
        with np.errstate(under="ignore", over="ignore"):
            re_squared = np.where(moving, reynolds, 0.0) ** 2
            stirring = re_squared > 0
            richardson = np.where(stirring, buoyancy * l_frc ** 3 / np.where(stirring, re_squared, 1.0), np.inf)
        natural_flow = flow_regime(nat_hot.geometry, rayleigh)
        if info.natural_geometry_cold != info.natural_geometry:
            natural_flow = np.where(delta < 0, flow_regime(info.natural_geometry_cold, rayleigh), natural_flow)
        flow = np.where(richardson >= 1.0, natural_flow, flow_regime(frc.geometry, reynolds))

        return dict(
            surface_temperature=ts, air_temperature=ta, film_temperature=film,
            q_per_area=q_conv + q_rad - solar, q_convection_per_area=q_conv, q_radiation_per_area=q_rad,
            q_solar_per_area=solar, h_convection=h_conv, h_radiation=effective_coefficient(q_rad, ts, ta, eps),
            h_natural=h_nat, h_forced=h_frc, nusselt=h_conv * l_nat / prop.k, rayleigh=rayleigh,
            grashof=grashof, reynolds=np.where(moving, reynolds, 0.0), prandtl=prop.pr, richardson=richardson,
            regime=convection_mode(richardson, wind), flow_regime=flow.astype(np.int8),
            warnings=flags.astype(np.int16),
        )

    def result(self, fields_per_area: dict[str, np.ndarray]) -> "SurfaceResult":
        """A :class:`SurfaceResult` from :meth:`exchange` output, adding per-length and total flows."""
        per_run = self.area / self.run_length
        out = {k: v for k, v in fields_per_area.items()
               if k not in ("q_convection_per_area", "q_radiation_per_area", "q_solar_per_area")}
        out.update(
            q_per_length=fields_per_area["q_per_area"] * per_run,
            q_total=fields_per_area["q_per_area"] * self.area,
            q_convection_per_length=fields_per_area["q_convection_per_area"] * per_run,
            q_radiation_per_length=fields_per_area["q_radiation_per_area"] * per_run,
            q_solar_per_length=fields_per_area["q_solar_per_area"] * per_run,
        )
        names = [f.name for f in fields(SurfaceResult)]
        arrays = np.broadcast_arrays(*(out[n] for n in names))
        return SurfaceResult(**{n: np.array(a) for n, a in zip(names, arrays)})


def check_cross_flow(shape: str, around: Surroundings) -> None:
    """Refuse wind along the axis of a horizontal cylinder: the laws of the registry are for cross-flow."""
    if shape == "horizontal_cylinder" and around.wind_direction == "along" and np.any(around.wind_speed > 0):
        raise InputError("wind_direction 'along' a horizontal cylinder has no law in the registry (its forced laws "
                         "are for cross-flow); use 'across' (the usual design case, it gives the larger loss)",
                         field="wind_direction", rule="'across' for a horizontal cylinder in wind", value="along")


@blocked
def bare_surface(
    shape: str = "horizontal_cylinder",
    *,
    surface_temperature,
    air_temperature=None,
    diameter=None,
    length=None,
    height=None,
    width=None,
    wind_speed=None,
    emissivity=0.9,
    surroundings_temperature=None,
    sky_view_fraction=None,
    sky_temperature=None,
    solar_irradiance=None,
    solar_absorptivity=None,
    pressure=None,
    natural: str | None = None,
    forced: str | None = None,
    flow_direction: str = "transverse",
    mixing_exponent=None,
    fluid: str = "Air",
    exact_properties: bool = False,
    convection_factor=1.0,
    convection_coefficient=None,
    strict: bool = False,
    surroundings: Surroundings | None = None,
) -> SurfaceResult:
    r"""Heat loss (or gain) of a surface at a known temperature.

    Parameters
    ----------
    shape : str
        One of :data:`convlib.geometry.SHAPES`.
    surface_temperature : numeric
        Outer surface temperature :math:`T_s` [K].
    air_temperature : numeric
        Ambient air temperature :math:`T_a` [K] (or give ``surroundings``).
    diameter, length, height, width : numeric
        Sizes the shape takes [m] (see :mod:`convlib.geometry`), 1e-6 to 1e6 m
        (:data:`convlib.validation.SIZE_RANGE`).
    wind_speed, surroundings_temperature, sky_view_fraction, sky_temperature, solar_irradiance, pressure
        Fields of the surroundings, as in :class:`convlib.surroundings.Surroundings` (defaults: still air,
        surroundings at the air temperature, no sky in view, a clear sky, no sun, 101325 Pa).
    emissivity : numeric
        Long-wave emissivity of the surface [-], 0..1.
    solar_absorptivity : numeric, optional
        Short-wave absorptivity [-]; default the emissivity (grey surface).
    natural, forced : str, optional
        Registry keys of the natural and forced correlations; default per shape.
    flow_direction : {"transverse", "assisting", "opposing"}
        How buoyancy acts relative to the wind; a horizontal wind is transverse.
    mixing_exponent : numeric, optional
        Churchill exponent n of :math:`Nu^n = Nu_F^n \pm Nu_N^n`, 0.5 to 20; default per shape and direction.
    fluid : str
        CoolProp fluid around the surface (default air).
    exact_properties : bool
        Call CoolProp directly instead of the interpolation table.
    convection_factor : numeric
        Multiplier on the convective coefficient [-], (0, 1000], default 1: the model-form
        uncertainty of the correlation in sensitivity studies.
    convection_coefficient : numeric, optional
        A convective coefficient [W/m2/K], 0 < h <= 1e8, to use instead of the correlations (one a
        specification prescribes, a measured one, a textbook's); radiation is still computed
        from the emissivity (give ``emissivity=0`` when the value is a combined coefficient).
        Flagged ``COEFFICIENT_GIVEN`` (informational); the Nusselt number is that of the given
        coefficient, while Rayleigh, Reynolds, the regime and ``h_natural`` / ``h_forced`` are
        still those of the physical situation (to compare the given value with the correlations).
    strict : bool
        Raise ``InputError`` (a ``ValueError``) if any correlation is evaluated outside its range.
    surroundings : Surroundings, optional
        The surroundings as one object, instead of the keywords above (not both).

    Returns
    -------
    SurfaceResult

    Examples
    --------
    A 100 mm horizontal line at 80 degC in still air at 20 degC, emissivity 0.9:

    >>> r = bare_surface(surface_temperature=353.15, air_temperature=293.15, diameter=0.1, length=1.0)
    >>> round(float(r.q_per_length)), r.regime_names().item()
    (245, 'natural')
    """
    around = resolve(surroundings, air_temperature=air_temperature, wind_speed=wind_speed,
                     surroundings_temperature=surroundings_temperature, sky_view_fraction=sky_view_fraction,
                     sky_temperature=sky_temperature, solar_irradiance=solar_irradiance, pressure=pressure)
    check_cross_flow(shape, around)
    conditions = OuterSurface.build(
        shape, diameter=diameter, length=length, height=height, width=width, emissivity=emissivity,
        solar_absorptivity=solar_absorptivity, natural=natural, forced=forced,
        flow_direction=flow_direction, mixing_exponent=mixing_exponent, fluid=fluid,
        exact_properties=exact_properties, convection_factor=convection_factor,
        convection_coefficient=convection_coefficient, **around.surface_keywords())
    ts = as_array("surface_temperature", surface_temperature, unit="K", low=0.0, low_inclusive=False)
    with property_range_named("surface_temperature, air_temperature"):
        result = conditions.result(conditions.exchange(ts))
    if strict and (result.warnings & ~Flag.INFORMATIONAL).any():
        raise InputError("; ".join(summarize_flags(result.warnings & ~Flag.INFORMATIONAL)), field="inputs",
                         rule="within the validity ranges of the correlations (strict=True)",
                         value=int(np.bitwise_or.reduce(result.warnings & ~Flag.INFORMATIONAL, axis=None)))
    return result
