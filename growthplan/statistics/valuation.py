"""Valuation layers and the special cells of published supply and use tables.

Offices publish supply at basic prices and use at purchasers' prices: a
product's uses then exceed its supply by the trade and transport margins and
the taxes less subsidies on products paid on it, while the margin products
(trade, transport) show supply that no one seems to use. A plan needs one
valuation, basic prices, in which every product balances:
``supply (output + imports) = intermediate uses + final uses``.

Two routes
----------
``exact`` (margin and tax tables given)
    ``U_b = U_p − Σ_m M_m − T``: each margin table ``M_m`` (products × uses)
    is taken off the uses it was paid on and its column totals become
    deliveries of the margin product ``m``; the taxes less subsidies ``T``
    become a row of their own by use.
``proportional`` (no margin tables; the default when none are given)
    The approximation the library names *proportional margins*. For each
    product ``p`` with uses ``u_p`` above its supply ``s_p`` the excess
    ``e_p = u_p − s_p`` is taken off its uses in proportion,
    ``u_pj ← u_pj (1 − e_p / u_p)``; what each use ``j`` lost,
    ``r_j = Σ_p u_pj e_p / u_p``, is delivered instead by the margin products
    (those whose supply exceeds their uses, unused supply ``d_m = s_m − u_m``)
    in proportion to their unused supply, ``r_j · d_m / Σ e``, and the rest,
    ``r_j (Σ e − Σ d) / Σ e``, is the row of taxes less subsidies on products.
    Every product then balances, every use keeps its total at purchasers'
    prices, so value added at basic prices (output less intermediate use at
    purchasers' prices) is unchanged, and the taxes row sums to the tables'
    net taxes on products ``Σ uses − Σ supply``. The largest adjustment of
    each product is reported (:attr:`Valuation.adjustments`).

Special cells, each by a named rule
-----------------------------------
``byproduct`` (negative intermediate use, the default)
    A negative use ``u_pj < 0`` (an industry's sales of scrap or used goods)
    is a by-product of the using industry: the cell becomes zero and industry
    ``j`` supplies ``−u_pj`` of product ``p``. Product ``p`` still balances
    (supply and uses both rise by ``−u_pj``), industry ``j``'s output and
    inputs rise alike, so its value added is unchanged.
``net`` (the alternative)
    The cell becomes zero and ``−u_pj`` is taken off the product's other
    positive uses (intermediate and final) in proportion: the product still
    balances, the industry's inputs rise by ``−u_pj`` and its value added
    falls by as much.
``as_use`` (negative supply)
    A negative cell of the supply table ``v_pj < 0`` (a correction printed
    against an industry's output) becomes zero and a use of ``−v_pj`` of
    product ``p`` by industry ``j``: the product balances and the industry's
    value added is unchanged.
Negative final uses (changes in inventories) are accepted as they are.

Suppressed cells (``---``, ``n.p.``, ``..``, ``x``) are missing, not zero:
:func:`fill_suppressed` fills them so that their row meets its published
total, spread in proportion to the totals of their columns, and counts them.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal

import numpy as np
import pandas as pd

from ..errors import invalid

__all__ = ["SUPPRESSED", "Valuation", "to_basic_prices", "negative_uses", "NegativeUses",
           "negative_supply",
           "Filled", "fill_suppressed", "VALUATION_METHODS", "NEGATIVE_RULES"]

SUPPRESSED: tuple[str, ...] = ("---", "n.p.", "..", "x", "(D)", "…")
"""Cell texts offices print for a suppressed or unavailable figure (compared exactly)."""

VALUATION_METHODS: tuple[str, ...] = ("exact", "proportional")
NEGATIVE_RULES: tuple[str, ...] = ("byproduct", "net")
TAXES_ROW = "taxes less subsidies on products"


@dataclass(frozen=True)
class Valuation:
    """Use at basic prices, from use at purchasers' prices.

    Attributes
    ----------
    method : str
        ``"exact"`` or ``"proportional"``.
    use : DataFrame
        Intermediate use at basic prices, products × industries.
    final_demand : DataFrame
        Final uses at basic prices, products × categories.
    taxes : Series
        Taxes less subsidies on products, by use (industries, then categories).
    adjustments : DataFrame
        By product: ``uses`` and ``supply`` before, ``adjustment`` (taken off
        its uses, negative where margins were added) and ``largest_cell`` (the
        largest change of one of its cells).
    margin_products : list of str
        The products that received margins.
    """

    method: str
    use: pd.DataFrame
    final_demand: pd.DataFrame
    taxes: pd.Series
    adjustments: pd.DataFrame
    margin_products: list[str] = field(default_factory=list)

    def assumption(self) -> str:
        """The rule applied, in a sentence."""
        if self.method == "exact":
            return ("Valuation: the use table at purchasers' prices was turned into basic "
                    "prices exactly, with the published margin and tax tables; margins "
                    f"became deliveries of {', '.join(self.margin_products)} and the taxes "
                    "less subsidies on products a row of their own.")
        worst = self.adjustments["adjustment"].abs().idxmax()
        return ("Valuation: the use table is at purchasers' prices and no margin tables were "
                "given, so it was turned into basic prices by proportional margins: each "
                "product's uses above its supply were reduced in proportion, and what each "
                "user lost was delivered instead by the margin products "
                f"({', '.join(self.margin_products)}) in proportion to their unused supply, "
                "the rest being taxes less subsidies on products "
                f"({self.taxes.sum():,.0f} in all). Every product balances and value added "
                f"is unchanged; the largest adjustment is {worst} "
                f"({self.adjustments.at[worst, 'adjustment']:,.0f}).")


def _uses(use: pd.DataFrame, final: pd.DataFrame) -> pd.DataFrame:
    return pd.concat([use, final], axis=1)


def to_basic_prices(use: pd.DataFrame, final_demand: pd.DataFrame, supply: pd.Series, *,
                    margins: dict[str, pd.DataFrame] | None = None,
                    taxes: pd.DataFrame | None = None,
                    margin_products: list[str] | None = None,
                    tolerance: float = 0.005) -> Valuation:
    """Turn use at purchasers' prices into basic prices (see the module notes).

    Parameters
    ----------
    use : DataFrame, products × industries
        Intermediate use at purchasers' prices.
    final_demand : DataFrame, products × categories
        Final uses at purchasers' prices.
    supply : Series by product
        Total supply at basic prices (domestic output plus imports).
    margins : dict of str to DataFrame, optional
        For the exact route: each margin product's margin table, products ×
        uses (the use table's industries and categories). Default: the
        proportional route.
    taxes : DataFrame, optional
        For the exact route: taxes less subsidies on products, products × uses.
    margin_products : list of str, optional
        For the proportional route: the products that deliver margins
        (default every product whose supply exceeds its uses).
    tolerance : float, default 0.005
        Exact route: largest imbalance left, as a share of a product's supply.

    Returns
    -------
    Valuation

    Raises
    ------
    InvalidInput
        A product with uses above supply that has no positive uses to reduce,
        no margin product, tables that do not match, or an exact conversion
        that leaves a product unbalanced.
    """
    products = list(use.index)
    whole = _uses(use, final_demand).astype(float)
    cols = list(whole.columns)
    s = supply.reindex(products).astype(float)
    if s.isna().any():
        raise invalid("supply", "give the supply of every product of the use table",
                      [p for p in products if pd.isna(s[p])][:5])
    before = whole.sum(axis=1)
    if margins is not None or taxes is not None:
        margins = margins or {}
        unknown = [m for m in margins if m not in products]
        if unknown:
            raise invalid("margins", "be keyed by products of the use table", unknown[:5])
        out = whole.copy()
        for m, table in margins.items():
            t = table.reindex(index=products, columns=cols).fillna(0.0).astype(float)
            out -= t
            out.loc[m] += t.sum(axis=0)
        tax = (pd.DataFrame(0.0, index=products, columns=cols) if taxes is None
               else taxes.reindex(index=products, columns=cols).fillna(0.0).astype(float))
        out -= tax
        gap = out.sum(axis=1) - s
        off = gap[gap.abs() > tolerance * s.abs().clip(lower=1.0)]
        if len(off):
            p = off.index[0]
            raise invalid(f"margins[{p}]", "turn the use table into basic prices that balance "
                          f"the product's supply within {100 * tolerance:g} % "
                          f"({len(off)} product(s) break this)",
                          f"uses {out.loc[p].sum():.6g} against supply {s[p]:.6g}")
        taxes_row = tax.sum(axis=0)
        method, mprods = "exact", list(margins)
    else:
        gap = before - s
        mprods = list(margin_products) if margin_products is not None else \
            [p for p in products if gap[p] < 0]
        unknown = [m for m in mprods if m not in products]
        if unknown:
            raise invalid("margin_products", "name products of the use table", unknown[:5])
        if not mprods:
            raise invalid("margin_products", "hold a product whose supply exceeds its uses "
                          "(trade, transport)", mprods)
        over = [p for p in products if p not in mprods and gap[p] > 0]
        e = gap[over]
        tot = before[over]
        bad = [p for p in over if not tot[p] > e[p]]
        if bad:
            p = bad[0]
            raise invalid(f"use[{p}]", "have uses whose total exceeds the part above supply "
                          "(proportional margins reduce them)",
                          f"uses {tot[p]:.6g} against supply {s[p]:.6g}")
        out = whole.copy()
        cut = whole.loc[over].mul(e / tot, axis=0)
        out.loc[over] -= cut
        r = cut.sum(axis=0)  # what each use lost
        spare = (-gap[mprods]).clip(lower=0.0)
        e_sum, d_sum = float(e.sum()), float(spare.sum())
        if not d_sum > 0 or not e_sum > 0:
            raise invalid("margin_products", "have supply above their uses to deliver "
                          "margins from", mprods)
        # a margin product's own excess (uses above supply) is cut like any product's
        share = spare / e_sum
        out.loc[mprods] += np.outer(share.to_numpy(), r.to_numpy())
        taxes_row = r * (e_sum - d_sum) / e_sum
        method = "proportional"
    change = whole - out
    adj = pd.DataFrame({"uses": before, "supply": s, "adjustment": change.sum(axis=1),
                        "largest_cell": change.abs().max(axis=1)})
    ind = list(use.columns)
    return Valuation(method=method, use=out[ind], final_demand=out[list(final_demand.columns)],
                     taxes=taxes_row.rename(TAXES_ROW), adjustments=adj,
                     margin_products=mprods)


@dataclass(frozen=True)
class NegativeUses:
    """Negative intermediate uses after their rule.

    Attributes
    ----------
    rule : str
    use : DataFrame
        Intermediate use with the negative cells removed.
    final_demand : DataFrame
    byproducts : DataFrame
        Industries × products: supply added to industries (``byproduct``).
    cells : DataFrame
        ``product``, ``industry``, ``value`` of every negative cell found.
    """

    rule: str
    use: pd.DataFrame
    final_demand: pd.DataFrame
    byproducts: pd.DataFrame
    cells: pd.DataFrame

    def assumption(self) -> str:
        """The rule applied, in a sentence."""
        if not len(self.cells):
            return "Negative intermediate uses: none."
        n, total = len(self.cells), float(self.cells["value"].sum())
        products = sorted(set(self.cells["product"]))
        if self.rule == "byproduct":
            return (f"Negative intermediate uses: {n} cell(s) of {', '.join(products)} "
                    f"({total:,.0f} in all) were read as a by-product of the using industry: "
                    "the cell became zero and the industry supplies that amount of the "
                    "product, so the product balances and the industry's value added is "
                    "unchanged.")
        return (f"Negative intermediate uses: {n} cell(s) of {', '.join(products)} "
                f"({total:,.0f} in all) were netted: each cell became zero and its amount "
                "was taken off the product's other uses in proportion, so the product "
                "balances and the using industry's value added falls by that amount.")


def negative_uses(use: pd.DataFrame, final_demand: pd.DataFrame,
                  rule: Literal["byproduct", "net"] = "byproduct") -> NegativeUses:
    """Remove negative intermediate uses by a named rule (see the module notes).

    Parameters
    ----------
    use : DataFrame, products × industries
    final_demand : DataFrame, products × categories
        Negative final uses are kept.
    rule : {"byproduct", "net"}

    Returns
    -------
    NegativeUses
    """
    if rule not in NEGATIVE_RULES:
        raise invalid("negative_uses", f"be one of {list(NEGATIVE_RULES)}", rule)
    u = use.astype(float).copy()
    f = final_demand.astype(float).copy()
    neg = u.to_numpy() < 0
    cells = pd.DataFrame([{"product": u.index[i], "industry": u.columns[j],
                           "value": float(u.iat[i, j])} for i, j in np.argwhere(neg)],
                         columns=["product", "industry", "value"])
    by = pd.DataFrame(0.0, index=u.columns, columns=u.index)
    if rule == "byproduct":
        by = (-u.where(u < 0, 0.0)).T
        u = u.clip(lower=0.0)
    else:
        for p in sorted(set(cells["product"])):
            amount = -float(u.loc[p][u.loc[p] < 0].sum())
            u.loc[p] = u.loc[p].clip(lower=0.0)
            pos_u = u.loc[p].clip(lower=0.0)
            pos_f = f.loc[p].clip(lower=0.0)
            base = float(pos_u.sum() + pos_f.sum())
            if not base > amount:
                raise invalid(f"use[{p}]", "have positive uses larger than its negative "
                              "uses to net them against", f"{base:.6g} against {amount:.6g}")
            k = amount / base
            u.loc[p] -= pos_u * k
            f.loc[p] -= pos_f * k
    return NegativeUses(rule=rule, use=u, final_demand=f, byproducts=by, cells=cells)


def negative_supply(supply: pd.DataFrame, use: pd.DataFrame
                    ) -> tuple[pd.DataFrame, pd.DataFrame, str]:
    """Turn negative supply cells into uses by the rule ``as_use`` (see the module notes).

    Parameters
    ----------
    supply : DataFrame, products × industries
    use : DataFrame, products × industries

    Returns
    -------
    supply, use : DataFrame
    assumption : str
        The rule applied, in a sentence.
    """
    neg = (-supply.where(supply < 0, 0.0)).reindex(index=use.index, columns=use.columns)
    n = int((supply.to_numpy() < 0).sum())
    if not n:
        return supply, use, "Negative supply: none."
    total = float(neg.to_numpy().sum())
    return (supply.clip(lower=0.0), use + neg.fillna(0.0),
            f"Negative supply: {n} cell(s) of the supply table ({total:,.0f} in all) were "
            "read as uses of the product by the industry: the cell became zero and the "
            "industry uses that amount, so the product balances and the industry's value "
            "added is unchanged.")


@dataclass(frozen=True)
class Filled:
    """A table with its suppressed cells filled against the published row totals.

    Attributes
    ----------
    frame : DataFrame
        The table, no missing cell left.
    suppressed : int
        Missing cells read.
    filled : int
        Of them, the cells filled with a non-zero amount.
    amount : float
        The total filled in.
    """

    frame: pd.DataFrame
    suppressed: int
    filled: int
    amount: float

    def assumption(self, what: str) -> str:
        """The rule applied, in a sentence."""
        if not self.suppressed:
            return f"Suppressed cells of the {what}: none."
        if not self.filled:
            return (f"Suppressed cells of the {what}: {self.suppressed} cell(s) printed as "
                    "suppressed were read as missing; every row already met its published "
                    "total within rounding, so they are zero.")
        return (f"Suppressed cells of the {what}: {self.suppressed} cell(s) printed as "
                "suppressed were read as missing and filled so that each row meets its "
                "published total, spread in proportion to the totals of their columns; "
                f"{self.filled} of them received a non-zero amount ({self.amount:,.0f} in all), "
                "the others are zero (their row already met its total within rounding).")


def fill_suppressed(frame: pd.DataFrame, totals: pd.Series | None, *,
                    rounding: float = 0.5) -> Filled:
    """Fill missing (NaN) cells so that each row meets its published total.

    A row's gap (published total less the sum of its published cells) is
    spread over its missing cells in proportion to the totals of their
    columns (equal shares where those are zero); a gap within the rounding of
    the row (``rounding`` per cell of the row and its total, the tables being
    rounded to whole units) leaves the missing cells zero. Without a total the missing
    cells are zero.

    Parameters
    ----------
    frame : DataFrame
        With NaN for suppressed cells.
    totals : Series by row, optional
        The published row totals.
    rounding : float, default 0.5
        Rounding of a published cell.

    Returns
    -------
    Filled
    """
    data = frame.to_numpy(dtype=float).copy()
    missing = np.isnan(data)
    count = int(missing.sum())
    if totals is None or not missing.any():
        return Filled(frame.fillna(0.0), count, 0, 0.0)
    t = totals.reindex(frame.index).to_numpy(dtype=float)
    published = np.where(missing, 0.0, data)
    col_w = np.abs(published).sum(axis=0)
    filled, amount = 0, 0.0
    for i in np.flatnonzero(missing.any(axis=1)):
        data[i, missing[i]] = 0.0
        if not np.isfinite(t[i]):
            continue
        gap = t[i] - published[i].sum()
        if abs(gap) <= rounding * (missing.shape[1] + 1):  # the row's cells and its total
            continue
        w = col_w[missing[i]]
        w = w / w.sum() if w.sum() > 0 else np.full(w.size, 1.0 / w.size)
        data[i, missing[i]] = gap * w
        filled += int(missing[i].sum())
        amount += float(gap)
    return Filled(pd.DataFrame(data, index=frame.index, columns=frame.columns), count,
                  filled, amount)
