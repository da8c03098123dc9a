"""Grey-body radiation from an outer surface to its surroundings, the sky and the ground.

All temperatures are in kelvin, fluxes in W/m2 of outer surface, coefficients in
W/m2/K.  Every function broadcasts its inputs with numpy and returns an array of
the broadcast shape (a numpy scalar when all inputs are scalars).

The surface is treated as a small grey, diffuse body inside a large isothermal
enclosure (Bergman et al., *Fundamentals of Heat and Mass Transfer*, 7th ed.,
Wiley 2011, Sec. 1.2.3), so only its own emissivity enters.  Outdoors the
enclosure is split into a sky part and a ground part by a view fraction.
"""
from __future__ import annotations

import numpy as np

from convlib.errors import InputError
from convlib.validation import as_array, check_choice

__all__ = ["STEFAN_BOLTZMANN", "SKY_MODELS", "SKY_VIEW_FRACTION_TYPICAL", "radiation_coefficient", "net_flux",
           "effective_coefficient",
           "radiation_flux", "sky_temperature", "outdoor_radiation", "solar_gain"]

#: Stefan-Boltzmann constant [W/m2/K4], CODATA 2018 (exact since the 2019 SI).
STEFAN_BOLTZMANN = 5.670374419e-8

#: Fraction of the outer surface's view taken by the sky [-]; the rest sees the
#: ground.  Common practice, no source: a surface sees the half-space above its
#: horizon, a horizontal cylinder, sphere or vertical surface in the open half sky
#: and half ground; a plate facing up sees only sky, one facing down only ground.
#: Buildings, racks and neighbouring lines reduce the sky part.
SKY_VIEW_FRACTION_TYPICAL = {
    "horizontal_cylinder": 0.5,
    "vertical_cylinder": 0.5,
    "vertical_plate": 0.5,
    "horizontal_plate_up": 1.0,
    "horizontal_plate_down": 0.0,
    "sphere": 0.5,
}


def _temperature(name, value):
    return as_array(name, value, unit="K", low=0.0, low_inclusive=False)


def _fraction(name, value):
    return as_array(name, value, low=0.0, high=1.0)


def _out(x):
    """0-d arrays become numpy scalars; other arrays pass through."""
    return np.asarray(x)[()]


def _difference_of_fourth_powers(a, b):
    """a**4 - b**4 in factored form, free of cancellation when a is close to b."""
    return (a * a + b * b) * (a + b) * (a - b)


def radiation_coefficient(surface_temperature, surroundings_temperature, emissivity):
    r"""Linearised radiation coefficient of a grey surface in a large enclosure.

    Parameters
    ----------
    surface_temperature : numeric
        Outer surface temperature :math:`T_s` [K].
    surroundings_temperature : numeric
        Temperature of the enclosing walls :math:`T_{sur}` [K].
    emissivity : numeric
        Total hemispherical emissivity of the surface :math:`\varepsilon` [-], 0..1.

    Returns
    -------
    numeric
        :math:`h_{rad}` [W/m2/K], such that :math:`q = h_{rad}(T_s - T_{sur})`
        equals :func:`radiation_flux` exactly (no small-difference approximation).

    Notes
    -----
    .. math::
        h_{rad} = \varepsilon \sigma (T_s^2 + T_{sur}^2)(T_s + T_{sur})

    At :math:`T_s = T_{sur}` it equals :math:`4\varepsilon\sigma T_s^3`.
    Bergman et al. (2011), Fundamentals of Heat and Mass Transfer, 7th ed., Sec. 1.2.3.

    Examples
    --------
    >>> round(float(radiation_coefficient(363.15, 293.15, 0.9)), 2)
    7.3
    """
    ts = _temperature("surface_temperature", surface_temperature)
    tsur = _temperature("surroundings_temperature", surroundings_temperature)
    eps = _fraction("emissivity", emissivity)
    return _out(eps * STEFAN_BOLTZMANN * (ts * ts + tsur * tsur) * (ts + tsur))


def radiation_flux(surface_temperature, surroundings_temperature, emissivity):
    r"""Net radiant flux from a grey surface to a large enclosure.

    Parameters
    ----------
    surface_temperature : numeric
        Outer surface temperature :math:`T_s` [K].
    surroundings_temperature : numeric
        Temperature of the enclosing walls :math:`T_{sur}` [K].
    emissivity : numeric
        Total hemispherical emissivity of the surface [-], 0..1.

    Returns
    -------
    numeric
        Net flux leaving the surface :math:`q` [W/m2]; negative when the
        surroundings are hotter.

    Notes
    -----
    .. math::
        q = \varepsilon \sigma (T_s^4 - T_{sur}^4)

    Evaluated as :math:`\varepsilon\sigma(T_s^2+T_{sur}^2)(T_s+T_{sur})(T_s-T_{sur})`
    to avoid cancellation when the temperatures are close.
    Bergman et al. (2011), Fundamentals of Heat and Mass Transfer, 7th ed., Sec. 1.2.3.

    Examples
    --------
    >>> round(float(radiation_flux(363.15, 293.15, 0.9)), 1)
    510.7
    """
    ts = _temperature("surface_temperature", surface_temperature)
    tsur = _temperature("surroundings_temperature", surroundings_temperature)
    eps = _fraction("emissivity", emissivity)
    return _out(eps * STEFAN_BOLTZMANN * _difference_of_fourth_powers(ts, tsur))


