"""Files in and out: plan files and their schema, safe writing and reading.

:mod:`~growthplan.io.planfile` reads and writes YAML/TOML plan files,
:mod:`~growthplan.io.schema` words their published schema,
:mod:`~growthplan.io.atomic` is the one writer every export goes through
(written aside, renamed into place only on success) and
:mod:`~growthplan.io.files` the one reader of input files (regular files only,
size-capped, one-line errors).

Turning published statistical tables into an economy lives in
:mod:`growthplan.statistics`; its names are still reachable here for one
release, with a :class:`DeprecationWarning`.
"""

from __future__ import annotations

import warnings
from typing import TYPE_CHECKING, Any

from ..lazy import attribute
from .atomic import atomic_file, atomic_files, atomic_folder

if TYPE_CHECKING:
    from .planfile import (
        EconomyTables,
        PlanFile,
        SolveOptions,
        load_plan_file,
        plan_file_inputs,
        plan_file_schema,
        save_plan_file,
    )

_LAZY = {
    "EconomyTables": "planfile", "PlanFile": "planfile", "SolveOptions": "planfile",
    "load_plan_file": "planfile", "plan_file_inputs": "planfile",
    "plan_file_schema": "planfile", "save_plan_file": "planfile",
}

__all__ = [
    "EconomyTables",
    "PlanFile",
    "SolveOptions",
    "atomic_file",
    "atomic_files",
    "atomic_folder",
    "load_plan_file",
    "plan_file_inputs",
    "plan_file_schema",
    "save_plan_file",
]


def __getattr__(name: str) -> Any:
    if name in _LAZY:
        return attribute(__name__, name, _LAZY, globals())
    from .. import statistics

    if name in statistics.__all__:
        warnings.warn(f"growthplan.io.{name} has moved to growthplan.statistics.{name}; "
                      "the old spelling will be removed in the next release",
                      DeprecationWarning, stacklevel=2)
        return getattr(statistics, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(__all__)
