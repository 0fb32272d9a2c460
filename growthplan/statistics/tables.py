"""Transactions tables: from flows to coefficients, files in and out, aggregation.

Table file layout (CSV or Excel, one sheet)
-------------------------------------------
First column ``sector`` holds row labels. Rows are the producing sectors
(commodities), then the rows ``gross_output`` (required), ``labour`` or
``labour:<kind>`` (person-years, optional, one row per kind) and
``value_added`` (optional). Columns are the using sectors, in the same names,
then optionally ``final_demand``::

    sector,       farm, mill, final_demand
    farm,          150,  500,          350
    mill,          200,  100,         1700
    gross_output, 1000, 2000,
    labour,        300,  400,

The capital table has one row per sector and the columns of
:class:`~growthplan.CapitalSpec` (``initial_capacity``,
``mean_service_life``, ``retirement``, ``shape``, ``lead_time``,
``spending_profile`` as ``"0.4;0.6"``, ``max_utilisation``, …). Capital
coefficients come either as a matrix file (commodities × sectors) or from
capital stocks by using sector divided by capacity.
"""

from __future__ import annotations

import csv
import io
import os
import re
from collections import Counter
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd
from numpy.typing import ArrayLike

from ..errors import InvalidInput, invalid, show
from ..io.atomic import atomic_files
from ..io.files import read_regular_file
from ..limits import TABLE_MAX_BYTES, TABLE_MAX_CELLS, TABLE_MAX_COLUMNS
from ..model.economy import CapitalSpec, Economy, Sector
from ..model.validation import Rule, align_labels, raise_plain

__all__ = ["TransactionsTable", "read_transactions", "read_frame",
           "capital_coefficients_from_stocks", "capital_table", "economy_from_coefficients",
           "write_coefficient_tables"]

SPECIAL_ROWS = ("gross_output", "value_added")
LIST_COLUMNS = ("spending_profile", "investment_history")
CAPITAL_COLUMNS = set(CapitalSpec.model_fields)


# Largest table file read (64 MB): a 1,000-sector table at full precision is ~20 MB.
_FLOW_RULE = "be a finite flow >= 0 (a blank cell reads as 0)"

# TABLE_MAX_CELLS: most cells read from one sheet (a compressed workbook expands a lot).


def read_frame(source: Any, *, what: str = "table") -> pd.DataFrame:
    """A DataFrame from a DataFrame, a CSV file or an Excel workbook (first sheet).

    The first column holds the row labels. Labels are read as text, so
    sectors named ``NA``, ``null``, ``None``, ``nan`` or ``007`` keep their
    names; only an empty cell is missing. Only regular files up to
    :data:`TABLE_MAX_BYTES` are read; workbooks are refused when a formula
    has no saved result (its value would read as blank).

    Raises
    ------
    InvalidInput
        One line naming ``what`` and the file.
    """
    if isinstance(source, pd.DataFrame):
        return source.copy()
    if not isinstance(source, str | os.PathLike):
        raise invalid(what, "be a DataFrame or the path of a CSV or .xlsx file",
                      type(source).__name__)
    path = Path(source)
    suffix = path.suffix.lower()
    raw = read_regular_file(path, what=what, limit=TABLE_MAX_BYTES)
    if suffix in (".xlsx", ".xlsm"):
        frame = _frame_from_rows(_workbook_rows(raw, path, what), path, what)
    elif suffix == ".xls":
        raise invalid(what, "be CSV or an .xlsx workbook (save the old .xls format as "
                      ".xlsx)", str(path))
    else:
        frame = _read_csv(raw, path, what)
    frame.index = frame.index.map(lambda x: str(x).strip())
    frame.columns = [str(c).strip() for c in frame.columns]
    return frame


_NUMBER = re.compile(r"[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?")


def _csv_cell(cell: str) -> Any:
    """A CSV cell: None when empty, a float when it is a plain decimal number, else text.

    Python's ``float`` rounds correctly, so numbers written with 17 significant
    digits read back exactly; words such as ``NA``, ``nan`` or ``None`` stay text.
    """
    cell = cell.strip()
    if not cell:
        return None
    return float(cell) if _NUMBER.fullmatch(cell) else cell


