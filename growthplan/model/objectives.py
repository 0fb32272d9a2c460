"""What a plan aims for.

Each objective is a small model that carries its own cost vector
(:meth:`Objective.cost`), sense, requirements on the plan
(:meth:`Objective.check`) and objective stages (:meth:`Objective.stages`);
the builder asks it for them and knows no objective by name.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Annotated, Any, Literal

import numpy as np
from pydantic import Field, field_validator

from .validation import Model, Rule

if TYPE_CHECKING:
    from ..lp.data import PlanData
    from ..lp.program import Block, Stage
    from .plan import Plan

__all__ = ["Objective", "TerminalCapacity", "DiscountedConsumption", "LeastLabour",
           "LeastForeignExchange", "Weighted", "WeightedTerm", "Lexicographic", "Fastest",
           "components"]


class Objective(Model):
    """Base class of the plan objectives."""

    kind: str = "objective"
    sense: Literal["max", "min"] = "max"

    def discount_rate(self) -> float | None:
        """Rate that turns the objective's year weights into present values, if any."""
        return None

    def check(self, plan: Plan) -> None:
        """Raise :class:`Rule` when the plan lacks a part this objective needs."""

    def needs_level(self) -> bool:
        """Whether the LP needs the terminal level ``λ`` and its rows."""
        return any(isinstance(c, TerminalCapacity) for c in components(self))

    def cost(self, d: PlanData, cols: dict[str, Block], ncol: int) -> np.ndarray:
        """Cost vector over the LP's columns, optimised in ``sense``."""
        raise NotImplementedError

    def stages(self, d: PlanData, cols: dict[str, Block], ncol: int) -> list[Stage]:
        """The objective stages: one for a simple objective."""
        from ..lp.program import Stage

        return [Stage(self.cost(d, cols, ncol), self.sense)]

    def horizon_search(self) -> Fastest | None:
        """The horizon search this objective asks for, if any."""
        return None


def _zeros(ncol: int) -> np.ndarray:
    return np.zeros(ncol)


class TerminalCapacity(Objective):
    """Maximise ``λ`` with terminal capacity ``C_T ≥ λ π``.

    ``C_T`` is the capacity in service in the first year after the plan, so
    the starts of the final years count.

    Parameters
    ----------
    proportions : dict of str to float, optional
        Terminal proportions ``π`` by sector (any positive scale; normalised to
        sum 1). Default: the dynamic balanced-growth proportions of the
        economy, or today's capacity when those cannot be computed.
    """

    kind: Literal["terminal_capacity"] = "terminal_capacity"
    sense: Literal["max", "min"] = "max"
    proportions: dict[str, float] | None = None

    @field_validator("proportions")
    @classmethod
    def _positive(cls, v: dict[str, float] | None) -> dict[str, float] | None:
        if v is None:
            return v
        vals = np.array(list(v.values()), dtype=float)
        if vals.size == 0 or not np.all(np.isfinite(vals)) or np.any(vals < 0) or vals.sum() <= 0:
            raise Rule("hold non-negative weights with a positive sum", v)
        return v

    def check(self, plan: Plan) -> None:
        if self.proportions:
            unknown = [k for k in self.proportions if k not in plan.economy.names]
            if unknown:
                raise Rule("name sectors of the economy", unknown[:5],
                           field="objective.proportions")

    def cost(self, d: PlanData, cols: dict[str, Block], ncol: int) -> np.ndarray:
        c = _zeros(ncol)
        c[cols["level"].start] = 1.0
        return c


class DiscountedConsumption(Objective):
    """Maximise ``Σ_t (1 + r)^-t κ_t``, the discounted consumption level.

    Parameters
    ----------
    rate : float
        Social discount rate ``r`` per year (0.03 for 3 %).
    """

    kind: Literal["discounted_consumption"] = "discounted_consumption"
    sense: Literal["max", "min"] = "max"
    rate: float = 0.0

    @field_validator("rate", mode="before")
    @classmethod
    def _rate(cls, v: Any) -> Any:
        if not isinstance(v, int | float) or not np.isfinite(v) or v <= -1:
            raise Rule("be a finite rate > -1", v)
        return v

    def discount_rate(self) -> float | None:
        return self.rate

    def check(self, plan: Plan) -> None:
        if plan.consumption is None:
            raise Rule("come with a consumption part in the plan (the objective values it)",
                       None, field="consumption")

    def cost(self, d: PlanData, cols: dict[str, Block], ncol: int) -> np.ndarray:
        c = _zeros(ncol)
        k = cols["consumption"]
        c[k.start:k.stop] = (1.0 + self.rate) ** -np.arange(k.size, dtype=float)
        return c


class LeastLabour(Objective):
    """Minimise the total labour (all kinds, all years) that meets every condition."""

    kind: Literal["least_labour"] = "least_labour"
    sense: Literal["max", "min"] = "min"

    def check(self, plan: Plan) -> None:
        if plan.economy.labour_coefficients is None:
            raise Rule("come with labour coefficients in the economy (the objective counts "
                       "labour)", None, field="economy.labour_coefficients")

    def cost(self, d: PlanData, cols: dict[str, Block], ncol: int) -> np.ndarray:
        c = _zeros(ncol)
        x = cols["output"]
        per_year = [d.labour_at(t, every_kind=True).sum(axis=0) for t in range(d.T)]
        c[x.start:x.stop] = np.concatenate(per_year)
        return c