def net_flux(surface_temperature, emissivity, sky_view_fraction, sky_temperature, ground_temperature):
    """Net long-wave flux to sky and ground [W/m2] without input checks (for solver loops).

    The formula of :func:`outdoor_radiation`; callers validate their inputs once.
    """
    ts = surface_temperature
    return emissivity * STEFAN_BOLTZMANN * (
        sky_view_fraction * _difference_of_fourth_powers(ts, sky_temperature)
        + (1.0 - sky_view_fraction) * _difference_of_fourth_powers(ts, ground_temperature))


def _sky_swinbank(air_temperature, dew_point):
    return 0.0552 * air_temperature**1.5


def _sky_berdahl_martin(air_temperature, dew_point):
    if dew_point is None:
        raise InputError("sky model 'berdahl_martin' needs dew_point [K]; got None", field="dew_point",
                         rule="given with the sky model 'berdahl_martin'", value=None)
    dew_celsius_hundredths = (dew_point - 273.15) / 100.0
    sky_emissivity = 0.711 + 0.56 * dew_celsius_hundredths + 0.73 * dew_celsius_hundredths**2
    return sky_emissivity**0.25 * air_temperature


#: Clear-sky temperature models by name: function(air_temperature, dew_point) -> [K].
SKY_MODELS = {
    "swinbank": _sky_swinbank,
    "berdahl_martin": _sky_berdahl_martin,
}


def sky_temperature(air_temperature, dew_point=None, model="swinbank"):
    r"""Effective clear-sky temperature for long-wave exchange.

    Parameters
    ----------
    air_temperature : numeric
        Screen-level air temperature :math:`T_a` [K].
    dew_point : numeric, optional
        Dew-point temperature :math:`T_{dp}` [K], at most the air temperature.
        Required by ``"berdahl_martin"``, ignored (but checked) by ``"swinbank"``.
    model : str
        ``"swinbank"`` or ``"berdahl_martin"`` (keys of :data:`SKY_MODELS`).

    Returns
    -------
    numeric
        Sky temperature :math:`T_{sky}` [K]: the black-body temperature whose
        emission equals the downwelling long-wave radiation.

    Notes
    -----
    ``"swinbank"`` (clear sky, air temperature only):

    .. math::
        T_{sky} = 0.0552\, T_a^{1.5}

    Swinbank, W. C. (1963), Long-wave radiation from clear skies, Q. J. R.
    Meteorol. Soc. 89:339-348, doi:10.1002/qj.49708938105; the form in
    :math:`T_{sky}` is as given by Duffie & Beckman, Solar Engineering of
    Thermal Processes (Wiley).

    ``"berdahl_martin"`` (clear sky, dew point :math:`t_{dp}` in degC):

    .. math::
        \varepsilon_{sky} = 0.711 + 0.56\,\frac{t_{dp}}{100}
                          + 0.73\left(\frac{t_{dp}}{100}\right)^2, \qquad
        T_{sky} = \varepsilon_{sky}^{1/4}\, T_a

    Berdahl, P. & Martin, M. (1984), Emissivity of clear skies, Solar Energy
    32:663-664, doi:10.1016/0038-092X(84)90144-0.  The small hour-of-day
    (and station-pressure) corrections published with the fit are omitted, and
    it was fitted to US data with dew points of about -20 to +25 degC (both from
    memory).  The fit is not clipped: it would exceed 1 above a 35 degC dew point.

    Both models are for cloudless skies; clouds raise the sky temperature
    towards the air temperature, so these give an upper bound on sky losses.

    Examples
    --------
    >>> round(float(sky_temperature(293.15)), 2)
    277.06
    >>> round(float(sky_temperature(293.15, dew_point=283.15, model="berdahl_martin")), 2)
    274.99
    """
    function = SKY_MODELS[check_choice("model", model, SKY_MODELS)]
    ta = _temperature("air_temperature", air_temperature)
    if dew_point is not None:
        dew_point = _temperature("dew_point", dew_point)
        dew_b, air_b = np.broadcast_arrays(dew_point, ta)
        above = dew_b > air_b
        if above.any():
            dew_bad, air_bad = dew_b[above][0].item(), air_b[above][0].item()
            raise InputError(f"dew_point must be at most air_temperature; got "
                             f"{dew_bad!r} K with air at {air_bad!r} K", field="dew_point",
                             rule="at most air_temperature", value=dew_bad)
    return _out(function(ta, dew_point))


