"""A fused, single-core reference kernel of convlib's default physics, to measure convlib against.

Not part of the library: the benchmarks (``benchmarks/kernel_ratio.py``) time convlib beside it, and
``tests/test_reference_kernel.py`` checks that it computes what convlib computes. The source is plain Python on
scalars in one loop over the points, so it runs as it is (slowly, in a unit test, no numba needed) and compiled
with numba's ``njit`` (single core, no ``parallel``, no ``fastmath``) when numba is installed (the ``bench``
extra): ``make_kernels(jit=True)``.

What it computes, point by point, with convlib's defaults (read from ``convlib/surface.py``,
``convlib/correlations/``, ``convlib/properties.py``, ``convlib/wall.py``):

* a bare horizontal cylinder at a known surface temperature, per metre: film temperature; air at the film
  temperature from the same shipped 1 K table (``convlib/data/air_101325Pa.npy``, columns rho, mu, k, cp, beta)
  with the same linear interpolation, ideal-gas beta = 1/T_film; Churchill & Chu (1975) natural convection,
  Churchill & Bernstein (1977) forced, Churchill (1977) mixing with convlib's default exponent for transverse flow
  over a round body (4), grey radiation to surroundings at the air temperature; every numeric field of
  ``convlib.surface.SurfaceResult`` (:data:`FIELDS`, :data:`CODES`), including the regime codes and the warning
  bits of the two laws' ranges;
* a horizontal pipe with one layer of constant conductivity: the outer surface temperature by a safeguarded
  Newton iteration (bracket between the fluid and air temperatures, bisection when a step leaves it or does not
  shrink the residual enough), then the same fields at that temperature, plus the outer diameter.

Inputs are flat float64 arrays of one length (broadcast them first); still air is ``wind_speed == 0``.
Temperatures outside the table give NaN (convlib raises there; the benchmark stays inside).
"""
from __future__ import annotations

import math

import numpy as np

#: Constants as convlib uses them: convlib.surface.GRAVITY (CGPM 1901), convlib.radiation.STEFAN_BOLTZMANN
#: (CODATA 2018).
GRAVITY = 9.80665
STEFAN_BOLTZMANN = 5.670374419e-8
#: convlib.correlations.mixed default exponent for ("transverse", round body); written out as 4 in the kernel.
MIXING_EXPONENT = 4.0
#: Validity ranges of the two default laws in convlib's registry (convlib/correlations/registry.py):
#: churchill_chu / horizontal_cylinder Ra 1e-5..1e12; churchill_bernstein Re 1e-2..1e7 and Re Pr >= 0.2.
RA_RANGE = (1e-5, 1e12)
RE_RANGE = (1e-2, 1e7)
REPR_MIN = 0.2
#: convlib.regimes: Richardson limits, flow-regime limits of a horizontal cylinder (Ra) and a cylinder in
#: cross-flow (Re), warning bits.
RI_NATURAL_ABOVE, RI_FORCED_BELOW = 10.0, 0.1
RA_LAMINAR, RA_TURBULENT = 1e9, 1e10
RE_LAMINAR, RE_TURBULENT = 2e5, 1e6
NATURAL_OUT_OF_RANGE, FORCED_OUT_OF_RANGE = 1, 2

#: Float fields the kernels write, one row each of ``out`` (the SurfaceResult fields, in its order).
FIELDS = ("surface_temperature", "air_temperature", "film_temperature", "q_per_area", "q_per_length", "q_total",
          "q_convection_per_length", "q_radiation_per_length", "q_solar_per_length", "h_convection", "h_radiation",
          "h_natural", "h_forced", "nusselt", "rayleigh", "grashof", "reynolds", "prandtl", "richardson")
#: Integer fields, one row each of ``codes``.
CODES = ("regime", "flow_regime", "warnings")
(TS, TA, FILM, QA, QL, QT, QCL, QRL, QSL, HC, HR, HN, HF, NU, RA, GR, RE, PR, RI) = range(len(FIELDS))

