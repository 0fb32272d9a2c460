"""Reading the tables statistical offices publish: wide and long layouts, located errors.

Offices publish supply, use and employment tables as spreadsheets or CSV
files in one of two shapes. This module reads both into a numeric table of
codes × codes and remembers where every code and cell came from, so that each
error names the file, the sheet, the row, the column and the value:
``use (use.csv, row 7 'C20', column D 'A01') must be a number. Got '..'.``

Layout version 1
----------------
The layout is described by a mapping (a table entry of the economy spec,
see :mod:`growthplan.statistics.build`); a bare file name means the wide layout
with every default. ``layout_version`` (of the spec) is ``1``.

**Wide** (``layout: wide``, the default): one row per row code, one column
per column code.

``header_row`` (default 1)
    The row (1-based) holding the column codes. Rows above it (titles,
    notes) are skipped.
``code_column`` (default 1)
    The column (1-based) holding the row codes.
``label_column`` (optional)
    A column of row labels (names), read as text and not as data.
``label_row`` (optional)
    A row of column labels below the header, read as text and not as data.
``totals`` (default ``["total"]``)
    Codes of totals rows and columns (compared case-insensitively). They are
    checked, not read as data: a totals row must equal the sum of the other
    rows of its column, a totals column the sum of the other columns of its
    row, within ``totals_tolerance`` (default 0.005, a share of the total;
    published tables are rounded).
``skip`` (default none)
    Codes of other rows or columns to leave out (subtotals, memo items).

Empty cells are zeros. Every other cell must be a number: text such as
``..`` or ``n/a`` is refused with its location, never read as zero. Codes
are text; a numeric code ``1`` and ``1.0`` are both ``"1"``. Blank rows are
skipped; a row with values and no code, a column with values and no code,
and a code given twice are errors.

**Long** (``layout: long``): a header row naming the columns, then one row
per cell; ``row_field`` (default ``row``), ``column_field`` (default
``column``) and ``value_field`` (default ``value``) name the columns that
hold the row code, the column code and the value; other columns are
ignored. Cells not listed are zeros; a cell listed twice is an error.
Totals codes are recognised and checked as in the wide layout.

Workbooks (``.xlsx``) are read from the sheet named ``sheet`` (default the
first); a formula without a saved result is refused. CSV files are UTF-8.
"""

from __future__ import annotations

import csv
import io
import math
import os
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Literal

import numpy as np
import pandas as pd
from pydantic import ConfigDict, Field

from ..errors import InvalidInput, invalid
from ..io.files import read_regular_file
from ..model.validation import Model
from .tables import _NUMBER, TABLE_MAX_BYTES, TABLE_MAX_CELLS

__all__ = ["LAYOUT_VERSION", "TableLayout", "LocatedTable", "read_table"]

LAYOUT_VERSION = 1
"""Version of the table layouts and of the economy spec that describes them."""


class TableLayout(Model):
    """Where a table is and how it is laid out (see the module notes, layout version 1).

    Parameters
    ----------
    file : str
        CSV or ``.xlsx`` file, relative to the spec file.
    layout : {"wide", "long"}, default "wide"
    sheet : str, optional
        Worksheet of a workbook (default the first).
    header_row, code_column : int, default 1
        Row of the column codes and column of the row codes (1-based, wide).
    label_column, label_row : int, optional
        A column of row labels and a row of column labels (wide), skipped.
    totals : list of str, default ["total"]
        Codes of totals rows and columns, checked and left out.
    skip : list of str, default []
        Codes of rows or columns left out unchecked (subtotals).
    totals_tolerance : float, default 0.005
        Largest gap between a total and its sum, as a share of the total.
    row_field, column_field, value_field : str
        Column names of the long layout.
    """

    model_config = ConfigDict(extra="forbid", frozen=True)

    file: str
    layout: Literal["wide", "long"] = "wide"
    sheet: str | None = None
    header_row: int = Field(default=1, ge=1)
    code_column: int = Field(default=1, ge=1)
    label_column: int | None = Field(default=None, ge=1)
    label_row: int | None = Field(default=None, ge=2)
    totals: list[str] = Field(default_factory=lambda: ["total"])
    skip: list[str] = Field(default_factory=list)
    totals_tolerance: float = Field(default=0.005, ge=0, lt=1)
    row_field: str = "row"
    column_field: str = "column"
    value_field: str = "value"