def outdoor_radiation(surface_temperature, air_temperature, emissivity,
                      sky_view_fraction=0.5, sky_temperature=None, ground_temperature=None):
    r"""Long-wave exchange of an outdoor surface with sky and ground.

    Parameters
    ----------
    surface_temperature : numeric
        Outer surface temperature :math:`T_s` [K].
    air_temperature : numeric
        Ambient air temperature :math:`T_a` [K].
    emissivity : numeric
        Surface emissivity [-], 0..1.
    sky_view_fraction : numeric
        Fraction :math:`F` of the surface's view that is sky [-], 0..1; see
        :data:`SKY_VIEW_FRACTION_TYPICAL`.
    sky_temperature : numeric, optional
        Sky temperature [K]; default: Swinbank's clear sky from the air temperature.
    ground_temperature : numeric, optional
        Ground temperature [K]; default: the air temperature.

    Returns
    -------
    h_rad_effective : numeric
        :math:`q/(T_s - T_a)` [W/m2/K], the coefficient to add to the convective
        one when both are referenced to the air temperature.
    q : numeric
        Net long-wave flux leaving the surface [W/m2].

    Notes
    -----
    .. math::
        q = \varepsilon\sigma\left[F (T_s^4 - T_{sky}^4) + (1 - F)(T_s^4 - T_g^4)\right]

    The sky and ground are each treated as a black enclosure filling their part
    of the view (small grey body, Bergman et al. 2011, Sec. 1.2.3, split by view).

    :math:`h_{rad,eff}` is undefined at :math:`T_s = T_a`.  There this function
    returns :math:`\partial q/\partial T_s = 4\varepsilon\sigma T_a^3`, which is
    both the derivative-based limit and the linearised coefficient (they
    coincide), never NaN or inf.  When the sky or ground differ from the air,
    :math:`q \neq 0` at :math:`T_s = T_a`, so near that point
    :math:`h_{rad,eff}` becomes large or negative: use ``q`` for heat balances,
    ``h_rad_effective`` only for reporting.

    Examples
    --------
    >>> h, q = outdoor_radiation(313.15, 293.15, 0.9)
    >>> round(float(q), 1), round(float(h), 2)
    (152.0, 7.6)
    """
    ts = _temperature("surface_temperature", surface_temperature)
    ta = _temperature("air_temperature", air_temperature)
    eps = _fraction("emissivity", emissivity)
    fraction = _fraction("sky_view_fraction", sky_view_fraction)
    if sky_temperature is None:
        t_sky = _sky_swinbank(ta, None)
    else:
        t_sky = _temperature("sky_temperature", sky_temperature)
    if ground_temperature is None:
        t_ground = ta
    else:
        t_ground = _temperature("ground_temperature", ground_temperature)
    q = net_flux(ts, eps, fraction, t_sky, t_ground)
    h, q = np.broadcast_arrays(effective_coefficient(q, ts, ta, eps), q)
    return _out(h), _out(q)


def effective_coefficient(q, surface_temperature, air_temperature, emissivity):
    """q / (Ts - Ta) [W/m2/K], and 4*eps*sigma*Ta^3 where Ts == Ta (no input checks).

    See :func:`outdoor_radiation` for why this limit is used.
    """
    difference = surface_temperature - air_temperature
    at_air = difference == 0.0
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(at_air, 4.0 * emissivity * STEFAN_BOLTZMANN * air_temperature**3,
                        q / np.where(at_air, 1.0, difference))


def solar_gain(absorptivity, irradiance, projected_area):
    r"""Absorbed solar power on a surface.

    Parameters
    ----------
    absorptivity : numeric
        Solar (short-wave) absorptivity :math:`\alpha_s` [-], 0..1; differs from
        the long-wave emissivity (e.g. aluminium jacketing).
    irradiance : numeric
        Solar irradiance on the projected area :math:`G` [W/m2], >= 0.
    projected_area : numeric
        Area :math:`A_{proj}` of the body's shadow on a plane normal to the beam
        [m2], > 0; for a cylinder with the sun normal to its axis, ``D * L``.

    Returns
    -------
    numeric
        Absorbed power [W].

    Notes
    -----
    .. math::
        Q_{sol} = \alpha_s\, G\, A_{proj}

    Examples
    --------
    >>> round(float(solar_gain(0.3, 800.0, 0.1143)), 2)
    27.43
    """
    alpha = _fraction("absorptivity", absorptivity)
    g = as_array("irradiance", irradiance, unit="W/m2", low=0.0)
    area = as_array("projected_area", projected_area, unit="m2", low=0.0, low_inclusive=False)
    return _out(alpha * g * area)
