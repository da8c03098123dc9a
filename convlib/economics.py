r"""Money and carbon of heat losses: energy prices by fuel, payback, net present value, economic thickness.

All functions take numpy arrays (scalars broadcast) and return arrays. Money is in one currency of the user's
choosing (the demo values are invented). Energy is in kWh of *heat* at the line unless a name says "purchased".

The present worth of savings that grow with energy prices uses the geometric gradient series factor

.. math::
    (P/A_1, g, i, n) = \begin{cases}
        \dfrac{1 - \left(\frac{1+g}{1+i}\right)^n}{i - g} & i \ne g \\[1ex]
        \dfrac{n}{1+i} & i = g
    \end{cases}

for a first-year amount :math:`A_1` at the end of year 1, growing by :math:`g` a year, discounted at :math:`i`
over :math:`n` years (Newnan, Eschenbach & Lavelle, *Engineering Economic Analysis*, Oxford University Press,
chapter on gradient series -- from memory, no page given). With :math:`g = 0` it is the uniform series present
worth factor :math:`(P/A, i, n) = (1 - (1+i)^{-n})/i`.

Steam bought by the tonne is turned into a price per kWh of heat with the enthalpy one tonne brings to the plant:
saturated vapour at the steam pressure minus liquid water at the condensate-return (or feedwater) temperature,
from CoolProp's IAPWS-IF97-grade water model, or as given by the user.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import InputError
from .validation import as_array

__all__ = ["Tariff", "Finance", "present_worth_factor", "steam_kwh_per_tonne", "steam_tariff", "Appraisal",
           "appraise", "life_cycle_cost", "economic_thickness", "DEMO_TARIFFS"]

_CLOSE = 1e-9  # |i - g| below this: the limit n/(1+i) of the gradient factor


def present_worth_factor(discount_rate, escalation, years) -> np.ndarray:
    r"""Present worth of a series that starts at 1 at the end of year 1 and grows by ``escalation`` a year [-].

    Parameters
    ----------
    discount_rate : numeric
        Real or nominal discount rate per year :math:`i` [-] (> -1).
    escalation : numeric
        Growth of the yearly amount :math:`g` [-] (> -1), e.g. energy price escalation.
    years : numeric
        Lifetime :math:`n` [years] (>= 0; fractional years allowed by the formula).

    Examples
    --------
    >>> round(float(present_worth_factor(0.10, 0.0, 10)), 4)  # (P/A, 10 %, 10) = 6.1446 in every interest table
    6.1446
    >>> float(present_worth_factor(0.05, 0.05, 10)) == 10 / 1.05
    True
    """
    i = as_array("discount_rate", discount_rate, low=-1.0, low_inclusive=False)
    g = as_array("escalation", escalation, low=-1.0, low_inclusive=False)
    n = as_array("years", years, unit="years", low=0.0)
    close = np.abs(i - g) < _CLOSE
    with np.errstate(divide="ignore", invalid="ignore"):
        general = (1.0 - ((1.0 + g) / (1.0 + i)) ** n) / np.where(close, 1.0, i - g)
    return np.where(close, n / (1.0 + i), general)


@dataclass(frozen=True)
class Tariff:
    """What a kWh of heat lost (or gained) costs and emits.

    Parameters
    ----------
    fuel : str
        Label, e.g. "natural gas", "steam", "electricity (chiller)".
    price : float
        Price per purchased kWh [currency/kWh].
    efficiency : float
        Heat delivered to the line per kWh purchased [-]: boiler/plant efficiency for hot lines, COP for a chiller
        (may exceed 1).
    co2_per_kwh : float
        Emission factor per purchased kWh [kg/kWh] (a user input: factors depend on country and year).
    """

    fuel: str
    price: float
    efficiency: float = 1.0
    co2_per_kwh: float = 0.0

    def __post_init__(self):
        as_array(f"{self.fuel} price", self.price, unit="per kWh", low=0.0)
        as_array(f"{self.fuel} efficiency", self.efficiency, low=0.0, low_inclusive=False)
        as_array(f"{self.fuel} co2_per_kwh", self.co2_per_kwh, unit="kg/kWh", low=0.0)

    @property
    def price_per_heat_kwh(self) -> float:
        """Price per kWh of heat at the line [currency/kWh]."""
        return float(self.price) / float(self.efficiency)

    @property
    def co2_per_heat_kwh(self) -> float:
        """Emissions per kWh of heat at the line [kg/kWh]."""
        return float(self.co2_per_kwh) / float(self.efficiency)


@dataclass(frozen=True)
class Finance:
    """Discount rate, energy-price escalation and lifetime of an upgrade.

    Examples
    --------
    >>> round(float(Finance(0.08, 0.03, 15).factor), 3)
    10.177
    """

    discount_rate: float = 0.08
    escalation: float = 0.02
    years: float = 15.0

    @property
    def factor(self) -> np.ndarray:
        """Present worth of 1 currency unit of first-year savings over the lifetime [-]."""
        return present_worth_factor(self.discount_rate, self.escalation, self.years)


def steam_kwh_per_tonne(steam_pressure, return_temperature=None, *, enthalpy_difference=None) -> np.ndarray:
    """Heat one tonne of steam brings [kWh/t]: saturated vapour at the pressure minus liquid at the return temperature.

    Parameters
    ----------
    steam_pressure : numeric
        Absolute pressure of the saturated steam [Pa].
    return_temperature : numeric
        Temperature of the condensate return / feedwater [K] (liquid at the steam pressure); default 373.15 K
        (common practice, no source).
    enthalpy_difference : numeric, optional
        Given by the user instead [J/kg]; then CoolProp is not called.

    Examples
    --------
    >>> round(float(steam_kwh_per_tonne(10e5, 373.15)))  # h''(10 bar) 2777 kJ/kg - h'(100 degC) 419 kJ/kg
    655
    >>> float(steam_kwh_per_tonne(None, enthalpy_difference=2.34e6))
    650.0
    """
    if enthalpy_difference is not None:
        dh = as_array("enthalpy_difference", enthalpy_difference, unit="J/kg", low=0.0, low_inclusive=False)
        return dh * 1000.0 / 3.6e6
    from CoolProp.CoolProp import PropsSI

    p = as_array("steam_pressure", steam_pressure, unit="Pa", low=611.657, high=22.064e6)
    t_ret = as_array("return_temperature", 373.15 if return_temperature is None else return_temperature, unit="K",
                     low=273.16, low_inclusive=True)
    p, t_ret = np.broadcast_arrays(p, t_ret)
    t_sat = np.asarray(PropsSI("T", "P", p.ravel(), "Q", 1.0, "Water")).reshape(p.shape)
    if np.any(t_ret >= t_sat):
        bad = float(t_ret[t_ret >= t_sat].flat[0])
        raise InputError(f"return_temperature {bad:g} K is not below the saturation temperature of the steam",
                         field="return_temperature", rule="below the steam's saturation temperature", value=bad)
    h_vapour = np.asarray(PropsSI("H", "P", p.ravel(), "Q", 1.0, "Water")).reshape(p.shape)
    h_liquid = np.asarray(PropsSI("H", "P", p.ravel(), "T", t_ret.ravel(), "Water")).reshape(p.shape)
    return (h_vapour - h_liquid) * 1000.0 / 3.6e6


def steam_tariff(price_per_tonne, steam_pressure, return_temperature=None, *, enthalpy_difference=None,
                 co2_per_tonne=0.0, distribution_efficiency=1.0) -> Tariff:
    """A :class:`Tariff` for steam bought by the tonne: price and CO2 per kWh of heat in the steam.

    Examples
    --------
    >>> t = steam_tariff(30.0, None, enthalpy_difference=2.34e6)
    >>> round(t.price, 4)
    0.0462
    """
    kwh = float(np.asarray(steam_kwh_per_tonne(steam_pressure, return_temperature,
                                               enthalpy_difference=enthalpy_difference)).ravel()[0])
    as_array("steam price_per_tonne", price_per_tonne, unit="per t", low=0.0)
    as_array("steam co2_per_tonne", co2_per_tonne, unit="kg/t", low=0.0)
    return Tariff("steam", float(price_per_tonne) / kwh, float(distribution_efficiency), float(co2_per_tonne) / kwh)


#: Demo tariffs of the invented Fernhill site: invented numbers, for demonstration only -- use your own
#: contract prices and your country's emission factors.
DEMO_TARIFFS = {
    "natural gas": Tariff("natural gas", price=0.045, efficiency=0.85, co2_per_kwh=0.20),   # demo, invented
    "fuel oil": Tariff("fuel oil", price=0.070, efficiency=0.82, co2_per_kwh=0.27),        # demo, invented
    "electricity (chiller)": Tariff("electricity (chiller)", price=0.15, efficiency=3.0,
                                    co2_per_kwh=0.25),                                     # demo, invented
}


@dataclass(frozen=True)
class Appraisal:
    """Economics of one measure per case; arrays broadcast over the inputs."""

    saved_kwh: np.ndarray          # heat saved in the first year [kWh]
    annual_saving: np.ndarray      # money saved in the first year [currency]
    investment: np.ndarray         # installed cost [currency]
    simple_payback: np.ndarray     # investment / first-year saving [years]; inf if nothing is saved
    npv: np.ndarray                # present worth of savings over the lifetime minus investment [currency]
    co2_saved_kg: np.ndarray       # in the first year [kg]
    pays_back: np.ndarray          # bool: npv > 0


def appraise(saved_kwh, investment, tariff: Tariff, finance: Finance) -> Appraisal:
    """Savings, simple payback, NPV and CO2 of a measure that saves ``saved_kwh`` of heat a year.

    Parameters
    ----------
    saved_kwh : numeric
        Heat saved in the first year [kWh] (a loss avoided for hot lines, a gain avoided for cold ones).
    investment : numeric
        Installed cost of the measure [currency], >= 0.
    tariff : Tariff
    finance : Finance

    Examples
    --------
    >>> a = appraise(10000.0, 1000.0, Tariff("gas", 0.05, 0.8), Finance(0.10, 0.0, 10))
    >>> float(a.annual_saving), float(a.simple_payback), round(float(a.npv), 1)
    (625.0, 1.6, 2840.4)
    """
    kwh = as_array("saved_kwh", saved_kwh, unit="kWh")
    cost = as_array("investment", investment, low=0.0)
    saving = kwh * tariff.price_per_heat_kwh
    with np.errstate(divide="ignore", invalid="ignore"):
        payback = np.where(saving > 0.0, cost / np.where(saving > 0.0, saving, 1.0), np.inf)
    npv = saving * finance.factor - cost
    shape = np.broadcast_shapes(kwh.shape, cost.shape, np.shape(finance.factor))
    full = lambda a: np.broadcast_to(a, shape).copy()  # noqa: E731
    return Appraisal(saved_kwh=full(kwh), annual_saving=full(saving), investment=full(cost),
                     simple_payback=full(payback), npv=full(npv), co2_saved_kg=full(kwh * tariff.co2_per_heat_kwh),
                     pays_back=full(npv > 0))


def life_cycle_cost(annual_heat_kwh, investment, tariff: Tariff, finance: Finance) -> np.ndarray:
    """Investment plus the present worth of the energy lost (or gained) over the lifetime [currency].

    Examples
    --------
    >>> round(float(life_cycle_cost(1000.0, 50.0, Tariff("gas", 0.05, 0.8), Finance(0.10, 0.0, 10))), 2)
    434.04
    """
    heat = np.abs(as_array("annual_heat_kwh", annual_heat_kwh, unit="kWh"))
    return as_array("investment", investment, low=0.0) + heat * tariff.price_per_heat_kwh * finance.factor


def economic_thickness(pipe_outer_diameter, fluid_temperature, thicknesses, installed_cost, *, insulation_conductivity,
                       bins, tariff: Tariff, finance: Finance, length=1.0, outer_layers=(), jacket_emissivity=0.9,
                       solar_absorptivity=None, pipe_wall_thickness=None, pipe_conductivity=None,
                       inner_coefficient=None, natural=None, forced=None, mixing_exponent=None, convection_factor=None,
                       convection_coefficient=None, exact_properties=False, surroundings_temperature=None,
                       sky_view_fraction=None, sky_temperature=None, solar_irradiance=None, pressure=None):
    """The listed thickness with the least life-cycle cost, per case (vectorized over cases x thicknesses x bins).

    Parameters
    ----------
    pipe_outer_diameter, fluid_temperature : numeric
        Per case [m], [K]; broadcast together to the case shape.
    thicknesses : 1-D array
        Listed insulation thicknesses [m] (the last axis of the cost table).
    installed_cost : numeric
        Installed cost per metre of line [currency/m], shape ``case_shape + (len(thicknesses),)`` or broadcastable.
    insulation_conductivity : float or Conductivity
    bins : convlib.design.WeatherBins
    tariff, finance : Tariff, Finance
    length : numeric
        Line length per case [m].
    outer_layers : sequence of Layer
        Jacket etc. outside the insulation.
    jacket_emissivity, solar_absorptivity, pipe_wall_thickness, pipe_conductivity, inner_coefficient, natural,
    forced, mixing_exponent, convection_factor, convection_coefficient, exact_properties
        As in :func:`convlib.pipe.insulated_pipe` (numeric ones per case).
    surroundings_temperature, sky_view_fraction, sky_temperature, solar_irradiance, pressure
        The rest of the surroundings (the bins give air and wind).

    Returns
    -------
    dict with ``thickness`` (best, per case) [m], ``index`` into ``thicknesses``, ``life_cycle_cost`` per case and
    thickness [currency], ``annual_heat_kwh`` per case and thickness [kWh], ``warnings`` per case (union of the
    flags of every solve, :class:`convlib.regimes.Flag`).

    Examples
    --------
    >>> from convlib.design import WeatherBins
    >>> r = economic_thickness(0.1143, 453.15, [0.04, 0.06, 0.08, 0.10, 0.12], [20, 26, 33, 41, 50],
    ...                        insulation_conductivity=0.045, bins=WeatherBins.single(288.15, 2.0, 8000),
    ...                        tariff=Tariff("gas", 0.05, 0.85), finance=Finance(0.08, 0.02, 15))
    >>> float(r["thickness"]) in (0.06, 0.08, 0.10, 0.12)
    True
    """
    from .conductivity import Conductivity
    from .pipe import Layer, insulated_pipe

    d = as_array("pipe_outer_diameter", pipe_outer_diameter, unit="m", low=0.0, low_inclusive=False)
    tf = as_array("fluid_temperature", fluid_temperature, unit="K", low=0.0, low_inclusive=False)
    t = as_array("thicknesses", thicknesses, unit="m", low=0.0).ravel()
    if t.size == 0:
        raise InputError("thicknesses: give at least one listed thickness", field="thicknesses",
                         rule="at least one value", value=[])
    length = as_array("length", length, unit="m", low=0.0)
    numeric = {name: np.asarray(value, dtype=float) for name, value in dict(
        jacket_emissivity=jacket_emissivity, solar_absorptivity=solar_absorptivity,
        pipe_wall_thickness=pipe_wall_thickness, pipe_conductivity=pipe_conductivity,
        inner_coefficient=inner_coefficient, mixing_exponent=mixing_exponent, convection_factor=convection_factor,
        convection_coefficient=convection_coefficient, surroundings_temperature=surroundings_temperature,
        sky_view_fraction=sky_view_fraction, sky_temperature=sky_temperature, solar_irradiance=solar_irradiance,
        pressure=pressure).items() if value is not None}
    for layer in outer_layers:
        if not isinstance(layer, Layer):
            raise InputError(f"outer_layers must be Layer objects; got {layer!r}", field="outer_layers",
                             rule="Layer objects", value=layer)
    k = Conductivity.of(insulation_conductivity)
    case_shape = np.broadcast_shapes(d.shape, tf.shape, length.shape, *(v.shape for v in numeric.values()),
                                     *(np.shape(layer.thickness) for layer in outer_layers),
                                     np.shape(k.constant_value) if k.is_constant else ())
    cost = np.broadcast_to(as_array("installed_cost", installed_cost, unit="per m", low=0.0), case_shape + t.shape)
    grid = lambda a: np.broadcast_to(a, case_shape)[..., None, None]  # noqa: E731 cases x thickness x bins
    outer = [Layer(grid(layer.thickness), layer.conductivity if not layer.conductivity.is_constant
                   else grid(layer.conductivity.constant_value), name=layer.name) for layer in outer_layers]
    insulation = Layer(t[:, None], grid(k.constant_value) if k.is_constant else k)
    r = insulated_pipe(grid(d), grid(tf), [insulation, *outer],
                       air_temperature=bins.air_temperature, wind_speed=bins.wind_speed, length=1.0, natural=natural,
                       forced=forced, exact_properties=exact_properties,
                       **{name: grid(value) for name, value in numeric.items()})
    heat_kwh = (r.q_per_length * bins.hours).sum(axis=-1) * np.broadcast_to(length, case_shape)[..., None] / 1000.0
    lcc = life_cycle_cost(heat_kwh, cost * np.broadcast_to(length, case_shape)[..., None], tariff, finance)
    index = np.argmin(lcc, axis=-1)
    return {"thickness": t[index], "index": index, "life_cycle_cost": lcc, "annual_heat_kwh": heat_kwh,
            "warnings": np.bitwise_or.reduce(r.warnings.reshape(*case_shape, -1), axis=-1)}