def _letter(j: int) -> str:
    """Spreadsheet column letter of the 0-based column ``j``."""
    s = ""
    j += 1
    while j:
        j, r = divmod(j - 1, 26)
        s = chr(65 + r) + s
    return s


@dataclass(frozen=True)
class LocatedTable:
    """A numeric table read from a file, with where each code and cell came from.

    Attributes
    ----------
    frame : DataFrame
        Row codes × column codes, floats (totals and skipped codes left out).
    what : str
        What the table is (``"use"``), first in every message.
    file : str
        The file name.
    sheet : str or None
        The worksheet, for a workbook.
    rows : dict
        Row code → 1-based row number in the file.
    columns : dict
        Column code → column letter (wide layout).
    cells : dict
        (row code, column code) → 1-based row (long layout).
    labels : dict
        Code → label, where the file gives labels.
    """

    frame: pd.DataFrame
    what: str
    file: str
    sheet: str | None = None
    rows: dict[str, int] = field(default_factory=dict)
    columns: dict[str, str] = field(default_factory=dict)
    cells: dict[tuple[str, str], int] = field(default_factory=dict)
    labels: dict[str, str] = field(default_factory=dict)

    def where(self, row: str | None = None, column: str | None = None) -> str:
        """``what (file, sheet 'S', row 7 'code', column D 'code')``: the location of a cell."""
        parts = [self.file]
        if self.sheet is not None:
            parts.append(f"sheet {self.sheet!r}")
        line = self.cells.get((row, column)) if row is not None and column is not None \
            else None
        if line is not None:
            parts.append(f"row {line}")
            parts.append(f"row code {row!r}, column code {column!r}")
        else:
            if row is not None:
                n = self.rows.get(row)
                parts.append(f"row {n} {row!r}" if n is not None else f"row code {row!r}")
            if column is not None:
                c = self.columns.get(column)
                parts.append(f"column {c} {column!r}" if c is not None
                             else f"column code {column!r}")
        return f"{self.what} ({', '.join(parts)})"

    def error(self, row: str | None, column: str | None, rule: str, value: Any
              ) -> InvalidInput:
        """The one-line error ``where must rule. Got value.`` for a cell, row or column."""
        return invalid(self.where(row, column), rule, value)

    def series(self) -> pd.Series:
        """A table of one data column as a Series by row code."""
        if self.frame.shape[1] != 1:
            raise invalid(self.where(), "have one column of values", list(self.frame.columns))
        return self.frame.iloc[:, 0].rename(None)


# -- raw grids ----------------------------------------------------------------------------

def _csv_grid(raw: bytes, path: Path, what: str) -> list[list[Any]]:
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise invalid(f"{what} ({path.name})", "be UTF-8 text", f"byte {exc.start}") from None
    if "\0" in text:
        raise invalid(f"{what} ({path.name})", "be a text table (it holds a NUL byte)",
                      "a NUL byte")
    rows: list[list[Any]] = []
    try:
        for row in csv.reader(io.StringIO(text, newline=""), strict=True):
            rows.append([_cell(c) for c in row])
            if len(rows) * max(len(row), 1) > TABLE_MAX_CELLS:
                raise invalid(f"{what} ({path.name})", f"have at most {TABLE_MAX_CELLS:,} "
                              "cells", "more")
    except csv.Error as exc:
        raise invalid(f"{what} ({path.name}, row {len(rows) + 1})", "be readable CSV",
                      str(exc)) from None
    return rows


def _cell(text: str) -> Any:
    text = text.strip()
    if not text:
        return None
    return float(text) if _NUMBER.fullmatch(text) else text


