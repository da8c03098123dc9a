r"""The net flux of an outer surface and its slope, for the surface-temperature solvers (the lean path).

A solver evaluates the outer surface's net flux :math:`q''(T_s)` many times at the same surroundings.
:class:`FluxSlope` settles once per solve what does not change between evaluations -- the correlation
functions (no registry look-up or argument checks per call), the fluid's property table at its one
pressure, the free-stream properties of laws evaluated there -- and then returns, per call, the flux
:meth:`convlib.surface.OuterSurface.exchange` gives (``flux_only``; the same numbers, to rounding) and its
derivative with the fluid properties held at their values of the call:

.. math::
    \frac{dq''}{dT_s} = h_c + \Delta T \frac{dh_c}{dT_s} + 4 \varepsilon \sigma T_s^3, \qquad
    \Delta T \frac{dh_c}{dT_s} = f_c\, w\, \frac{k}{L_n}\, Ra \frac{dNu_n}{dRa}

with :math:`f_c` the convection factor, :math:`w = \partial h_{mix}/\partial h_n` of the mixing rule
(:func:`convlib.correlations.mixed.combine`: :math:`(h_n/h_{mix})^{n-1}` assisting or transverse, with the sign
of the stronger mechanism opposing, the floor's fraction where floored; 1 in still air; 0 where the coefficient
is given) and :math:`Ra\,dNu_n/dRa` of the natural law from a forward
difference on the law itself (relative step 1e-7), so that every registered law has a slope without one
written per law. The forced coefficient depends on the surface temperature through the properties only,
held here. The slope serves Newton steps (:func:`convlib.roots.newton_decreasing`), which are safeguarded
by a bracket: an approximate slope costs iterations, never correctness.
"""
from __future__ import annotations

import numpy as np

from . import correlations as corr
from .correlations.mixed import OPPOSING_FLOOR_FRACTION, combine
from .geometry import SHAPES
from .properties import fluid_properties, solver_properties
from .radiation import STEFAN_BOLTZMANN, net_flux

__all__ = ["FluxSlope"]

#: Relative step on Ra of the natural law's forward difference.
RA_STEP = 1e-7


class _Law:
    """A registry record's :meth:`~convlib.correlations.registry.Correlation.nusselt`, non-finite -> 0: the
    treatment of ``convlib.correlations.evaluate(..., check=False)``."""

    def __init__(self, record):
        self.record = record

    def __call__(self, **groups):
        nu = self.record.nusselt(**groups)
        return np.where(np.isfinite(nu), nu, 0.0)


