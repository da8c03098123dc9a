"""Forced convection correlations (external flow), one published law per function.

Functions take dimensionless groups as numpy arrays and return the mean
Nusselt number on the characteristic length (diameter for cylinders and
spheres, flow length for plates). The registry states at which temperature
each law wants its properties (film, or free stream plus a surface value).
"""
from __future__ import annotations

import numpy as np

__all__ = [
    "nusselt_cylinder_crossflow_churchill_bernstein",
    "nusselt_cylinder_crossflow_hilpert",
    "nusselt_cylinder_crossflow_zukauskas",
    "nusselt_sphere_crossflow_whitaker",
    "nusselt_plate_parallel_flow_laminar",
    "nusselt_plate_parallel_flow_mixed_layer",
    "nusselt_square_cylinder_crossflow_jakob",
    "HILPERT_TABLE",
    "ZUKAUSKAS_TABLE",
]


def _arr(x):
    return np.asarray(x, dtype=float)


def _piece(table, x):
    """Index of the table row whose lower bound is the largest one <= x (boundary -> upper piece)."""
    return np.clip(np.searchsorted(table[:, 0], x, side="right") - 1, 0, len(table) - 1)


def nusselt_cylinder_crossflow_churchill_bernstein(Re, Pr):
    r"""Churchill & Bernstein (1977), cylinder in cross-flow, all Re.

    .. math::
        Nu_D = 0.3 + \frac{0.62\,Re_D^{1/2}Pr^{1/3}}{\left[1+(0.4/Pr)^{2/3}\right]^{1/4}}
        \left[1 + \left(\frac{Re_D}{282000}\right)^{5/8}\right]^{4/5}

    Valid for :math:`Re_D Pr \ge 0.2`; properties at film temperature.

    References
    ----------
    Churchill, S.W., Bernstein, M. (1977). A correlating equation for forced
    convection from gases and liquids to a circular cylinder in crossflow.
    J. Heat Transfer 99:300-306, eq. (25). doi:10.1115/1.3450685

    Examples
    --------
    >>> round(float(nusselt_cylinder_crossflow_churchill_bernstein(1e4, 0.71)), 2)
    53.63
    """
    Re, Pr = _arr(Re), _arr(Pr)
    lam = 0.62 * Re ** 0.5 * Pr ** (1.0 / 3.0) / (1.0 + (0.4 / Pr) ** (2.0 / 3.0)) ** 0.25
    return 0.3 + lam * (1.0 + (Re / 282000.0) ** 0.625) ** 0.8


#: Hilpert (1933) with the Knudsen & Katz (1958) constants: lower Re bound, C, m.
HILPERT_TABLE = np.array(
    [
        [0.4, 0.989, 0.330],
        [4.0, 0.911, 0.385],
        [40.0, 0.683, 0.466],
        [4000.0, 0.193, 0.618],
        [40000.0, 0.027, 0.805],
    ]
)


def nusselt_cylinder_crossflow_hilpert(Re, Pr):
    r"""Hilpert (1933) power law with Knudsen & Katz constants: :math:`Nu_D = C Re_D^m Pr^{1/3}`.

    ======================  =======  =======
    Re_D                    C        m
    ======================  =======  =======
    0.4 <= Re < 4           0.989    0.330
    4 <= Re < 40            0.911    0.385
    40 <= Re < 4000         0.683    0.466
    4000 <= Re < 40000      0.193    0.618
    40000 <= Re <= 400000   0.027    0.805
    ======================  =======  =======

    A boundary value belongs to the upper piece. :math:`Pr \ge 0.7`; film properties.

    References
    ----------
    Hilpert, R. (1933). Waermeabgabe von geheizten Draehten und Rohren im
    Luftstrom. Forsch. Ing.-Wes. 4:215-224. doi:10.1007/BF02719754;
    constants from Knudsen, J.D., Katz, D.L. (1958), Fluid Dynamics and Heat
    Transfer, McGraw-Hill.

    Examples
    --------
    >>> round(float(nusselt_cylinder_crossflow_hilpert(1e4, 0.71)), 2)
    51.05
    """
    Re, Pr = _arr(Re), _arr(Pr)
    row = _piece(HILPERT_TABLE, Re)
    return HILPERT_TABLE[row, 1] * Re ** HILPERT_TABLE[row, 2] * Pr ** (1.0 / 3.0)


#: Zukauskas (1972): lower Re bound, C, m.
ZUKAUSKAS_TABLE = np.array(
    [
        [1.0, 0.75, 0.4],
        [40.0, 0.51, 0.5],
        [1e3, 0.26, 0.6],
        [2e5, 0.076, 0.7],
    ]
)


def nusselt_cylinder_crossflow_zukauskas(Re, Pr, Pr_s=None):
    r"""Zukauskas (1972), cylinder in cross-flow.

    .. math::
        Nu_D = C\,Re_D^m\,Pr^n\,(Pr/Pr_s)^{1/4},\qquad n = 0.37\ (Pr \le 10),\ 0.36\ (Pr > 10)

    ==================  ======  =====
    Re_D                C       m
    ==================  ======  =====
    1 <= Re < 40        0.75    0.4
    40 <= Re < 1e3      0.51    0.5
    1e3 <= Re < 2e5     0.26    0.6
    2e5 <= Re <= 1e6    0.076   0.7
    ==================  ======  =====

    A boundary value belongs to the upper piece. Valid for
    :math:`0.7 \le Pr \le 500`, :math:`1 \le Re_D \le 10^6`. Properties at the
    free-stream temperature, except :math:`Pr_s` at the surface temperature
    (``Pr_s=None`` takes :math:`Pr_s = Pr`).

    References
    ----------
    Zukauskas, A. (1972). Heat transfer from tubes in crossflow. Advances in
    Heat Transfer 8:93-160. doi:10.1016/S0065-2717(08)70038-8

    Examples
    --------
    >>> round(float(nusselt_cylinder_crossflow_zukauskas(1e4, 0.71, 0.70)), 2)
    57.74
    """
    Re, Pr = _arr(Re), _arr(Pr)
    Pr_s = Pr if Pr_s is None else _arr(Pr_s)
    row = _piece(ZUKAUSKAS_TABLE, Re)
    n = np.where(Pr <= 10.0, 0.37, 0.36)
    return ZUKAUSKAS_TABLE[row, 1] * Re ** ZUKAUSKAS_TABLE[row, 2] * Pr ** n * (Pr / Pr_s) ** 0.25


