"""The marginal abatement curve: the plan's optimum as a function of an emission budget.

The optimal objective ``V(E)`` of a plan whose limit allows ``E`` is concave
in ``E`` (the feasible set grows linearly with it), and its slope at ``E``
is the limit's shadow price. :func:`abatement_curve` traces ``V`` by solving
the plan again for each budget (or a cap path scaled to each level): the loss
``V(E_max) − V(E)`` is the cost of abatement, the price the marginal cost of
one more unit abated.
"""

from __future__ import annotations

from collections.abc import Iterable
from typing import TYPE_CHECKING, Any

import numpy as np
import pandas as pd

from ..errors import invalid

if TYPE_CHECKING:
    from ..model.plan import Plan

__all__ = ["abatement_curve"]

COLUMNS = ["level", "status", "objective", "loss", "value", "price", "emitted", "unit",
           "price_unit"]


def abatement_curve(plan: Plan, levels: Iterable[float], *, limit: int = 0,
                    backend: Any = None, method: str = "auto") -> pd.DataFrame:
    """Solve ``plan`` once for each level of one of its limits.

    Parameters
    ----------
    plan : Plan
        A plan with satellite accounts and at least one limit.
    levels : iterable of float
        For a :class:`~growthplan.Budget`, the totals; for a
        :class:`~growthplan.Cap`, the first covered year's ceiling (the path
        keeps its rate, or a given series is scaled to start there); for an
        :class:`~growthplan.IntensityCeiling`, the first year's ceiling.
    limit : int, default 0
        Which of ``plan.limits``.
    backend : Backend, optional
        As for :meth:`~growthplan.Plan.solve`.
    method : str, default "auto"
        HiGHS method (without ``backend``).

    Returns
    -------
    pandas.DataFrame
        One row per level, in increasing order: the solve's status, the
        objective, the loss against the loosest level that solved, the
        limit's shadow value (objective per unit of the level: for a path,
        ``Σ_t value_t · bound_t / level``, the derivative with respect to
        the level when the whole path scales with it), the same in base-year
        money per unit, the amount emitted
        over the limit's years and the units. A level the plan cannot meet
        has status ``infeasible`` and NaN figures.
    """
    from ..model.satellite import Budget, Cap

    if not 0 <= limit < len(plan.limits):
        raise invalid("limit", f"be the index of one of the plan's {len(plan.limits)} "
                      "limits", limit)
    values = sorted(float(v) for v in levels)
    if not values or not np.all(np.isfinite(values)) or values[0] < 0:
        raise invalid("levels", "hold finite numbers >= 0, at least one", list(levels))
    lim = plan.limits[limit]
    rows = []
    for level in values:
        if isinstance(lim, Budget):
            new: Any = lim.model_copy(update={"total": level})
        elif isinstance(lim, Cap):
            new = lim.model_copy(update={"at_most": _scaled(lim.at_most, level)})
        else:
            new = lim.model_copy(update={"per_gdp": _scaled(lim.per_gdp, level)})
        limits = list(plan.limits)
        limits[limit] = new
        variant = plan.model_copy(update={"limits": limits})
        r = variant.solve(backend=backend) if backend is not None else \
            variant.solve(method=method)
        if r.ok:
            prices = r.emission_prices
            own = prices[prices["limit"] == limit]
            # a path scaled to `level`: each year's bound moves by bound_t / level per unit
            w = np.ones(len(own)) if isinstance(lim, Budget) else \
                own["bound"].to_numpy(dtype=float) / level if level > 0 else np.nan
            rows.append([level, r.status.value, r.objective, np.nan,
                         float(own["value"].to_numpy() @ w), float(own["price"].to_numpy() @ w),
                         float(own["emitted"].sum()),
                         own["unit"].iloc[0], own["price_unit"].iloc[0]])
        else:
            rows.append([level, r.status.value, np.nan, np.nan, np.nan, np.nan, np.nan, "", ""])
    out = pd.DataFrame(rows, columns=COLUMNS)
    solved = out["objective"].notna()
    if solved.any():
        best = out.loc[solved, "objective"].iloc[-1]  # the loosest level that solved
        sense = 1.0 if plan.objective.sense == "max" else -1.0
        out["loss"] = sense * (best - out["objective"])
    out.attrs["limit"] = f"{lim.kind} on {lim.what}"
    return out


def _scaled(value: Any, level: float) -> Any:
    """A number replaced by ``level``; a series scaled so that its first value is ``level``."""
    if isinstance(value, int | float):
        return level
    items = list(value.values()) if isinstance(value, dict) else list(value)
    first = float(items[0])
    if first <= 0:
        raise invalid("levels", "scale a path whose first value is > 0", first)
    f = level / first
    if isinstance(value, dict):
        return {k: float(v) * f for k, v in value.items()}
    return [float(v) * f for v in items]
