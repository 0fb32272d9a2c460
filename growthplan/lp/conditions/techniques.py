"""Techniques: availability years, by-products and vintage coefficients. Audit only.

Availability is a bound on the starts columns (zero outside a technique's
``[first_year, last_start]``), by-products enter the balances through the
output matrix ``Q``, and embodied change is written as vintage techniques
(:mod:`growthplan.model.technique`); this family adds no rows. Its audit checks,
from the schedules alone, that no technique was started outside its years,
that the commodities made as by-products balance when their supply is summed
technique by technique, and that each vintage used the coefficients of its
start year (recomputed from the base coefficients and the yearly rates).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np

from . import Check, Condition, Context, RowBlock, Schedules

if TYPE_CHECKING:
    from ..data import PlanData


class Techniques(Condition):
    def __init__(self) -> None:
        super().__init__(name="techniques", elastic=False, words="technique")

    def applies(self, d: PlanData) -> bool:
        return d.tech is not None

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        return 0, 0

    def build(self, ctx: Context) -> RowBlock | None:
        return None  # bounds on the starts columns, set by the builder

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        ts = d.tech
        assert ts is not None
        out = []
        viol, scale, labels, groups = [], [], [], []
        for k in range(ts.m):
            lo, hi = ts.first_year[k], ts.last_start[k]
            for t, y in enumerate(d.years):
                if (lo is not None and y < lo) or (hi is not None and y > hi):
                    viol.append(s.starts[t, k])
                    scale.append(abs(s.starts[t, k]))
                    labels.append(("starts outside availability", y, ts.keys[k]))
                    groups.append(k)
        if viol:
            out.append(Check("technique availability", np.array(viol), np.array(scale),
                             labels, np.array(groups)))
        out.extend(self._by_products(d, s))
        out.extend(self._vintages(d, s))
        return out

    def _by_products(self, d: PlanData, s: Schedules) -> list[Check]:
        """Balances of the by-product commodities, supply summed technique by technique."""
        ts = d.tech
        assert ts is not None and s.deliveries_check is not None
        made = sorted({i for k in range(ts.m) for i in np.flatnonzero(ts.outputs[:, k])
                       if i != ts.sector[k]})
        if not made:
            return []
        kappa = np.zeros(d.T) if s.consumption is None else s.consumption
        viol, scale, labels, groups = [], [], [], []
        for i in made:
            for t, y in enumerate(d.years):
                supply = use = 0.0
                for k in range(ts.m):
                    x = s.output[t, k]
                    supply += x * (1.0 if ts.sector[k] == i else ts.outputs[i, k])
                    use += d.a_at(t)[i, k] * x
                for flows, side, sign in ((s.imports, d.imports, 1.0),
                                          (s.exports, d.exports, -1.0)):
                    if flows is not None and side is not None and i in side.index:
                        supply += sign * flows[t, list(side.index).index(i)]
                use += s.deliveries_check[t, i] + kappa[t] * d.basket[i] + d.demand[t, i]
                viol.append(use - supply)
                scale.append(abs(use) + abs(supply))
                labels.append(("by-product balance", y, d.names[i]))
                groups.append(i)
        return [Check("by-product balance", np.array(viol), np.array(scale), labels,
                      np.array(groups))]

    def _vintages(self, d: PlanData, s: Schedules) -> list[Check]:
        """Input and labour use, and the capital goods that starts embody, recomputed
        vintage by vintage from the base coefficients and the year-τ factors."""
        ts = d.tech
        factors = d.extra.get("vintage_factors")
        assert ts is not None
        if factors is None or not np.any(ts.vintage > 0):
            return []
        a0, l0, b0 = factors["base_inputs"], factors["base_labour"], factors["base_capital"]
        inputs = np.zeros((d.T, d.n))
        labour = np.zeros((d.T, l0.shape[0]))
        embodied = np.zeros((d.T, d.n))
        for k in range(ts.m):
            tau, j, o = int(ts.vintage[k]), int(ts.sector[k]), int(ts.origin[k])
            fa = 1.0 if tau < 0 else factors["input"][tau, j]
            fl = 1.0 if tau < 0 else factors["labour"][tau, j]
            fb = 1.0 if tau < 0 else factors["capital"][tau, j]
            inputs += np.outer(s.output[:, k], a0[:, o] * fa)
            labour += np.outer(s.output[:, k], l0[:, o] * fl)
            embodied += np.outer(s.starts[:, k], b0[:, o] * fb)
        needed = s.starts @ d.b.T  # the capital goods the LP's columns charge to the starts
        used = d.intermediate(s.output)
        lab = d.labour_used(s.output, every_kind=True)
        groups = np.tile(np.arange(d.n), d.T)
        out = [Check("vintage inputs", np.abs(used - inputs).ravel(),
                     (np.abs(used) + np.abs(inputs)).ravel(),
                     [("vintage inputs", y, c) for y in d.years for c in d.names], groups),
               Check("vintage capital", np.abs(needed - embodied).ravel(),
                     (np.abs(needed) + np.abs(embodied)).ravel(),
                     [("vintage capital", y, c) for y in d.years for c in d.names], groups)]
        if lab.shape[1]:
            out.append(Check("vintage labour", np.abs(lab - labour).ravel(),
                             (np.abs(lab) + np.abs(labour)).ravel(),
                             [("vintage labour", y, kind) for y in d.years
                              for kind in d.labour_all_kinds],
                             np.tile(np.arange(lab.shape[1]), d.T)))
        return out

    def describe(self, label: tuple[Any, ...]) -> str:
        return f"{label[0]} of {label[2]} in {label[1]}"