def nusselt_sphere_crossflow_whitaker(Re, Pr, viscosity_ratio=1.0):
    r"""Whitaker (1972), sphere in a stream.

    .. math::
        Nu_D = 2 + \left(0.4\,Re_D^{1/2} + 0.06\,Re_D^{2/3}\right)Pr^{0.4}\left(\mu/\mu_s\right)^{1/4}

    Valid for :math:`3.5 \le Re_D \le 7.6\times10^4`, :math:`0.71 \le Pr \le 380`,
    :math:`1 \le \mu/\mu_s \le 3.2`; properties at free stream, :math:`\mu_s`
    at the surface. ``viscosity_ratio`` is :math:`\mu/\mu_s`. Stated accuracy ±30 %.

    References
    ----------
    Whitaker, S. (1972). Forced convection heat transfer correlations for flow
    in pipes, past flat plates, single cylinders, single spheres, and for flow
    in packed beds and tube bundles. AIChE J. 18:361-371. doi:10.1002/aic.690180219

    Examples
    --------
    >>> round(float(nusselt_sphere_crossflow_whitaker(1e4, 0.71)), 2)
    61.16
    """
    Re, Pr = _arr(Re), _arr(Pr)
    return 2.0 + (0.4 * Re ** 0.5 + 0.06 * Re ** (2.0 / 3.0)) * Pr ** 0.4 * _arr(viscosity_ratio) ** 0.25


def nusselt_plate_parallel_flow_laminar(Re, Pr):
    r"""Laminar boundary layer on an isothermal flat plate: :math:`Nu_L = 0.664\,Re_L^{1/2}Pr^{1/3}`.

    Valid for :math:`Re_L \le 5\times10^5`, :math:`Pr \ge 0.6`; film properties.

    References
    ----------
    Pohlhausen, E. (1921). Der Waermeaustausch zwischen festen Koerpern und
    Fluessigkeiten mit kleiner Reibung und kleiner Waermeleitung. ZAMM 1:115-121.
    doi:10.1002/zamm.19210010205

    Examples
    --------
    >>> round(float(nusselt_plate_parallel_flow_laminar(1e5, 0.71)), 1)
    187.3
    """
    Re, Pr = _arr(Re), _arr(Pr)
    return 0.664 * Re ** 0.5 * Pr ** (1.0 / 3.0)


def nusselt_plate_parallel_flow_mixed_layer(Re, Pr):
    r"""Flat plate with a laminar leading part and a turbulent remainder (transition at Re = 5e5).

    .. math::
        Nu_L = 0.664\,Re_L^{1/2}Pr^{1/3}\ (Re_L \le 5\times10^5),\qquad
        Nu_L = (0.037\,Re_L^{4/5} - 871)\,Pr^{1/3}\ (5\times10^5 < Re_L \le 10^8)

    The boundary value belongs to the laminar piece; :math:`0.6 \le Pr \le 60`.
    Wind over building-size surfaces is usually disturbed, so the fully
    laminar leading edge is an idealisation.

    References
    ----------
    Incropera, F.P., DeWitt, D.P., Bergman, T.L., Lavine, A.S. (2007).
    Fundamentals of Heat and Mass Transfer, 6th ed., Wiley, eqs. (7.30) and (7.38)
    (from memory); the turbulent part after Schlichting (1979), Boundary-Layer Theory.

    Examples
    --------
    >>> round(float(nusselt_plate_parallel_flow_mixed_layer(1e6, 0.71)), 1)
    1305.6
    """
    Re, Pr = _arr(Re), _arr(Pr)
    with np.errstate(invalid="ignore"):
        lam = 0.664 * Re ** 0.5
        turb = 0.037 * Re ** 0.8 - 871.0
    return np.where(Re <= 5e5, lam, turb) * Pr ** (1.0 / 3.0)


def nusselt_square_cylinder_crossflow_jakob(Re, Pr):
    r"""Mean Nusselt number of a square cylinder in cross flow, a flat face to the flow.

    .. math:: Nu_D = 0.102\, Re_D^{0.675}\, Pr^{1/3}, \qquad 5\times10^3 \le Re_D \le 10^5

    :math:`D` is the side of the square, properties at the film temperature. Measured in air
    (gases); constants of Jakob (1949) after Hilpert's (1933) measurements, as tabulated in
    Incropera et al., *Fundamentals of Heat and Mass Transfer*, 6th ed., Table 7.3 (from memory;
    the corner-to-flow orientation has C = 0.246, m = 0.588).

    References
    ----------
    M. Jakob (1949), *Heat Transfer*, Vol. 1, Wiley, New York.

    Examples
    --------
    >>> round(float(nusselt_square_cylinder_crossflow_jakob(2.0e4, 0.71)), 1)
    72.8
    """
    Re, Pr = _arr(Re), _arr(Pr)
    return 0.102 * Re ** 0.675 * Pr ** (1.0 / 3.0)