def _read_csv(raw: bytes, path: Path, what: str) -> pd.DataFrame:
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise invalid(what, "be UTF-8 text", str(path),
                      hint=f"({exc.reason} at byte {exc.start})") from None
    if "\0" in text:
        raise invalid(what, "be a text table (it holds a NUL byte)", str(path))
    _check_header(text.split("\n", 1)[0], path, what)
    try:
        # the csv module, not pandas: no guessing of missing values ("NA" is a sector,
        # not a gap) and no per-column cost on a very wide file
        rows: list[list[Any]] = []
        for i, row in enumerate(csv.reader(io.StringIO(text, newline=""), strict=True)):
            labels = [c.strip() or None for c in (row if i == 0 else row[:1])]
            rows.append(labels if i == 0 else labels + [_csv_cell(c) for c in row[1:]])
    except csv.Error as exc:
        raise invalid(what, "be a readable CSV table", str(path), hint=f"({exc})") from None
    return _frame_from_rows(rows, path, what)


_SEPARATORS = {";": "semicolons", "\t": "tabs", "|": "vertical bars"}


def _check_header(first: str, path: Path, what: str) -> None:
    """Refuse, from its first line alone, a table separated by something other than
    commas (it would read as one column) or wider than the limit (before any row is
    parsed: a million columns would take a minute and a gigabyte)."""
    if "," not in first:
        for sep, words in _SEPARATORS.items():
            if sep in first:
                raise invalid(what, "be comma-separated (CSV)", str(path),
                              hint=f"(its first line is separated by {words}; save it with "
                                   "commas, or as .xlsx)")
    columns = first.count(",") + 1
    if columns > TABLE_MAX_COLUMNS:
        raise invalid(what, f"have at most {TABLE_MAX_COLUMNS:,} columns", str(path),
                      hint=f"(its first line has {columns:,})")


def _repeated(labels: list[str]) -> list[str]:
    return sorted(k for k, n in Counter(labels).items() if n > 1)


def _drop_blank_rows(frame: pd.DataFrame, path: Path, what: str) -> pd.DataFrame:
    """Drop rows with no label and no values; a row with values needs a label."""
    unlabelled = frame.index.isna() | (frame.index.map(lambda x: str(x).strip()) == "")
    if not unlabelled.any():
        return frame
    values = frame[unlabelled].notna().any(axis=1).to_numpy()
    if values.any():
        row = int(np.flatnonzero(unlabelled)[np.argmax(values)]) + 2  # 1-based, after header
        raise invalid(f"{what} ({path.name})", "have a label in the first column of every "
                      "row with values", f"an unlabelled row {row}")
    return frame[~unlabelled]


def _workbook_rows(raw: bytes, path: Path, what: str) -> list[list[Any]]:
    """Values of the first sheet; formulas without a saved result are refused.

    ``data_only=True`` gives the value a spreadsheet program saved with each
    formula, or None when none was saved (files written by scripts); the
    second, formula-keeping load tells those apart from blank cells.
    """
    import openpyxl

    try:
        values_wb = openpyxl.load_workbook(io.BytesIO(raw), read_only=True, data_only=True)
        formula_wb = openpyxl.load_workbook(io.BytesIO(raw), read_only=True, data_only=False)
        if not values_wb.worksheets:
            raise invalid(what, "have a worksheet", str(path))
        sheet, fsheet = values_wb.worksheets[0], formula_wb.worksheets[0]
        if getattr(sheet, "sheet_state", "visible") != "visible":
            # the table is the first sheet; one the reader cannot see is not taken silently
            raise invalid(what, "have its first sheet visible (the table is read from the "
                          f"first sheet, and {sheet.title!r} is hidden)", str(path))
        rows: list[list[Any]] = []
        cells = 0
        for vrow, frow in zip(sheet.iter_rows(), fsheet.iter_rows(), strict=False):
            cells += len(vrow)
            if cells > TABLE_MAX_CELLS:
                raise invalid(what, f"have at most {TABLE_MAX_CELLS:,} cells in its sheet",
                              str(path))
            for v, f in zip(vrow, frow, strict=False):
                if v.value is None and getattr(f, "data_type", None) == "f":
                    raise invalid(f"{what} ({path.name}, sheet {sheet.title!r}, cell "
                                  f"{f.coordinate})", "hold a value, not a formula without "
                                  "a saved result (open and save the workbook in a "
                                  "spreadsheet program, or paste values)",
                                  show(str(f.value)))
            rows.append([c.value for c in vrow])
        values_wb.close()
        formula_wb.close()
    except InvalidInput:
        raise
    except Exception as exc:  # noqa: BLE001 - a corrupt workbook raises anything
        raise invalid(what, "be a readable .xlsx workbook", str(path),
                      hint=f"({type(exc).__name__})") from None
    return rows


