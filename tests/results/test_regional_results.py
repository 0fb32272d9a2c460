"""Results of a plan over several regions: accounts, flows, prices, exports and charts."""

from __future__ import annotations

import matplotlib
import numpy as np
import pytest
from conftest import assert_optimal
from helpers import regional_economy

import growthplan as gp
from growthplan.results.regions import flow_matrix

matplotlib.use("Agg")


@pytest.fixture(scope="module")
def result() -> gp.PlanResult:
    mre = regional_economy(["north", "south", "east"], 3, seed=7)
    plan = mre.plan(range(2030, 2036), corridors=[
        gp.Corridor(origin="north", destination="south", transport=0.1, both_ways=True),
        gp.Corridor(origin="east", destination="south", transport=0.2)],
        transport_sector="haul", regional_labour={"north": 150.0, "south": 90.0, "east": 60.0},
        consumption=gp.Consumption(floor=1.0), terminal=gp.TerminalGrowth(rate=0.02),
        objective=gp.objectives.DiscountedConsumption(rate=0.03))
    return assert_optimal(plan.solve())


def test_regional_accounts_add_up_to_the_national_ones(result) -> None:
    acc = result.regional_accounts
    national = result.accounts
    # the regions' products and investment are the nation's, split (identity of the accounts)
    for ours, theirs in (("regional_product", "gdp"), ("investment", "investment"),
                         ("employment", "employment"), ("consumption", "consumption")):
        total = acc[ours].groupby(level="year").sum()
        np.testing.assert_allclose(total.to_numpy(), national[theirs].to_numpy(), rtol=1e-9,
                                   atol=1e-9)
    labour = result.plan.regions.labour
    assert np.all(acc["employment"].unstack("region")[list(labour)].to_numpy()
                  <= np.array(list(labour.values())) * (1 + 1e-9))


def test_flows_and_the_price_pattern(result) -> None:
    flows = result.flows
    m = flow_matrix(flows, ["north", "south", "east"])
    assert m.to_numpy().sum() == pytest.approx(flows["value"].sum())
    assert np.all(np.diag(m.to_numpy()) == 0)
    assert m.loc["south", "east"] == 0.0  # no corridor from south to east
    sp = result.spatial_prices
    prices = result.shadow_prices
    assert sp.loc[(2031, "s0"), "north"] == prices.loc[2031, "north/s0"]
    spread = sp[["north", "south", "east"]].max(axis=1) - sp[["north", "south", "east"]].min(
        axis=1)
    np.testing.assert_allclose(sp["spread"], spread, atol=1e-15)
    gap = result.regional_gap
    assert np.all(gap["highest_to_lowest"] >= 1.0)


def test_exports_carry_the_regional_tables(result, tmp_path) -> None:
    folder = result.to_csv(tmp_path / "tables")
    for name in ("regional_accounts", "regional_gap", "flows", "spatial_prices"):
        assert (folder / f"{name}.csv").is_file()
    from growthplan.results.report import render

    html = render(result, charts=False)  # the charts are drawn below, once
    assert "<h2>Regions</h2>" in html and "main corridor" in html
    import openpyxl

    book = openpyxl.load_workbook(result.to_excel(tmp_path / "plan.xlsx"), read_only=True)
    assert {"regional_accounts", "flows", "spatial_prices"} <= set(book.sheetnames)
    ax = gp.plot.plot_flows(result)
    assert ax.get_xlabel() == "to (destination)"
    ax = gp.plot.plot_regional_growth(result)
    assert len(ax.get_lines()) == 3


def test_a_single_region_plan_has_no_regional_tables(tmp_path) -> None:
    res = assert_optimal(gp.demo_plan().solve())
    assert res.flows.empty and res.regional_accounts.empty
    folder = res.to_csv(tmp_path / "t")
    assert not (folder / "flows.csv").exists()
