"""Exception and warning classes of growthplan.

Every error the library raises for bad input or an impossible plan is a
:class:`GrowthplanError` that also subclasses the matching built-in, so
``except ValueError`` keeps working in user code.
"""

from __future__ import annotations

import difflib
from collections.abc import Iterable
from typing import Any

import numpy as np

__all__ = [
    "GrowthplanError",
    "InvalidInput",
    "UnproductiveEconomy",
    "NoBalancedGrowth",
    "PlanInfeasible",
    "PlanUnbounded",
    "SolverFailure",
    "PlanNotOptimal",
    "GrowthplanWarning",
    "EndEffectsWarning",
    "TinyCoefficientsWarning",
    "invalid",
    "show",
    "suggest",
]


class GrowthplanError(Exception):
    """Base class of every growthplan exception."""


class InvalidInput(GrowthplanError, ValueError):
    """Input that breaks a documented rule.

    Parameters
    ----------
    message : str
        The whole message, "`field` must `rule`. Got `value`." (see :func:`invalid`).
    field : str, optional
        Dotted path of the offending field.

    Attributes
    ----------
    field : str or None
        Dotted path of the offending field (``"capital.energy.lead_time"``).
    """

    def __init__(self, message: str, *, field: str | None = None) -> None:
        super().__init__(message)
        self.field = field


class UnproductiveEconomy(InvalidInput):
    """The input coefficients cannot sustain any positive net output (ρ(A) ≥ 1).

    Its ``field`` is ``"input_coefficients"``.

    Parameters
    ----------
    message : str
        The whole message.
    spectral_radius : float
        ``ρ(A)`` of the input coefficients.
    sectors : list of str
        Sectors whose input coefficients sum to 1 or more (may be empty when
        only a cycle of inputs among sectors is unproductive).

    Attributes
    ----------
    spectral_radius : float
    sectors : list of str
    """

    def __init__(self, message: str, *, spectral_radius: float, sectors: list[str]) -> None:
        super().__init__(message, field="input_coefficients")
        self.spectral_radius = spectral_radius
        self.sectors = sectors


class NoBalancedGrowth(GrowthplanError, ValueError):
    """The system has no balanced-growth ray with non-negative proportions."""


class PlanInfeasible(GrowthplanError, ValueError):
    """The plan's conditions cannot all be met."""


class PlanUnbounded(GrowthplanError, ValueError):
    """The plan's objective can grow without limit (a modelling error)."""


class SolverFailure(GrowthplanError, RuntimeError):
    """The solver stopped without a verified optimal plan (time limit, interrupt, error)."""


class PlanNotOptimal(GrowthplanError, RuntimeError):
    """A schedule was requested from a result that holds no verified optimal plan."""


class GrowthplanWarning(UserWarning):
    """Base class of growthplan warnings."""


class EndEffectsWarning(GrowthplanWarning):
    """The plan has no terminal condition, so its last years under-invest."""


class TinyCoefficientsWarning(GrowthplanWarning):
    """Coefficients negligible next to their column were set to zero.

    An entry below 1e-12 times the largest entry of its column is far under
    the solver's tolerances and can make it misjudge the plan (an input of
    1e-30 beside inputs of 0.2 made the plan look unbounded).
    """


def show(value: Any) -> str:
    """Render a value short enough for an error message."""
    if isinstance(value, np.ndarray):
        if value.size > 8:
            return f"array of shape {value.shape}"
        return np.array2string(value, precision=6, separator=", ")
    text = repr(value)
    return text if len(text) <= 120 else text[:117] + "..."


def invalid(field: str, rule: str, value: Any, *, hint: str = "") -> InvalidInput:
    """Build the one message template for bad input: field, rule, value.

    Examples
    --------
    >>> str(invalid("capital.energy.mean_service_life", "be >= 1 year", -5))
    'capital.energy.mean_service_life must be >= 1 year. Got -5.'
    """
    message = f"{field} must {rule}. Got {show(value)}."
    if hint:
        message += f" {hint}"
    return InvalidInput(message, field=field)


def suggest(word: Any, choices: Iterable[Any], *, sentence: bool = False) -> str:
    """``did you mean 'labour'?`` for a misspelt name, or ``""`` when nothing is close.

    Parameters
    ----------
    word : Any
        The name given.
    choices : iterable
        The names it may have meant.
    sentence : bool, default False
        Start with a capital, to follow a message as a sentence of its own.

    Examples
    --------
    >>> suggest("labor", ["years", "labour", "consumption"])
    "did you mean 'labour'?"
    """
    close = difflib.get_close_matches(str(word), [str(c) for c in choices], n=1, cutoff=0.6)
    if not close:
        return ""
    return f"{'Did' if sentence else 'did'} you mean {close[0]!r}?"