def _frame_from_rows(rows: list[list[Any]], path: Path, what: str) -> pd.DataFrame:
    rows = [r for r in rows if any(v is not None for v in r)]
    if not rows:
        raise invalid(what, "hold a table (it is empty)", str(path))
    width = max(len(r) for r in rows)
    rows = [list(r) + [None] * (width - len(r)) for r in rows]
    used = [j for j in range(width) if any(r[j] is not None for r in rows)]
    width = used[-1] + 1
    header, body = rows[0][:width], [r[:width] for r in rows[1:]]
    missing = [j for j in range(1, width) if header[j] is None]
    if missing:
        raise invalid(f"{what} ({path.name})", "have a label at the top of every column",
                      f"none in column {missing[0] + 1}")
    labels = [str(h).strip() for h in header[1:]]
    dup = _repeated(labels)
    if dup:
        raise invalid(f"{what} ({path.name})", "have each column label once", dup)
    dup = _repeated([str(r[0]).strip() for r in body if r[0] is not None])
    if dup:  # a repeated row (two 'labour' rows) would be taken for one
        raise invalid(f"{what} ({path.name})", "have each row label once", dup)
    index = pd.Index([r[0] for r in body], dtype=object,
                     name=None if header[0] is None else str(header[0]))
    data = [[np.nan if v is None else v for v in r[1:]] for r in body]
    frame = pd.DataFrame(data, index=index, columns=labels, dtype=object).infer_objects()
    frame.index = frame.index.map(lambda x: x if x is None else str(x))
    return _drop_blank_rows(frame, path, what)


def _to_number(v: Any) -> float:
    """A cell as a float; NaN for anything that is not a number (text, true/false, lists)."""
    if isinstance(v, bool | np.bool_) or (isinstance(v, str) and "_" in v):
        return np.nan
    try:
        return float(v)
    except (TypeError, ValueError, OverflowError):
        return np.nan


def _numeric(frame: pd.DataFrame, what: str) -> pd.DataFrame:
    """The table as floats; a cell that holds something else than a number is named."""
    if all(pd.api.types.is_numeric_dtype(t) and not pd.api.types.is_bool_dtype(t)
           for t in frame.dtypes):
        return frame.astype(float)
    cells = frame.to_numpy(dtype=object)
    numbers = np.frompyfunc(_to_number, 1, 1)(cells).astype(float)
    bad = np.isnan(numbers) & ~pd.isna(cells)
    if bad.any():
        r, c = np.argwhere(bad)[0]
        raise invalid(f"{what}[{frame.index[r]}, {frame.columns[c]}]", "be a number",
                      frame.iat[r, c])
    return pd.DataFrame(numbers, index=frame.index, columns=frame.columns)


def _named(what: str, source: Any) -> str:
    """``what`` with the file it was read from, when it was read from one."""
    return f"{what} ({Path(source).name})" if isinstance(source, str | os.PathLike) else what


def _nonnegative_cells(frame: pd.DataFrame, what: str, rule: str) -> None:
    """Refuse a table with a negative or non-finite cell, naming its first such cell."""
    z = frame.to_numpy(dtype=float)
    bad = ~np.isfinite(z) | (z < 0)
    if bad.any():
        r, c = np.argwhere(bad)[0]
        more = int(bad.sum()) - 1
        extra = f" ({more} more cell(s) break this)" if more else ""
        raise invalid(f"{what}[{frame.index[r]}, {frame.columns[c]}]", rule + extra,
                      float(z[r, c]))


