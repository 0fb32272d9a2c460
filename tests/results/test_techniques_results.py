"""Technique results: tables, years of use, the comparison text and the technique-mix chart."""

from __future__ import annotations

import numpy as np
import pytest
from conftest import assert_optimal
from helpers import switch_plan

from growthplan.errors import InvalidInput


@pytest.fixture(scope="module")
def result():
    """The switch case of tests/lp/test_techniques.py: the labour-saving start comes in 2032."""
    plan = switch_plan()
    return assert_optimal(plan.solve())


def test_technique_table_adds_up_to_the_sector_tables(result):
    t = result.techniques
    assert list(t.columns) == ["technique", "sector", "label", "year", "output", "capacity",
                               "starts"]
    assert len(t) == 2 * 8
    for col in ("output", "starts"):
        by_year = t.groupby("year")[col].sum()
        np.testing.assert_allclose(by_year.to_numpy(), getattr(result, col)["goods"].to_numpy(),
                                   rtol=1e-12, atol=1e-12)


def test_technique_years(result):
    years = result.technique_years
    assert years.loc["goods", "first_start"] == 2030
    assert years.loc["goods:saving", "first_start"] == 2032  # closed form, see the LP tests
    assert years.loc["goods:saving", "last_used"] == 2037


def test_profits_decompose(result):
    """profit = returns + after_plan − capital_charge; zero for the starts made (LP duality)."""
    p = result.technique_profits
    np.testing.assert_allclose(p["profit"], p["returns"] + p["after_plan"] - p["capital_charge"],
                               atol=1e-12)
    started = p[p["starts"] > 1e-6]
    assert np.abs(started["profit"]).max() < 1e-9
    assert p["profit"].max() < 1e-9


def test_explain_technique(result):
    text = result.explain_technique("goods", 2033)
    lines = text.splitlines()
    assert lines[0].startswith("Techniques of goods in 2033")
    assert lines[1].split()[:2] == ["technique", "available"]
    assert lines[2].split()[0] == "base" and lines[3].split()[0] == "saving"
    with pytest.raises(InvalidInput, match="sector must name a sector"):
        result.explain_technique("gold", 2033)
    with pytest.raises(InvalidInput, match="year must be a plan year"):
        result.explain_technique("goods", 1999)


def test_plot_techniques(result):
    pytest.importorskip("matplotlib")
    import matplotlib

    matplotlib.use("Agg")
    from growthplan.results.charts import plot_techniques

    ax = plot_techniques(result, "goods")
    heights = [p.get_height() for p in ax.patches]
    assert len(heights) == 16
    assert sum(heights) == pytest.approx(float(result.output["goods"].sum()), rel=1e-9)
    with pytest.raises(InvalidInput):
        plot_techniques(result, "gold")