def air_table():
    """(values, T_low, T_step) of the shipped air table at 101325 Pa, as convlib reads it."""
    from convlib.air_table import shipped

    table = shipped().table
    return np.array(table.values, order="C"), float(table.T_low), float(table.T_step)  # a writeable copy


def make_kernels(jit: bool = False):
    """``(bare, insulated)`` kernel functions; compiled with numba's ``njit`` when ``jit``, else plain Python.

    ``bare(ts, ta, diameter, wind, emissivity, length, table, t_low, t_step, out, codes)`` fills
    ``out[len(FIELDS), n]`` and ``codes[len(CODES), n]``.

    ``insulated(pipe_diameter, tf, thickness, conductivity, ta, wind, emissivity, length, table, t_low, t_step,
    tolerance, out, codes, outer_diameter)`` solves the surface temperature to ``tolerance`` [K], fills the same
    plus ``outer_diameter[n]``, and returns the number of evaluations of the outer exchange (residual and final
    evaluation) over all points.
    """
    if jit:
        from numba import njit

        wrap = njit(cache=False, fastmath=False, nogil=True)
    else:
        def wrap(f):
            return f

    @wrap
    def properties(t, table, t_low, t_step):
        # convlib.properties.PropertyTable.lookup: x = (T - T_low)/T_step, i = min(floor x, rows - 2)
        x = (t - t_low) / t_step
        rows = table.shape[0]
        if not (x >= 0.0) or x > rows - 1:
            return math.nan, math.nan, math.nan, math.nan
        i = min(int(x), rows - 2)
        w = x - i
        rho = table[i, 0] + w * (table[i + 1, 0] - table[i, 0])
        mu = table[i, 1] + w * (table[i + 1, 1] - table[i, 1])
        k = table[i, 2] + w * (table[i + 1, 2] - table[i, 2])
        cp = table[i, 3] + w * (table[i + 1, 3] - table[i, 3])
        return rho, mu, k, cp

    @wrap
    def exchange(ts, ta, d, wind, eps, table, t_low, t_step):
        """Net flux q'' [W/m2], its derivative in ts with the properties held (for Newton), and the parts."""
        film = 0.5 * (ts + ta)
        rho, mu, k, cp = properties(film, table, t_low, t_step)
        nu = mu / rho
        pr = cp * mu / k
        beta = 1.0 / film
        delta = ts - ta
        buoyancy = GRAVITY * beta * abs(delta) / (nu * nu)
        grashof = buoyancy * d * d * d
        rayleigh = grashof * pr
        # Churchill & Chu (1975) eq. 4
        psi = (1.0 + (0.559 / pr) ** (9.0 / 16.0)) ** (8.0 / 27.0)
        ra_sixth = rayleigh ** (1.0 / 6.0)
        root = 0.60 + 0.387 * ra_sixth / psi
        nu_nat = root * root
        h_nat = nu_nat * k / d
        # d(h_nat)/d(ts) * delta, properties held: Ra ~ |delta|, so delta dNu/dts = 2 root 0.387 Ra^(1/6) / (6 psi)
        delta_dh_nat = (2.0 * root * 0.387 * ra_sixth / (6.0 * psi)) * k / d
        moving = wind > 0.0
        reynolds = wind * d / nu
        re_law = reynolds if moving else 1.0
        # Churchill & Bernstein (1977) eq. 25, film properties
        lam = 0.62 * math.sqrt(re_law) * pr ** (1.0 / 3.0) / math.sqrt(math.sqrt(1.0 + (0.4 / pr) ** (2.0 / 3.0)))
        nu_frc = 0.3 + lam * (1.0 + (re_law / 282000.0) ** 0.625) ** 0.8
        h_frc = nu_frc * k / d if moving else 0.0
        if moving:  # Churchill (1977) with n = MIXING_EXPONENT = 4, written out
            h2 = h_frc * h_frc
            n2 = h_nat * h_nat
            h_conv = math.sqrt(math.sqrt(h2 * h2 + n2 * n2))
            ratio = h_nat / h_conv if h_conv > 0.0 else 0.0
            delta_dh = ratio * ratio * ratio * delta_dh_nat
        else:
            h_conv = h_nat
            delta_dh = delta_dh_nat
        q_conv = h_conv * delta
        # grey body to surroundings at the air temperature, factored as convlib.radiation does
        q_rad = eps * STEFAN_BOLTZMANN * ((ts * ts + ta * ta) * (ts + ta) * (ts - ta))
        dq = h_conv + delta_dh + eps * STEFAN_BOLTZMANN * 4.0 * ts * ts * ts
        return (q_conv + q_rad, dq, film, q_conv, q_rad, h_conv, h_nat, h_frc, rayleigh, grashof, reynolds, pr,
                buoyancy, k, moving)

    @wrap
    def write(j, ts, ta, d, wind, eps, length, table, t_low, t_step, out, codes):
        (q, dq, film, q_conv, q_rad, h_conv, h_nat, h_frc, rayleigh, grashof, reynolds, pr, buoyancy, k,
         moving) = exchange(ts, ta, d, wind, eps, table, t_low, t_step)
        per_run = math.pi * d
        delta = ts - ta
        out[TS, j] = ts
        out[TA, j] = ta
        out[FILM, j] = film
        out[QA, j] = q
        out[QL, j] = q * per_run
        out[QT, j] = q * per_run * length
        out[QCL, j] = q_conv * per_run
        out[QRL, j] = q_rad * per_run
        out[QSL, j] = 0.0
        out[HC, j] = h_conv
        out[HR, j] = q_rad / delta if delta != 0.0 else 4.0 * eps * STEFAN_BOLTZMANN * ta * ta * ta
        out[HN, j] = h_nat
        out[HF, j] = h_frc
        out[NU, j] = h_conv * d / k
        out[RA, j] = rayleigh
        out[GR, j] = grashof
        re = reynolds if moving else 0.0
        out[RE, j] = re
        out[PR, j] = pr
        ri = buoyancy * d * d * d / (re * re) if re * re > 0.0 else math.inf
        out[RI, j] = ri
        if not moving or ri > RI_NATURAL_ABOVE:
            codes[0, j] = 0
        elif ri < RI_FORCED_BELOW:
            codes[0, j] = 2
        else:
            codes[0, j] = 1
        value, lower, upper = rayleigh, RA_LAMINAR, RA_TURBULENT
        if ri < 1.0:
            value, lower, upper = reynolds, RE_LAMINAR, RE_TURBULENT
        codes[1, j] = 0 if value <= lower else (1 if value <= upper else 2)
        flags = 0
        if rayleigh < RA_RANGE[0] or rayleigh > RA_RANGE[1]:
            flags |= NATURAL_OUT_OF_RANGE
        if moving and (reynolds < RE_RANGE[0] or reynolds > RE_RANGE[1] or reynolds * pr < REPR_MIN):
            flags |= FORCED_OUT_OF_RANGE
        codes[2, j] = flags

    @wrap
    def bare(ts, ta, diameter, wind, emissivity, length, table, t_low, t_step, out, codes):
        for j in range(ts.shape[0]):
            write(j, ts[j], ta[j], diameter[j], wind[j], emissivity[j], length[j], table, t_low, t_step, out,
                  codes)

    @wrap
    def insulated(pipe_diameter, tf, thickness, conductivity, ta, wind, emissivity, length, table, t_low, t_step,
                  tolerance, out, codes, outer_diameter):
        evaluations = 0
        for j in range(tf.shape[0]):
            r_in = 0.5 * pipe_diameter[j]
            r_out = r_in + thickness[j]
            d = 2.0 * r_out
            outer_diameter[j] = d
            resistance = math.log(r_out / r_in) / (2.0 * math.pi) / conductivity[j]  # K m/W
            area = math.pi * d
            t_f, t_a = tf[j], ta[j]
            if resistance <= 0.0 or t_f == t_a:
                ts = t_f
            else:
                lo, hi = min(t_f, t_a), max(t_f, t_a)
                # start: surface resistance of a coefficient of 10 W/m2/K in series with the layer
                r_surface = 1.0 / (area * 10.0)
                ts = t_a + (t_f - t_a) * r_surface / (resistance + r_surface)
                f_previous = math.inf
                for _ in range(100):
                    (q, dq, _film, _qc, _qr, _hc, _hn, _hf, _ra, _gr, _re, _pr, _b, _k,
                     _m) = exchange(ts, t_a, d, wind[j], emissivity[j], table, t_low, t_step)
                    evaluations += 1
                    f = (t_f - ts) / resistance - area * q  # falls as ts rises; the root lies in [lo, hi]
                    if f == 0.0:
                        break
                    if f > 0.0:
                        lo = ts
                    else:
                        hi = ts
                    step = f / (1.0 / resistance + area * dq)  # Newton (properties held in the derivative)
                    if not (lo < ts + step < hi) or abs(f) > 0.5 * abs(f_previous):
                        step = 0.5 * (lo + hi) - ts  # bisection: the step left the bracket or did not gain enough
                    f_previous = f
                    ts = ts + step
                    if abs(step) <= tolerance or hi - lo <= tolerance:
                        break
            write(j, ts, t_a, d, wind[j], emissivity[j], length[j], table, t_low, t_step, out, codes)
            evaluations += 1
        return evaluations

    return bare, insulated


