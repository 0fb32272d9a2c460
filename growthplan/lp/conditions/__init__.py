"""One module per family of conditions.

Each family is a :class:`Condition`: it builds its rows of the LP from the
plan's arrays, counts them for the size estimate without building them,
checks them in the audit from the schedules alone, says whether the
diagnosis may relax them (and what each row requires), and words its rows
for reports. The builder, the size estimate, the audit and the diagnosis
loop over :data:`CONDITIONS`; adding a family is adding a module here.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

if TYPE_CHECKING:
    from ..data import PlanData
    from ..program import Block

__all__ = ["Check", "Condition", "Context", "RowBlock", "Schedules", "CONDITIONS",
           "capacity_nnz_by_row", "FORMULATIONS"]

# How capacity in service enters the LP (see :mod:`growthplan.lp.build`):
# "expression": a linear expression in past starts, ``C = base + G z``;
# "state": stock columns ``K = G z`` carried from year to year by their own rows.
FORMULATIONS = ("expression", "state")


@dataclass
class Context:
    """What the conditions share while the LP is built: column blocks and operators."""

    data: PlanData
    cols: dict[str, Block]
    ncol: int
    capacity: sparse.csr_array    # G: rows (t, k) for t = 0..T, columns starts (τ, k)
    deliveries: sparse.csr_array  # W: rows (t, i), columns starts (τ, k); k: techniques

    def width(self, name: str) -> int:
        return self.cols[name].size

    def new_capacity(self, weights: sparse.sparray) -> dict[str, sparse.sparray]:
        """Coefficients of ``weights @ (G z)``, capacity from the plan's own starts.

        ``weights`` has one column per row (t, k) of ``G`` (t = 0..T). In the
        expression form the terms fall on the starts (``weights @ G``); in the
        state form on the stock columns ``K = G z`` themselves, which keeps
        every row short and the LP block-banded in years.
        """
        w = sparse.csr_array(weights)
        if "stock" in self.cols:
            return {"stock": w}
        return {"starts": sparse.csr_array(w @ self.capacity)}


@dataclass
class RowBlock:
    """Rows of one family: coefficients by column block, bounds and label axes."""

    name: str
    shape: tuple[int, ...]
    labels: tuple[tuple[Any, ...], ...]
    coeffs: dict[str, sparse.sparray]
    lower: np.ndarray | float
    upper: np.ndarray | float


@dataclass
class Schedules:
    """A solution as arrays (years × techniques and the like), the audit's input.

    ``output``, ``starts`` and ``capacity`` have one column per technique
    (per sector when there are no alternative techniques).
    """

    output: np.ndarray
    starts: np.ndarray
    consumption: np.ndarray | None
    level: float | None
    imports: np.ndarray | None
    exports: np.ndarray | None
    capacity: np.ndarray        # as reported: (T + 1) × sectors
    deliveries: np.ndarray      # as reported: years × commodities
    shipments: np.ndarray | None = None  # years × shipments (several regions)
    regional_consumption: np.ndarray | None = None  # years × regions (own levels)
    # recomputed independently by the audit (vintage by vintage)
    capacity_check: np.ndarray | None = None
    deliveries_check: np.ndarray | None = None


@dataclass
class Check:
    """Violations of one kind of condition, each with its own scale and label.

    ``violation`` is how far each condition is from holding (≤ 0 when it
    holds; NaN counts as violated), ``scale`` the sum of the absolute values
    of its terms, ``group`` the index of the sector, commodity or kind the
    row belongs to (violations are measured against the largest scale within
    the same group, so a sector in tiny units is judged by its own numbers).
    """

    kind: str
    violation: np.ndarray
    scale: np.ndarray
    labels: list[tuple[Any, ...]]
    group: np.ndarray | None = None


@dataclass
class Condition:
    """Base of the condition families (see the module notes)."""

    name: str = ""
    elastic: bool = False
    words: str = ""
    extra: dict[str, Any] = field(default_factory=dict)

    def applies(self, d: PlanData) -> bool:
        """Whether the plan has rows of this family."""
        return True

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        """(rows, nonzeros) this family adds, without building anything."""
        raise NotImplementedError

    def build(self, ctx: Context) -> RowBlock | None:
        """The family's rows."""
        raise NotImplementedError

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        """Violations recomputed from the schedules, never from the LP matrix."""
        return []

    def required(self, d: PlanData, block: Block, lower: np.ndarray,
                 upper: np.ndarray) -> np.ndarray:
        """What each row asks for (its right-hand side in the trade's terms), for the diagnosis."""
        return np.where(np.isfinite(lower), lower, upper)

    def magnitude(self, d: PlanData, required: np.ndarray) -> np.ndarray:
        """Typical size of each row's terms: the unit of its shortfall in the elastic re-solve."""
        return np.abs(required)

    def shortfall_label(self, label: tuple[Any, ...]) -> tuple[str, str, Any]:
        """(condition, sector or kind, year) of one row, for the shortfall table."""
        return (self.words or self.name, str(label[2]) if len(label) > 2 else "", label[1])

    def excess_words(self, d: PlanData, label: tuple[Any, ...], excess: float) -> str | None:
        """A limit exceeded by ``excess``, in words with its unit (None: the usual wording)."""
        return None

    def describe(self, label: tuple[Any, ...]) -> str:
        """The row in the trade's words, e.g. "labour in 2031"."""
        cond, who, year = self.shortfall_label(label)
        return " ".join(str(p) for p in (cond, "of" if who else "", who, "in", year) if p != "")


