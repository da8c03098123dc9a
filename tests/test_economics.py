"""Economics: present worth factors, steam per tonne, appraisal, economic thickness."""
import numpy as np
import pytest

from convlib.design import WeatherBins, annual_energy
from convlib.economics import (Finance, Tariff, appraise, economic_thickness, life_cycle_cost, present_worth_factor,
                               steam_kwh_per_tonne, steam_tariff)
from convlib.errors import InputError
from convlib.pipe import Layer


def _discounted_sum(i, g, n):
    # Definition of present worth: sum over k = 1..n of A1 (1+g)^(k-1) / (1+i)^k
    # (Newnan, Eschenbach & Lavelle, Engineering Economic Analysis, geometric gradient -- from memory)
    k = np.arange(1, n + 1)
    return float(np.sum((1 + g) ** (k - 1) / (1 + i) ** k))


@pytest.mark.parametrize("i, g, n", [(0.08, 0.03, 15), (0.05, 0.0, 20), (0.03, 0.06, 12), (0.07, 0.07, 10),
                                     (0.10, -0.02, 25)])
def test_gradient_factor_equals_discounted_cash_flows(i, g, n):
    assert float(present_worth_factor(i, g, n)) == pytest.approx(_discounted_sum(i, g, n), rel=1e-12)


@pytest.mark.parametrize("i, n, table", [(0.10, 10, 6.1446), (0.08, 15, 8.5595), (0.06, 20, 11.4699)])
def test_uniform_series_against_interest_tables(i, n, table):
    # (P/A, i, n) as printed to 4 decimals in the compound-interest tables of engineering-economy textbooks
    # (e.g. Newnan et al., Engineering Economic Analysis, appendix tables) -- from memory; the closed form
    # (1 - (1+i)^-n)/i is the textbook definition and is checked to full precision as well.
    assert float(present_worth_factor(i, 0.0, n)) == pytest.approx(table, abs=6e-5)
    assert float(present_worth_factor(i, 0.0, n)) == pytest.approx((1 - (1 + i) ** -n) / i, rel=1e-13)


def test_gradient_factor_continuous_across_i_equal_g():
    # the i = g limit n/(1+i) of the geometric gradient factor; values just beside it must agree
    near = present_worth_factor(0.05 + 1e-7, 0.05, 10)
    assert float(near) == pytest.approx(10 / 1.05, rel=1e-6)
    assert float(present_worth_factor(0.05, 0.05, 10)) == pytest.approx(10 / 1.05, rel=1e-15)


def test_gradient_factor_vectorized_list_and_array():
    rates = [0.04, 0.08, 0.12]
    expected = [_discounted_sum(i, 0.02, 15) for i in rates]
    np.testing.assert_allclose(present_worth_factor(rates, 0.02, 15), expected, rtol=1e-12)
    np.testing.assert_allclose(present_worth_factor(np.array(rates)[:, None], [0.0, 0.02], 15)[:, 1], expected,
                               rtol=1e-12)


def test_appraisal_hand_formulas():
    # hand: saving = kWh x price / efficiency; payback = cost / saving; NPV = saving (P/A1,g,i,n) - cost
    tariff, finance = Tariff("gas", 0.06, 0.8, co2_per_kwh=0.2), Finance(0.07, 0.03, 20)
    a = appraise([8000.0, 0.0], [1200.0, 500.0], tariff, finance)
    saving = 8000 * 0.06 / 0.8
    np.testing.assert_allclose(a.annual_saving, [saving, 0.0])
    assert a.simple_payback[0] == pytest.approx(1200 / saving)
    assert np.isinf(a.simple_payback[1])
    assert a.npv[0] == pytest.approx(saving * _discounted_sum(0.07, 0.03, 20) - 1200, rel=1e-12)
    assert a.npv[1] == pytest.approx(-500.0)
    assert a.co2_saved_kg[0] == pytest.approx(8000 * 0.2 / 0.8)
    assert a.pays_back.tolist() == [True, False]


