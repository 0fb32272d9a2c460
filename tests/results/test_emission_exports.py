"""Emissions in the exports: the report's section, the workbook's sheets, the CSV files,
and an impossible budget in words in each of them."""

from __future__ import annotations

import warnings

import pandas as pd
import pytest
from conftest import assert_infeasible, assert_optimal, one_sector

import growthplan as gp


def plan(limit: gp.Cap | gp.Budget, **kw) -> gp.Plan:
    sat = gp.Satellite(stressors=[gp.Stressor(name="CO2", unit="t", intensities={"goods": 0.5}),
                                  gp.Stressor(name="water", unit="m3", resource=True,
                                              intensities={"goods": 2.0})])
    return gp.Plan(economy=one_sector(), years=range(2030, 2036), satellite=sat,
                   limits=[limit], **kw)


@pytest.fixture(scope="module")
def capped():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return assert_optimal(plan(gp.Cap(what="CO2", at_most=60.0)).solve())


def test_csv_and_workbook_hold_the_emission_tables(capped, tmp_path):
    folder = capped.to_csv(tmp_path / "out")
    totals = pd.read_csv(folder / "emission_totals.csv", index_col=0)
    assert list(totals.columns) == ["CO2 [t]", "water [m3]"]
    assert totals["water [m3]"].iloc[-1] == pytest.approx(4 * totals["CO2 [t]"].iloc[-1])
    prices = pd.read_csv(folder / "emission_prices.csv", index_col=0)
    assert (prices["price_unit"] == "money at base-year prices per t").all()
    assert (folder / "emissions.csv").exists()
    book = pd.read_excel(capped.to_excel(tmp_path / "plan.xlsx"), sheet_name=None)
    assert {"emissions", "emission_totals", "emission_prices"} <= set(book)
    glossary = book["glossary"]
    assert glossary.iloc[:, 0].astype(str).str.contains("emission prices").any()


def test_report_has_an_emissions_section_in_words(capped):
    from growthplan.results.report import render

    html = render(capped, charts=False)
    assert "<h2>Emissions</h2>" in html
    assert "The cap on CO2 in 2035 binds" in html
    assert "money at base-year prices per t" in html
    assert "does not bind" in html


def test_emissions_chart_names_its_unit(capped):
    import matplotlib

    matplotlib.use("Agg")
    ax = gp.plot.plot_emissions(capped, "CO2")
    assert ax.get_ylabel() == "CO2 (t per year)"
    assert "cap" in [t.get_text() for t in ax.get_legend().get_texts()]


def test_impossible_budget_in_words_everywhere(tmp_path):
    """Demand 30 needs output 75 and 37.5 t a year (by hand): 187.5 t over 2031–2035
    against 150 t."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        r = assert_infeasible(plan(gp.Budget(what="CO2", total=150.0, first=2031, last=2035),
                                   final_demand={"goods": 30.0}).solve())
    words = "emissions of CO2 in 2031–2035 exceed the budget by 37.5 t"
    assert words in r.diagnosis.headline()
    from growthplan.results.report import render

    assert words in render(r, charts=False)
    short = pd.read_csv(r.to_csv(tmp_path / "out") / "shortfalls.csv")
    assert short["words"].iloc[0] == words
    book = pd.read_excel(r.to_excel(tmp_path / "plan.xlsx"), sheet_name=None)
    assert book["diagnosis"].astype(str).apply(lambda c: c.str.contains(words)).any().any()


def test_resource_use_is_worded_as_use(tmp_path):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        r = assert_infeasible(plan(gp.Cap(what="water", at_most=100.0),
                                   final_demand={"goods": 30.0}).solve())
    assert "use of water in 2030 exceeds the cap by 50 m3" in r.diagnosis.headline()
