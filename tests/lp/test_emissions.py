"""Emission limits in the plan: caps, budgets and ceilings per unit of GDP, and their prices.

Checked against closed forms (one sector: output at most E/e; the shadow price of a
limit is the derivative of the optimal objective with respect to it, LP duality) and a
hand computation of the price of carbon where two techniques run side by side.
"""

from __future__ import annotations

import numpy as np
import pytest
from conftest import assert_optimal, one_sector

import growthplan as gp
from growthplan.lp.build import _upper_bound, build, estimate_size
from growthplan.lp.conditions import CONDITIONS
from growthplan.results.tables import schedules

YEARS = range(2030, 2036)
E = 0.5  # tonnes per unit of output of the one sector


def satellite(**intensities: float) -> gp.Satellite:
    return gp.Satellite(stressors=[gp.Stressor(name="CO2", unit="t",
                                               intensities=intensities or {"goods": E})])


def capped(at_most, **kw) -> gp.Plan:
    return gp.Plan(economy=one_sector(), years=YEARS, satellite=satellite(),
                   limits=[gp.Cap(what="CO2", at_most=at_most, **kw)])


def budgeted(total: float, years=YEARS, **kw) -> gp.Plan:
    return gp.Plan(economy=one_sector(), years=years, satellite=satellite(),
                   limits=[gp.Budget(what="CO2", total=total, **kw)])


class TestOneSectorCap:
    def test_output_is_at_most_cap_over_intensity(self):
        """With intensity e and a cap E the output is at most E/e, and the cap binds once
        capacity allows more (closed form: x_t ≤ E/e)."""
        r = assert_optimal(capped(60.0).solve())
        out = r.output["goods"].to_numpy()
        assert np.all(out <= 60.0 / E * (1 + 1e-9))
        np.testing.assert_allclose(out[2:], 60.0 / E, rtol=1e-9)
        uncapped = assert_optimal(gp.Plan(economy=one_sector(), years=YEARS).solve())
        assert r.objective < uncapped.objective

    @pytest.mark.parametrize("year", [2032, 2034, 2035])
    def test_cap_price_is_the_derivative_of_the_objective(self, year):
        """A year's cap price equals dV/dE_t by central difference (LP duality)."""
        base = {y: 60.0 for y in YEARS}
        r = assert_optimal(capped(base).solve(method="simplex"))
        prices = r.emission_prices.set_index("year")["value"]
        h = 1e-3
        up = assert_optimal(capped({**base, year: 60.0 + h}).solve(method="simplex"))
        down = assert_optimal(capped({**base, year: 60.0 - h}).solve(method="simplex"))
        fd = (up.objective - down.objective) / (2 * h)
        assert prices[year] > 0
        assert prices[year] == pytest.approx(fd, rel=1e-6)

    def test_falling_cap_path(self):
        """A cap given as a number and a rate falls as E_0 (1 + r)^t (the series convention)."""
        r = assert_optimal(capped(60.0, rate=-0.05).solve())
        table = r.emission_prices
        np.testing.assert_allclose(table["bound"], 60.0 * 0.95 ** np.arange(len(YEARS)))
        assert np.all(r.emission_totals["CO2"].to_numpy() <= table["bound"].to_numpy() + 1e-7)


class TestBudget:
    def test_budget_has_one_price_equal_to_the_derivative(self):
        """A cumulative budget's single dual equals dV/dB by central difference (LP duality)."""
        total = 330.0
        r = assert_optimal(budgeted(total).solve(method="simplex"))
        table = r.emission_prices
        assert len(table) == 1 and table["year"].iloc[0] == "2030–2035"
        assert float(r.emission_totals["CO2"].sum()) == pytest.approx(total, rel=1e-9)
        h = 1e-2
        fd = (assert_optimal(budgeted(total + h).solve(method="simplex")).objective
              - assert_optimal(budgeted(total - h).solve(method="simplex")).objective) / (2 * h)
        assert table["value"].iloc[0] == pytest.approx(fd, rel=1e-6)

    def test_window(self):
        """A budget over 2032–2034 counts only those years."""
        r = assert_optimal(budgeted(150.0, first=2032, last=2034).solve())
        used = r.emission_totals.loc[2032:2034, "CO2"].sum()
        assert used <= 150.0 * (1 + 1e-9)
        assert r.emission_prices["year"].iloc[0] == "2032–2034"


