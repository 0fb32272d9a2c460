"""Values, units and national accounts: figures that mean the same in any unit."""

from __future__ import annotations

import warnings

import numpy as np
import pandas as pd
import pytest
from conftest import assert_optimal, random_economy
from helpers import rescale
from hypothesis import given, settings
from hypothesis import strategies as st

import growthplan as gp

AGGREGATE_LINES = ("objective", "terminal level", "capacity growth", "GDP",
                   "investment share", "labour", "bottlenecks")


def _aggregate_lines(result: gp.PlanResult) -> list[str]:
    # the unit names of the rescaled sector do not appear in aggregate lines
    return [f"{k}  {v}" for k, v in result.summary()._lines()
            if k.startswith(AGGREGATE_LINES)]


@pytest.mark.parametrize("f", [1e3, 1e-6])
def test_demo_aggregates_do_not_depend_on_a_sectors_unit(f):
    """Energy re-expressed in a unit 1e3 or 1e-6 as large (its price scaled inversely):
    every aggregate line of the summary, the key figures and the accounts are unchanged."""
    base = assert_optimal(gp.demo_plan().solve(method="simplex"))
    other = assert_optimal(rescale(gp.demo_plan(), "energy", f).solve(method="simplex"))
    assert other.objective == pytest.approx(base.objective, rel=1e-9)
    a, b = base.key_figures(), other.key_figures()
    for key in ("terminal_capacity", "total_starts", "gdp_first", "gdp_last",
                "investment_share", "peak_labour_use"):
        assert b[key] == pytest.approx(a[key], rel=1e-9), key
    pd.testing.assert_frame_equal(other.accounts, base.accounts, rtol=1e-9, atol=1e-6)
    assert _aggregate_lines(other) == _aggregate_lines(base)
    # per-sector tables change only by the unit factor
    np.testing.assert_allclose(other.output["energy"], f * base.output["energy"], rtol=1e-9)
    np.testing.assert_allclose(other.shadow_prices_money["energy"],
                               base.shadow_prices_money["energy"] / f, rtol=1e-7)


def test_sweep_table_does_not_depend_on_a_sectors_unit():
    grid = {"terminal.rate": [0.02, 0.04]}
    opts = {"method": "simplex"}
    a = gp.sweep(gp.demo_plan(), grid, executor=gp.SerialExecutor(), solve_options=opts)
    b = gp.sweep(rescale(gp.demo_plan(), "energy", 1e3), grid, executor=gp.SerialExecutor(),
                 solve_options=opts)
    cols = ["objective", "terminal_capacity", "total_starts", "gdp_first", "gdp_last",
            "investment_share", "peak_labour_use"]
    pd.testing.assert_frame_equal(a.table[cols], b.table[cols], rtol=1e-9)


@settings(max_examples=12)
@given(st.integers(0, 10_000), st.integers(2, 4), st.integers(3, 8),
       st.sampled_from([1e-4, 1e-2, 1e2, 1e5]))
def test_aggregates_are_unit_free_on_random_plans(seed, n, T, f):
    """Property: rescaling a random sector of a random plan leaves λ and the totals."""
    rng = np.random.default_rng(seed)
    econ = random_economy(rng, n)
    plan = gp.Plan(economy=econ, years=range(2030, 2030 + T),
                   labour=gp.LabourSupply(start=1e4), terminal=gp.TerminalGrowth(rate=0.02))
    base = plan.solve(method="simplex")
    if not base.ok:
        return
    other = assert_optimal(rescale(plan, econ.names[int(rng.integers(n))], f).solve(
        method="simplex"))
    assert other.objective == pytest.approx(base.objective, rel=1e-7)
    assert other.terminal_value == pytest.approx(base.terminal_value, rel=1e-7)


