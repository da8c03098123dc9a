"""Natural (free) convection correlations, one published law per function.

Every function takes dimensionless groups as numpy arrays (scalars broadcast)
and returns the mean Nusselt number on the geometry's characteristic length.
Properties, the film temperature and the validity check are the caller's job
(:func:`convlib.correlations.nusselt` does the check from the registry).
Piecewise laws use ``np.where``; the docstring says to which piece a boundary
value belongs.
"""
from __future__ import annotations

import numpy as np

__all__ = [
    "nusselt_horizontal_cylinder_churchill_chu",
    "nusselt_horizontal_cylinder_churchill_chu_laminar",
    "nusselt_horizontal_cylinder_morgan",
    "nusselt_horizontal_cylinder_kuehn_goldstein",
    "nusselt_vertical_plate_churchill_chu",
    "nusselt_vertical_plate_churchill_chu_laminar",
    "thin_cylinder_criterion",
    "thin_cylinder_factor_popiel",
    "slender_cylinder_curvature",
    "popiel_out_of_range",
    "nusselt_vertical_cylinder_churchill_chu",
    "nusselt_vertical_cylinder_churchill_chu_laminar",
    "nusselt_horizontal_plate_up_mcadams",
    "nusselt_horizontal_plate_up_vdi",
    "nusselt_horizontal_plate_down_mcadams",
    "nusselt_horizontal_plate_down_vdi",
    "nusselt_sphere_churchill",
    "nusselt_sphere_yuge",
    "MORGAN_TABLE",
]


def _arr(x):
    return np.asarray(x, dtype=float)


# --------------------------------------------------------------------------- horizontal cylinder
def nusselt_horizontal_cylinder_churchill_chu(Ra, Pr):
    r"""Churchill & Chu (1975), isothermal horizontal cylinder, full range.

    .. math::
        Nu_D = \left\{0.60 + \frac{0.387\,Ra_D^{1/6}}
               {\left[1 + (0.559/Pr)^{9/16}\right]^{8/27}}\right\}^2

    Parameters
    ----------
    Ra : numeric
        Rayleigh number on the diameter, properties at film temperature [-]
    Pr : numeric
        Prandtl number at film temperature [-]

    Returns
    -------
    numpy.ndarray
        Mean Nusselt number on the diameter [-]

    Notes
    -----
    Valid for :math:`10^{-5} \le Ra_D \le 10^{12}`, all Pr. Fitted to data for
    air, water and oils; a single accuracy figure is not stated in the paper.

    References
    ----------
    Churchill, S.W., Chu, H.H.S. (1975). Correlating equations for laminar and
    turbulent free convection from a horizontal cylinder. Int. J. Heat Mass
    Transfer 18:1049-1053, eq. (4). doi:10.1016/0017-9310(75)90222-7

    Examples
    --------
    >>> round(float(nusselt_horizontal_cylinder_churchill_chu(1e6, 0.71)), 2)
    14.54
    """
    Ra, Pr = _arr(Ra), _arr(Pr)
    psi = (1.0 + (0.559 / Pr) ** (9.0 / 16.0)) ** (8.0 / 27.0)
    return (0.60 + 0.387 * Ra ** (1.0 / 6.0) / psi) ** 2


def nusselt_horizontal_cylinder_churchill_chu_laminar(Ra, Pr):
    r"""Churchill & Chu (1975), horizontal cylinder, laminar form.

    .. math::
        Nu_D = 0.36 + \frac{0.518\,Ra_D^{1/4}}
               {\left[1 + (0.559/Pr)^{9/16}\right]^{4/9}}

    Valid for :math:`10^{-6} \le Ra_D \le 10^{9}`; slightly more accurate than the
    full-range form inside that range.

    References
    ----------
    Churchill & Chu (1975), Int. J. Heat Mass Transfer 18:1049, eq. (5).
    doi:10.1016/0017-9310(75)90222-7

    Examples
    --------
    >>> round(float(nusselt_horizontal_cylinder_churchill_chu_laminar(1e6, 0.71)), 2)
    12.75
    """
    Ra, Pr = _arr(Ra), _arr(Pr)
    psi = (1.0 + (0.559 / Pr) ** (9.0 / 16.0)) ** (4.0 / 9.0)
    return 0.36 + 0.518 * Ra ** 0.25 / psi


#: Morgan (1975) Table: lower Ra bound of each piece, C, n (Nu = C Ra^n).
MORGAN_TABLE = np.array(
    [
        [1e-10, 0.675, 0.058],
        [1e-2, 1.02, 0.148],
        [1e2, 0.850, 0.188],
        [1e4, 0.480, 0.250],
        [1e7, 0.125, 0.333],
    ]
)