def dirty_clean(total: float) -> gp.Plan:
    """Dirty base technique (capital 2, 1 t) and a clean one (capital 2.5, 0.1 t)."""
    return gp.Plan(economy=one_sector(), years=range(2030, 2045),
                   techniques=[gp.Technique(sector="goods", label="clean",
                                            capital={"goods": 2.5})],
                   satellite=satellite(goods=1.0, **{"goods:clean": 0.1}),
                   limits=[gp.Budget(what="CO2", total=total)])


def test_tighter_budget_moves_the_switch_earlier():
    """The first year the clean technique is started comes no later under a tighter
    budget, and strictly earlier from 3,000 t to 2,000 t (the budget's price rises)."""
    first, price = [], []
    for total in (3000.0, 2500.0, 2000.0):
        r = assert_optimal(dirty_clean(total).solve())
        tq = r.techniques
        clean = tq[(tq["label"] == "clean") & (tq["starts"] > 1e-7)]
        first.append(int(clean["year"].min()))
        price.append(float(r.emission_prices["value"].iloc[0]))
    assert first == sorted(first, reverse=True) and first[-1] < first[0]
    assert price == sorted(price) and price[0] > 0


def test_price_where_both_techniques_run_is_labour_saved_per_tonne():
    """No capital (lead time 0, no capital goods), least labour: where both run, the
    cap's price is (l_clean − l_dirty) / (e_dirty − e_clean) person-years per tonne
    (by hand: (1.6 − 1.0) / (2.0 − 0.5) = 0.4)."""
    econ = gp.Economy(sectors=["power"], input_coefficients=[[0.1]],
                      capital_coefficients=[[0.0]], labour_coefficients=[[1.0]],
                      capital={"power": gp.CapitalSpec(initial_capacity=0, mean_service_life=10,
                                                       lead_time=0)})
    plan = gp.Plan(economy=econ, years=range(2030, 2033), final_demand={"power": 90.0},
                   techniques=[gp.Technique(sector="power", label="clean", labour=1.6,
                                            capital={})],
                   satellite=gp.Satellite(stressors=[gp.Stressor(
                       name="CO2", unit="t", intensities={"power": 2.0, "power:clean": 0.5})]),
                   limits=[gp.Cap(what="CO2", at_most=120.0)],
                   objective=gp.objectives.LeastLabour())
    r = assert_optimal(plan.solve())
    tq = r.techniques
    assert (tq["output"] > 1).all()  # both run in every year
    np.testing.assert_allclose(r.emission_prices["value"], (1.6 - 1.0) / (2.0 - 0.5),
                               rtol=1e-9)


def test_households_and_impacts():
    """Households emit per unit of consumption; an impact adds stressors by its factors
    (e.g. 28 t CO2-eq per t CH4, a stated factor): recomputed by hand from the schedules."""
    econ = gp.Economy(sectors=["goods"], input_coefficients=[[0.6]],
                      capital_coefficients=[[2.0]], consumption_basket=[1.0],
                      capital={"goods": gp.CapitalSpec(initial_capacity=100,
                                                       mean_service_life=20)})
    sat = gp.Satellite(stressors=[gp.Stressor(name="CO2", unit="t", intensities={"goods": 0.5},
                                              households=0.2),
                                  gp.Stressor(name="CH4", unit="t", intensities={"goods": 0.01})],
                       impacts=[gp.Impact(name="GHG", unit="t CO2-eq",
                                          factors={"CO2": 1.0, "CH4": 28.0})])
    plan = gp.Plan(economy=econ, years=YEARS, consumption=gp.Consumption(floor=5.0),
                   satellite=sat, limits=[gp.Cap(what="GHG", at_most=70.0)])
    r = assert_optimal(plan.solve())
    x = r.output["goods"].to_numpy()
    k = r.consumption["level"].to_numpy()
    ghg = 0.5 * x + 0.2 * k + 28 * 0.01 * x
    np.testing.assert_allclose(r.emission_totals["GHG"], ghg, rtol=1e-9)
    assert np.all(ghg <= 70.0 * (1 + 1e-9))
    homes = r.emissions.query("technique == 'households' and stressor == 'CO2'")
    np.testing.assert_allclose(homes["amount"], 0.2 * k[k > 0], rtol=1e-12)
    assert r.emission_totals.attrs["units"]["GHG"] == "t CO2-eq"