def _sheet_grid(raw: bytes, path: Path, what: str, sheet: str | None
                ) -> tuple[list[list[Any]], str]:
    import openpyxl

    try:
        values_wb = openpyxl.load_workbook(io.BytesIO(raw), read_only=True, data_only=True)
        formula_wb = openpyxl.load_workbook(io.BytesIO(raw), read_only=True, data_only=False)
    except Exception as exc:  # noqa: BLE001 - a corrupt workbook raises anything
        raise invalid(f"{what} ({path.name})", "be a readable .xlsx workbook",
                      type(exc).__name__) from None
    try:
        names = values_wb.sheetnames
        if not names:
            raise invalid(f"{what} ({path.name})", "have a worksheet", "none")
        name = names[0] if sheet is None else sheet
        if name not in names:
            raise invalid(f"{what} ({path.name}) sheet", f"be one of {names}", sheet)
        vsheet, fsheet = values_wb[name], formula_wb[name]
        rows: list[list[Any]] = []
        cells = 0
        for i, (vrow, frow) in enumerate(zip(vsheet.iter_rows(min_row=1), fsheet.iter_rows(
                min_row=1), strict=False), start=1):
            cells += len(vrow)
            if cells > TABLE_MAX_CELLS:
                raise invalid(f"{what} ({path.name}, sheet {name!r})",
                              f"have at most {TABLE_MAX_CELLS:,} cells", "more")
            out = []
            for j, (v, f) in enumerate(zip(vrow, frow, strict=False)):
                if v.value is None and getattr(f, "data_type", None) == "f":
                    raise invalid(f"{what} ({path.name}, sheet {name!r}, row {i}, column "
                                  f"{_letter(j)})", "hold a value, not a formula without a "
                                  "saved result (save the workbook in a spreadsheet program, "
                                  "or paste values)", str(f.value))
                value = v.value
                out.append(value.strip() or None if isinstance(value, str) else value)
            rows.append(out)
    except InvalidInput:
        raise
    except Exception as exc:  # noqa: BLE001 - a corrupt workbook raises anything
        raise invalid(f"{what} ({path.name})", "be a readable .xlsx workbook",
                      type(exc).__name__) from None
    finally:
        values_wb.close()
        formula_wb.close()
    return rows, name


def _grid(path: Path, what: str, sheet: str | None) -> tuple[list[list[Any]], str | None]:
    suffix = path.suffix.lower()
    raw = read_regular_file(path, what=what, limit=TABLE_MAX_BYTES)
    if suffix in (".xlsx", ".xlsm"):
        return _sheet_grid(raw, path, what, sheet)
    if suffix == ".xls":
        raise invalid(f"{what} ({path.name})", "be CSV or an .xlsx workbook (save the old "
                      ".xls format as .xlsx)", suffix)
    if sheet is not None:
        raise invalid(f"{what} ({path.name}) sheet", "be given only for a workbook", sheet)
    return _csv_grid(raw, path, what), None


def _code(v: Any) -> str | None:
    if v is None:
        return None
    if isinstance(v, float) and v.is_integer():
        return str(int(v))
    text = str(v).strip()
    return text or None


def _number(v: Any) -> float | None:
    """The cell as a float; None when it is not a number."""
    if v is None:
        return 0.0
    if isinstance(v, bool):
        return None
    if isinstance(v, int | float):
        return float(v)
    if isinstance(v, str) and _NUMBER.fullmatch(v.strip()):
        return float(v)
    return None


# -- the two layouts ------------------------------------------------------------------------

def read_table(layout: TableLayout | str | os.PathLike[str], *, what: str = "table",
               base: str | os.PathLike[str] | None = None) -> LocatedTable:
    """Read a table in the wide or long layout (see the module notes).

    Parameters
    ----------
    layout : TableLayout, str or path
        The layout, or a file name (wide layout, defaults).
    what : str
        What the table is, first in every message.
    base : path, optional
        Folder that a relative ``file`` is relative to.

    Returns
    -------
    LocatedTable

    Raises
    ------
    InvalidInput
        One line naming the file, sheet, row, column and value.
    """
    if not isinstance(layout, TableLayout):
        layout = TableLayout(file=str(layout))
    path = Path(layout.file)
    if base is not None and not path.is_absolute():
        path = Path(base) / path
    grid, sheet = _grid(path, what, layout.sheet)
    loc = LocatedTable(pd.DataFrame(), what, path.name, sheet)
    if layout.layout == "long":
        return _long(grid, layout, loc)
    return _wide(grid, layout, loc)


