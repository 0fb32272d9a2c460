"""Techniques in a solved plan: schedules, years of use and profits at shadow prices.

Profits are read from the LP's dual. Write ``π_r ≥ 0`` for the value of row
``r`` (the improvement of the objective per unit by which it is relaxed: the
shadow price ``p_it`` of a commodity balance, the quasi-rent ``ρ_kt`` of a
capacity row, the labour value ``w_t`` …), ``σ_r`` for its sign (+1 for an
at-most row, −1 for an at-least row) and ``s`` for the objective's sense (+1
maximise, −1 minimise). The profit of a column ``v`` at those values is its
reduced cost

``d_v = s c_v − Σ_r σ_r π_r M_rv``,

which at an optimum is ≤ 0 for a column at zero, = 0 for a column strictly
between its bounds, and ≥ 0 only for a column held at an upper bound (a
technique not available that year, or a starts ceiling). For a technique
``k`` of sector ``i`` in year ``t`` this gives two profits:

* operating, of one unit of output:
  ``d_x = p_t·q_k − p_t·a_kt − w_t·l_kt − ρ_kt (+ values of output targets
  and of the first-year floor, and the objective's own term)``:
  the value of its products less its inputs and labour, less the
  quasi-rent of the capacity it occupies; 0 where the technique runs;
* of a start, one unit of new capacity ordered in year ``t``:
  ``d_z = Σ_t' u_k S_k(t' − t − θ_k) ρ_kt' + (values after the plan: the
  terminal level, capacity targets and terminal growth) − Σ_s p_{t+s}·b_k w_k(s)``:
  the quasi-rents the capacity earns over its life, less the capital goods
  it takes at their shadow prices; 0 where the technique is started and
  ≤ 0 for the others in the years they are available.

Both are computed from the rows' values and the columns of the LP matrix,
family by family (``returns`` from the capacity rows, ``capital_charge``
from the balances, ``after_plan`` from the rest), and ``profit`` is ``d_z``.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
import pandas as pd

from ..errors import SolverFailure

if TYPE_CHECKING:
    from .result import PlanResult

__all__ = ["technique_table", "technique_years", "technique_profits", "explain_technique",
           "technique_export"]

TOL = 1e-9


def _names(result: PlanResult) -> tuple[list[str], list[str], list[str]]:
    d = result.data
    assert d is not None
    keys = d.tech_names
    sectors = [d.names[j] for j in d.tech_sector]
    labels = list(d.tech.labels) if d.tech is not None else ["base"] * d.n
    return keys, sectors, labels


def technique_table(result: PlanResult) -> pd.DataFrame:
    """Output, capacity in service and starts of every technique, one row per year.

    Returns
    -------
    pandas.DataFrame
        Columns technique, sector, label, year, output, capacity, starts.
    """
    result._get("output")  # refuses a result that is not an optimal, audited plan
    s = result._schedules
    d = result.data
    assert s is not None and d is not None
    keys, sectors, labels = _names(result)
    rows = []
    for k, key in enumerate(keys):
        for t, y in enumerate(d.years):
            rows.append((key, sectors[k], labels[k], y, float(s.output[t, k]),
                         float(s.capacity[t, k]), float(s.starts[t, k])))
    return pd.DataFrame(rows, columns=["technique", "sector", "label", "year", "output",
                                       "capacity", "starts"])


def technique_years(result: PlanResult, *, tol: float = 1e-9) -> pd.DataFrame:
    """First year each technique is started and last year it is used.

    Parameters
    ----------
    tol : float, default 1e-9
        Least share of the largest output (starts) of the technique's sector
        counted as use (a start).

    Returns
    -------
    pandas.DataFrame
        Indexed by technique: sector, label, first_start, last_used (missing,
        ``pd.NA``, when never).
    """
    table = technique_table(result)
    out = []
    for key, part in table.groupby("technique", sort=False):
        sector_rows = table[table["sector"] == part["sector"].iloc[0]]
        big_x = max(float(sector_rows["output"].abs().max()), 1e-300)
        big_z = max(float(sector_rows["starts"].abs().max()), 1e-300)
        started = part.loc[part["starts"] > tol * big_z, "year"]
        used = part.loc[part["output"] > tol * big_x, "year"]
        out.append({"technique": key, "sector": part["sector"].iloc[0],
                    "label": part["label"].iloc[0],
                    "first_start": int(started.min()) if len(started) else None,
                    "last_used": int(used.max()) if len(used) else None})
    frame = pd.DataFrame(out).set_index("technique")
    for col in ("first_start", "last_used"):  # whole years, missing where never
        frame[col] = frame[col].astype("Int64")
    return frame


def _values(result: PlanResult) -> tuple[np.ndarray, np.ndarray]:
    """``σ_r π_r`` of every row and ``s c`` (see the module notes)."""
    lp = result.lp
    dual = result.outcome.row_dual
    if dual is None:
        raise SolverFailure("the solve returned no duals; technique profits need them")
    sign = 1.0 if lp.sense == "max" else -1.0
    value = sign * lp.row_sign * dual  # π_r, as in the shadow-price tables
    return lp.row_sign * value, sign * lp.cost


def technique_profits(result: PlanResult) -> pd.DataFrame:
    """Profit of every technique in every year at the plan's shadow prices.

    See the module notes for the expressions; ``profit`` is the reduced cost
    of a start and ``operating`` that of a unit of output.

    Returns
    -------
    pandas.DataFrame
        Columns technique, sector, label, year, available, output, starts,
        revenue (``p_t·q_k``), inputs (``p_t·a_kt``), labour (``w_t·l_kt``),
        quasi_rent (``ρ_kt``), operating, returns, after_plan, capital_charge,
        profit.
    """
    table = technique_table(result)
    lp, d = result.lp, result.data
    assert d is not None
    weighted, cost = _values(result)
    m, T = d.m, d.T
    xcol, zcol = lp.cols["output"], lp.cols["starts"]
    matrix = lp.matrix
    parts: dict[str, dict[str, np.ndarray]] = {"x": {}, "z": {}}
    for tag, block in (("x", xcol), ("z", zcol)):
        sub = matrix[:, block.start:block.stop]
        for name, rows in lp.rows.items():
            w = np.zeros(lp.shape[0])
            w[rows.start:rows.stop] = weighted[rows.start:rows.stop]
            parts[tag][name] = -(sub.T @ w).reshape(T, m)  # −Σ_r σ_r π_r M_rv
        parts[tag]["cost"] = cost[block.start:block.stop].reshape(T, m)
    prices = lp.rows["balance"].take(weighted) * -1.0  # balances are at-least rows: σ = −1
    revenue = np.stack([prices[t] @ d.q for t in range(T)])
    inputs = np.stack([prices[t] @ d.a_at(t) for t in range(T)])
    labour = np.zeros((T, m))
    if "labour" in lp.rows:
        wages = lp.rows["labour"].take(weighted)  # at-most rows: σ = +1
        labour = np.stack([wages[t] @ d.labour_at(t) for t in range(T)])
    rents = lp.rows["capacity"].take(weighted)
    op = sum(parts["x"].values())
    profit = sum(parts["z"].values())
    returns = parts["z"].get("capacity", np.zeros((T, m)))
    charge = -parts["z"].get("balance", np.zeros((T, m)))
    after = profit - returns + charge
    upper = lp.col_upper[zcol.start:zcol.stop].reshape(T, m)
    avail = np.ones((T, m), dtype=bool)
    if d.tech is not None:
        years = np.array(d.years)[:, None]
        lo = np.array([-np.inf if v is None else v for v in d.tech.first_year])[None, :]
        hi = np.array([np.inf if v is None else v for v in d.tech.last_start])[None, :]
        avail = (years >= lo) & (years <= hi)
    avail &= upper > 0
    # the table is technique by technique, years within: transpose the T × m arrays
    for col, arr in (("revenue", revenue), ("inputs", inputs), ("labour", labour),
                     ("quasi_rent", rents), ("operating", op), ("returns", returns),
                     ("after_plan", after), ("capital_charge", charge), ("profit", profit)):
        table[col] = np.asarray(arr, dtype=float).T.ravel()
    table.insert(4, "available", avail.T.ravel())
    return table


def explain_technique(result: PlanResult, sector: str, year: int) -> str:
    """A short text table comparing a sector's techniques in one year.

    Parameters
    ----------
    sector : str
        A sector of the plan.
    year : int
        A plan year.

    Returns
    -------
    str
        One line per technique: available, output, capacity, starts, unit
        cost at shadow prices (inputs and labour per unit of output), the
        value of its products, the operating profit and the profit of a start.
    """
    from ..errors import invalid

    d = result.data
    assert d is not None
    if sector not in d.names:
        raise invalid("sector", f"name a sector of the plan ({', '.join(d.names[:8])})",
                      sector)
    if year not in d.years:
        raise invalid("year", f"be a plan year ({d.years[0]}..{d.years[-1]})", year)
    prof = technique_profits(result)
    rows = prof[(prof["sector"] == sector) & (prof["year"] == year)]
    head = (f"Techniques of {sector} in {year} (values at the plan's shadow prices, "
            "per unit of output or of new capacity)")
    cols: list[tuple[str, Any]] = [
        ("technique", lambda r: str(r["label"])),
        ("available", lambda r: "yes" if r["available"] else "no"),
        ("output", lambda r: f"{r['output']:.4g}"),
        ("capacity", lambda r: f"{r['capacity']:.4g}"),
        ("starts", lambda r: f"{r['starts']:.4g}"),
        ("unit cost", lambda r: f"{r['inputs'] + r['labour']:.4g}"),
        ("value made", lambda r: f"{r['revenue']:.4g}"),
        ("operating", lambda r: f"{r['operating']:.3g}"),
        ("start profit", lambda r: f"{r['profit']:.3g}")]
    cells = [[name for name, _ in cols]]
    for _, r in rows.iterrows():
        cells.append([f(r) for _, f in cols])
    widths = [max(len(c[i]) for c in cells) for i in range(len(cols))]
    lines = [head]
    for c in cells:
        lines.append("  ".join(v.rjust(w) if i else v.ljust(w)
                               for i, (v, w) in enumerate(zip(c, widths, strict=True))))
    best = rows.loc[rows["available"], "profit"]
    if len(best):
        lines.append(f"Most profitable start: {rows.loc[best.idxmax(), 'label']} "
                     "(a start whose profit is below 0 does not pay at these prices).")
    return "\n".join(lines)


def technique_export(result: PlanResult) -> pd.DataFrame:
    """The technique schedules as one tidy table for the CSV folder and the workbook.

    Returns
    -------
    pandas.DataFrame
        Indexed by year; columns sector, technique (its own label), key (the
        column label, ``"sector:label"``), unit (the sector's unit), output,
        capacity (in service at the start of the year) and starts (new
        capacity begun), each in the sector's unit a year.
    """
    table = technique_table(result)
    d = result.data
    assert d is not None
    units = dict(zip(d.names, d.units, strict=True))
    out = pd.DataFrame({
        "sector": table["sector"], "technique": table["label"], "key": table["technique"],
        "unit": [f"{units[s]} a year" if units[s] else "units a year"
                 for s in table["sector"]],
        "output": table["output"], "capacity": table["capacity"], "starts": table["starts"]})
    out.index = pd.Index(table["year"].astype(int).to_numpy(), name="year")
    # year by year, each year's sectors and techniques in the plan's order
    return out.sort_index(kind="stable")
