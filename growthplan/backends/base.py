"""What every back end promises: a status vocabulary, an outcome record and a protocol."""

from __future__ import annotations

import enum
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, Protocol, runtime_checkable

import numpy as np

if TYPE_CHECKING:
    from ..lp.program import LinearProgram

__all__ = ["Status", "SolverOutcome", "Feature", "Backend", "RayBackend", "IisBackend", "FAILED"]


class Status(enum.StrEnum):
    """Outcome of a plan solve."""

    OPTIMAL = "optimal"
    INFEASIBLE = "infeasible"
    UNBOUNDED = "unbounded"
    INFEASIBLE_OR_UNBOUNDED = "infeasible_or_unbounded"
    TIME_LIMIT = "time_limit"
    ITERATION_LIMIT = "iteration_limit"
    INTERRUPTED = "interrupted"
    IMPRECISE = "imprecise"
    NOT_VERIFIED = "not_verified"
    UNKNOWN = "unknown"
    ERROR = "error"


# statuses after which another method (and then the elastic re-solve) is tried
FAILED = frozenset({Status.ERROR, Status.UNKNOWN, Status.IMPRECISE, Status.NOT_VERIFIED,
                    Status.INFEASIBLE_OR_UNBOUNDED})


class Feature(enum.StrEnum):
    """What a back end can do besides solving."""

    DUALS = "duals"
    IIS = "iis"
    RAY = "ray"
    INTERRUPT = "interrupt"
    TIME_LIMIT = "time_limit"


@dataclass
class SolverOutcome:
    """What a solver returned, in the LP's own terms (back-end neutral).

    Attributes
    ----------
    status : Status
    message : str
        The solver's own status text.
    objective : float
        Value of the LP's cost at ``x`` (NaN without a solution).
    x : numpy.ndarray
        Column values (NaN when the solver gave none).
    row_dual : numpy.ndarray or None
        d(objective)/d(row bound) in the LP's own sense.
    col_dual : numpy.ndarray or None
        Reduced costs, when the back end gives them.
    method : str
        Back end and method that produced it.
    iterations : dict of str to int
    seconds : float
    options : dict
        Options used, and notes such as ``scaled`` or ``fallback``.
    solver_version : str
    """

    status: Status
    message: str
    objective: float
    x: np.ndarray
    row_dual: np.ndarray | None
    method: str
    col_dual: np.ndarray | None = None
    iterations: dict[str, int] = field(default_factory=dict)
    seconds: float = 0.0
    options: dict[str, Any] = field(default_factory=dict)
    solver_version: str = ""


@runtime_checkable
class Backend(Protocol):
    """A solver for :class:`~growthplan.lp.program.LinearProgram`.

    Attributes
    ----------
    name : str
    features : frozenset of Feature
    """

    name: str
    features: frozenset[Feature]

    def solve(self, lp: LinearProgram, *, stop: Any = None,
              callback: Any = None) -> SolverOutcome:
        """Solve ``lp`` (its ``cost`` in its ``sense``); never raises for a failed solve."""
        ...

    def alternatives(self) -> list[Backend]:
        """Back ends to try, in order, when this one fails on a problem."""
        ...


@runtime_checkable
class RayBackend(Backend, Protocol):
    """A back end that finds the direction an unbounded LP runs away in (``Feature.RAY``)."""

    def ray(self, lp: LinearProgram) -> np.ndarray | None:
        """A primal ray of an unbounded ``lp`` (None when none is found)."""
        ...


@runtime_checkable
class IisBackend(Backend, Protocol):
    """A back end that finds an irreducible infeasible subset (``Feature.IIS``)."""

    def iis(self, lp: LinearProgram) -> tuple[list[int], list[int]] | None:
        """Rows and columns of an irreducible infeasible subset (None when none is found)."""
        ...