class FluxSlope:
    """Net outer flux [W/m2] and its slope [W/m2/K] at surface temperatures, for one solve.

    Parameters
    ----------
    outer : convlib.surface.OuterSurface
        The validated surface and surroundings.
    point : dict
        The per-point inputs of ``outer.exchange`` by name (full arrays, subsets of them, or scalars).

    Call ``flux_slope(ts, point)`` with the points' surface temperatures and (a subset of) the same per-point
    inputs; it returns ``(q, dq_dts)``.
    """

    def __init__(self, outer, point: dict):
        from .surface import GRAVITY  # surface imports this module's users: imported at use

        info = SHAPES[outer.shape]
        self.gravity = GRAVITY
        self.fluid, self.exact, self.direction = outer.fluid, outer.exact_properties, outer.flow_direction
        hot = corr.get(info.natural_geometry, outer.natural)
        self.natural = _Law(hot)
        self.natural_cold = (None if info.natural_geometry_cold == info.natural_geometry
                             else _Law(corr.get(info.natural_geometry_cold, outer.natural)))
        self.uses_ratio = "diameter_over_length" in hot.inputs
        forced = corr.get(info.forced_geometry, outer.forced)
        self.forced = _Law(forced)
        self.forced_inputs = forced.inputs
        self.free_stream = forced.property_temperature == "free_stream"
        self.table = solver_properties(outer.fluid, point["pressure"], outer.exact_properties)

    def _properties(self, temperature, pressure):
        """(k, nu, pr, beta, mu) at ``temperature``: from the table settled once, else the general path."""
        if self.table is not None:
            found = self.table(np.asarray(temperature, dtype=float))
            if found is not None:
                return found
        p = fluid_properties(self.fluid, temperature, pressure=pressure, exact=self.exact)
        return p.k, p.nu, p.pr, p.beta, p.mu

    def _nusselt_natural(self, rayleigh, prandtl, cold, ratio):
        extra = {"diameter_over_length": ratio} if self.uses_ratio else {}
        nu = self.natural(Ra=rayleigh, Pr=prandtl, **extra)
        if self.natural_cold is not None:
            nu = np.where(cold, self.natural_cold(Ra=rayleigh, Pr=prandtl), nu)
        return nu

    def __call__(self, ts, pt: dict):
        ta, wind, eps = pt["air_temperature"], pt["wind_speed"], pt["emissivity"]
        p, l_nat, l_frc = pt["pressure"], pt["natural_length"], pt["forced_length"]
        factor, given = pt["convection_factor"], pt["given_coefficient"]
        film = 0.5 * (ts + ta)
        k, nu, pr, beta, mu = self._properties(film, p)
        delta = ts - ta
        cold = delta < 0
        rayleigh = self.gravity * beta * np.abs(delta) / nu ** 2 * l_nat ** 3 * pr
        ratio = pt["diameter_over_length"]
        nu_nat = self._nusselt_natural(rayleigh, pr, cold, ratio)
        h_nat = nu_nat * k / l_nat
        # Ra dNu/dRa by a forward difference on the law (0 at Ra = 0, where Delta T dh/dTs vanishes)
        stretched = self._nusselt_natural(rayleigh * (1.0 + RA_STEP), pr, cold, ratio)
        ra_slope = (stretched - nu_nat) / RA_STEP * k / l_nat

        moving = wind > 0
        groups = {}
        if self.free_stream:
            ks, nus, prs, _, mus = self._properties(np.broadcast_to(ta, np.shape(ts)), p)
            k_w, _, pr_w, _, mu_w = self._properties(ts, p)
            groups = {"Pr_s": pr_w, "viscosity_ratio": mus / mu_w}
        else:
            ks, nus, prs = k, nu, pr
        reynolds = wind * l_frc / nus
        nu_frc = self.forced(Re=np.where(moving, reynolds, 1.0), Pr=prs,
                             **{name: v for name, v in groups.items() if name in self.forced_inputs})
        h_frc = np.where(moving, nu_frc * ks / l_frc, 0.0)
        n_mix = pt["mixing_exponent"]
        h_mix, floored = combine(h_frc, h_nat, n_mix, self.direction)
        weight = self._mixing_weight(h_frc, h_nat, h_mix, n_mix, floored)
        is_given = ~np.isnan(given)
        h_conv = factor * np.where(is_given, given, np.where(moving, h_mix, h_nat))
        slope_conv = np.where(is_given, 0.0, factor * np.where(moving, weight, 1.0) * ra_slope)
        q_rad = net_flux(ts, eps, pt["sky_view_fraction"], pt["sky_temperature"], pt["surroundings_temperature"])
        q = h_conv * delta + q_rad - pt["solar_per_area"]
        slope = h_conv + slope_conv + 4.0 * eps * STEFAN_BOLTZMANN * ts ** 3
        return q, slope

    def _mixing_weight(self, h_frc, h_nat, h_mix, n_mix, floored):
        """d h_mix / d h_nat of the mixing rule."""
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            ratio = np.where(h_mix > 0, h_nat / h_mix, 1.0) ** (n_mix - 1.0)
            if self.direction == "opposing":
                beyond = np.where(h_nat > h_frc, ratio, -ratio)
                ratio = np.where(floored, np.where(h_nat > h_frc, OPPOSING_FLOOR_FRACTION, 0.0), beyond)
        return np.where(np.isfinite(ratio), ratio, 0.0)