def run_bare(kernel, surface_temperature, air_temperature, diameter, wind_speed, emissivity, length=1.0,
             table=None):
    """Call a bare kernel on broadcast inputs; ``(out, codes)`` as dicts of arrays by field name."""
    values, t_low, t_step = air_table() if table is None else table
    arrays = _flat(surface_temperature, air_temperature, diameter, wind_speed, emissivity, length)
    n = arrays[0].size
    out, codes = np.empty((len(FIELDS), n)), np.empty((len(CODES), n), dtype=np.int16)
    kernel(*arrays, values, t_low, t_step, out, codes)
    return _named(out, codes)


def run_insulated(kernel, pipe_outer_diameter, fluid_temperature, thickness, conductivity, air_temperature,
                  wind_speed, emissivity, length=1.0, tolerance=1e-6, table=None):
    """Call an insulated kernel on broadcast inputs; ``(fields, evaluations)`` with ``outer_diameter`` among the
    fields."""
    values, t_low, t_step = air_table() if table is None else table
    arrays = _flat(pipe_outer_diameter, fluid_temperature, thickness, conductivity, air_temperature, wind_speed,
                   emissivity, length)
    n = arrays[0].size
    out, codes = np.empty((len(FIELDS), n)), np.empty((len(CODES), n), dtype=np.int16)
    outer = np.empty(n)
    evaluations = kernel(*arrays, values, t_low, t_step, float(tolerance), out, codes, outer)
    fields = _named(out, codes)
    fields["outer_diameter"] = outer
    return fields, evaluations


def _flat(*values):
    """Flat, contiguous, writeable float64 arrays of the broadcast shape (one array type: one compilation);
    an input that already is one is passed as it is, not copied."""
    shape = np.broadcast_shapes(*(np.shape(v) for v in values))
    out = []
    for v in values:
        a = np.asarray(v, dtype=float)
        if a.shape != shape or not a.flags.c_contiguous or not a.flags.writeable:
            a = np.array(np.broadcast_to(a, shape), dtype=float, order="C")
        out.append(a.reshape(-1))
    return out


def _named(out, codes):
    fields = {name: out[i] for i, name in enumerate(FIELDS)}
    fields.update({name: codes[i] for i, name in enumerate(CODES)})
    return fields
