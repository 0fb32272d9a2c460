"""Capital coefficients from what statistical offices publish.

Few offices publish a capital-flows (capital stock) matrix by product and
using sector. Two routes to capital coefficients ``B`` (product ``i`` held
per unit of capacity of sector ``j``):

* from a capital stock matrix, divided by capacity:
  ``b_ij = K_ij / capacity_j`` (:func:`capital_coefficients_from_stocks`);
* from capital–output ratios by sector ``κ_j`` and the product composition of
  investment (:func:`capital_coefficients_from_ratios`):
  ``b_ij = c_ij κ_j`` with ``c_ij`` the share of product ``i`` in the
  investment of sector ``j`` (one composition for all sectors, or one per
  sector). The assumption is that a sector's capital stock has the product
  composition of its investment, so the column sums of ``B`` (the capital
  valued at base-year prices, per unit of capacity) are the capital–output
  ratios.

:func:`investment_matrix` spreads investment by sector over products by the
same composition, for checking against published investment by product.

Where only investment is published (a capital-flows table of one year, or
investment by sector and its composition), :func:`stocks_from_investment`
estimates the stock by the perpetual inventory in a steady state: with
investment growing at ``g`` a year and geometric retirement at
``δ = 1 / L`` (``L`` the mean service life), ``K_t = I_t + (1 − δ) K_{t−1}``
gives ``K = I (1 + g) / (g + δ)``; with ``g = 0`` the stock is investment
times the service life.
"""

from __future__ import annotations

from typing import Any

import numpy as np
import pandas as pd

from ..errors import invalid
from .tables import _numeric, capital_coefficients_from_stocks

__all__ = ["capital_coefficients_from_ratios", "capital_coefficients_from_stocks",
           "investment_matrix", "stocks_from_investment"]


def _ratios(value: Any, what: str, names: list[str] | None = None) -> pd.Series:
    if isinstance(value, dict):
        value = pd.Series(value, dtype=object)
    if not isinstance(value, pd.Series):
        arr = np.asarray(value, dtype=object).ravel()
        if names is None:
            raise invalid(what, "be a Series or dict by sector", type(value).__name__)
        if arr.size != len(names):
            raise invalid(what, f"have one entry per sector ({len(names)})", f"{arr.size}")
        value = pd.Series(list(arr), index=names)
    value = value.copy()
    value.index = [str(i) for i in value.index]
    series = _numeric(value.to_frame("v"), what)["v"]
    if names is not None:
        missing = [n for n in names if n not in series.index]
        unknown = [n for n in series.index if n not in names]
        if missing or unknown:
            raise invalid(what, f"name the sectors of the composition (missing {missing}; "
                          f"unknown {unknown})", list(series.index))
        series = series.loc[names]
    bad = series[~(np.isfinite(series) & (series >= 0))]
    if len(bad):
        raise invalid(f"{what}[{bad.index[0]}]", "be a finite number >= 0", bad.iloc[0])
    return series.rename(None)


def _composition(composition: Any, sectors: list[str], products: list[str] | None
                 ) -> pd.DataFrame:
    """Shares, products × sectors, each column summing to 1."""
    if isinstance(composition, pd.DataFrame) and composition.shape[1] > 1:
        comp = composition.copy()
        comp.index = [str(i) for i in comp.index]
        comp.columns = [str(c) for c in comp.columns]
        comp = _numeric(comp, "composition").fillna(0.0)
        missing = [n for n in sectors if n not in comp.columns]
        unknown = [n for n in comp.columns if n not in sectors]
        if missing or unknown:
            raise invalid("composition", f"have one column per sector (missing {missing}; "
                          f"unknown {unknown})", list(comp.columns))
        comp = comp[sectors]
    else:
        vec = composition.iloc[:, 0] if isinstance(composition, pd.DataFrame) else composition
        if not isinstance(vec, pd.Series | dict):
            if products is None:
                raise invalid("composition", "be a Series by product or a DataFrame of "
                              "products × sectors (or give the products)",
                              type(composition).__name__)
            vec = _ratios(vec, "composition", products)
        vec = _ratios(vec, "composition")
        comp = pd.DataFrame({s: vec for s in sectors})
    if products is not None:
        missing = [p for p in products if p not in comp.index]
        unknown = [p for p in comp.index if p not in products]
        if missing or unknown:
            raise invalid("composition", f"have one row per product of the table (missing "
                          f"{missing}; unknown {unknown})", list(comp.index))
        comp = comp.loc[products]
    arr = comp.to_numpy()
    if not np.all(np.isfinite(arr)) or (arr < 0).any():
        i, j = np.argwhere(~(np.isfinite(arr) & (arr >= 0)))[0]
        raise invalid(f"composition[{comp.index[i]}, {comp.columns[j]}]", "be >= 0",
                      float(arr[i, j]))
    totals = comp.sum(axis=0)
    empty = [s for s in sectors if not totals[s] > 0]
    if empty:
        raise invalid(f"composition[{empty[0]}]", "hold some investment for every sector "
                      "(its shares divide by their sum)", 0.0)
    return comp.div(totals, axis=1)