class TransactionsTable:
    """An input–output transactions table in flows.

    Parameters
    ----------
    flows : DataFrame or array_like, shape (n, n)
        Intermediate use ``z_ij`` of commodity ``i`` (rows) by sector ``j``
        (columns), the same labels on both axes (an array gets the names
        ``sector_1``, ``sector_2``, …).
    gross_output : Series or array_like
        Gross output ``x_j``.
    labour : Series, DataFrame (kinds × sectors) or array_like, optional
        Labour input in person-years.
    final_demand : Series or DataFrame, optional
        Final demand by commodity (one or more columns).
    value_added : Series, optional
        Value added by sector.
    balance_tolerance : float, default 0.005
        Largest gap, as a share of gross output, between a row's uses
        (intermediate plus final demand) and its gross output, and between a
        column's inputs plus value added and its gross output: published
        tables are rounded, so a small gap is accepted; beyond it the table
        is refused with the row or column named.

    Raises
    ------
    InvalidInput
        Naming the sector: intermediate inputs above gross output (negative
        value added), value added given and negative, or a row or column that
        does not balance beyond ``balance_tolerance``.

    Attributes
    ----------
    names : list of str
        Sector names, in the order of the flow table's columns.
    flows : DataFrame
        The flows with rows in the order of ``names``, blanks read as 0.
    gross_output, value_added : Series
        Aligned to ``names`` (``value_added`` may be None).
    labour : DataFrame or None
        Labour kinds × sectors.
    final_demand : DataFrame or None
        Commodities × final-demand columns.
    """

    def __init__(self, flows: pd.DataFrame | ArrayLike, gross_output: pd.Series | ArrayLike,
                 labour: pd.Series | pd.DataFrame | ArrayLike | None = None, *,
                 final_demand: pd.Series | pd.DataFrame | ArrayLike | None = None,
                 value_added: pd.Series | ArrayLike | None = None,
                 balance_tolerance: float = 0.005) -> None:
        if not isinstance(flows, pd.DataFrame):
            arr = np.asarray(flows, dtype=float)
            if arr.ndim != 2 or arr.shape[0] != arr.shape[1]:
                raise invalid("flows", "be a square table", f"shape {arr.shape}")
            names = [f"sector_{i + 1}" for i in range(arr.shape[0])]
            flows = pd.DataFrame(arr, index=names, columns=names)
        flows = _numeric(flows, "flows")
        names = [str(c) for c in flows.columns]
        try:
            rows = align_labels(flows.index, names, "flows", "row")
        except Rule as exc:
            raise raise_plain(exc, "") from None
        self.flows = flows.iloc[rows].fillna(0.0)
        self.names = names
        self.gross_output = self._vector(gross_output, "gross_output")
        self.labour = self._labour(labour)
        self.final_demand = None if final_demand is None else self._final(final_demand)
        self.value_added = None if value_added is None else self._vector(value_added,
                                                                         "value_added")
        _nonnegative_cells(self.flows, "flows", _FLOW_RULE)
        x = self.gross_output.to_numpy()
        zero = [n for n, v in zip(self.names, x, strict=True) if not v > 0]
        if zero:
            raise invalid("gross_output", "be > 0 for every sector (coefficients divide by it)",
                          {n: float(self.gross_output[n]) for n in zero},
                          hint="Drop or aggregate sectors with no output.")
        if isinstance(balance_tolerance, bool) or not isinstance(balance_tolerance, int | float) \
                or not 0 <= balance_tolerance < 1:
            raise invalid("balance_tolerance", "be a share in [0, 1)", balance_tolerance)
        self.balance_tolerance = float(balance_tolerance)
        self._check_balance()

    def _check_balance(self) -> None:
        """Refuse columns whose inputs exceed output and rows or columns that do not balance."""
        x = self.gross_output
        tol = self.balance_tolerance
        inputs = self.flows.sum(axis=0)
        over = inputs - x
        bad = [n for n in self.names if over[n] > tol * x[n]]
        if bad:
            n = bad[0]
            raise invalid(f"flows.{n}", "have intermediate inputs at most the sector's gross "
                          f"output (value added >= 0; {len(bad)} sector(s) break this)",
                          f"inputs {inputs[n]:.6g} against gross output {x[n]:.6g}")
        if self.value_added is not None:
            va = self.value_added
            neg = [n for n in self.names if va[n] < 0]
            if neg:
                raise invalid(f"value_added.{neg[0]}", "be >= 0", float(va[neg[0]]))
            gap = inputs + va - x
            off = [n for n in self.names if abs(gap[n]) > tol * x[n]]
            if off:
                n = off[0]
                raise invalid(f"value_added.{n}", f"make inputs plus value added equal gross "
                              f"output within {100 * tol:g} %",
                              f"inputs {inputs[n]:.6g} + value added {va[n]:.6g} against "
                              f"gross output {x[n]:.6g}")
        gap_rows = self.balance_gap()
        if gap_rows is not None:
            off = [n for n in self.names if abs(gap_rows[n]) > tol * x[n]]
            if off:
                n = off[0]
                assert self.final_demand is not None  # balance_gap needs it
                uses = float(self.flows.loc[n].sum() + self.final_demand.loc[n].sum())
                raise invalid(f"flows.{n}", f"balance: intermediate and final uses of {n} "
                              f"equal its gross output within {100 * tol:g} % "
                              f"({len(off)} row(s) break this)",
                              f"uses {uses:.6g} against gross output {x[n]:.6g}")

    def value_added_by_sector(self) -> pd.Series:
        """Value added of each sector: the given figures, else gross output less inputs.

        Returns
        -------
        pandas.Series
        """
        if self.value_added is not None:
            return self.value_added.copy()
        return (self.gross_output - self.flows.sum(axis=0)).rename("value_added")

    def gdp(self) -> float:
        """Gross domestic product of the base year: the sum of value added.

        Returns
        -------
        float
        """
        return float(self.value_added_by_sector().sum())

    def _vector(self, v: Any, field: str) -> pd.Series:
        if isinstance(v, pd.DataFrame):
            v = v.iloc[:, 0] if v.shape[1] == 1 else v.iloc[0]
        if not isinstance(v, pd.Series):
            arr = np.asarray(v, dtype=object).ravel()
            if arr.size != len(self.names):
                raise invalid(field, f"have one entry per sector ({len(self.names)})",
                              f"{arr.size} entries")
            v = pd.Series(list(arr), index=self.names)
        v = pd.to_numeric(v, errors="coerce").where(lambda s: s.notna(), np.nan)
        try:
            pos = align_labels(v.index, self.names, field, "index")
        except Rule as exc:
            raise raise_plain(exc, "") from None
        v = v.iloc[pos].astype(float)
        if v.isna().any():
            raise invalid(f"{field}[{v.index[v.isna()][0]}]", "be a number", "a blank or text")
        return v

    def _labour(self, lab: Any) -> pd.DataFrame | None:
        if lab is None:
            return None
        if isinstance(lab, pd.DataFrame):
            rows = {str(k): self._vector(lab.loc[k], f"labour[{k}]") for k in lab.index}
            return pd.DataFrame(rows).T
        series = self._vector(lab, "labour")
        name = series.name if isinstance(series.name, str) and series.name else "labour"
        return pd.DataFrame([series.to_numpy()], index=[name], columns=self.names)

    def _final(self, f: Any) -> pd.DataFrame:
        if isinstance(f, pd.DataFrame):
            return pd.DataFrame({c: self._vector(f[c], f"final_demand[{c}]") for c in f.columns})
        return self._vector(f, "final_demand").to_frame("final_demand")

    # -- derived --------------------------------------------------------------
    def input_coefficients(self) -> pd.DataFrame:
        """Input coefficients ``a_ij = z_ij / x_j``.

        Returns
        -------
        pandas.DataFrame
            Commodities × sectors.
        """
        return self.flows.div(self.gross_output, axis=1)

    def labour_coefficients(self) -> pd.DataFrame | None:
        """Labour coefficients ``l_kj = labour_kj / x_j`` (None without labour).

        Returns
        -------
        pandas.DataFrame or None
            Labour kinds × sectors.
        """
        return None if self.labour is None else self.labour.div(self.gross_output, axis=1)

    def balance_gap(self) -> pd.Series | None:
        """Row sums of flows plus final demand minus gross output (zero when balanced).

        Returns
        -------
        pandas.Series or None
            By commodity; None without final demand.
        """
        if self.final_demand is None:
            return None
        return self.flows.sum(axis=1) + self.final_demand.sum(axis=1) - self.gross_output

    def aggregate(self, mapping: dict[str, str]) -> TransactionsTable:
        """Merge sectors by a concordance ``{old sector: new sector}``.

        Flows, gross output, labour, final demand and value added are summed;
        coefficients are then recomputed from the sums, never averaged.

        Parameters
        ----------
        mapping : dict of str to str
            The new sector of every old sector (each old sector exactly once);
            new sectors keep the order of their first old sector.

        Returns
        -------
        TransactionsTable
            The aggregated table.
        """
        missing = [s for s in self.names if s not in mapping]
        unknown = [s for s in mapping if s not in self.names]
        if missing or unknown:
            raise invalid("mapping", f"map every sector once (missing {missing}; unknown "
                          f"{unknown})", sorted(mapping))
        new = list(dict.fromkeys(mapping[s] for s in self.names))
        key = np.array([mapping[s] for s in self.names], dtype=object)  # an array, not labels
        flows = self.flows.groupby(key, sort=False).sum().T.groupby(key, sort=False).sum().T
        flows = flows.loc[new, new]

        def rows(s: pd.Series) -> pd.Series:
            return s.groupby(key, sort=False).sum().loc[new]

        lab = None if self.labour is None else self.labour.T.groupby(key, sort=False).sum().T
        fd = None if self.final_demand is None else self.final_demand.groupby(
            key, sort=False).sum().loc[new]
        va = None if self.value_added is None else rows(self.value_added)
        return TransactionsTable(flows, rows(self.gross_output),
                                 None if lab is None else lab[new],
                                 final_demand=fd, value_added=va)

    def to_economy(self, *, capital: Any = None,
                   capital_coefficients: pd.DataFrame | None = None,
                   capital_stocks: Any = None, **kwargs: Any) -> Economy:
        """The :class:`Economy` with coefficients of this table.

        Parameters
        ----------
        capital : dict, DataFrame or table file, optional
            Capital of each sector (CapitalSpec fields); ``initial_capacity``
            defaults to gross output divided by ``max_utilisation``.
        capital_coefficients : DataFrame or array_like, optional
            ``B`` directly (ignored when ``capital_stocks`` is given).
        capital_stocks : DataFrame or table file, optional
            Capital stock of commodity ``i`` (rows) held by sector ``j``
            (columns); ``b_ij = stock_ij / capacity_j``. Needs ``capital``.
        **kwargs
            Further :class:`Economy` fields (labour kinds, baskets).

        Returns
        -------
        Economy
        """
        spec = None
        if capital is not None:
            spec = _capital_specs(capital, self.names, self.gross_output)
        if capital_stocks is not None:
            if spec is None:
                raise invalid("capital", "be given with capital_stocks (capacity divides them)",
                              None)
            capacity = pd.Series({k: s.initial_capacity for k, s in spec.items()})
            capital_coefficients = capital_coefficients_from_stocks(capital_stocks, capacity)
        kwargs.setdefault("base_output", self.gross_output.to_numpy())
        return Economy(sectors=[Sector(name=n) for n in self.names],
                       input_coefficients=self.input_coefficients(),
                       capital_coefficients=capital_coefficients,
                       labour_coefficients=self.labour_coefficients(), capital=spec, **kwargs)


