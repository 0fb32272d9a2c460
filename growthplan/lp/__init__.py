"""The plan as a linear programme: arrays (:mod:`.data`), the solver-neutral
program (:mod:`.program`), its builder (:mod:`.build`) and one module per
family of conditions (:mod:`.conditions`)."""

from __future__ import annotations

import importlib
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from .build import build, estimate_size
    from .data import PlanData, lower
    from .program import Block, LinearProgram, Stage

_LAZY = {"build": "build", "estimate_size": "build", "PlanData": "data", "lower": "data",
         "Block": "program", "LinearProgram": "program", "Stage": "program"}

__all__ = ["Block", "LinearProgram", "PlanData", "Stage", "build", "estimate_size", "lower"]


def __getattr__(name: str) -> Any:
    module = _LAZY.get(name)
    if module is None:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    value = getattr(importlib.import_module(f"{__name__}.{module}"), name)
    globals()[name] = value
    return value
