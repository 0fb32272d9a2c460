"""Independent audit of a solved plan.

Capacity in service and capital deliveries are recomputed from the starts
vintage by vintage with plain loops, never from the LP matrix; then every
condition family checks its own conditions from the schedules
(:meth:`~growthplan.lp.conditions.Condition.audit`). A violation is measured
relative to the condition's own terms: ``violation / max(scale, floor)``,
``scale`` the sum of the absolute values of its terms and ``floor`` 1e-9
times the largest scale of the same condition kind for the same sector,
commodity or kind. A sector in tiny units is so judged by its own numbers,
and NaN counts as a violation, never as zero.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..lp.conditions import CONDITIONS, Check, Schedules
from ..lp.data import PlanData

__all__ = ["Audit", "audit", "recompute_capacity", "recompute_deliveries", "FLOOR"]

FLOOR = 1e-9


@dataclass(frozen=True)
class Audit:
    """Result of the audit.

    Attributes
    ----------
    ok : bool
        Whether every condition holds within ``tolerance`` (and nothing is NaN).
    max_violation : float
        Largest relative violation found.
    max_absolute : float
        Largest absolute violation (in the condition's own units).
    worst : str
        Which condition it is.
    tolerance : float
        Largest relative violation accepted.
    checks : pandas.DataFrame
        One row per kind of condition: count, largest relative and absolute violation.
    """

    ok: bool
    max_violation: float
    max_absolute: float
    worst: str
    tolerance: float
    checks: pd.DataFrame

    def __repr__(self) -> str:
        return (f"Audit(ok={self.ok}, max_violation={self.max_violation:.3g} "
                f"(relative), worst={self.worst!r})")


def recompute_capacity(d: PlanData, starts: np.ndarray) -> np.ndarray:
    """Capacity in service in years ``0..T`` from the starts, vintage by vintage, per technique."""
    T = d.T
    cap = d.initial.copy()
    for j in range(d.m):
        s = d.surv_full[j]
        theta = int(d.theta[j])
        vintages = [(-(k + 1), v) for k, v in enumerate(d.pipeline[j][::-1])]
        vintages += [(tau, starts[tau, j]) for tau in range(T)]
        for tau, amount in vintages:
            for t in range(max(tau + theta, 0), T + 1):
                age = t - tau - theta
                if age < s.size:
                    cap[t, j] += amount * s[age]
    return cap


def recompute_deliveries(d: PlanData, starts: np.ndarray) -> np.ndarray:
    """Capital goods delivered by commodity in each plan year."""
    T = d.T
    out = np.zeros((T, d.n))
    for j in range(d.m):
        vintages = [(-(k + 1), v) for k, v in enumerate(d.pipeline[j][::-1])]
        vintages += [(tau, starts[tau, j]) for tau in range(T)]
        for tau, amount in vintages:
            # a start embodies the capital coefficients of its own year (the base year's
            # for starts made before the plan)
            b = d.b if tau < 0 else d.b_at(tau)
            for s, share in enumerate(d.spending[j]):
                if share and 0 <= tau + s < T:
                    out[tau + s] += b[:, j] * share * amount
    return out


def _relative(c: Check) -> tuple[np.ndarray, np.ndarray]:
    viol = np.asarray(c.violation, dtype=float)
    viol = np.where(np.isnan(viol), np.inf, np.maximum(viol, 0.0))
    scale = np.abs(np.asarray(c.scale, dtype=float))
    scale = np.where(np.isnan(scale), np.inf, scale)
    group = np.zeros(viol.size, int) if c.group is None else np.asarray(c.group, int)
    floor = np.zeros(viol.size)
    if viol.size:
        top = np.zeros(group.max() + 1)
        np.maximum.at(top, group, np.where(np.isfinite(scale), scale, 0.0))
        floor = np.maximum(FLOOR * top[group], 1e-300)
    with np.errstate(invalid="ignore", divide="ignore"):
        rel = np.where(viol == 0, 0.0, viol / np.maximum(scale, floor))
    return np.nan_to_num(rel, nan=np.inf), viol


def _accounts_checks(d: PlanData, s: Schedules) -> list[Check]:
    """GDP from production equals GDP from expenditure plus free disposal, and disposal ≥ 0.

    Both sides at base-year prices, with the capital goods delivered recomputed
    vintage by vintage and the disposal summed commodity by commodity from the
    balances, so the identity ties the reported accounts to the schedules.
    """
    assert s.deliveries_check is not None
    p = d.prices
    x = s.output
    kappa = np.zeros(d.T) if s.consumption is None else s.consumption
    supply = d.supplied(x).copy()
    for flows, side, sign in ((s.imports, d.imports, 1.0), (s.exports, d.exports, -1.0)):
        if flows is not None and side is not None:
            for i, j in enumerate(side.index):
                supply[:, j] += sign * flows[:, i]
    inter = d.intermediate(x)
    use = inter + s.deliveries_check + kappa[:, None] * d.basket[None, :] + d.demand
    disposal = (supply - use) @ p
    production = (d.supplied(x) - inter) @ p
    exports = np.zeros(d.T) if s.exports is None or d.exports is None else \
        s.exports @ p[d.exports.index]
    imports = np.zeros(d.T) if s.imports is None or d.imports is None else \
        s.imports @ p[d.imports.index]
    expenditure = (s.deliveries_check @ p + kappa * float(d.basket @ p) + d.demand @ p
                   + exports - imports)
    scale = np.abs(d.supplied(x)) @ p + np.abs(inter) @ p + np.abs(use) @ p
    labels = [("national accounts", y) for y in d.years]
    zeros = np.zeros(d.T, int)
    return [Check("GDP identity", np.abs(production - expenditure - disposal), scale, labels,
                  zeros),
            Check("free disposal", -disposal, scale, labels, zeros)]


def audit(d: PlanData, s: Schedules, *, tolerance: float = 1e-6) -> Audit:
    """Check every condition of the plan against the schedules.

    Parameters
    ----------
    d : PlanData
        The plan's arrays.
    s : Schedules
        The solution; its ``capacity_check`` and ``deliveries_check`` are
        filled in here by the independent recomputation.
    tolerance : float, default 1e-6
        Largest relative violation accepted.
    """
    s.capacity_check = recompute_capacity(d, s.starts)
    s.deliveries_check = recompute_deliveries(d, s.starts)
    rows = []
    worst, worst_rel, worst_abs = "", 0.0, 0.0
    for cond in CONDITIONS:
        if not cond.applies(d):
            continue
        for c in cond.audit(d, s):
            if np.size(c.violation) == 0:
                continue
            rel, viol = _relative(c)
            k = int(np.argmax(rel))
            label = " ".join(str(p) for p in c.labels[k] if p != "")
            rows.append({"condition": c.kind, "count": int(rel.size),
                         "max_relative": float(rel[k]), "max_absolute": float(viol.max()),
                         "where": label})
            if rel[k] > worst_rel or (worst == "" and rel[k] > 0):
                worst, worst_rel, worst_abs = label, float(rel[k]), float(viol[k])
    for c in _accounts_checks(d, s):
        rel, viol = _relative(c)
        k = int(np.argmax(rel))
        label = " ".join(str(p) for p in c.labels[k] if p != "")
        rows.append({"condition": c.kind, "count": int(rel.size), "max_relative": float(rel[k]),
                     "max_absolute": float(viol.max()), "where": label})
        if rel[k] > worst_rel:
            worst, worst_rel, worst_abs = label, float(rel[k]), float(viol[k])
    table = pd.DataFrame(rows, columns=["condition", "count", "max_relative", "max_absolute",
                                        "where"]).set_index("condition")
    finite = all(np.all(np.isfinite(a)) for a in (s.output, s.starts, s.capacity,
                                                   s.deliveries) if a is not None)
    ok = bool(worst_rel <= tolerance and finite)
    return Audit(ok=ok, max_violation=worst_rel if finite else float("inf"),
                 max_absolute=worst_abs, worst=worst or "none", tolerance=tolerance,
                 checks=table)
