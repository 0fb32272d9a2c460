"""Independent audit of a plan result.

Every condition of the plan is recomputed from the result's schedules
(output, starts, consumption) and the plan's own data, with straightforward
loops over years and vintages, never from the LP matrix. A violation is
measured relative to the condition's scale: ``violation / max(scale, floor)``
where ``scale`` is the sum of the absolute values of the terms of that
condition and ``floor = 1e-9`` times the largest scale in the plan, so that
the tolerance means the same whatever units the sectors use.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

__all__ = ["Audit", "audit_schedules", "recompute_capacity", "recompute_deliveries"]


@dataclass(frozen=True)
class Audit:
    """Result of the audit.

    Attributes
    ----------
    ok : bool
        Whether every condition holds within ``tolerance``.
    max_violation : float
        Largest relative violation found.
    max_absolute : float
        Largest absolute violation (in the condition's own units).
    worst : str
        Which condition it is.
    tolerance : float
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


def recompute_capacity(plan, starts: np.ndarray) -> np.ndarray:
    """Capacity in service in years ``0..T`` from the starts, vintage by vintage."""
    econ = plan.economy
    T = plan.horizon
    cap = np.zeros((T + 1, econ.n))
    for j, name in enumerate(econ.names):
        spec = econ.capital[name]
        s = spec.survival(max_age=T + 1)
        cap[:, j] = spec.initial_capacity * spec.initial_survival(T)
        theta = spec.lead_time
        pipeline = np.asarray((plan.under_construction or {}).get(name, []), dtype=float)
        series = np.concatenate([pipeline, starts[:, j]])  # years -P..T-1
        # a start of year tau serves at age t - tau - theta in year t
        served = np.convolve(series, s)
        for t in range(T + 1):
            k = t + pipeline.size - theta
            if 0 <= k < served.size:
                cap[t, j] += served[k]
    return cap


def recompute_deliveries(plan, starts: np.ndarray) -> np.ndarray:
    """Capital goods delivered by commodity in each plan year."""
    econ = plan.economy
    T = plan.horizon
    b = np.asarray(econ.capital_coefficients)
    out = np.zeros((T, econ.n))
    for j, name in enumerate(econ.names):
        spec = econ.capital[name]
        pipeline = list((plan.under_construction or {}).get(name, []))
        started = [(-(k + 1), v) for k, v in enumerate(reversed(pipeline))]
        started += [(tau, starts[tau, j]) for tau in range(T)]
        for tau, amount in started:
            for s, share in enumerate(spec.spending_profile):
                if 0 <= tau + s < T:
                    out[tau + s] += b[:, j] * share * amount
    return out


def audit_schedules(plan, output: np.ndarray, starts: np.ndarray,
                    consumption: np.ndarray | None, *, reported_capacity: np.ndarray,
                    reported_deliveries: np.ndarray, level: float | None,
                    imports: np.ndarray | None = None, exports: np.ndarray | None = None,
                    tolerance: float = 1e-6) -> Audit:
    """Check every condition of ``plan`` against the schedules.

    Parameters
    ----------
    output, starts : array, years × sectors
    consumption : array (years,) or None
        Consumption level.
    reported_capacity : array, (years + 1) × sectors
        Capacity as the result reports it (checked against the recomputation).
    reported_deliveries : array, years × commodities
    level : float or None
        Terminal-capacity level ``λ`` the result claims.
    imports, exports : array, years × traded goods, optional
        In the order of the economy's sectors that have an import (export) price.
    """
    econ = plan.economy
    names, years = econ.names, plan.years
    a = np.asarray(econ.input_coefficients)
    kappa = np.zeros(len(years)) if consumption is None else consumption
    basket = plan.basket()
    cap = recompute_capacity(plan, starts)
    deliv = recompute_deliveries(plan, starts)
    demand = plan.exogenous_demand()
    checks: list[tuple[str, np.ndarray, np.ndarray, list[str]]] = []

    def add(kind: str, viol: np.ndarray, scale: np.ndarray, labels: list[str]) -> None:
        checks.append((kind, np.maximum(np.ravel(viol), 0.0), np.ravel(np.abs(scale)), labels))

    def grid(prefix: str) -> list[str]:
        return [f"{prefix} {y} {s}" for y in years for s in names]

    intermediate = output @ a.T
    use = intermediate + deliv + kappa[:, None] * basket[None, :] + demand
    supply = output.copy()
    trade_scale = np.zeros_like(output)
    td = plan.trade_data()
    if td is not None:
        t_years = [f"{y}" for y in years]
        for side, flows, sign in (("import", imports, 1.0), ("export", exports, -1.0)):
            goods, prices, ceil = td[side]
            if not goods:
                continue
            assert flows is not None, f"{side}s are needed when the plan trades"
            for i, g in enumerate(goods):
                j = names.index(g)
                supply[:, j] += sign * flows[:, i]
                trade_scale[:, j] += np.abs(flows[:, i])
            add(f"{side} ceiling", flows - ceil, np.abs(flows) + np.where(np.isfinite(ceil),
                                                                          ceil, 0.0),
                [f"{side} {y} {g}" for y in years for g in goods])
            add(f"non-negative {side}s", -flows, flows,
                [f"{side} {y} {g}" for y in years for g in goods])
        spend = np.zeros(len(years))
        scale = np.zeros(len(years))
        if td["import"][0]:
            assert imports is not None
            spend += imports @ td["import"][1]
            scale += np.abs(imports) @ td["import"][1]
        if td["export"][0]:
            assert exports is not None
            spend -= exports @ td["export"][1]
            scale += np.abs(exports) @ td["export"][1]
        add("foreign exchange", spend - td["inflow"], scale + td["inflow"],
            [f"foreign exchange {y}" for y in t_years])
    add("balance", use - supply, output + intermediate + deliv + demand + trade_scale
        + kappa[:, None] * basket[None, :], grid("balance"))
    util = np.array([econ.capital[k].max_utilisation for k in names])
    add("capacity", output - util * cap[:-1], output + util * cap[:-1], grid("capacity"))
    add("reported capacity", np.abs(reported_capacity - cap), cap,
        [f"capacity {y} {s}" for y in [*years, years[-1] + 1] for s in names])
    add("reported deliveries", np.abs(reported_deliveries - deliv), deliv, grid("deliveries"))
    add("non-negative output", -output, output, grid("output"))
    add("non-negative starts", -starts, starts, grid("starts"))
    if plan.labour:
        kinds = econ.labour_kinds
        for ls in plan.labour:
            lrow = np.asarray(econ.labour_coefficients)[kinds.index(ls.kind)]
            used = output @ lrow
            sup = ls.path(years)
            add("labour", used - sup, used + sup, [f"labour {y} {ls.kind}" for y in years])
    if consumption is not None:
        floor = plan.consumption_floor()
        add("consumption floor", floor - kappa, floor + kappa, [f"floor {y}" for y in years])
        f = plan.consumption.max_fall
        if f is not None and len(years) > 1:
            add("consumption fall", (1 - f) * kappa[:-1] - kappa[1:], kappa[1:] + kappa[:-1],
                [f"fall {y}" for y in years[1:]])
    for i, tg in enumerate(plan.targets):
        t = tg.year - years[0]
        if tg.what == "output":
            got = output[t, names.index(tg.sector)]
        elif tg.what == "capacity":
            got = cap[t, names.index(tg.sector)]
        else:
            got = kappa[t] * (1.0 if tg.sector is None else basket[names.index(tg.sector)])
        add("target", np.array([tg.value - got]), np.array([tg.value + got]),
            [f"target {i} {tg.what} {tg.sector or ''} {tg.year}"])
    for sc in plan.starts_ceilings:
        j = names.index(sc.sector)
        rows = [years.index(y) for y in sc.years] if sc.years else list(range(len(years)))
        add("starts ceiling", starts[rows, j] - sc.at_most, starts[rows, j] + sc.at_most,
            [f"starts ceiling {years[r]} {sc.sector}" for r in rows])
    if plan.terminal is not None:
        for j, name in enumerate(names):
            spec = econ.capital[name]
            s = spec.survival()
            growth = (1.0 + plan.terminal.rate) ** -np.arange(s.size, dtype=float)
            if spec.retirement == "geometric":  # closed form of the infinite sum
                d = spec.declining_balance / spec.mean_service_life
                total = (1 + plan.terminal.rate) / (plan.terminal.rate + d)
            else:
                total = float(np.sum(s * growth))
            psi = (1.0 + plan.terminal.rate) ** spec.lead_time / total
            for t in range(len(years) - max(spec.lead_time, 1), len(years)):
                if t >= 0:
                    need = psi * cap[t, j]
                    add("terminal", np.array([need - starts[t, j]]),
                        np.array([need + starts[t, j]]), [f"terminal {years[t]} {name}"])
    if level is not None:
        pi, _ = plan.terminal_proportions()
        add("terminal level", level * pi - cap[-1], level * pi + cap[-1],
            [f"terminal capacity {s}" for s in names])

    global_scale = max((float(s.max()) for _, _, s, _ in checks if s.size), default=1.0)
    floor = max(global_scale * 1e-9, 1e-300)
    rows = []
    worst, worst_rel, worst_abs = "", 0.0, 0.0
    for kind, viol, scale, labels in checks:
        if viol.size == 0:
            continue
        rel = viol / np.maximum(scale, floor)
        k = int(np.argmax(rel))
        rows.append({"condition": kind, "count": int(viol.size), "max_relative": float(rel[k]),
                     "max_absolute": float(viol.max()), "where": labels[k]})
        if rel[k] > worst_rel:
            worst, worst_rel, worst_abs = labels[k], float(rel[k]), float(viol[k])
    table = pd.DataFrame(rows).set_index("condition")
    bad = not np.all(np.isfinite(output)) or not np.all(np.isfinite(starts))
    return Audit(ok=(worst_rel <= tolerance) and not bad, max_violation=worst_rel,
                 max_absolute=worst_abs, worst=worst or "none", tolerance=tolerance,
                 checks=table)
