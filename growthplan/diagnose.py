"""Diagnosis of impossible plans by an elastic re-solve.

The commodity balances and capacity limits are physical and stay hard. Every
target, consumption floor, consumption-fall limit, labour limit and terminal
condition may fall short by a shortfall variable ``s ≥ 0`` at the penalty
``weight × s``; the re-solve minimises the total penalty. The default weight
of a condition is one over its requirement (labour: over the supply), so the
penalty adds up shortfalls as shares of what was asked; give ``weights`` by
condition kind to change that.
"""

from __future__ import annotations

from dataclasses import dataclass
from types import SimpleNamespace

import numpy as np
import pandas as pd
from scipy import sparse

from .solvers import Status, infeasible_subset, solve_highs

__all__ = ["Diagnosis", "diagnose", "ELASTIC_BLOCKS"]

ELASTIC_BLOCKS = ("targets", "consumption_floor", "consumption_fall", "labour", "terminal")


@dataclass
class Diagnosis:
    """Which conditions of an impossible plan cannot be met, and by how much.

    Attributes
    ----------
    shortfalls : pandas.DataFrame
        One row per condition that falls short: condition, sector, year,
        required, achievable, shortfall, share (shortfall / required), ranked by
        share.
    status : Status
        Status of the elastic re-solve (``infeasible`` when even the hard
        conditions, the balances with their exogenous demand, cannot hold).
    total_penalty : float
    """

    shortfalls: pd.DataFrame
    status: Status
    total_penalty: float
    infeasible_subset: pd.DataFrame | None = None

    def headline(self) -> str:
        """One sentence naming the worst conditions."""
        if self.status is not Status.OPTIMAL:
            return ("Even with every target, floor and labour limit relaxed the plan is "
                    "impossible: the commodity balances with the exogenous demand and the "
                    "capacity from before the plan cannot hold.")
        if self.shortfalls.empty:
            return "The elastic re-solve found no shortfall."
        worst = self.shortfalls.head(3)
        parts = [f"{r.condition} {r.sector} {r.year}".replace("  ", " ").strip()
                 + f" short by {r.shortfall:.6g} ({100 * r.share:.1f} %)"
                 for r in worst.itertuples()]
        return "Cannot be met: " + "; ".join(parts) + "."


def _labels(lp, block: str) -> list[tuple[str, str, int, float]]:
    """(condition, sector, year, required) for each row of an elastic block."""
    b = lp.rows[block]
    d = lp.data
    out = []
    lower, upper = lp.row_lower[b.start:b.stop], lp.row_upper[b.start:b.stop]
    if block == "targets":
        for e in lp.target_info:
            out.append((f"{e['what']} target", e["sector"], e["year"], e["required"]))
        return out
    if block == "labour":
        for i in range(b.size):
            t, k = divmod(i, b.shape[1])
            out.append(("labour", d.labour_kinds[k], d.years[t], float(upper[i])))
        return out
    if block == "consumption_floor":
        return [("consumption floor", "", d.years[i], float(lower[i])) for i in range(b.size)]
    if block == "consumption_fall":
        return [("consumption fall", "", d.years[i + 1], 0.0) for i in range(b.size)]
    labels = b.labels[0]
    return [("terminal growth", str(labels[i]).split("_", 1)[1], int(str(labels[i])[:4]),
             float(lower[i])) for i in range(b.size)]


IIS_ROW_LIMIT = 20_000  # larger plans skip the (slow) infeasible-subset search by default


def _subset(lp) -> pd.DataFrame | None:
    found = infeasible_subset(lp)
    if found is None:
        return None
    rows, cols = found
    rn, cn = lp.row_names(), lp.col_names()
    return pd.DataFrame([("row", rn[r]) for r in rows] + [("column bound", cn[c]) for c in cols],
                        columns=["kind", "name"])


def diagnose(lp, *, weights: dict[str, float] | None = None,
             subset: bool | None = None) -> Diagnosis:
    """Elastic re-solve of an impossible plan's LP (see the module notes).

    Parameters
    ----------
    weights : dict, optional
        Penalty per unit of shortfall by block (``"targets"``, ``"labour"``, …).
    subset : bool, optional
        Also ask HiGHS for an irreducible infeasible subset (default: for plans
        of up to 20,000 rows).
    """
    rows, signs, info, w = [], [], [], []
    for block in ELASTIC_BLOCKS:
        if block not in lp.rows:
            continue
        b = lp.rows[block]
        for i, lab in enumerate(_labels(lp, block)):
            r = b.start + i
            rows.append(r)
            signs.append(-lp.row_sign[r])  # ≥ row: +s on the left; ≤ row: −s
            info.append((block, *lab))
            base = abs(lab[3])
            custom = (weights or {}).get(block)
            w.append(custom if custom is not None else 1.0 / max(base, 1e-9))
    m = lp.matrix
    k = len(rows)
    elastic = sparse.csc_array((np.array(signs, dtype=float), (np.array(rows), np.arange(k))),
                               shape=(m.shape[0], k))
    matrix = sparse.csc_array(sparse.hstack([m, elastic]))
    cost = np.concatenate([np.zeros(m.shape[1]), np.array(w, dtype=float)])
    col_lower = np.concatenate([lp.col_lower, np.zeros(k)])
    col_upper = np.concatenate([lp.col_upper, np.full(k, np.inf)])
    model = SimpleNamespace(matrix=matrix, row_lower=lp.row_lower, row_upper=lp.row_upper,
                            col_lower=col_lower, col_upper=col_upper, cost=cost, sense="min",
                            nnz=matrix.nnz)
    out = solve_highs(model, method="simplex")
    want = subset if subset is not None else m.shape[0] <= IIS_ROW_LIMIT
    iis = _subset(lp) if want else None
    columns = ["condition", "sector", "year", "required", "achievable", "shortfall", "share"]
    if out.status is not Status.OPTIMAL:
        return Diagnosis(pd.DataFrame(columns=columns), out.status, float("nan"), iis)
    s = out.x[m.shape[1]:]
    recs = []
    for (block, cond, sector, year, required), short in zip(info, s, strict=True):
        if short <= 1e-9 * max(1.0, abs(required)):
            continue
        if block == "labour":  # a labour limit is exceeded: the extra labour needed
            achievable = required
            need = required + short
            recs.append((cond, sector, year, need, achievable, short,
                         short / need if need else np.inf))
            continue
        recs.append((cond, sector, year, required, required - short, short,
                     short / required if required else np.inf))
    table = pd.DataFrame(recs, columns=columns).sort_values(
        ["share", "shortfall"], ascending=False).reset_index(drop=True)
    return Diagnosis(table, out.status, float(out.objective), iis)
