r"""Thermal conductivity of insulation and jacket materials as a function of temperature.

Three ways to give it: a constant, a polynomial in temperature, or a table of
points (linear between them, held constant beyond the ends and flagged there).

Two meanings of the data, to be stated by the caller:

* ``form="true"`` -- the data are the material's conductivity :math:`k(T)`.
  A layer between :math:`T_1` and :math:`T_2` then conducts with the exact
  integral mean :math:`\bar k = \frac{1}{T_1-T_2}\int_{T_2}^{T_1} k\,dT`
  (Kirchhoff transform), the practice of ASTM C680 for insulated systems.
* ``form="mean"`` -- the data are apparent conductivities against the test's
  mean temperature, as reported from ASTM C335 / ISO 8497 pipe tests. A layer
  is then given :math:`\bar k = k_{app}\left(\frac{T_1+T_2}{2}\right)`. The two
  forms agree exactly when k is linear in T and to second order otherwise.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .errors import InputError
from .roots import find_root
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
        """Effective conductivity of a layer whose faces are at t_in and t_out [K]."""
        t_in, t_out = np.asarray(t_in, float), np.asarray(t_out, float)
        if self.kind == "constant":
            return self.at(t_in + 0.0 * t_out)
        if self.form == "mean":
            return self.at(0.5 * (t_in + t_out))
        diff = t_in - t_out
        small = np.abs(diff) < 1e-6  # no drop: the limit is k itself
        with np.errstate(divide="ignore", invalid="ignore"):
            mean = (self._U(t_in) - self._U(t_out)) / np.where(small, 1.0, diff)
        return np.where(small, self.at(0.5 * (t_in + t_out)), mean)

    def temperature_after(self, t_in, drop) -> np.ndarray:
        """Outer face temperature of a layer given its inner face t_in [K] and
        ``drop`` = q' ln(r2/r1) / (2 pi) [W/m] (its conduction "potential" drop)."""
        t_in = np.asarray(t_in, float)
        if self.kind == "constant":
            return t_in - drop / self.coefficients[0]
        if self.form == "true":
            target = self._U(t_in) - drop
            t = np.interp(target, self._integral, _GRID)  # first guess from the tabulated integral
            for _ in range(20):  # Newton on the exact integral (U' = k > 0): converges in 1-2 steps
                step = (self._U(t) - target) / self.at(t)
                t = t - step
                if np.all(np.abs(step) < 1e-11):
                    break
            return t
        # mean form: solve 2 k(m) (t_in - m) = drop for the layer's mean temperature m, bracketed:
        # m lies between t_in and t_in - drop / (2 k_min) (k >= k_min everywhere).
        drop, t_in = np.broadcast_arrays(np.asarray(drop, float), t_in)
        k_min = float(self.at(np.linspace(*np.clip(self.valid_range, 1.0, 3000.0), 256)).min())
        far = t_in - drop / (2.0 * k_min) - np.sign(drop) * 1e-6
        lo, hi = np.minimum(t_in, far), np.maximum(t_in, far)
        res = find_root(lambda m, t, q: 2.0 * self.at(m) * (t - m) - q, lo, hi, args=(t_in, drop), xatol=1e-10,
                        xrtol=0.0)
        return np.where(drop == 0, t_in, 2.0 * res.x - t_in)