def _wide(grid: list[list[Any]], lay: TableLayout, loc: LocatedTable) -> LocatedTable:
    h = lay.header_row - 1
    if len(grid) <= h:
        raise invalid(loc.where(), f"have a header row {lay.header_row}",
                      f"{len(grid)} row(s)")
    width = max((len(r) for r in grid), default=0)
    grid = [list(r) + [None] * (width - len(r)) for r in grid]
    for name, number in (("code_column", lay.code_column), ("label_column", lay.label_column)):
        if number is not None and number > width:
            raise invalid(f"{loc.where()}: {name}", f"name one of its {width} column(s)",
                          number)
    cc = lay.code_column - 1
    skip_cols = {cc} | ({lay.label_column - 1} if lay.label_column else set())
    label_r = None if lay.label_row is None else lay.label_row - 1
    totals = {t.lower() for t in lay.totals}
    skip = set(lay.skip)
    header = grid[h]
    body_rows = [i for i in range(h + 1, len(grid)) if i != label_r]
    columns: dict[str, str] = {}
    col_index: list[tuple[int, str]] = []
    for j in range(width):
        if j in skip_cols:
            continue
        code = _code(header[j])
        if code is None:
            if any(grid[i][j] is not None for i in body_rows):
                where = f"{loc.what} ({', '.join(_parts(loc))}, row {h + 1}, column " \
                        f"{_letter(j)})"
                raise invalid(where, "hold a column code above every column with values",
                              None)
            continue
        if code in columns:
            raise invalid(f"{loc.what} ({', '.join(_parts(loc))}, row {h + 1}, column "
                          f"{_letter(j)})", f"hold each column code once (also in column "
                          f"{columns[code]})", code)
        columns[code] = _letter(j)
        col_index.append((j, code))
    if not col_index:
        raise invalid(loc.where(), f"have column codes in row {lay.header_row}", None)
    labels: dict[str, str] = {}
    if label_r is not None and label_r < len(grid):
        labels.update({c: str(grid[label_r][j]) for j, c in col_index
                       if grid[label_r][j] is not None})
    rows: dict[str, int] = {}
    data: list[list[float]] = []
    names: list[str] = []
    loc = LocatedTable(loc.frame, loc.what, loc.file, loc.sheet, rows, columns)
    for i in body_rows:
        row = grid[i]
        if all(v is None for v in row):
            continue
        code = _code(row[cc])
        if code is None:
            if any(row[j] is not None for j, _ in col_index):
                raise invalid(f"{loc.what} ({', '.join(_parts(loc))}, row {i + 1}, column "
                              f"{_letter(cc)})", "hold a row code in every row with values",
                              None)
            continue
        if code in rows:
            raise invalid(f"{loc.what} ({', '.join(_parts(loc))}, row {i + 1}, column "
                          f"{_letter(cc)})", f"hold each row code once (also in row "
                          f"{rows[code]})", code)
        rows[code] = i + 1
        if lay.label_column and row[lay.label_column - 1] is not None:
            labels[code] = str(row[lay.label_column - 1])
        values = []
        for j, col in col_index:
            x = _number(row[j])
            if x is None or not math.isfinite(x):
                raise loc.error(code, col, "be a number (empty for zero)", row[j])
            values.append(x)
        names.append(code)
        data.append(values)
    frame = pd.DataFrame(np.array(data, dtype=float).reshape(len(names), len(col_index)),
                         index=names, columns=[c for _, c in col_index])
    loc = LocatedTable(frame, loc.what, loc.file, loc.sheet, rows, columns, {}, labels)
    return _totals(loc, totals, skip, lay.totals_tolerance)


def _parts(loc: LocatedTable) -> list[str]:
    return [loc.file] + ([f"sheet {loc.sheet!r}"] if loc.sheet is not None else [])