def nusselt_horizontal_cylinder_morgan(Ra, Pr=None):
    r"""Morgan (1975), horizontal cylinder, piecewise power law :math:`Nu_D = C Ra_D^n`.

    ============================  =======  =======
    Ra_D                          C        n
    ============================  =======  =======
    1e-10 <= Ra < 1e-2            0.675    0.058
    1e-2  <= Ra < 1e2             1.02     0.148
    1e2   <= Ra < 1e4             0.850    0.188
    1e4   <= Ra < 1e7             0.480    0.250
    1e7   <= Ra <= 1e12           0.125    0.333
    ============================  =======  =======

    A value on a boundary belongs to the upper piece. The law was fitted for
    air (Pr about 0.7); ``Pr`` is accepted for a uniform signature and unused.

    References
    ----------
    Morgan, V.T. (1975). The overall convective heat transfer from smooth
    circular cylinders. Advances in Heat Transfer 11:199-264, Table II.
    doi:10.1016/S0065-2717(08)70075-3

    Examples
    --------
    >>> round(float(nusselt_horizontal_cylinder_morgan(1e6)), 2)
    15.18
    """
    Ra = _arr(Ra)
    piece = np.clip(np.searchsorted(MORGAN_TABLE[:, 0], Ra, side="right") - 1, 0, len(MORGAN_TABLE) - 1)
    return MORGAN_TABLE[piece, 1] * Ra ** MORGAN_TABLE[piece, 2]


def nusselt_horizontal_cylinder_kuehn_goldstein(Ra, Pr):
    r"""Kuehn & Goldstein (1976), horizontal cylinder, conduction-limit to turbulent.

    .. math::
        \frac{2}{Nu_D} = \ln\left[1 + \frac{2}{\left(Nu_l^{15} + Nu_t^{15}\right)^{1/15}}\right],\quad
        Nu_l = 0.518 Ra_D^{1/4}\left[1+(0.559/Pr)^{3/5}\right]^{-5/12},\quad
        Nu_t = 0.1 Ra_D^{1/3}

    Valid for all Ra_D except low-Pr fluids (liquid metals); the original data
    span about :math:`10^{-7} \le Ra_D \le 10^{12}` (from memory).

    References
    ----------
    Kuehn, T.H., Goldstein, R.J. (1976). Correlating equations for natural
    convection heat transfer between horizontal circular cylinders. Int. J.
    Heat Mass Transfer 19:1127-1134. doi:10.1016/0017-9310(76)90145-9

    Examples
    --------
    >>> round(float(nusselt_horizontal_cylinder_kuehn_goldstein(1e6, 0.71)), 2)
    13.63
    """
    Ra, Pr = _arr(Ra), _arr(Pr)
    nu_l = 0.518 * Ra ** 0.25 * (1.0 + (0.559 / Pr) ** 0.6) ** (-5.0 / 12.0)
    nu_t = 0.1 * Ra ** (1.0 / 3.0)
    with np.errstate(divide="ignore"):
        nu_c = (nu_l ** 15 + nu_t ** 15) ** (1.0 / 15.0)
        return 2.0 / np.log1p(2.0 / nu_c)


# --------------------------------------------------------------------------- vertical plate / cylinder
def nusselt_vertical_plate_churchill_chu(Ra, Pr):
    r"""Churchill & Chu (1975), isothermal vertical plate, full range.

    .. math::
        Nu_L = \left\{0.825 + \frac{0.387\,Ra_L^{1/6}}
               {\left[1 + (0.492/Pr)^{9/16}\right]^{8/27}}\right\}^2

    Valid for :math:`10^{-1} \le Ra_L \le 10^{12}`, all Pr; L is the height.

    References
    ----------
    Churchill, S.W., Chu, H.H.S. (1975). Correlating equations for laminar and
    turbulent free convection from a vertical plate. Int. J. Heat Mass Transfer
    18:1323-1329, eq. (6). doi:10.1016/0017-9310(75)90243-4

    Examples
    --------
    >>> round(float(nusselt_vertical_plate_churchill_chu(1e9, 0.71)), 1)
    122.9
    """
    Ra, Pr = _arr(Ra), _arr(Pr)
    psi = (1.0 + (0.492 / Pr) ** (9.0 / 16.0)) ** (8.0 / 27.0)
    return (0.825 + 0.387 * Ra ** (1.0 / 6.0) / psi) ** 2


