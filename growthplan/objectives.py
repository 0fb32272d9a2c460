"""What a plan aims for.

Each objective is a small model; :meth:`growthplan.Plan.solve` compiles it
into the LP's cost vector (MODEL.md §4).
"""

from __future__ import annotations

from typing import Any, Literal

import numpy as np
from pydantic import field_validator

from ._validation import Model, Rule

__all__ = ["Objective", "TerminalCapacity", "DiscountedConsumption", "LeastLabour"]


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
