"""Back ends: the solvers a :class:`~growthplan.lp.program.LinearProgram` can be handed to.

Every back end follows :class:`~growthplan.backends.base.Backend`: it solves one
LP (one objective stage) and returns a back-end-neutral
:class:`~growthplan.backends.base.SolverOutcome`, and declares what else it
offers (duals, infeasible subsets, unbounded rays, interrupts, time limits).
Objective stages, the horizon search, the audit and the diagnosis run above
the back ends, in :mod:`growthplan.solve`. A back end's solver is loaded when
the back end is first named.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from .base import Backend, Feature, SolverOutcome, Status

if TYPE_CHECKING:
    from .highs import HighsBackend
    from .pulp import PulpBackend

__all__ = ["Backend", "Feature", "HighsBackend", "PulpBackend", "SolverOutcome", "Status"]


def __getattr__(name: str) -> Any:
    if name == "HighsBackend":
        from .highs import HighsBackend

        return HighsBackend
    if name == "PulpBackend":
        from .pulp import PulpBackend

        return PulpBackend
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