def capital_coefficients_from_ratios(capital_output_ratio: Any, composition: Any, *,
                                     products: list[str] | None = None) -> pd.DataFrame:
    """Capital coefficients from capital–output ratios and the composition of investment.

    ``b_ij = c_ij κ_j``, where ``c_ij`` is the share of product ``i`` in the
    investment of sector ``j`` (the composition is normalised to shares) and
    ``κ_j`` the capital–output ratio of sector ``j`` (capital stock at
    base-year prices per unit of capacity). The capital of each sector is
    assumed to have the product composition of its investment; the column
    sums of ``B`` are then the capital–output ratios.

    Parameters
    ----------
    capital_output_ratio : Series or dict by sector
        ``κ_j >= 0``; its index gives the sectors and their order.
    composition : Series by product, or DataFrame products × sectors
        Investment by product, in values or shares: one vector for every
        sector, or a column per sector.
    products : list of str, optional
        The products (rows of ``B``) in order; default the composition's.
        For a symmetric product × product table these are the sectors again.

    Returns
    -------
    DataFrame, products × sectors

    Raises
    ------
    InvalidInput
        A negative or missing ratio or share, a sector with no investment,
        labels that do not match.
    """
    kappa = _ratios(capital_output_ratio, "capital_output_ratio")
    sectors = list(kappa.index)
    shares = _composition(composition, sectors, products)
    return shares.mul(kappa, axis=1)


def investment_matrix(investment: Any, composition: Any, *,
                      products: list[str] | None = None) -> pd.DataFrame:
    """Investment by sector spread over products: ``I_ij = c_ij · investment_j``.

    Parameters
    ----------
    investment : Series or dict by sector
        Gross fixed investment of each sector (>= 0).
    composition : Series by product, or DataFrame products × sectors
        As :func:`capital_coefficients_from_ratios`.
    products : list of str, optional

    Returns
    -------
    DataFrame, products × sectors
    """
    inv = _ratios(investment, "investment")
    return _composition(composition, list(inv.index), products).mul(inv, axis=1)


def stocks_from_investment(investment: Any, service_life: Any, *,
                           past_growth: float = 0.0) -> pd.DataFrame:
    """Capital stocks from one year's investment, by the steady-state perpetual inventory.

    ``K_ij = I_ij (1 + g) / (g + 1 / L_j)``: investment grew at ``g`` a year
    in the past and capital retires geometrically over a mean service life
    ``L_j`` (see the module notes).

    Parameters
    ----------
    investment : DataFrame, products × sectors
        Investment of the base year (a capital-flows table), >= 0.
    service_life : float, or Series or dict by sector
        Mean service life in years, >= 1.
    past_growth : float, default 0
        Yearly growth of investment before the base year, above -1/L.

    Returns
    -------
    DataFrame, products × sectors
    """
    inv = _numeric(pd.DataFrame(investment).copy(), "investment").fillna(0.0)
    inv.index = [str(i) for i in inv.index]
    inv.columns = [str(c) for c in inv.columns]
    sectors = list(inv.columns)
    arr = inv.to_numpy()
    if (arr < 0).any() or not np.all(np.isfinite(arr)):
        i, j = np.argwhere(~(np.isfinite(arr) & (arr >= 0)))[0]
        raise invalid(f"investment[{inv.index[i]}, {inv.columns[j]}]", "be >= 0",
                      float(arr[i, j]))
    if isinstance(service_life, int | float) and not isinstance(service_life, bool):
        life = pd.Series(float(service_life), index=sectors)
    else:
        life = _ratios(service_life, "service_life", sectors)
    short = life[~(life >= 1)]
    if len(short):
        raise invalid(f"service_life[{short.index[0]}]", "be a number of years >= 1",
                      float(short.iloc[0]))
    g = past_growth
    if isinstance(g, bool) or not isinstance(g, int | float) or not np.isfinite(g):
        raise invalid("past_growth", "be a yearly growth rate", g)
    delta = 1.0 / life
    if (g + delta <= 0).any() or g <= -1:
        raise invalid("past_growth", "be above minus the retirement rate 1 / service_life "
                      "(else no steady stock exists)", g)
    return inv.mul((1.0 + g) / (g + delta), axis=1)
