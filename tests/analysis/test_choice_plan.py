"""One description for the plan and the steady state: the activity table of a plan."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import growthplan as gp


def _economy() -> gp.Economy:
    """Grain and tools; tools are the capital good of both sectors."""
    return gp.Economy(
        sectors=["grain", "tools"],
        input_coefficients=[[0.2, 0.1], [0.1, 0.3]],
        capital_coefficients=[[0.0, 0.0], [0.8, 1.2]],
        labour_coefficients=[[0.6, 0.4]],
        capital={"grain": gp.CapitalSpec(initial_capacity=50, mean_service_life=10),
                 "tools": gp.CapitalSpec(initial_capacity=40, mean_service_life=20)})


def _plan(techniques: list[gp.Technique]) -> gp.Plan:
    return gp.Plan(economy=_economy(), years=range(2030, 2035),
                   labour=gp.LabourSupply(start=60, growth=0.01), techniques=techniques)


TECHNIQUES = [
    # labour-saving and capital-using, with its own service life
    gp.Technique(sector="grain", label="mechanised", inputs={"grain": 0.15, "tools": 0.12},
                 capital={"tools": 1.6}, labour=0.25, mean_service_life=8, first_year=2032),
    # straw as a by-product of the same grain
    gp.Technique(sector="tools", label="forged", labour=0.3, capital={"tools": 1.5},
                 by_products={"grain": 0.05}),
]


def _by_hand() -> gp.ActivityTable:
    """The same four techniques written out column by column."""
    labels = ["grain", "tools", "grain:mechanised", "tools:forged"]
    a = [[0.2, 0.1, 0.15, 0.1],
         [0.1, 0.3, 0.12, 0.3]]
    b = [[1.0, 0.0, 1.0, 0.05],
         [0.0, 1.0, 0.0, 1.0]]
    k = [[0.0, 0.0, 0.0, 0.0],
         [0.8, 1.2, 1.6, 1.5]]
    return gp.activity_table(a, b, labour=[0.6, 0.4, 0.25, 0.3], capital=k,
                             depreciation=[1 / 10, 1 / 20, 1 / 8, 1 / 20],
                             produces=["grain", "tools", "grain", "tools"],
                             techniques=labels, commodities=["grain", "tools"])


def _assert_same(t: gp.ActivityTable, u: gp.ActivityTable) -> None:
    for field in ("inputs", "outputs", "labour", "capital"):
        pd.testing.assert_frame_equal(getattr(t, field), getattr(u, field))
    pd.testing.assert_series_equal(t.depreciation, u.depreciation)
    pd.testing.assert_series_equal(t.produces, u.produces)


def test_the_plan_table_is_the_one_written_by_hand():
    """Capital per unit of capacity, δ = 1 / the technique's own life, by-products as outputs."""
    table = gp.activity_table_from_plan(_plan(TECHNIQUES))
    _assert_same(table, _by_hand())
    assert table.joint_production


def test_von_neumann_agrees_with_the_table_by_hand():
    """The expanding economy over the plan's techniques is that of the same table by hand."""
    mine = gp.von_neumann_choice(gp.activity_table_from_plan(_plan(TECHNIQUES)))
    hand = gp.von_neumann_choice(_by_hand())
    assert mine.growth_rate == pytest.approx(hand.growth_rate, abs=1e-10)
    assert mine.interest_rate == pytest.approx(hand.interest_rate, abs=1e-10)
    assert mine.techniques == hand.techniques
    pd.testing.assert_series_equal(mine.prices, hand.prices, atol=1e-9)
    assert mine.growth_rate > 0


def test_cheapest_techniques_agree_with_the_table_by_hand():
    """Without joint production the cheapest set at each profit rate is the hand table's.

    The mechanised grain technique saves 0.35 units of labour per unit of
    grain for 0.8 more units of tools per unit of capacity, worn at 1/8 a
    year: it is the cheaper at low profit rates and the base one at r = 0.2.
    """
    single = [TECHNIQUES[0]]
    mine = gp.activity_table_from_plan(_plan(single))
    hand = _by_hand()
    keep = ["grain", "tools", "grain:mechanised"]
    hand = gp.activity_table(hand.inputs[keep], labour=hand.labour[keep],
                             capital=hand.capital[keep], depreciation=hand.depreciation[keep],
                             produces=hand.produces[keep])
    _assert_same(mine, hand)
    for r in (0.0, 0.05, 0.2):
        a = gp.cheapest_techniques(mine, wage=1.0, profit_rate=r)
        b = gp.cheapest_techniques(hand, wage=1.0, profit_rate=r)
        assert list(a.techniques) == list(b.techniques)
        pd.testing.assert_series_equal(a.prices, b.prices, atol=1e-12)
    # the choice does turn on r here: the capital-using technique wins only at low rates
    low = gp.cheapest_techniques(mine, wage=1.0, profit_rate=0.0).techniques
    high = gp.cheapest_techniques(mine, wage=1.0, profit_rate=0.2).techniques
    assert list(low) != list(high)


def test_without_techniques_it_is_the_economy_table():
    """No techniques: the plan's table equals activity_table_from_economy(econ, [])."""
    for plan in (_plan([]), gp.demo_plan()):
        _assert_same(gp.activity_table_from_plan(plan),
                     gp.activity_table_from_economy(plan.economy, []))


def test_a_phase_out_keeps_the_base_column_once():
    """A base entry only restricts years in the plan: the table has the base column once."""
    table = gp.activity_table_from_plan(_plan([gp.Technique(sector="grain", label="base",
                                                            last_start=2031)]))
    assert table.techniques == ["grain", "tools"]
    np.testing.assert_allclose(table.depreciation.to_numpy(), [0.1, 0.05])


def test_the_frontier_legend_names_what_differs():
    """The chart's legend names the sets by their choice for grain, the rest alike."""
    pytest.importorskip("matplotlib")
    import matplotlib.pyplot as plt

    frontier = gp.wage_profit_frontier(gp.activity_table_from_plan(_plan([TECHNIQUES[0]])))
    assert len(frontier.switch_points) == 1
    ax = gp.plot_wage_profit(frontier)
    try:
        labels = [t.get_text() for t in ax.get_legend().get_texts()]
        assert labels == ["grain: mechanised; others alike", "grain: base; others alike",
                          "switch point"]
    finally:
        plt.close(ax.figure)