def nusselt_vertical_plate_churchill_chu_laminar(Ra, Pr):
    r"""Churchill & Chu (1975), vertical plate, laminar form.

    .. math::
        Nu_L = 0.68 + \frac{0.670\,Ra_L^{1/4}}{\left[1 + (0.492/Pr)^{9/16}\right]^{4/9}}

    Valid for :math:`10^{-1} \le Ra_L \le 10^{9}`.

    References
    ----------
    Churchill & Chu (1975), Int. J. Heat Mass Transfer 18:1323, eq. (5).
    doi:10.1016/0017-9310(75)90243-4

    Examples
    --------
    >>> round(float(nusselt_vertical_plate_churchill_chu_laminar(1e8, 0.71)), 1)
    52.1
    """
    Ra, Pr = _arr(Ra), _arr(Pr)
    psi = (1.0 + (0.492 / Pr) ** (9.0 / 16.0)) ** (4.0 / 9.0)
    return 0.68 + 0.670 * Ra ** 0.25 / psi


def thin_cylinder_criterion(Ra, Pr, diameter_over_length):
    r"""True where a vertical cylinder is thick enough for the plate law to hold within about 5 %.

    .. math:: \frac{D}{L} \ge \frac{35}{Gr_L^{1/4}}

    A laminar result for Pr about 0.7 (Sparrow & Gregg (1956), Trans. ASME
    78:1823), as quoted in Incropera et al., Fundamentals of Heat and Mass
    Transfer, 6th ed., eq. (9.33) (from memory). It does not switch laws here:
    the Popiel factor is applied on both sides (it is 1.056 at the criterion for
    air, the ~5 % the criterion stands for) and this only marks slender cylinders.

    Examples
    --------
    >>> bool(thin_cylinder_criterion(1e9, 0.7, 0.2)), bool(thin_cylinder_criterion(1e9, 0.7, 0.01))
    (True, False)
    """
    Gr = _arr(Ra) / _arr(Pr)
    with np.errstate(divide="ignore"):
        return _arr(diameter_over_length) >= 35.0 * Gr ** -0.25


#: Range of the Popiel, Wojtkowiak & Bober (2007) fit, from its abstract: transverse curvature
#: parameter xi = 32^0.5 Gr_L^(-1/4) L/D <= 5, laminar Gr_L <= 4e9, 0.01 < Pr < 100.
POPIEL_MAX_CURVATURE = 5.0
POPIEL_MAX_GRASHOF = 4e9
POPIEL_PRANDTL = (0.01, 100.0)


def slender_cylinder_curvature(Ra, Pr, diameter_over_length):
    r"""Transverse curvature parameter :math:`\xi = 32^{0.5}\,Gr_L^{-1/4}\,L/D` of Popiel et al. (2007) [-].

    0 for a plate; the Sparrow-Gregg criterion :math:`D/L = 35\,Gr_L^{-1/4}` is :math:`\xi = 0.1616`.

    >>> round(float(slender_cylinder_curvature(1e8 * 0.7, 0.7, 35.0 * 1e8 ** -0.25)), 4)
    0.1616
    """
    Gr = _arr(Ra) / _arr(Pr)
    with np.errstate(divide="ignore", invalid="ignore"):
        return 32.0 ** 0.5 * Gr ** -0.25 / _arr(diameter_over_length)


def thin_cylinder_factor_popiel(Ra, Pr, diameter_over_length):
    r"""Popiel, Wojtkowiak & Bober (2007) ratio of slender-cylinder to plate Nusselt number.

    .. math::
        \frac{Nu_L}{Nu_{L,plate}} = 1 + B\,\xi^C,\quad \xi = 32^{0.5}\,Gr_L^{-1/4}\frac{L}{D},\quad
        B = 0.0571322 + 0.20305\,Pr^{-0.43},\quad
        C = 0.9165 - 0.0043\,Pr^{0.5} + 0.01333\ln Pr + 0.0004809/Pr

    Continuous, and 1 for a plate (:math:`\xi \to 0`). Fitted to numerical data for the laminar
    boundary layer, :math:`Gr_L \le 4\times10^9`, :math:`0.01 < Pr < 100`, :math:`\xi \le 5`
    (the paper's abstract); its own experiments were in air, :math:`L/D < 60`.

    References
    ----------
    Popiel, C.O., Wojtkowiak, J., Bober, K. (2007). Laminar free convective heat
    transfer from isothermal vertical slender cylinder. Exp. Thermal Fluid Sci.
    32:607-613. doi:10.1016/j.expthermflusci.2007.07.003

    Examples
    --------
    >>> round(float(thin_cylinder_factor_popiel(1e8, 0.71, 0.01)), 3)
    2.307
    """
    Pr = _arr(Pr)
    B = 0.0571322 + 0.20305 * Pr ** -0.43
    C = 0.9165 - 0.0043 * Pr ** 0.5 + 0.01333 * np.log(Pr) + 0.0004809 / Pr
    return 1.0 + B * slender_cylinder_curvature(Ra, Pr, diameter_over_length) ** C