def capital_coefficients_from_stocks(stocks: pd.DataFrame, capacity: pd.Series) -> pd.DataFrame:
    """Capital coefficients ``b_ij = stock_ij / capacity_j`` (a zero capacity is an error).

    Parameters
    ----------
    stocks : DataFrame or table file
        Capital stock of commodity ``i`` (rows) held by sector ``j`` (columns).
    capacity : Series
        Capacity of each sector; its index gives the sector names and order.

    Returns
    -------
    DataFrame
        Capital coefficients, commodities × sectors.
    """
    what = _named("capital_stocks", stocks)
    stocks = _numeric(read_frame(stocks, what="capital_stocks"), what).fillna(0.0)
    # checked here, where the user's cell is known, rather than on the coefficient
    _nonnegative_cells(stocks, what, "be a finite capital stock >= 0")
    names = list(capacity.index)
    try:
        cols = align_labels(stocks.columns, names, "capital_stocks", "column")
        rows = align_labels(stocks.index, names, "capital_stocks", "row")
    except Rule as exc:
        raise raise_plain(exc, "") from None
    stocks = stocks.iloc[rows, cols]
    zero = [n for n in names if not capacity[n] > 0]
    if zero:
        raise invalid("capital.initial_capacity", "be > 0 to turn capital stocks into "
                      "coefficients", zero)
    return stocks.div(capacity, axis=1)