def _long(grid: list[list[Any]], lay: TableLayout, loc: LocatedTable) -> LocatedTable:
    h = lay.header_row - 1
    if len(grid) <= h:
        raise invalid(loc.where(), f"have a header row {lay.header_row}",
                      f"{len(grid)} row(s)")
    header = [_code(v) for v in grid[h]]
    pos = {}
    for key, name in (("row_field", lay.row_field), ("column_field", lay.column_field),
                      ("value_field", lay.value_field)):
        if name not in header:
            raise invalid(f"{loc.what} ({', '.join(_parts(loc))}, row {h + 1})",
                          f"name a column {name!r} ({key})", [c for c in header if c])
        pos[key] = header.index(name)
    cells: dict[tuple[str, str], int] = {}
    values: dict[tuple[str, str], float] = {}
    rows: dict[str, int] = {}
    cols: dict[str, int] = {}
    where = f"{loc.what} ({', '.join(_parts(loc))}"
    for i in range(h + 1, len(grid)):
        line = grid[i] + [None] * (len(header) - len(grid[i]))
        if all(v is None for v in line):
            continue
        r, c = _code(line[pos["row_field"]]), _code(line[pos["column_field"]])
        for name, code, key in ((lay.row_field, r, "row_field"),
                                (lay.column_field, c, "column_field")):
            if code is None:
                raise invalid(f"{where}, row {i + 1}, column {_letter(pos[key])})",
                              f"hold a code in the column {name!r}", None)
        assert r is not None and c is not None
        raw = line[pos["value_field"]]
        x = _number(raw)
        if x is None or not math.isfinite(x):
            raise invalid(f"{where}, row {i + 1}, column {_letter(pos['value_field'])} "
                          f"{lay.value_field!r}, row code {r!r}, column code {c!r})",
                          "be a number (empty for zero)", raw)
        if (r, c) in cells:
            raise invalid(f"{where}, row {i + 1}, row code {r!r}, column code {c!r})",
                          f"list each cell once (also in row {cells[(r, c)]})", raw)
        cells[(r, c)] = i + 1
        values[(r, c)] = x
        rows.setdefault(r, i + 1)
        cols.setdefault(c, i + 1)
    if not values:
        raise invalid(loc.where(), "list some cells", "none")
    rnames, cnames = list(rows), list(cols)
    ri = {n: k for k, n in enumerate(rnames)}
    ci = {n: k for k, n in enumerate(cnames)}
    arr = np.zeros((len(rnames), len(cnames)))
    for (r, c), x in values.items():
        arr[ri[r], ci[c]] = x
    frame = pd.DataFrame(arr, index=rnames, columns=cnames)
    loc = LocatedTable(frame, loc.what, loc.file, loc.sheet, rows, {}, cells)
    return _totals(loc, {t.lower() for t in lay.totals}, set(lay.skip), lay.totals_tolerance)


def _totals(loc: LocatedTable, totals: set[str], skip: set[str], tol: float
            ) -> LocatedTable:
    """Check totals rows and columns against their sums; leave them and skipped codes out."""
    f = loc.frame
    trows = [r for r in f.index if r.lower() in totals]
    tcols = [c for c in f.columns if c.lower() in totals]
    drows = [r for r in f.index if r not in trows and r not in skip]
    dcols = [c for c in f.columns if c not in tcols and c not in skip]
    for t in tcols:
        sums = f[dcols].sum(axis=1)
        for r in f.index:
            if r in skip:
                continue
            total, got = float(f.at[r, t]), float(sums[r])
            if abs(total - got) > tol * abs(total) + 1e-9 * max(abs(total), 1.0):
                raise loc.error(r, t, f"equal the sum of the other columns of its row "
                                f"within {100 * tol:g} % (it is a totals column; they sum "
                                f"to {got:.6g})", total)
    for t in trows:
        sums = f.loc[drows].sum(axis=0)
        for c in f.columns:
            if c in skip:
                continue
            total, got = float(f.at[t, c]), float(sums[c])
            if abs(total - got) > tol * abs(total) + 1e-9 * max(abs(total), 1.0):
                raise loc.error(t, c, f"equal the sum of the rows above within "
                                f"{100 * tol:g} % (it is a totals row; the rows sum to "
                                f"{got:.6g})", total)
    frame = f.loc[drows, dcols]
    if frame.empty:
        raise invalid(loc.where(), "hold data besides totals", list(f.index)[:5])
    return LocatedTable(frame, loc.what, loc.file, loc.sheet, loc.rows, loc.columns,
                        loc.cells, loc.labels)