def test_steam_per_tonne_against_iapws97():
    iapws = pytest.importorskip("iapws")
    # IAPWS-IF97 through the iapws package (independent of CoolProp): h''(p) - h(p, T_return)
    for p_bar, t_ret in [(3.0, 353.15), (10.0, 373.15), (40.0, 378.15)]:
        vap = iapws.IAPWS97(P=p_bar / 10, x=1.0)
        liq = iapws.IAPWS97(P=p_bar / 10, T=t_ret)
        expected = (vap.h - liq.h) * 1000 / 3600  # kJ/kg -> kWh/t
        assert float(steam_kwh_per_tonne(p_bar * 1e5, t_ret)) == pytest.approx(expected, rel=2e-4)


def test_steam_tariff_from_given_enthalpy():
    t = steam_tariff(28.0, None, enthalpy_difference=2.2e6, co2_per_tonne=180.0)
    kwh_per_t = 2.2e6 * 1000 / 3.6e6  # unit conversion only
    assert t.price == pytest.approx(28.0 / kwh_per_t)
    assert t.co2_per_kwh == pytest.approx(180.0 / kwh_per_t)


@pytest.mark.parametrize("call, field", [
    (lambda: steam_kwh_per_tonne(5e5, 500.0), "return_temperature"),
    (lambda: Tariff("gas", -0.1), "gas price"),
    (lambda: Tariff("gas", 0.1, 0.0), "gas efficiency"),
    (lambda: present_worth_factor(0.05, 0.0, -1), "years"),
    (lambda: appraise(100.0, -5.0, Tariff("gas", 0.1), Finance()), "investment"),
])
def test_bad_inputs_name_their_field(call, field):
    with pytest.raises(InputError) as err:
        call()
    assert err.value.field == field


def test_economic_thickness_matches_one_solve_per_thickness():
    # independent path: convlib.design.annual_energy one listed thickness at a time, LCC by hand
    bins = WeatherBins([268.15, 283.15, 298.15], [4.0, 3.0, 1.0], [2000, 4000, 2500])
    tariff, finance = Tariff("gas", 0.05, 0.85), Finance(0.08, 0.02, 15)
    thicknesses = np.array([0.025, 0.04, 0.06, 0.08, 0.10, 0.12])
    cost = np.array([[30.0, 38.0, 52.0, 75.0, 105.0, 145.0], [60.0, 75.0, 98.0, 130.0, 175.0, 235.0]])
    diam, tf, length = np.array([0.0603, 0.2191]), np.array([423.15, 453.15]), np.array([50.0, 120.0])
    r = economic_thickness(diam, tf, thicknesses, cost, insulation_conductivity=0.045, bins=bins, tariff=tariff,
                           finance=finance, length=length, jacket_emissivity=0.1)
    for c in range(2):
        lcc = []
        for j, t in enumerate(thicknesses):
            e = annual_energy(diam[c], tf[c], [Layer(t, 0.045)], bins=bins, length=length[c], jacket_emissivity=0.1)
            lcc.append(cost[c, j] * length[c] + float(e.heat_kwh) * 0.05 / 0.85 * _discounted_sum(0.08, 0.02, 15))
        np.testing.assert_allclose(r["life_cycle_cost"][c], lcc, rtol=1e-6)
        assert r["thickness"][c] == thicknesses[int(np.argmin(lcc))]
        # a real optimum: neither the thinnest nor the thickest listed size for these (invented) prices
        assert 0 < r["index"][c] < len(thicknesses) - 1


def test_life_cycle_cost_counts_gains_as_cost():
    f, t = Finance(0.05, 0.0, 10), Tariff("chiller", 0.15, 3.0)
    assert float(life_cycle_cost(-600.0, 0.0, t, f)) == pytest.approx(600 * 0.05 * _discounted_sum(0.05, 0, 10))