def test_intensity_ceiling_per_gdp():
    """Emissions per unit of GDP (p·(1 − a) x at base-year prices) at most ι: with
    e/(1 − a) = 0.5/0.4 = 1.25 t per unit of GDP a ceiling of 1.0 holds only with no
    output at all; 1.25 holds with equality in every year."""
    none = gp.Plan(economy=one_sector(), years=YEARS, satellite=satellite(),
                   limits=[gp.IntensityCeiling(what="CO2", per_gdp=1.0)])
    np.testing.assert_allclose(assert_optimal(none.solve()).output["goods"], 0.0, atol=1e-9)
    ok = gp.Plan(economy=one_sector(), years=YEARS, satellite=satellite(),
                 limits=[gp.IntensityCeiling(what="CO2", per_gdp=1.25)])
    r = assert_optimal(ok.solve())
    np.testing.assert_allclose(r.emission_totals["CO2"], 1.25 * 0.4 * r.output["goods"],
                               rtol=1e-9)


def test_vintage_keeps_its_intensity():
    """With embodied change an intensity falling 10 % a year goes with the vintage: capacity
    started in year τ emits 0.5 · 0.9^τ per unit for its whole life."""
    plan = gp.Plan(economy=one_sector(), years=range(2030, 2034),
                   technical_change=gp.TechnicalChange(embodied=True),
                   satellite=gp.Satellite(stressors=[gp.Stressor(
                       name="CO2", unit="t", intensities={"goods": E}, rate={"goods": -0.1})]),
                   limits=[gp.Cap(what="CO2", at_most=1e6)])
    r = assert_optimal(plan.solve())
    em = r.emissions
    for row in em.itertuples():
        tail = row.technique.rsplit(" ", 1)
        tau = int(tail[1]) - 2030 if len(tail) == 2 else 0
        x = r.techniques.set_index(["technique", "year"]).loc[(row.technique, row.year),
                                                               "output"]
        assert row.amount == pytest.approx(E * 0.9 ** tau * x, rel=1e-12)
    assert em["technique"].nunique() > 1


def test_disembodied_intensity_changes_every_year():
    """Without embodied change all capacity emits at year t's intensity 0.5 · 0.9^t."""
    plan = gp.Plan(economy=one_sector(), years=range(2030, 2034),
                   satellite=gp.Satellite(stressors=[gp.Stressor(
                       name="CO2", unit="t", intensities={"goods": E}, rate={"goods": -0.1})]))
    r = assert_optimal(plan.solve())
    np.testing.assert_allclose(r.emission_totals["CO2"],
                               E * 0.9 ** np.arange(4) * r.output["goods"], rtol=1e-12)
    assert r.emission_prices.empty


