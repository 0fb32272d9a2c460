"""The solver-neutral linear programme with labelled row and column blocks.

``row_lower ≤ M v ≤ row_upper`` and ``col_lower ≤ v ≤ col_upper``. Rows and
columns come in named blocks laid out as arrays (years × sectors, say); each
entry's label is a tuple of data (``("balance", 2030, "energy")``), never a
string to be parsed back.
"""

from __future__ import annotations

import dataclasses
import re
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

if TYPE_CHECKING:
    from .data import PlanData

__all__ = ["Block", "LinearProgram", "Stage"]


@dataclass(frozen=True)
class Block:
    """A named range of rows or columns laid out as an array of ``shape``.

    Attributes
    ----------
    name : str
        Family of the rows or columns (``"balance"``, ``"starts"``, …).
    start : int
        Position of the first entry in the full vector.
    shape : tuple of int
        Layout of the block; ``()`` for a single entry.
    labels : tuple of sequences
        One sequence of labels per axis of ``shape`` (years, sectors, …).
    """

    name: str
    start: int
    shape: tuple[int, ...]
    labels: tuple[tuple[Any, ...], ...]

    @property
    def size(self) -> int:
        """Number of entries."""
        return int(np.prod(self.shape)) if self.shape else 1

    @property
    def stop(self) -> int:
        """One past the last entry."""
        return self.start + self.size

    def take(self, values: np.ndarray) -> np.ndarray:
        """This block's part of a full vector, reshaped to ``shape``."""
        return np.asarray(values[self.start:self.stop]).reshape(self.shape)

    def label(self, i: int) -> tuple[Any, ...]:
        """``(name, *axis labels)`` of entry ``i`` of the block (0-based within it)."""
        if not self.shape:
            return (self.name,)
        idx = np.unravel_index(i, self.shape)
        return (self.name, *(axis[k] for axis, k in zip(self.labels, idx, strict=True)))

    def all_labels(self) -> list[tuple[Any, ...]]:
        """Labels of every entry, in order."""
        return [self.label(i) for i in range(self.size)]


@dataclass(frozen=True)
class Stage:
    """One objective stage: a cost vector, its sense and how closely it is held after."""

    cost: np.ndarray
    sense: str
    tolerance: float = 0.0