@settings(max_examples=12)
@given(st.integers(0, 10_000), st.integers(2, 5), st.integers(3, 8))
def test_national_accounts_identities_on_random_plans(seed, n, T):
    """GDP from production = final uses + free disposal; investment share in [0, 1];
    employment by sector sums to labour used (recomputed from the schedules here)."""
    rng = np.random.default_rng(seed)
    econ = random_economy(rng, n)
    prices = rng.uniform(0.5, 2.0, n)
    econ = gp.Economy(**{**{k: getattr(econ, k) for k in type(econ).model_fields},
                         "sectors": [gp.Sector(name=s, price=p)
                                     for s, p in zip(econ.names, prices, strict=True)]})
    plan = gp.Plan(economy=econ, years=range(2030, 2030 + T), labour=gp.LabourSupply(start=1e4),
                   consumption=gp.Consumption(floor=1.0), terminal=gp.TerminalGrowth(rate=0.02))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        r = plan.solve(method="simplex")
    if not r.ok:
        return
    acc = r.accounts
    x = r.output.to_numpy()
    a = np.asarray(econ.input_coefficients)
    gdp = (x - x @ a.T) @ prices
    np.testing.assert_allclose(acc["gdp"], gdp, rtol=1e-9)
    final = acc["investment"] + acc["consumption"] + acc["exogenous_demand"] \
        + acc["exports"] - acc["imports"] + acc["disposal"]
    np.testing.assert_allclose(acc["gdp"], final, rtol=1e-9, atol=1e-9)
    assert (acc["disposal"] >= -1e-9 * acc["gross_output"]).all()
    share = acc["investment_share"].dropna()
    assert ((share >= -1e-12) & (share <= 1 + 1e-12)).all()
    used = x @ np.asarray(econ.labour_coefficients)[0]
    np.testing.assert_allclose(r.employment.T.groupby(level="kind").sum().T["labour"], used,
                               rtol=1e-12)
    np.testing.assert_allclose(acc["employment"], used, rtol=1e-12)
    assert "GDP identity" in r.audit.checks.index


def test_miller_blair_value_added_and_gdp():
    """Miller & Blair (2009), ch. 2: value added (650, 1400); GDP 2,050 equals total final
    demand (350 + 1,700)."""
    flows = pd.DataFrame([[150.0, 500.0], [200.0, 100.0]], index=["1", "2"],
                         columns=["1", "2"])
    table = gp.TransactionsTable(flows, pd.Series({"1": 1000.0, "2": 2000.0}),
                                 final_demand=pd.Series({"1": 350.0, "2": 1700.0}))
    assert table.value_added_by_sector().tolist() == [650.0, 1400.0]
    assert table.gdp() == 2050.0 == 350.0 + 1700.0


@pytest.mark.parametrize("change,field", [
    ({"final_demand": pd.Series({"1": 450.0, "2": 1700.0})}, "flows.1"),
    ({"flows": pd.DataFrame([[950.0, 500.0], [200.0, 100.0]], index=["1", "2"],
                            columns=["1", "2"])}, "flows.1"),
    ({"value_added": pd.Series({"1": -10.0, "2": 1400.0})}, "value_added.1"),
    ({"value_added": pd.Series({"1": 600.0, "2": 1400.0})}, "value_added.1"),
])
def test_unbalanced_tables_are_refused_naming_the_cell(change, field):
    """A deliberately unbalanced copy of the Miller & Blair table is refused."""
    args = {"flows": pd.DataFrame([[150.0, 500.0], [200.0, 100.0]], index=["1", "2"],
                                  columns=["1", "2"]),
            "gross_output": pd.Series({"1": 1000.0, "2": 2000.0}),
            "final_demand": pd.Series({"1": 350.0, "2": 1700.0})}
    args.update(change)
    with pytest.raises(gp.InvalidInput) as err:
        gp.TransactionsTable(args.pop("flows"), args.pop("gross_output"), **args)
    assert str(err.value).startswith(field)


@pytest.mark.parametrize("update", [{"terminal": gp.TerminalGrowth(rate=1.5)},
                                    {"labour": gp.LabourSupply(start=100, growth=2.0)},
                                    {"final_demand_growth": 3.0}])
def test_percent_for_fraction_is_refused(update):
    with pytest.raises(gp.InvalidInput, match="fraction per year"):
        gp.demo_plan().model_copy(update=update)
    assert gp.demo_plan().model_copy(update={**update, "allow_high_rates": True})