def _capital_specs(capital: Any, names: list[str], gross: pd.Series) -> dict[str, CapitalSpec]:
    if isinstance(capital, dict):
        items = capital
    else:
        frame = capital if isinstance(capital, pd.DataFrame) else read_frame(capital,
                                                                            what="capital")
        unknown = [c for c in frame.columns if c not in CAPITAL_COLUMNS]
        if unknown:
            raise invalid("capital", f"have only the columns {sorted(CAPITAL_COLUMNS)}",
                          unknown)
        items = {}
        for name, row in frame.iterrows():
            entry = {k: v.item() if isinstance(v, np.generic) else v for k, v in row.items()
                     if not (isinstance(v, float) and np.isnan(v))}
            for key in LIST_COLUMNS:
                value = entry.get(key)
                if isinstance(value, str):
                    try:
                        entry[key] = [float(p) for p in value.split(";")]
                    except ValueError:
                        raise invalid(f"capital.{name}.{key}", "be numbers separated by ';'",
                                      value) from None
                elif isinstance(value, int | float | np.number) and not isinstance(value, bool):
                    entry[key] = [float(value)]  # a one-entry list read as a number
            for k in ("lead_time",):
                if k in entry and isinstance(entry[k], float) and entry[k].is_integer():
                    entry[k] = int(entry[k])
            items[str(name)] = entry
    out: dict[str, Any] = {}
    for name, entry in items.items():
        if isinstance(entry, dict) and "initial_capacity" not in entry and name in gross.index:
            entry = {**entry, "initial_capacity": float(gross[name]) / float(
                entry.get("max_utilisation", 1.0) or 1.0)}
        out[name] = entry
    try:
        unknown = [k for k in out if k not in names]
        missing = [k for k in names if k not in out]
        if unknown or missing:
            raise invalid("capital", f"name every sector once (missing {missing}; unknown "
                          f"{unknown})", sorted(out))
        return {k: v if isinstance(v, CapitalSpec) else _spec(k, v) for k, v in out.items()}
    except InvalidInput:
        raise