def test_count_matches_build_and_audit_catches_excess():
    plan = gp.Plan(economy=one_sector(), years=YEARS,
                   consumption=gp.Consumption(floor=1.0, basket={"goods": 1.0}),
                   satellite=gp.Satellite(stressors=[gp.Stressor(
                       name="CO2", unit="t", intensities={"goods": E}, households=0.1)]),
                   limits=[gp.Cap(what="CO2", at_most=60.0, years=[2031, 2033]),
                           gp.Budget(what="CO2", total=400.0),
                           gp.IntensityCeiling(what="CO2", per_gdp=2.0)])
    d = plan.lowered()
    lp = build(d)
    cond = next(c for c in CONDITIONS if c.name == "emissions")
    rows, nnz = cond.count(d, {})
    b = lp.rows["emissions"]
    assert rows == b.size == 2 + 1 + len(YEARS)
    assert nnz == lp.matrix[b.start:b.stop].nnz
    assert estimate_size(d)["rows"] == lp.shape[0]
    assert _upper_bound(plan) >= lp.matrix.nnz  # the cheap size guard stays an upper bound
    r = assert_optimal(plan.solve())
    s = schedules(d, lp, r.outcome.x)
    s.output = s.output * 1.5  # more output than the cap allows
    worst = max(float(np.max(ch.violation)) for ch in cond.audit(d, s))
    assert worst > 1.0


@pytest.mark.parametrize(("field", "make"), [
    ("intensities", lambda: gp.Stressor(name="CO2", unit="t", intensities={"goods": -1.0})),
    ("intensities", lambda: gp.Stressor(name="CO2", unit="t",
                                        intensities={"goods": float("nan")})),
    ("intensities", lambda: gp.Stressor(name="CO2", unit="t", intensities={"goods": 1e300})),
    ("households", lambda: gp.Stressor(name="CO2", unit="t", households=-2)),
    ("rate", lambda: gp.Stressor(name="CO2", unit="t", rate={"goods": 5.0})),
    ("factors", lambda: gp.Impact(name="GHG", unit="t", factors={"CO2": float("inf")})),
    ("total", lambda: gp.Budget(what="CO2", total=-5.0)),
    ("total", lambda: gp.Budget(what="CO2", total=float("nan"))),
    ("total", lambda: gp.Budget(what="CO2", total=1e300)),
    ("limits.0.at_most", lambda: capped(-1.0)),
    ("limits.0.at_most", lambda: capped(float("nan"))),
    ("limits.0.at_most", lambda: capped(1e300)),
    ("limits.0.at_most[2031]", lambda: capped([1, -1, 1, 1, 1, 1])),
    ("limits.0.what", lambda: gp.Plan(economy=one_sector(), years=YEARS,
                                      satellite=satellite(),
                                      limits=[gp.Cap(what="CO3", at_most=1.0)])),
    ("limits.0.what", lambda: gp.Plan(economy=one_sector(), years=YEARS,
                                      limits=[gp.Cap(what="CO2", at_most=1.0)])),
    ("satellite.stressors.0.intensities", lambda: gp.Plan(
        economy=one_sector(), years=YEARS, satellite=satellite(steel=1.0))),
    ("limits.0.years", lambda: capped(1.0, years=[1999])),
    ("limits.0.first", lambda: budgeted(1.0, first=2050)),
])
def test_hostile_inputs_name_the_field(field, make):
    with pytest.raises(gp.InvalidInput) as err:
        make()
    assert field in str(err.value)


def test_fastest_horizon_keeps_the_limits():
    """The horizon search restates limits for each horizon: a cap path given year by year is
    cut to the shorter plans; the fastest plan to reach capacity 120 under a cap of 60 t is
    the Harrod–Domar one (100 · 1.15^2 = 132.25 ≥ 120 after two years, 115 after one)."""
    years = list(range(2030, 2034))
    plan = gp.Plan(economy=one_sector(), years=years, satellite=satellite(),
                   targets=[gp.Target("goods", year=2034, capacity_at_least=120.0)],
                   limits=[gp.Cap(what="CO2", at_most={y: 60.0 for y in years}),
                           gp.Budget(what="CO2", total=1000.0)],
                   objective=gp.objectives.Fastest(max_years=6))
    r = assert_optimal(plan.solve())
    assert r.plan.horizon == 2
    assert [type(lim).__name__ for lim in r.plan.limits] == ["Cap", "Budget"]
    assert r.plan.limits[0].years == [2030, 2031]
