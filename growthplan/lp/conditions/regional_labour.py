"""Regional labour: each region's labour within its own supply, or within it plus migration.

``Σ_{k in r} l_k x_kt ≤ L^r_t`` for every region ``r`` (``l``: the economy's
first labour kind). With migration ceilings ``μ^r`` (most person-years by
which a region may draw on people moving in) the rows are
``Σ_{k in r} l_k x_kt ≤ L^r_t + μ^r`` and ``Σ_r Σ_{k in r} l_k x_kt ≤ Σ_r L^r_t``:
labour may move between regions within the ceilings while the whole
country's supply bounds the total (the same set of plans as explicit
migration flows ``m^r ≤ μ^r`` that sum to zero, without their columns).
Elastic: the diagnosis may ask for more labour in a region.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from . import Check, Condition, Context, RowBlock, Schedules

if TYPE_CHECKING:
    from ..data import PlanData

NATIONAL = "all regions"


def _coefficients(d: PlanData) -> np.ndarray:
    """Years × techniques: person-years of the first labour kind per unit of output."""
    return np.array([d.labour_at(t, every_kind=True)[0] for t in range(d.T)])


def _membership(d: PlanData) -> np.ndarray:
    """Rows × techniques: 1 where a technique works in the row's region (last row: every region)."""
    reg = d.regions
    region = reg.pair_region(d.tech_sector)
    rows = reg.R + (1 if reg.migration is not None else 0)
    out = np.zeros((rows, d.m))
    out[region, np.arange(d.m)] = 1.0
    if reg.migration is not None:
        out[-1] = 1.0
    return out


def _supply(d: PlanData) -> np.ndarray:
    """Years × rows: each region's supply (plus its migration ceiling), then the total."""
    reg = d.regions
    own = reg.labour.T  # years × regions
    if reg.migration is None:
        return own
    return np.hstack([own + reg.migration[None, :], own.sum(axis=1, keepdims=True)])


class RegionalLabour(Condition):
    def __init__(self) -> None:
        super().__init__(name="regional_labour", elastic=True, words="labour")

    def applies(self, d: PlanData) -> bool:
        return d.regions is not None and d.regions.labour is not None

    def _labels(self, d: PlanData) -> tuple[str, ...]:
        reg = d.regions
        return tuple(reg.regions) + ((NATIONAL,) if reg.migration is not None else ())

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        e = _membership(d)
        lab = _coefficients(d)
        nnz = sum(int(np.count_nonzero(e * lab[t][None, :])) for t in range(d.T))
        return d.T * e.shape[0], nnz

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        e = _membership(d)
        lab = _coefficients(d)
        rows = sparse.block_diag([sparse.csr_array(e * lab[t][None, :]) for t in range(d.T)],
                                 format="csr")
        return RowBlock(self.name, (d.T, e.shape[0]), (tuple(d.years), self._labels(d)),
                        {"output": sparse.csr_array(rows)}, -np.inf, _supply(d))

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        e = _membership(d)
        lab = _coefficients(d)
        used = (s.output * lab) @ e.T       # years × rows, from the output schedule
        scale = (np.abs(s.output) * lab) @ e.T
        supply = _supply(d)
        labels = [("regional_labour", y, r) for y in d.years for r in self._labels(d)]
        groups = np.tile(np.arange(e.shape[0]), d.T)
        return [Check("regional labour", (used - supply).ravel(), (scale + supply).ravel(),
                      labels, groups)]

    def shortfall_label(self, label: tuple[Any, ...]) -> tuple[str, str, Any]:
        return ("labour", str(label[2]), label[1])

    def describe(self, label: tuple[Any, ...]) -> str:
        where = "the whole country" if label[2] == NATIONAL else str(label[2])
        return f"labour in {where} in {label[1]}"
