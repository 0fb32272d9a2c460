"""The result tables: declared once, each computed alone on first access, exported in order."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from conftest import assert_optimal, one_sector

import growthplan as gp
from growthplan.results import tables
from growthplan.results.result import PlanResult, Table

YEARS = range(2030, 2040)


@pytest.fixture(scope="module")
def result() -> gp.PlanResult:
    plan = gp.Plan(economy=one_sector(), years=YEARS,
                   labour=gp.LabourSupply(start=80, growth=0.01),
                   terminal=gp.TerminalGrowth(rate=0.02))
    return assert_optimal(plan.solve())


def test_every_declared_table_is_an_attribute_and_back():
    attributes = {k for k, v in vars(PlanResult).items() if isinstance(v, Table)}
    declared = {name for name, t in tables.TABLES.items() if t.attribute}
    assert attributes == declared
    assert PlanResult.output.__doc__ == tables.TABLES["output"].doc


def test_a_table_is_computed_alone_and_once(result, monkeypatch):
    fresh = PlanResult(result.plan, result.lp, result.outcome, status=result.status,
                       timings={}, audit=result.audit, schedules=result._schedules)
    calls: list[str] = []
    for name, t in list(tables.TABLES.items()):
        def counted(s, _compute=t.compute, _name=name):
            calls.append(_name)
            return _compute(s)
        monkeypatch.setitem(tables.TABLES, name, tables.ResultTable(
            name=name, compute=counted, doc=t.doc, export=t.export, file=t.file,
            attribute=t.attribute))
    first, second = fresh.output, fresh.output
    assert calls == ["output"]
    assert first.equals(second)
    edited = fresh.output
    edited.iloc[0, 0] = -1.0  # a copy: the kept table is unchanged
    assert fresh.output.iloc[0, 0] != -1.0


def test_a_new_table_reaches_the_csv_folder_and_the_workbook(result, tmp_path):
    @tables.table("twice_output", doc="Output doubled.", unit="each sector's unit a year")
    def _twice(s):
        return s.frame(2 * s.d.by_sector(s.s.output), units=True)

    try:
        fresh = PlanResult(result.plan, result.lp, result.outcome, status=result.status,
                           timings={}, audit=result.audit, schedules=result._schedules)
        assert fresh._get("twice_output").equals(2 * fresh.output)
        fresh.to_csv(tmp_path / "csv")
        written = pd.read_csv(tmp_path / "csv" / "twice_output.csv", index_col="year")
        np.testing.assert_allclose(written.to_numpy(), 2 * fresh.output.to_numpy())
        assert written.columns[0].startswith("goods [")  # the unit in the header
        fresh.to_excel(tmp_path / "plan.xlsx")
        assert "twice_output" in pd.ExcelFile(tmp_path / "plan.xlsx").sheet_names
    finally:
        del tables.TABLES["twice_output"]


def test_a_name_is_declared_once():
    with pytest.raises(gp.GrowthplanError, match="output"):
        tables.table("output", doc="again")(lambda s: None)


def test_sheet_and_file_names():
    assert tables.TABLES["audit_checks"].csv == "audit.csv"
    assert tables.TABLES["shadow_prices_current"].sheet == "shadow_prices_current"
    assert all(len(t.sheet) <= 31 for t in tables.TABLES.values())  # Excel's limit


def test_geometric_retirement_is_capacity_over_the_mean_life(result):
    # geometric retirement with mean service life L retires 1/L of capacity a
    # year (common practice); L = 20 in one_sector
    cap = result.capacity["goods"].to_numpy()
    np.testing.assert_allclose(result.retirements["goods"].to_numpy(), cap[:-1] / 20.0,
                               rtol=1e-9)
    # capacity accounting: next year's capacity = this year's − retired + entering
    entering = cap[1:] - cap[:-1] + result.retirements["goods"].to_numpy()
    assert (entering >= -1e-9).all()


def test_utilisation_is_output_over_capacity(result):
    ratio = result.output / result.capacity.iloc[:-1]
    pd.testing.assert_frame_equal(result.utilisation, ratio)


def test_current_prices_with_a_discount_rate():
    # discounted objective: current-year prices are the solved ones times (1 + r)^t
    prices = np.array([[1.0, 2.0], [0.5, 1.0], [0.25, 0.5]])
    out = tables.current_prices(prices, np.ones((3, 2)), 0.1)
    np.testing.assert_allclose(out, prices * (1.1 ** np.arange(3))[:, None])
    # undiscounted: the first year's bundle keeps its first-year price
    same = tables.current_prices(prices, np.array([[1.0, 1.0]] * 3), None)
    np.testing.assert_allclose(same @ np.ones(2), 3.0)


def test_money_prices_value_the_first_bundle_at_base_year_prices(result):
    d = result.data
    bundle = result.output.iloc[0].to_numpy()
    money = result.shadow_prices_money.to_numpy()
    np.testing.assert_allclose(money @ bundle, float(d.prices @ bundle), rtol=1e-9)


def test_tables_of_a_result_that_is_not_a_plan_refuse():
    plan = gp.Plan(economy=one_sector(), years=YEARS,
                   targets=[gp.Target("goods", year=2035, capacity_at_least=1e9)])
    r = plan.solve()
    assert not r.ok
    for name in ("output", "accounts", "terminal_value"):
        with pytest.raises(gp.PlanNotOptimal, match=name):
            getattr(r, name)
