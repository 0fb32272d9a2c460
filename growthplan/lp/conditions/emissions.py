"""Emissions and resource use within their limits: caps, budgets, ceilings per unit of GDP. Elastic.

With ``I_wtk`` the amount of stressor or impact ``w`` per unit of output of
technique ``k`` in year ``t`` and ``h_w`` per unit of the consumption level,
emissions are ``e_wt = Σ_k I_wtk x_kt + h_w κ_t`` and the rows are

* a cap: ``e_wt ≤ E_t`` for each covered year;
* a budget: ``Σ_{t∈W} e_wt ≤ E_W``, one row for the window;
* a ceiling per unit of GDP: ``e_wt − ι_t p·(Q − A_t) x_t ≤ 0`` (GDP at
  base-year prices ``p``).

A row's dual is the value of one more unit of emissions allowed (per
tonne): the shadow price of the limit. The diagnosis relaxes these rows like
every other limit and words the least excess in the stressor's unit.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from . import Check, Condition, Context, RowBlock, Schedules

if TYPE_CHECKING:
    from ..data import LimitData, PlanData
    from ..program import Block

WHAT = {"cap": "cap", "budget": "budget", "intensity": "ceiling per unit of GDP"}


def gdp_coefficients(d: PlanData) -> np.ndarray:
    """Value added at base-year prices per unit of output, ``p·(q_k − a_kt)``.

    Returns years × techniques.
    """
    q = d.q
    return np.array([d.prices @ (q - d.a_at(t)) for t in range(d.T)])


def span(years: list[int]) -> int | str:
    """A year, or a window of years as ``"2031–2035"``."""
    return years[0] if len(years) == 1 else f"{years[0]}–{years[-1]}"


def _parts(d: PlanData, lim: LimitData, gdp: np.ndarray | None) -> tuple[
        np.ndarray, np.ndarray, np.ndarray, int, np.ndarray]:
    """Nonzeros of one limit's rows on the output columns and the consumption coefficient.

    Returns (rows, columns, values, number of rows, upper bounds).
    """
    sat = d.satellite
    assert sat is not None
    m, t = d.m, lim.t
    vals = sat.intensity[lim.w][t]                           # covered years × techniques
    if lim.kind == "intensity":
        assert gdp is not None
        vals = vals - lim.bound[t][:, None] * gdp[t]
        upper = np.zeros(t.size)
    else:
        upper = lim.bound
    nrow = 1 if lim.kind == "budget" else t.size
    rows = np.zeros(vals.shape, dtype=int) if lim.kind == "budget" else \
        np.repeat(np.arange(t.size), m).reshape(vals.shape)
    cols = t[:, None] * m + np.arange(m)[None, :]
    keep = vals != 0
    return rows[keep], cols[keep], vals[keep], nrow, upper


def _cat(parts: list[np.ndarray], dtype: type) -> np.ndarray:
    return np.concatenate(parts) if parts else np.zeros(0, dtype)


class Emissions(Condition):
    def __init__(self) -> None:
        super().__init__(name="emissions", elastic=True, words="emissions")

    def applies(self, d: PlanData) -> bool:
        return d.satellite is not None and bool(d.satellite.limits)

    def _gdp(self, d: PlanData) -> np.ndarray | None:
        assert d.satellite is not None
        if any(lim.kind == "intensity" for lim in d.satellite.limits):
            return gdp_coefficients(d)
        return None

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        sat = d.satellite
        assert sat is not None
        gdp = self._gdp(d)
        rows = nnz = 0
        for lim in sat.limits:
            _, _, vals, nrow, _ = _parts(d, lim, gdp)
            rows += nrow
            nnz += vals.size
            if d.has_consumption and sat.households[lim.w] != 0:
                nnz += lim.t.size
        return rows, nnz

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        sat = d.satellite
        assert sat is not None
        gdp = self._gdp(d)
        out_r, out_c, out_v, con_r, con_c, con_v, upper, labels = [], [], [], [], [], [], [], []
        start = 0
        for lim in sat.limits:
            r, c, v, nrow, up = _parts(d, lim, gdp)
            out_r.append(r + start)
            out_c.append(c)
            out_v.append(v)
            h = sat.households[lim.w]
            if d.has_consumption and h != 0:
                con_r.append(start + (np.zeros(lim.t.size, int) if nrow == 1
                                      else np.arange(nrow)))
                con_c.append(lim.t)
                con_v.append(np.full(lim.t.size, h))
            upper.append(up)
            years = [d.years[t] for t in lim.t]
            if lim.kind == "budget":
                labels.append((span(years), lim.what, lim.kind, lim.index))
            else:
                labels.extend((y, lim.what, lim.kind, lim.index) for y in years)
            start += nrow
        coeffs: dict[str, sparse.sparray] = {"output": sparse.csr_array(
            (np.concatenate(out_v), (np.concatenate(out_r), np.concatenate(out_c))),
            shape=(start, d.T * d.m))}
        if "consumption" in ctx.cols:
            coeffs["consumption"] = sparse.csr_array(
                (_cat(con_v, float), (_cat(con_r, int), _cat(con_c, int))), shape=(start, d.T))
        return RowBlock("emissions", (start,), (tuple(labels),), coeffs, -np.inf,
                        np.concatenate(upper))

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        sat = d.satellite
        assert sat is not None
        emitted = sat.emitted(s.output, s.consumption)        # names × years
        scale_all = sat.emitted(np.abs(s.output), None if s.consumption is None
                                else np.abs(s.consumption))
        gdp = None
        if any(lim.kind == "intensity" for lim in sat.limits):
            gdp = d.prices @ (d.supplied(s.output) - d.intermediate(s.output)).T  # by year
        viol, scale, labels, groups = [], [], [], []
        for lim in sat.limits:
            e, sc = emitted[lim.w, lim.t], scale_all[lim.w, lim.t]
            years = [d.years[t] for t in lim.t]
            if lim.kind == "budget":
                viol.append(e.sum() - lim.bound[0])
                scale.append(sc.sum() + lim.bound[0])
                labels.append(("emissions budget", span(years), lim.what))
                groups.append(lim.index)
                continue
            if lim.kind == "cap":
                allowed = lim.bound
            else:
                assert gdp is not None
                allowed = lim.bound[lim.t] * gdp[lim.t]
            viol.extend(e - allowed)
            scale.extend(sc + np.abs(allowed))
            labels.extend((f"emissions {WHAT[lim.kind]}", y, lim.what) for y in years)
            groups.extend([lim.index] * len(years))
        return [Check("emissions", np.array(viol, dtype=float), np.array(scale, dtype=float),
                      labels, np.array(groups))]

    def required(self, d: PlanData, block: Block, lower: np.ndarray,
                 upper: np.ndarray) -> np.ndarray:
        return np.asarray(upper, dtype=float)

    def magnitude(self, d: PlanData, required: np.ndarray) -> np.ndarray:
        """A cap's or budget's own size; for a ceiling per unit of GDP, the ceiling times
        the GDP of the capacity in service in the first year."""
        sat = d.satellite
        assert sat is not None
        out = np.abs(np.asarray(required, dtype=float)).copy()
        gdp0 = None
        i = 0
        for lim in sat.limits:
            nrow = 1 if lim.kind == "budget" else lim.t.size
            if lim.kind == "intensity":
                if gdp0 is None:
                    gdp0 = float(gdp_coefficients(d)[0] @ (d.base[0] * d.util))
                out[i:i + nrow] = lim.bound[lim.t] * abs(gdp0)
            i += nrow
        return out

    def excess_words(self, d: PlanData, label: tuple[Any, ...], excess: float) -> str | None:
        """E.g. "emissions of CO2 in 2031–2035 exceed the budget by 12.4 Mt"."""
        year, what, kind, _ = label[1]
        sat = d.satellite
        assert sat is not None
        w = sat.names.index(what)
        head = f"use of {what}" if sat.resource[w] else f"emissions of {what}"
        verb = "exceeds" if sat.resource[w] else "exceed"
        return f"{head} in {year} {verb} the {WHAT[kind]} by {excess:.4g} {sat.units[w]}"

    def shortfall_label(self, label: tuple[Any, ...]) -> tuple[str, str, Any]:
        year, what, kind, _ = label[1]
        return (f"emissions {WHAT[kind]}", str(what), year)

    def describe(self, label: tuple[Any, ...]) -> str:
        year, what, kind, _ = label[1]
        return f"the {WHAT[kind]} on {what} in {year}"
