"""Valuation layers and the named rules for special cells, each on a small table.

The small tables are invented; every expected figure is worked by hand from
the rule's formula (closed form), beside the identity the rule must keep:
each product balances (supply = uses) and value added at basic prices is
output less intermediate use at purchasers' prices (UN, *Handbook on Supply,
Use and Input-Output Tables with Extensions and Applications*, 2018, ch. 3;
from memory).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from growthplan.errors import InvalidInput
from growthplan.statistics.valuation import (
    fill_suppressed,
    negative_supply,
    negative_uses,
    to_basic_prices,
)

P = ["goods", "trade", "services"]
IND = ["farm", "works"]


def _purchasers() -> tuple[pd.DataFrame, pd.DataFrame, pd.Series]:
    use = pd.DataFrame([[40, 20], [0, 2], [10, 20]], index=P, columns=IND, dtype=float)
    final = pd.DataFrame({"households": [70, 3, 20]}, index=P, dtype=float)
    supply = pd.Series([100, 30, 50], index=P, dtype=float)  # basic prices, with imports
    return use, final, supply


def test_proportional_margins_balance_every_product_and_keep_every_use():
    use, final, supply = _purchasers()
    v = to_basic_prices(use, final, supply)
    assert v.method == "proportional" and v.margin_products == ["trade"]
    # goods: uses 130, supply 100: every cell × 100/130 (hand-worked)
    assert v.use.loc["goods", "farm"] == pytest.approx(40 * 100 / 130)
    assert v.final_demand.loc["goods", "households"] == pytest.approx(70 * 100 / 130)
    # what each use lost (30 × its share of goods) goes 25/30 to trade, 5/30 to taxes
    lost = np.array([40, 20, 70]) * 30 / 130
    assert v.use.loc["trade"].to_numpy() == pytest.approx([0 + lost[0] * 25 / 30,
                                                           2 + lost[1] * 25 / 30])
    assert v.taxes.to_numpy() == pytest.approx(lost * 5 / 30)
    assert v.taxes.sum() == pytest.approx(5.0)  # Σ uses − Σ supply: net taxes on products
    # the balance afterwards: every product, and every use's purchasers' total
    both = pd.concat([v.use, v.final_demand], axis=1)
    assert both.sum(axis=1).to_numpy() == pytest.approx(supply.to_numpy())
    assert (both.sum(axis=0) + v.taxes).to_numpy() == pytest.approx(
        pd.concat([use, final], axis=1).sum(axis=0).to_numpy())
    assert v.adjustments.loc["goods", "adjustment"] == pytest.approx(30.0)
    assert v.adjustments.loc["trade", "adjustment"] == pytest.approx(-25.0)
    assert "proportional margins" in v.assumption() and "goods" in v.assumption()


def test_exact_valuation_takes_the_margin_and_tax_tables_off():
    use, final, supply = _purchasers()
    cols = IND + ["households"]
    trade = pd.DataFrame([[6, 3, 16]], index=["goods"], columns=cols, dtype=float)
    taxes = pd.DataFrame([[2, 1, 2]], index=["goods"], columns=cols, dtype=float)
    v = to_basic_prices(use, final, supply, margins={"trade": trade}, taxes=taxes)
    assert v.method == "exact"
    assert v.use.loc["goods"].to_numpy() == pytest.approx([32, 16])  # 40−6−2, 20−3−1
    assert v.use.loc["trade"].to_numpy() == pytest.approx([6, 5])    # margins delivered
    assert v.final_demand.loc["goods", "households"] == pytest.approx(52)
    assert v.taxes.to_numpy() == pytest.approx([2, 1, 2])
    both = pd.concat([v.use, v.final_demand], axis=1)
    assert both.sum(axis=1).to_numpy() == pytest.approx(supply.to_numpy())
    # a margin table that does not add up is refused, naming the product
    with pytest.raises(InvalidInput, match=r"margins\[goods\]"):
        to_basic_prices(use, final, supply, margins={"trade": trade * 0.5}, taxes=taxes)


def _scrap() -> tuple[pd.DataFrame, pd.DataFrame, pd.DataFrame]:
    # the farm sells 2 of scrap (a negative use); the works use 10, households 4
    use = pd.DataFrame([[10, 5], [-2, 10]], index=["goods", "scrap"], columns=IND,
                       dtype=float)
    final = pd.DataFrame({"households": [85, 4], "inventories": [-5, 0]},
                         index=["goods", "scrap"], dtype=float)
    supply = pd.DataFrame([[100, 0], [0, 12]], index=["goods", "scrap"], columns=IND,
                          dtype=float)
    return use, final, supply


def test_negative_use_as_a_byproduct_of_the_using_industry():
    use, final, supply = _scrap()
    r = negative_uses(use, final, "byproduct")
    assert r.use.loc["scrap", "farm"] == 0.0
    assert r.byproducts.loc["farm", "scrap"] == 2.0
    assert list(r.cells["value"]) == [-2.0]
    new_supply = supply + r.byproducts.T
    # the product balances afterwards: supply 14 = uses 0 + 10 + 4
    assert new_supply.loc["scrap"].sum() == pytest.approx(
        r.use.loc["scrap"].sum() + r.final_demand.loc["scrap"].sum())
    # the farm's value added is unchanged: output and inputs both rise by 2
    va_before = supply["farm"].sum() - use["farm"].sum()
    assert new_supply["farm"].sum() - r.use["farm"].sum() == pytest.approx(va_before)
    # a negative final use (inventories) is kept
    assert r.final_demand.loc["goods", "inventories"] == -5.0
    assert "by-product" in r.assumption()


def test_negative_use_netted_against_the_other_uses():
    use, final, supply = _scrap()
    r = negative_uses(use, final, "net")
    assert r.use.loc["scrap", "farm"] == 0.0
    assert r.use.loc["scrap", "works"] == pytest.approx(10 - 2 * 10 / 14)
    assert r.final_demand.loc["scrap", "households"] == pytest.approx(4 - 2 * 4 / 14)
    # the product balances against the same supply; the farm's value added falls by 2
    assert r.use.loc["scrap"].sum() + r.final_demand.loc["scrap"].sum() == pytest.approx(12)
    va_before = supply["farm"].sum() - use["farm"].sum()
    assert supply["farm"].sum() - r.use["farm"].sum() == pytest.approx(va_before - 2)
    assert "netted" in r.assumption()
    with pytest.raises(InvalidInput, match="negative_uses must be one of"):
        negative_uses(use, final, "clip")  # type: ignore[arg-type]


def test_negative_supply_read_as_a_use():
    supply = pd.DataFrame([[100, -3], [0, 50]], index=["goods", "services"], columns=IND,
                          dtype=float)
    use = pd.DataFrame([[10, 20], [5, 5]], index=["goods", "services"], columns=IND,
                       dtype=float)
    s2, u2, said = negative_supply(supply, use)
    assert s2.loc["goods", "works"] == 0.0 and u2.loc["goods", "works"] == 23.0
    # goods: supply and uses both rise by 3; the works' value added is unchanged
    assert s2.loc["goods"].sum() - u2.loc["goods"].sum() == pytest.approx(
        supply.loc["goods"].sum() - use.loc["goods"].sum())
    assert s2["works"].sum() - u2["works"].sum() == pytest.approx(
        supply["works"].sum() - use["works"].sum())
    assert "1 cell(s)" in said


def test_suppressed_cells_filled_against_the_published_total():
    frame = pd.DataFrame([[10, np.nan, 5], [10, np.nan, 5], [np.nan, 6, np.nan]],
                         index=["a", "b", "c"], columns=["x", "y", "z"])
    totals = pd.Series([20, 15, 18], index=["a", "b", "c"])
    f = fill_suppressed(frame, totals)
    assert f.suppressed == 4
    assert f.frame.loc["a", "y"] == pytest.approx(5.0)      # the row's gap
    assert f.frame.loc["b", "y"] == 0.0                     # the row met its total
    # two missing cells share 12 in proportion to their columns' published totals (20, 10)
    assert f.frame.loc["c", ["x", "z"]].to_numpy() == pytest.approx([8.0, 4.0])
    assert f.filled == 3 and f.amount == pytest.approx(17.0)
    assert (f.frame.sum(axis=1) == totals).all()
    assert "4 cell(s)" in f.assumption("use table")
    # without a published total the missing cells are zero
    assert fill_suppressed(frame, None).frame.loc["a", "y"] == 0.0