@dataclass(frozen=True)
class LinearProgram:
    """A compiled plan, ready for any back end.

    Attributes
    ----------
    matrix : scipy.sparse.csc_array
        The constraint matrix ``M``, rows × columns.
    row_lower, row_upper, col_lower, col_upper : numpy.ndarray
        Bounds; ``±inf`` where there is none.
    cost : numpy.ndarray
        Objective of the current stage, optimised in ``sense``.
    sense : {"max", "min"}
        Whether ``cost`` is maximised or minimised.
    rows, cols : dict of str to Block
        Named blocks in order.
    stages : list of Stage
        The objective stages (one for most objectives; the first is ``cost``).
    data : PlanData or None
        The arrays the programme was built from.
    operators : dict
        ``capacity`` (``C = base + G z``) and ``deliveries`` (``W z``) operators,
        kept for the results.
    formulation : {"expression", "state"}
        How capacity in service is written (:mod:`growthplan.lp.build`).
    """

    matrix: sparse.csc_array
    row_lower: np.ndarray
    row_upper: np.ndarray
    col_lower: np.ndarray
    col_upper: np.ndarray
    cost: np.ndarray
    sense: str
    rows: dict[str, Block]
    cols: dict[str, Block]
    stages: list[Stage] = field(default_factory=list)
    data: PlanData | None = None
    operators: dict[str, Any] = field(default_factory=dict)
    formulation: str = "expression"

    @property
    def shape(self) -> tuple[int, int]:
        """(rows, columns)."""
        return (int(self.matrix.shape[0]), int(self.matrix.shape[1]))

    @property
    def nnz(self) -> int:
        """Stored nonzeros of the matrix."""
        return int(self.matrix.nnz)

    @property
    def row_sign(self) -> np.ndarray:
        """+1 for "≤" rows (a finite upper bound), −1 for "≥" rows."""
        return np.where(np.isfinite(self.row_upper), 1.0, -1.0)

    def replace(self, **changes: Any) -> LinearProgram:
        """A copy with some fields replaced.

        Returns
        -------
        LinearProgram
        """
        return dataclasses.replace(self, **changes)

    def row_labels(self) -> list[tuple[Any, ...]]:
        """Label tuple of every row, e.g. ``("balance", 2030, "energy")``.

        Returns
        -------
        list of tuple
        """
        return _labels(self.rows, self.shape[0])

    def col_labels(self) -> list[tuple[Any, ...]]:
        """Label tuple of every column, e.g. ``("starts", 2030, "energy")``.

        Returns
        -------
        list of tuple
        """
        return _labels(self.cols, self.shape[1])

    def row_names(self) -> list[str]:
        """Unique names made of letters, digits and underscores (for LP and MPS files).

        Returns
        -------
        list of str
            One per row, from the row labels (a repeat gets ``_2``, ``_3``, …).
        """
        return _names(self.row_labels())

    def col_names(self) -> list[str]:
        """Unique names made of letters, digits and underscores (for LP and MPS files).

        Returns
        -------
        list of str
            One per column, from the column labels (a repeat gets ``_2``, ``_3``, …).
        """
        return _names(self.col_labels())

    def block_of_row(self, r: int) -> Block:
        """The row block holding row ``r``.

        Parameters
        ----------
        r : int
            Row position in the whole programme.

        Returns
        -------
        Block

        Raises
        ------
        IndexError
            When no block holds ``r``.
        """
        return _find(self.rows, r)

    def block_of_col(self, c: int) -> Block:
        """The column block holding column ``c``.

        Parameters
        ----------
        c : int
            Column position in the whole programme.

        Returns
        -------
        Block

        Raises
        ------
        IndexError
            When no block holds ``c``.
        """
        return _find(self.cols, c)

    def add_rows(self, name: str, coeffs: sparse.sparray, lower: np.ndarray,
                 upper: np.ndarray, labels: tuple[Any, ...]) -> LinearProgram:
        """A copy with a block of rows appended (used for held objective stages).

        Parameters
        ----------
        name : str
            Name of the row block; a block of that name must be the last one
            and then grows.
        coeffs : scipy.sparse array, shape (k, columns)
            Coefficients of the new rows.
        lower, upper : numpy.ndarray, shape (k,)
            Row bounds (``±inf`` where there is none).
        labels : tuple
            One label per new row.

        Returns
        -------
        LinearProgram
            The programme with ``k`` more rows; ``self`` is unchanged.
        """
        k = coeffs.shape[0]
        prev = self.rows.get(name)
        rows = dict(self.rows)
        if prev is not None:
            assert prev.stop == self.shape[0], "only the last row block can grow"
            rows[name] = Block(name, prev.start, (prev.size + k,), (prev.labels[0] + labels,))
        else:
            rows[name] = Block(name, self.shape[0], (k,), (labels,))
        return self.replace(
            matrix=sparse.csc_array(sparse.vstack([self.matrix, coeffs])),
            row_lower=np.append(self.row_lower, lower), row_upper=np.append(self.row_upper, upper),
            rows=rows)

    def add_cols(self, name: str, coeffs: sparse.sparray, cost: np.ndarray, lower: np.ndarray,
                 upper: np.ndarray, labels: tuple[Any, ...]) -> LinearProgram:
        """A copy with a block of columns appended (used by the elastic re-solve).

        Parameters
        ----------
        name : str
            Name of the new column block.
        coeffs : scipy.sparse array, shape (rows, k)
            Coefficients of the new columns.
        cost : numpy.ndarray, shape (k,)
            Their entries in the objective.
        lower, upper : numpy.ndarray, shape (k,)
            Column bounds (``±inf`` where there is none).
        labels : tuple
            One label per new column.

        Returns
        -------
        LinearProgram
            The programme with ``k`` more columns and no objective stages
            (their costs would be a column short); ``self`` is unchanged.
        """
        cols = dict(self.cols)
        cols[name] = Block(name, self.shape[1], (coeffs.shape[1],), (labels,))
        return self.replace(
            matrix=sparse.csc_array(sparse.hstack([self.matrix, coeffs])),
            col_lower=np.append(self.col_lower, lower), col_upper=np.append(self.col_upper, upper),
            cost=np.append(self.cost, cost), cols=cols, stages=[])


def _find(blocks: dict[str, Block], i: int) -> Block:
    for b in blocks.values():
        if b.start <= i < b.stop:
            return b
    raise IndexError(i)


def _labels(blocks: dict[str, Block], total: int) -> list[tuple[Any, ...]]:
    out: list[tuple[Any, ...]] = [("",)] * total
    for b in blocks.values():
        for i in range(b.size):
            out[b.start + i] = b.label(i)
    return out


_BAD = re.compile(r"[^A-Za-z0-9_]")


def _names(labels: list[tuple[Any, ...]]) -> list[str]:
    out, seen = [], set()
    for lab in labels:
        name = _BAD.sub("_", "_".join(str(p) for p in lab))
        base, k = name, 1
        while name in seen:
            k += 1
            name = f"{base}_{k}"
        seen.add(name)
        out.append(name)
    return out