def test_units_reach_the_exports(tmp_path):
    plan = rescale(gp.demo_plan(), "energy", 1e3)
    r = assert_optimal(plan.solve())
    out = r.to_csv(tmp_path / "out")
    header = (out / "output.csv").read_text(encoding="utf-8").splitlines()[0]
    assert "energy [million arvens at 2026 prices / 1000]" in header
    acc = (out / "accounts.csv").read_text(encoding="utf-8").splitlines()[0]
    assert "gdp [million arvens at 2026 prices]" in acc


@pytest.mark.parametrize("f", [1e3, 1e-6])
def test_ray_distance_and_stacked_starts_are_unit_free(f):
    """The turnpike angle and the stacked starts chart are computed in value terms."""
    import matplotlib

    matplotlib.use("Agg")
    from growthplan.results.charts import plot_starts, ray_distance

    base = assert_optimal(gp.demo_plan().solve(method="simplex"))
    other = assert_optimal(rescale(gp.demo_plan(), "energy", f).solve(method="simplex"))
    np.testing.assert_allclose(ray_distance(other), ray_distance(base), rtol=1e-7, atol=1e-9)
    tops = []
    for r in (base, other):
        ax = plot_starts(r)
        tops.append(sorted(round(p.get_y() + p.get_height(), 6) for p in ax.patches))
    np.testing.assert_allclose(tops[0], tops[1], rtol=1e-7)


def test_first_year_is_held_near_the_base_year():
    """Plan(first_year_within=s): every sector's first-year output ≥ (1 − s) × base year."""
    plan = gp.demo_plan()
    assert plan.first_year_within == 0.1
    r = assert_optimal(plan.solve())
    assert (r.calibration["change"] >= -0.1 - 1e-9).all()
    loose = assert_optimal(plan.model_copy(update={"first_year_within": None}).solve())
    assert (loose.calibration["change"] < -0.4).any()  # the plan would start far below
    assert "first year" in str(loose.summary())
    assert loose.objective >= r.objective  # a condition less can only help


def test_an_unreachable_first_year_is_diagnosed():
    """One sector with capacity 100 but a base year of 200: at least 180 in the first year
    cannot be produced; the shortfall is exactly 80 (capacity binds)."""
    from conftest import one_sector

    econ = one_sector()
    econ = gp.Economy(**{**{k: getattr(econ, k) for k in type(econ).model_fields},
                         "base_output": [200.0]})
    plan = gp.Plan(economy=econ, years=range(2030, 2035), first_year_within=0.1)
    r = plan.solve()
    assert r.status is gp.Status.INFEASIBLE
    row = r.diagnosis.shortfalls.iloc[0]
    assert (row.condition, row.sector, row.year) == ("first-year output", "goods", 2030)
    assert row.shortfall == pytest.approx(80.0, rel=1e-9)


def test_first_year_without_a_base_year_is_refused():
    from conftest import one_sector

    with pytest.raises(gp.InvalidInput, match="first_year_within"):
        gp.Plan(economy=one_sector(), years=range(2030, 2035), first_year_within=0.1)


def test_consumption_per_head():
    """With a population the accounts divide consumption by it (the demo: 12 million in
    2027, growing 1.1 % a year)."""
    r = assert_optimal(gp.demo_plan().solve())
    acc = r.accounts
    pop = 12.0 * 1.011 ** np.arange(len(acc))
    np.testing.assert_allclose(acc["consumption_per_head"], acc["consumption"] / pop,
                               rtol=1e-12)
    for bad in ("many", -12.0, [12.0] * 3):
        with pytest.raises(gp.InvalidInput, match="consumption.population"):
            gp.demo_plan().model_copy(update={"consumption": gp.Consumption(
                floor=1.0, population=bad)})


@pytest.mark.parametrize("f", [1e-12, 1e-16])
def test_demo_in_far_smaller_units_is_the_same_plan(f):
    """Beyond the supported range, energy in a unit 1e12 or 1e16 times smaller with its
    price scaled: the balanced-growth proportions are computed in value terms, so λ is
    unchanged (once a physical-unit positivity test dropped them)."""
    base = assert_optimal(gp.demo_plan().solve(method="simplex"))
    other = assert_optimal(rescale(gp.demo_plan(), "energy", f).solve(method="simplex"))
    assert other.data.proportions_source == "balanced growth"
    assert other.objective == pytest.approx(base.objective, rel=1e-9)
