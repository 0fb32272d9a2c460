"""The plan as a linear programme: arrays (:mod:`.data`), the solver-neutral
program (:mod:`.program`), its builder (:mod:`.build`) and one module per
family of conditions (:mod:`.conditions`)."""

from .build import build, estimate_size
from .data import PlanData, lower
from .program import Block, LinearProgram, Stage

__all__ = ["Block", "LinearProgram", "PlanData", "Stage", "build", "estimate_size", "lower"]
