"""The ``growthplan`` command line: one module per group of commands.

``base`` holds what every command shares (one-line failures with documented
exit codes, signal handling, output checks); the command modules register
their commands on :func:`main` when imported here.

Exit codes: 0 optimal plan (or success), 1 infeasible plan, 2 invalid input,
3 solver failure or interrupt, 4 unbounded plan.

A signal while the command starts, before its handlers are in place, is
taken by :mod:`growthplan.startup` (exit 3, ``interrupted``).
"""

from . import economy as _economy  # noqa: F401 - registers the economy commands
from . import plan as _plan  # noqa: F401 - registers the plan commands
from . import scenarios as _scenarios  # noqa: F401 - registers the scenario commands
from .base import main

__all__ = ["main"]