def _spec(name: str, entry: dict[str, Any]) -> CapitalSpec:
    try:
        return CapitalSpec(**entry)
    except InvalidInput as exc:
        msg = str(exc)
        raise InvalidInput(f"capital.{name}.{msg}" if not msg.startswith("capital") else msg,
                           field=f"capital.{name}.{exc.field}") from None


def read_transactions(source: Any) -> TransactionsTable:
    """Read a transactions table in the layout described in this module.

    Parameters
    ----------
    source : DataFrame, str or path-like
        The table, or a CSV file or Excel workbook (first sheet) holding it.

    Returns
    -------
    TransactionsTable
    """
    frame = read_frame(source, what="flows")
    lower = {str(i).lower(): i for i in frame.index}
    if "gross_output" not in lower:
        raise invalid("flows", "have a row 'gross_output'", list(frame.index))
    special = [i for i in frame.index if str(i).lower() in SPECIAL_ROWS
               or str(i).lower().startswith("labour")]
    fd_cols = [c for c in frame.columns if c.lower().startswith("final_demand")]
    sector_cols = [c for c in frame.columns if c not in fd_cols]
    body = frame.drop(index=special)
    what = _named("flows", source)
    flows = _numeric(body[sector_cols], what)
    _nonnegative_cells(flows.fillna(0.0), what, _FLOW_RULE)  # named with its file
    gross = frame.loc[lower["gross_output"], sector_cols]
    lab_rows = [i for i in special if str(i).lower().startswith("labour")]
    labour = None
    if lab_rows:
        labour = frame.loc[lab_rows, sector_cols]
        labour.index = ["labour" if r.lower() == "labour" else r.split(":", 1)[1].strip()
                        for r in lab_rows]
    fd = body[fd_cols] if fd_cols else None
    va = frame.loc[lower["value_added"], sector_cols] if "value_added" in lower else None
    return TransactionsTable(flows, gross, labour, final_demand=fd, value_added=va)


def capital_table(econ: Economy) -> pd.DataFrame:
    """The economy's capital as a table in the layout :func:`read_frame` reads back.

    Parameters
    ----------
    econ : Economy
        An economy with capital.

    Returns
    -------
    DataFrame
        One row per sector, the CapitalSpec fields as columns (list fields
        written as ``"0.4;0.6"``).
    """
    if econ.capital is None:
        raise invalid("capital", "be given to write a capital table", None)
    rows = {}
    for name, spec in econ.capital.items():
        row = spec.model_dump()
        for key in LIST_COLUMNS:
            if row.get(key) is not None:
                row[key] = ";".join(repr(float(v)) for v in row[key])
        rows[name] = row
    frame = pd.DataFrame.from_dict(rows, orient="index")
    frame.index.name = "sector"
    return frame