def popiel_out_of_range(Ra, Pr, diameter_over_length):
    """True where the Popiel factor is used outside its fit: curvature beyond 5, or a slender cylinder
    (correction over ~5 %, :func:`thin_cylinder_criterion` fails) beyond the laminar Gr_L 4e9.

    >>> popiel_out_of_range(1e9, 0.71, np.array([0.5, 0.01, 0.001])).tolist()
    [False, False, True]
    """
    Gr = _arr(Ra) / _arr(Pr)
    xi = slender_cylinder_curvature(Ra, Pr, diameter_over_length)
    slender = ~thin_cylinder_criterion(Ra, Pr, diameter_over_length)
    return (xi > POPIEL_MAX_CURVATURE) | (slender & (Gr > POPIEL_MAX_GRASHOF))


def nusselt_vertical_cylinder_churchill_chu(Ra, Pr, diameter_over_length):
    """Vertical cylinder: Churchill-Chu plate law (full range) times the Popiel slender-cylinder factor,
    applied at every D/L (continuous; 1 for a plate).

    ``Ra`` is on the height L; ``diameter_over_length`` is D/L [-].

    Examples
    --------
    >>> round(float(nusselt_vertical_cylinder_churchill_chu(1e9, 0.71, 0.5)), 1)
    125.6
    """
    plate = nusselt_vertical_plate_churchill_chu(Ra, Pr)
    return plate * thin_cylinder_factor_popiel(Ra, Pr, diameter_over_length)


def nusselt_vertical_cylinder_churchill_chu_laminar(Ra, Pr, diameter_over_length):
    """Vertical cylinder: Churchill-Chu laminar plate law times the Popiel factor (every D/L).

    Examples
    --------
    >>> round(float(nusselt_vertical_cylinder_churchill_chu_laminar(1e8, 0.71, 0.5)), 1)
    54.0
    """
    plate = nusselt_vertical_plate_churchill_chu_laminar(Ra, Pr)
    return plate * thin_cylinder_factor_popiel(Ra, Pr, diameter_over_length)


def nusselt_horizontal_plate_up_mcadams(Ra, Pr=None):
    r"""Hot face up (or cold face down), McAdams (1954), L = A/P.

    .. math::
        Nu_L = 0.54\,Ra_L^{1/4} \;(10^4 \le Ra_L \le 10^7),\qquad
        Nu_L = 0.15\,Ra_L^{1/3} \;(10^7 < Ra_L \le 10^{11})

    The boundary value :math:`Ra_L = 10^7` belongs to the lower (laminar) piece.
    The characteristic length A/P is that of Goldstein, Sparrow & Jones (1973)
    and Lloyd & Moran (1974), J. Heat Transfer 96:443, doi:10.1115/1.3450224.

    References
    ----------
    McAdams, W.H. (1954). Heat Transmission, 3rd ed., McGraw-Hill, ch. 7;
    ranges as in Incropera et al., 6th ed., eqs. (9.30)-(9.31) (from memory).

    Examples
    --------
    >>> round(float(nusselt_horizontal_plate_up_mcadams(1e6)), 2)
    17.08
    """
    Ra = _arr(Ra)
    return np.where(Ra <= 1e7, 0.54 * Ra ** 0.25, 0.15 * Ra ** (1.0 / 3.0))


def nusselt_horizontal_plate_up_vdi(Ra, Pr):
    r"""Hot face up (or cold face down), VDI Heat Atlas form with a Prandtl function.

    .. math::
        f_2 = \left[1 + (0.322/Pr)^{11/20}\right]^{-20/11},\quad
        Nu_L = 0.766\,(Ra_L f_2)^{1/5}\;(Ra_L f_2 \le 7\times10^4),\quad
        Nu_L = 0.15\,(Ra_L f_2)^{1/3}\;\text{above}

    L = A/P. The laminar branch follows Stewartson (1958), ZAMP 9:276,
    doi:10.1007/BF02033031. A boundary value belongs to the lower piece.

    One secondary implementation writes the exponent of :math:`f_2` as +20/11; the
    form here follows the pattern of :math:`f_1` in the same section, -20/11, which
    makes the factor fall below 1 for gases as in Churchill's Prandtl functions.

    References
    ----------
    VDI Heat Atlas, 2nd ed. (2010), Springer, part F2, section 3.1 (from memory).

    Examples
    --------
    >>> round(float(nusselt_horizontal_plate_up_vdi(1e6, 0.71)), 2)
    11.08
    """
    Ra, Pr = _arr(Ra), _arr(Pr)
    x = Ra * (1.0 + (0.322 / Pr) ** (11.0 / 20.0)) ** (-20.0 / 11.0)
    return np.where(x <= 7e4, 0.766 * x ** 0.2, 0.15 * x ** (1.0 / 3.0))


