r"""Thermal conductivity of insulation and jacket materials as a function of temperature.

Three ways to give it: a constant, a polynomial in temperature, or a table of
points (linear between them, held constant beyond the ends and flagged there).

A layer between faces at :math:`T_1` and :math:`T_2` conducts through the
Kirchhoff potential :math:`\Theta(T) = \int k\,dT` of the curve:

.. math:: q' = \frac{2\pi\,[\Theta(T_1) - \Theta(T_2)]}{\ln(r_2/r_1)},
    \qquad \bar k = \frac{\Theta(T_1) - \Theta(T_2)}{T_1 - T_2}

the practice of ASTM C680, which takes k(T) from the data reduction of
ASTM C1045. :math:`\Theta` rises strictly with T (k > 0), so every layer has
exactly one outer face temperature for a given heat flow.

The data may mean two things, recorded with ``form``:

* ``form="true"`` -- the material's conductivity :math:`k(T)`.
* ``form="mean"`` -- apparent conductivities against the test's mean
  temperature (ASTM C335 / C177 / ISO 8497). They are applied as
  :math:`k(T)` too: a test's apparent value is the integral mean of k over its
  own small drop, which equals k at the mean temperature to second order
  (ASTM C1045, small temperature differences). Evaluating the apparent value
  at each *layer's* mean temperature instead (:math:`\bar k = k_{app}((T_1+T_2)/2)`)
  is not monotone when k rises steeply over a large drop (high-temperature
  blankets): a colder outer face would carry less heat, and the inversion has
  several roots. That form is kept only as :meth:`Conductivity.at_layer_mean`,
  for comparison. For a linear k the two agree exactly; otherwise
  :math:`\bar k - k_{app}(\bar T) = c_2 (T_1 - T_2)^2 / 12` for a quadratic.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .errors import InputError
from .validation import as_array, check_choice

__all__ = ["Conductivity"]

# Grid on which the true-form integral U(T) = int k dT is tabulated for a first guess of its inverse.
_GRID = np.arange(1.0, 3000.0 + 0.25, 0.25)
FORMS = ("true", "mean")


@dataclass(frozen=True, eq=False)
class Conductivity:
    """Conductivity of a layer material [W/m/K] as a function of temperature [K].

    Build it with :meth:`constant`, :meth:`polynomial` or :meth:`table`.

    Examples
    --------
    >>> k = Conductivity.polynomial([0.03, 1e-4], form="true", valid_range=(250, 700))
    >>> round(float(k.at(400.0)), 4)
    0.07
    >>> round(float(k.effective(500.0, 300.0)), 4)   # linear k: integral mean = k at mean temperature
    0.07
    """

    kind: str
    coefficients: tuple[float, ...] = ()
    temperatures: tuple[float, ...] = ()
    values: tuple[float, ...] = ()
    form: str = "true"
    valid_range: tuple[float, float] = (0.0, np.inf)
    _integral: np.ndarray | None = field(default=None, repr=False)

    # ---------------------------------------------------------------- constructors
    @classmethod
    def constant(cls, k) -> "Conductivity":
        """A conductivity [W/m/K] > 0 independent of temperature; an array broadcasts over cases."""
        value = as_array("conductivity", k, unit="W/m/K", low=0.0, low_inclusive=False)
        return cls("constant", coefficients=(value,))

    @property
    def constant_value(self) -> np.ndarray:
        """The value of a constant conductivity [W/m/K] (scalar or array over cases)."""
        return self.coefficients[0]

    @classmethod
    def polynomial(cls, coefficients, form: str = "true", valid_range=(200.0, 900.0)) -> "Conductivity":
        """:math:`k(T) = c_0 + c_1 T + c_2 T^2 + \\dots` with T in kelvin.

        ``valid_range`` [K] is where the fit holds (outside: held at the end values and flagged);
        k must be positive on it.
        """
        check_choice("conductivity form", form, FORMS)
        coeffs = tuple(float(c) for c in as_array("conductivity coefficients", coefficients).ravel())
        low, high = (float(v) for v in as_array("valid_range", valid_range, unit="K", low=0.0, low_inclusive=False))
        if not low < high:
            raise InputError(f"valid_range must be (low, high) with low < high; got ({low}, {high}) K",
                             field="valid_range", rule="(low, high) with low < high", value=(low, high))
        probe = np.polynomial.polynomial.polyval(np.linspace(low, high, 200), coeffs)
        if np.any(probe <= 0):
            raise InputError(f"conductivity polynomial must be positive over {low:g}..{high:g} K; "
                             f"it reaches {probe.min():.4g} W/m/K", field="coefficients",
                             rule=f"positive over {low:g}..{high:g} K", value=coeffs)
        return cls._with_integral("polynomial", coefficients=coeffs, form=form, valid_range=(low, high))

    @classmethod
    def table(cls, temperatures, conductivities, form: str = "true") -> "Conductivity":
        """Points (T [K], k [W/m/K]), linear between them; at least two, temperatures increasing."""
        check_choice("conductivity form", form, FORMS)
        t = as_array("conductivity table temperatures", temperatures, unit="K", low=0.0, low_inclusive=False).ravel()
        k = as_array("conductivity table values", conductivities, unit="W/m/K", low=0.0, low_inclusive=False).ravel()
        if t.size < 2 or t.size != k.size:
            raise InputError(f"a conductivity table needs at least two (T, k) points of equal count; "
                             f"got {t.size} temperatures and {k.size} values", field="temperatures, conductivities",
                             rule="at least two (T, k) points of equal count", value=(t.size, k.size))
        if np.any(np.diff(t) <= 0):
            raise InputError("conductivity table temperatures must increase strictly", field="temperatures",
                             rule="strictly increasing", value=tuple(t))
        return cls._with_integral("table", temperatures=tuple(t), values=tuple(k), form=form,
                                  valid_range=(float(t[0]), float(t[-1])))

    @classmethod
    def _with_integral(cls, kind, **kw) -> "Conductivity":
        obj = cls(kind, **kw)
        object.__setattr__(obj, "_integral", obj._U(_GRID))  # for the first guess of the inverse
        return obj

    @classmethod
    def of(cls, value) -> "Conductivity":
        """Accept a number (constant) or a Conductivity."""
        return value if isinstance(value, Conductivity) else cls.constant(value)

    # ---------------------------------------------------------------- evaluation
    @property
    def is_constant(self) -> bool:
        return self.kind == "constant"

    def at(self, T) -> np.ndarray:
        """k at temperature T [K] (the data as given, either form)."""
        T = np.asarray(T, dtype=float)
        if self.kind == "constant":
            k = self.coefficients[0]
            return np.broadcast_to(k, np.broadcast_shapes(T.shape, k.shape)).copy()
        clipped = np.clip(T, *self.valid_range)
        if self.kind == "polynomial":
            return np.polynomial.polynomial.polyval(clipped, self.coefficients)
        return np.interp(clipped, self.temperatures, self.values)

    def outside_range(self, *temperatures) -> np.ndarray:
        """True where any of the temperatures lies outside the data's range."""
        low, high = self.valid_range
        return np.logical_or.reduce([(np.asarray(t) < low) | (np.asarray(t) > high) for t in temperatures])

    def _U(self, T):
        """Exact integral of k from the low end of the data's range to T [W/m], continued
        linearly (k held at its end values) outside the range."""
        T = np.asarray(T, dtype=float)
        low, high = self.valid_range
        inside = np.clip(T, low, high)
        if self.kind == "polynomial":
            antiderivative = np.polynomial.polynomial.polyint(self.coefficients)
            body = (np.polynomial.polynomial.polyval(inside, antiderivative)
                    - np.polynomial.polynomial.polyval(low, antiderivative))
        else:
            t, k = np.asarray(self.temperatures), np.asarray(self.values)
            nodes = np.concatenate([[0.0], np.cumsum(0.5 * (k[1:] + k[:-1]) * np.diff(t))])
            i = np.clip(np.searchsorted(t, inside, side="right") - 1, 0, t.size - 2)
            dx = inside - t[i]
            slope = (k[i + 1] - k[i]) / (t[i + 1] - t[i])
            body = nodes[i] + k[i] * dx + 0.5 * slope * dx * dx
        k_low, k_high = self.at(low), self.at(high)
        return body + k_low * np.minimum(T - low, 0.0) + k_high * np.maximum(T - high, 0.0)

    def effective(self, t_in, t_out) -> np.ndarray:
        """Effective conductivity of a layer whose faces are at t_in and t_out [K]: the integral mean
        of k between them (either form, see the module notes)."""
        t_in, t_out = np.asarray(t_in, float), np.asarray(t_out, float)
        if self.kind == "constant":
            return self.at(t_in + 0.0 * t_out)
        diff = t_in - t_out
        small = np.abs(diff) < 1e-6  # no drop: the limit is k itself
        with np.errstate(divide="ignore", invalid="ignore"):
            mean = (self._U(t_in) - self._U(t_out)) / np.where(small, 1.0, diff)
        return np.where(small, self.at(0.5 * (t_in + t_out)), mean)

    def at_layer_mean(self, t_in, t_out) -> np.ndarray:
        """The data at the layer's mean temperature, :math:`k((T_1+T_2)/2)` [W/m/K] -- the one-point
        reading of mean-form data, for comparison only (not monotone over large drops; see the module notes)."""
        return self.at(0.5 * (np.asarray(t_in, float) + np.asarray(t_out, float)))

    def temperature_after(self, t_in, drop) -> np.ndarray:
        r"""Outer face temperature of a layer given its inner face t_in [K] and
        ``drop`` = q' ln(r2/r1) / (2 pi) [W/m] (its conduction "potential" drop).

        Solves :math:`\Theta(T_2) = \Theta(T_1) - drop`; :math:`\Theta` is strictly increasing, so the
        root is unique. Newton steps from the tabulated integral are kept inside the grid cell that
        brackets the root (bisection where a step would leave it); every point is checked and a point
        that does not converge raises rather than returning a wrong temperature.
        """
        t_in = np.asarray(t_in, float)
        if self.kind == "constant":
            return t_in - drop / self.coefficients[0]
        target = np.asarray(self._U(t_in) - drop, dtype=float)
        # Beyond the tabulated grid U is continued linearly (k held at its end value): exact there.
        below, above = target < self._integral[0], target > self._integral[-1]
        i = np.clip(np.searchsorted(self._integral, target, side="right") - 1, 0, _GRID.size - 2)
        lo, hi = _GRID[i], _GRID[i + 1]
        lo = np.where(below, -np.inf, lo)
        hi = np.where(above, np.inf, hi)
        t = np.interp(target, self._integral, _GRID)
        t = np.where(below, _GRID[0] - (self._integral[0] - target) / self.at(_GRID[0]), t)
        t = np.where(above, _GRID[-1] + (target - self._integral[-1]) / self.at(_GRID[-1]), t)
        converged = below | above | ~np.isfinite(target)  # non-finite in, NaN out: the caller's solve reports it
        for _ in range(60):  # safeguarded Newton (U' = k > 0): 1-3 steps in practice
            residual = self._U(t) - target
            lo = np.where(residual < 0, t, lo)
            hi = np.where(residual > 0, t, hi)
            step = residual / self.at(t)
            new = t - step
            outside = ~((new >= lo) & (new <= hi))
            new = np.where(outside & np.isfinite(lo) & np.isfinite(hi), 0.5 * (lo + hi), new)
            done = (np.abs(new - t) <= 1e-11 * np.maximum(1.0, np.abs(t))) | (residual == 0)
            t = np.where(converged, t, new)  # a point once converged keeps its value
            converged = converged | done
            if np.all(converged):
                break
        if not np.all(converged):
            raise InputError("the outer face temperature of a layer with temperature-dependent conductivity was "
                             f"not found at {int(np.count_nonzero(~converged))} point(s)", field="conductivity",
                             rule="a conductivity curve positive and finite over the layer's temperatures",
                             value=int(np.count_nonzero(~converged)))
        return t