def _coefficient_frames(econ: Economy, prefix: str) -> dict[str, tuple[str, pd.DataFrame]]:
    """The coefficient tables of ``econ`` by plan-file key: (file name, table)."""
    out = {"input_coefficients": (f"{prefix}input_coefficients.csv",
                                  econ.A.rename_axis("sector")),
           "capital_coefficients": (f"{prefix}capital_coefficients.csv",
                                    econ.B.rename_axis("sector"))}
    if econ.labour_coefficients is not None:
        out["labour_coefficients"] = (f"{prefix}labour_coefficients.csv", pd.DataFrame(
            np.asarray(econ.labour_coefficients), columns=econ.names,
            index=pd.Index(econ.labour_kinds, name="kind")))
    if econ.capital is not None:
        out["capital"] = (f"{prefix}capital.csv", capital_table(econ))
    return out


def _write_csv(key: str, frame: pd.DataFrame, path: Path) -> None:
    # 17 significant digits read back to the same float (IEEE 754 double round trip)
    frame.to_csv(path, float_format=None if key == "capital" else "%.17g")


def write_coefficient_tables(econ: Economy, folder: str | os.PathLike[str], prefix: str = "", *,
                             overwrite: bool = False) -> dict[str, str]:
    """Write A, B, labour coefficients and capital as CSV files; return their file names.

    The files appear together or not at all (see :mod:`growthplan.io.atomic`);
    existing files are replaced only with ``overwrite=True``.

    Parameters
    ----------
    econ : Economy
        The economy whose coefficients and capital are written.
    folder : str or path-like
        Existing folder for the files.
    prefix : str, default ""
        Put before every file name.
    overwrite : bool, default False
        Replace files that exist.

    Returns
    -------
    dict of str to str
        File name by plan-file key (``input_coefficients``, ``capital``, …).
    """
    folder = Path(folder)
    frames = _coefficient_frames(econ, prefix)
    with atomic_files([folder / name for name, _ in frames.values()],
                      overwrite=overwrite) as temps:
        for (key, (_, frame)), tmp in zip(frames.items(), temps, strict=True):
            _write_csv(key, frame, tmp)
    return {key: name for key, (name, _) in frames.items()}


def economy_from_coefficients(input_coefficients: Any, *, capital: Any = None,
                              capital_coefficients: Any = None,
                              labour_coefficients: Any = None, **kwargs: Any) -> Economy:
    """An economy from coefficient tables (files or DataFrames) rather than flows.

    ``input_coefficients`` and ``capital_coefficients`` are commodities ×
    sectors; ``labour_coefficients`` has one row per labour kind; ``capital``
    is the capital table.

    Parameters
    ----------
    input_coefficients : DataFrame or table file
        ``A``; its columns name the sectors.
    capital : DataFrame or table file, optional
        The capital table (one row per sector, CapitalSpec fields).
    capital_coefficients : DataFrame or table file, optional
        ``B``.
    labour_coefficients : DataFrame or table file, optional
        Labour kinds × sectors.
    **kwargs
        Further :class:`Economy` fields.

    Returns
    -------
    Economy
    """
    a = _numeric(read_frame(input_coefficients, what="input_coefficients"),
                 "input_coefficients").fillna(0.0)
    names = [str(c) for c in a.columns]
    b = None if capital_coefficients is None else _numeric(
        read_frame(capital_coefficients, what="capital_coefficients"),
        "capital_coefficients").fillna(0.0)
    lab = None if labour_coefficients is None else _numeric(
        read_frame(labour_coefficients, what="labour_coefficients"), "labour_coefficients")
    spec = None
    if capital is not None:
        spec = _capital_specs(capital if isinstance(capital, pd.DataFrame) else read_frame(
            capital, what="capital"), names, pd.Series(dtype=float))
    return Economy(sectors=[Sector(name=n) for n in names], input_coefficients=a,
                   capital_coefficients=b, labour_coefficients=lab,
                   labour_kinds=None if lab is None else [str(k) for k in lab.index],
                   capital=spec, **kwargs)