def nusselt_horizontal_plate_down_mcadams(Ra, Pr=None):
    r"""Hot face down (or cold face up), McAdams (1954): :math:`Nu_L = 0.27 Ra_L^{1/4}`.

    Valid for :math:`3\times10^5 \le Ra_L \le 3\times10^{10}`, L = A/P.

    References
    ----------
    McAdams, W.H. (1954). Heat Transmission, 3rd ed., McGraw-Hill, ch. 7 (from memory).

    Examples
    --------
    >>> round(float(nusselt_horizontal_plate_down_mcadams(1e8)), 2)
    27.0
    """
    return 0.27 * _arr(Ra) ** 0.25


def nusselt_horizontal_plate_down_vdi(Ra, Pr):
    r"""Hot face down (or cold face up), VDI Heat Atlas form.

    .. math::
        f_1 = \left[1 + (0.492/Pr)^{9/16}\right]^{-16/9},\quad Nu_L = 0.6\,(Ra_L f_1)^{1/5}

    Laminar, :math:`10^3 \le Ra_L f_1 \le 10^{10}`, L = A/P.

    References
    ----------
    VDI Heat Atlas, 2nd ed. (2010), Springer, part F2, section 3.2 (from memory).

    Examples
    --------
    >>> round(float(nusselt_horizontal_plate_down_vdi(1e8, 0.71)), 2)
    19.33
    """
    Ra, Pr = _arr(Ra), _arr(Pr)
    f1 = (1.0 + (0.492 / Pr) ** (9.0 / 16.0)) ** (-16.0 / 9.0)
    return 0.6 * (Ra * f1) ** 0.2


# --------------------------------------------------------------------------- sphere
def nusselt_sphere_churchill(Ra, Pr):
    r"""Churchill (1983), isothermal sphere, laminar through turbulent.

    .. math::
        Nu_D = 2 + \frac{0.589\,Ra_D^{1/4}}{\left[1+(0.469/Pr)^{9/16}\right]^{4/9}}
        \left\{1 + \frac{7.44\times10^{-8}\,Ra_D}{\left[1+(0.469/Pr)^{9/16}\right]^{16/9}}\right\}^{1/12}

    Valid for :math:`Ra_D \le 10^{13}`, :math:`Pr \ge 0.7`; the laminar part
    alone is the form quoted in textbooks for :math:`Ra_D \le 10^{11}`.

    References
    ----------
    Churchill, S.W. (1983). Free convection around immersed bodies. In Heat
    Exchanger Design Handbook, section 2.5.7, Hemisphere.

    Examples
    --------
    >>> round(float(nusselt_sphere_churchill(1e7, 0.7)), 2)
    28.02
    """
    Ra, Pr = _arr(Ra), _arr(Pr)
    psi = 1.0 + (0.469 / Pr) ** (9.0 / 16.0)
    return 2.0 + 0.589 * Ra ** 0.25 / psi ** (4.0 / 9.0) * (1.0 + 7.44e-8 * Ra / psi ** (16.0 / 9.0)) ** (1.0 / 12.0)


def nusselt_sphere_yuge(Ra, Pr):
    r"""Yuge (1960), sphere in air: :math:`Nu_D = 2 + 0.392\,Gr_D^{1/4}`, :math:`1 \le Gr_D \le 10^5`.

    Written in Ra and Pr (Gr = Ra/Pr) for a uniform signature; fitted for air.

    References
    ----------
    Yuge, T. (1960). Experiments on heat transfer from spheres including
    combined natural and forced convection. J. Heat Transfer 82:214-220.
    doi:10.1115/1.3679912

    Examples
    --------
    >>> round(float(nusselt_sphere_yuge(7e4, 0.7)), 3)
    8.971
    """
    Ra, Pr = _arr(Ra), _arr(Pr)
    return 2.0 + 0.392 * (Ra / Pr) ** 0.25