def capacity_nnz_by_row(d: PlanData, profile: np.ndarray | None = None) -> np.ndarray:
    """Nonzeros of each row of the capacity operator ``G``, shape (T + 1) × techniques.

    ``profile`` (techniques × (T + 2), by age) replaces the survival profile,
    e.g. for the stock increments of the state form.
    """
    T = d.T
    prof = d.surv if profile is None else profile
    nz = (prof != 0).astype(np.int64)                # techniques × (T + 2)
    csum = np.concatenate([np.zeros((d.m, 1), np.int64), np.cumsum(nz, axis=1)], axis=1)
    t = np.arange(T + 1)[:, None]
    hi = t - d.theta[None, :]                        # oldest vintage's age: τ = 0
    lo = hi - (T - 1)                                # youngest: τ = T − 1
    hi_c = np.clip(hi, -1, T + 1)
    lo_c = np.clip(lo, 0, T + 2)
    rows = np.arange(d.m)[None, :]
    out = csum[rows, hi_c + 1] - csum[rows, lo_c]
    return np.where(hi >= 0, np.maximum(out, 0), 0)


def _registry() -> list[Condition]:
    from .balance import Balance
    from .calibration import FirstYear
    from .capacity import Capacity, CapacityStock
    from .consumption import ConsumptionFall, ConsumptionFloor
    from .emissions import Emissions
    from .labour import Labour
    from .level import TerminalLevel
    from .national_targets import NationalTargets
    from .regional_consumption import RegionalConsumptionFloor, RegionalConsumptionLevel
    from .regional_labour import RegionalLabour
    from .shipments import ShipmentCeilings
    from .targets import Targets
    from .techniques import Techniques
    from .terminal import Terminal
    from .trade import ForeignExchange, TradeBounds
    from .trade_shares import FixedTradeShares

    return [Balance(), Capacity(), Labour(), ForeignExchange(), ConsumptionFloor(),
            ConsumptionFall(), Targets(), Terminal(), TerminalLevel(), TradeBounds(),
            FirstYear(), Techniques(), Emissions(), CapacityStock(),
            # several regions
            RegionalLabour(), ShipmentCeilings(), RegionalConsumptionLevel(),
            RegionalConsumptionFloor(), FixedTradeShares(), NationalTargets()]


CONDITIONS: list[Condition] = _registry()