class LeastForeignExchange(Objective):
    """Minimise the total net foreign-exchange outlay ``Σ_t (p^m·m_t − p^e·e_t)``."""

    kind: Literal["least_foreign_exchange"] = "least_foreign_exchange"
    sense: Literal["max", "min"] = "min"

    def check(self, plan: Plan) -> None:
        if plan.trade is None:
            raise Rule("come with a trade part in the plan (the objective counts foreign "
                       "exchange)", None, field="trade")

    def cost(self, d: PlanData, cols: dict[str, Block], ncol: int) -> np.ndarray:
        c = _zeros(ncol)
        for name, side, sign in (("imports", d.imports, 1.0), ("exports", d.exports, -1.0)):
            if name in cols and side is not None:
                b = cols[name]
                c[b.start:b.stop] = sign * np.tile(side.prices, d.T)
        return c


Simple = Annotated[TerminalCapacity | DiscountedConsumption | LeastLabour | LeastForeignExchange,
                   Field(discriminator="kind")]


class WeightedTerm(Model):
    """One term of a :class:`Weighted` objective."""

    objective: Simple
    weight: float = Field(gt=0, allow_inf_nan=False)


class Weighted(Objective):
    """Maximise ``Σ_k w_k σ_k f_k``: a weighted sum of objectives.

    ``σ_k`` is +1 for objectives that are maximised and −1 for those that are
    minimised (least labour, least foreign exchange), so every term counts as
    a gain. Weights carry the units: one unit of ``f_1`` is worth ``w_1/w_2``
    units of ``f_2``.
    """

    kind: Literal["weighted"] = "weighted"
    sense: Literal["max", "min"] = "max"
    terms: list[WeightedTerm] = Field(min_length=1)

    def __init__(self, terms: Any = None, /, **data: Any) -> None:
        if terms is not None:
            data["terms"] = [t if isinstance(t, WeightedTerm | dict) else
                             {"objective": t[0], "weight": t[1]} for t in terms]
        super().__init__(**data)

    def check(self, plan: Plan) -> None:
        for t in self.terms:
            t.objective.check(plan)

    def cost(self, d: PlanData, cols: dict[str, Block], ncol: int) -> np.ndarray:
        c = _zeros(ncol)
        for t in self.terms:
            sign = 1.0 if t.objective.sense == "max" else -1.0
            c += t.weight * sign * t.objective.cost(d, cols, ncol)
        return c


class Lexicographic(Objective):
    """Optimise the first objective, then each next one with the earlier ones held.

    Each earlier optimum ``f*`` is kept within ``tolerance`` (relative):
    ``f ≥ f* − tolerance·|f*|`` for a maximised objective, ``≤`` the mirror
    for a minimised one (``|f*|`` measured as the sum of the absolute values
    of its terms, so it does not depend on the objective's unit).
    """

    kind: Literal["lexicographic"] = "lexicographic"
    sense: Literal["max", "min"] = "max"
    objectives: list[Simple] = Field(min_length=1)
    tolerance: float = Field(default=1e-6, ge=0, lt=1)

    def __init__(self, objectives: Any = None, /, **data: Any) -> None:
        if objectives is not None:
            data["objectives"] = list(objectives)
        super().__init__(**data)

    def discount_rate(self) -> float | None:
        return self.objectives[-1].discount_rate()

    def check(self, plan: Plan) -> None:
        for o in self.objectives:
            o.check(plan)

    def cost(self, d: PlanData, cols: dict[str, Block], ncol: int) -> np.ndarray:
        return self.objectives[0].cost(d, cols, ncol)

    def stages(self, d: PlanData, cols: dict[str, Block], ncol: int) -> list[Stage]:
        from ..lp.program import Stage

        return [Stage(o.cost(d, cols, ncol), o.sense, self.tolerance) for o in self.objectives]


class Fastest(Objective):
    """The shortest horizon, in whole years up to ``max_years``, that meets every target.

    Horizons are searched by bisection, each one a feasibility LP. For a
    horizon of ``T`` years the plan's targets apply at its end: capacity
    targets to the capacity in service in the year after the plan, output and
    consumption targets to the last plan year (the years written in the
    targets are replaced). The shortest feasible plan is then solved with
    ``then``. Per-year series (labour, floors, final demand) must be given as
    a start value and growth rate so they extend to any horizon.
    """

    kind: Literal["fastest"] = "fastest"
    sense: Literal["max", "min"] = "max"
    max_years: int = Field(ge=1, le=500)
    then: Simple | Weighted = Field(default_factory=TerminalCapacity, discriminator="kind")

    def check(self, plan: Plan) -> None:
        self.then.check(plan)

    def discount_rate(self) -> float | None:
        return self.then.discount_rate()

    def cost(self, d: PlanData, cols: dict[str, Block], ncol: int) -> np.ndarray:
        return self.then.cost(d, cols, ncol)

    def stages(self, d: PlanData, cols: dict[str, Block], ncol: int) -> list[Stage]:
        return self.then.stages(d, cols, ncol)

    def horizon_search(self) -> Fastest | None:
        return self


def components(objective: Objective) -> list[Objective]:
    """The simple objectives an objective is made of."""
    if isinstance(objective, Weighted):
        return [t.objective for t in objective.terms]
    if isinstance(objective, Lexicographic):
        return list(objective.objectives)
    if isinstance(objective, Fastest):
        return components(objective.then)
    return [objective]
