"""What a plan aims for.

Each objective is a small model; :meth:`growthplan.Plan.solve` compiles it
into the LP's cost vector (MODEL.md §4).
"""

from __future__ import annotations

from typing import Annotated, Any, Literal

import numpy as np
from pydantic import Field, field_validator

from ._validation import Model, Rule

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


class LeastLabour(Objective):
    """Minimise the total labour (all kinds, all years) that meets every condition."""

    kind: Literal["least_labour"] = "least_labour"
    sense: Literal["max", "min"] = "min"


class LeastForeignExchange(Objective):
    """Minimise the total net foreign-exchange outlay ``Σ_t (p^m·m_t − p^e·e_t)``."""

    kind: Literal["least_foreign_exchange"] = "least_foreign_exchange"
    sense: Literal["max", "min"] = "min"


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


class Lexicographic(Objective):
    """Optimise the first objective, then each next one with the earlier ones held.

    Each earlier optimum ``f*`` is kept within ``tolerance`` (relative):
    ``f ≥ f* − tolerance·max(1, |f*|)`` for a maximised objective, ``≤`` the
    mirror for a minimised one.
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


def components(objective: Objective) -> list[Objective]:
    """The simple objectives an objective is made of."""
    if isinstance(objective, Weighted):
        return [t.objective for t in objective.terms]
    if isinstance(objective, Lexicographic):
        return list(objective.objectives)
    if isinstance(objective, Fastest):
        return components(objective.then)
    return [objective]
