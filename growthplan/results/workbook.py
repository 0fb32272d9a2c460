"""A plan result as a workbook a colleague can read (openpyxl through pandas).

Sheets, in order: ``summary`` (what the plan is, the summary lines and the
caution), ``inputs`` (the plan's inputs and assumptions), ``sectors`` (units
and base-year prices), ``glossary``, ``targets`` (required, reached, margin),
then every table of an optimal plan (a plan with techniques adds
``techniques``: one row per year and technique, the unit in its own column),
or for an impossible plan the
``diagnosis`` (shortfalls in words and figures) and ``conflict`` (the
infeasible subset in words).

Each sheet has one flat header row that pandas reads back (a two-level header
such as the labour table's becomes "labour used", "labour available"), the
year as its first column (never a bare row number), units in the headers,
per-column number formats with the values rounded to what the format shows
(no ``2435.9999999999995``, no ``-0.0``, no ``4.5e-13``), a frozen header row
and column widths that fit. The capacity table's year stays numeric; its
``period`` column marks the last row "after the plan".
"""

from __future__ import annotations

import contextlib
import math
import os
from collections.abc import Iterable
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np
import pandas as pd

from .accounts import employment_kind
from .report import (
    GLOSSARY,
    RATIO_WORDS,
    _job,
    decimals_for,
    inputs,
    sectors_table,
    shortfall_table,
    shortfall_words,
    targets_table,
    tidy_number,
)
from .summary import CAUTION, objective_unit

if TYPE_CHECKING:
    from .result import PlanResult

__all__ = ["write_workbook", "sheets", "flat_table"]

TEXT_WIDTH = 110     # width of the words column of the text sheets
MAX_WIDTH = 30       # widest numeric column (headers wrap)
# tables whose values are money at base-year prices per unit of the column
MONEY = ("shadow_prices_money", "quasi_rents_money", "labour_values_money")


def _flat(name: str, frame: pd.DataFrame, result: PlanResult) -> pd.DataFrame:
    """One header row: two-level headers joined in words, units added where known."""
    d = result.data
    labour_units: dict[str, str] = {}
    if d is not None:
        labour_units = dict(zip(d.labour_all_kinds, d.labour_all_units, strict=False))
    out = frame.copy()
    if isinstance(out.columns, pd.MultiIndex):
        cols = []
        for kind, second in out.columns:
            unit = labour_units.get(str(kind), "") or (frame.attrs.get("units") or {}).get(kind)
            if name == "employment":
                text = f"{kind} in {second}"
            else:  # labour: (kind, used/available)
                text = f"{kind} {second}"
            cols.append(f"{text} [{unit}]" if unit else text)
        out.columns = pd.Index(cols)
    elif d is not None and name in MONEY:
        vu = d.value_unit
        if name == "labour_values_money":
            out.columns = pd.Index([f"{c} [{vu} per {labour_units.get(str(c), 'unit')}]"
                                    for c in out.columns])
        else:
            units = dict(zip(d.names, d.units, strict=False))
            more = " a year of capacity" if name == "quasi_rents_money" else ""
            out.columns = pd.Index([f"{c} [{vu} per {units.get(str(c), 'unit')}{more}]"
                                    for c in out.columns])
    elif d is not None and name in ("consumption", "imports", "exports"):
        units = dict(zip(d.names, d.units, strict=False))
        out.columns = pd.Index([f"{c} [{units[c]}]" if c in units else
                                ("level [units of the consumption level]" if c == "level"
                                 else str(c)) for c in out.columns])
    elif d is not None and name in DUALS:
        units = dict(zip(d.names, d.units, strict=False))
        per = "{obj} per {unit}" + DUALS[name]
        obj = objective_unit(result)
        out.columns = pd.Index([f"{c} [" + per.format(
            obj=obj, unit=(labour_units.get(str(c)) or "person-year") if name == "labour_values"
            else units.get(str(c), "unit")) + "]" for c in out.columns])
    else:
        cols = []
        for c in map(str, out.columns):
            kind = employment_kind(c) if name == "accounts" else None
            if kind is not None:
                c = f"{c} [{labour_units.get(kind) or 'person-years'}]"
            elif name == "utilisation":
                c = f"{c} [fraction of capacity]"
            elif name == "starts" and c.endswith("]"):
                c = c[:-1] + " a year]"  # capacity begun, as output a year
            elif name == "accounts" and d is not None and c in _ACCOUNT_UNITS:
                c = f"{c} [{_ACCOUNT_UNITS[c].format(money=d.value_unit)}]"
            elif name == "shortfalls" and c == "share":
                c = SHARE
            elif name == "target_values" and c == "value":
                c = f"value [{objective_unit(result)} per unit of the requirement]"
            cols.append(c)
        out.columns = pd.Index(cols)
    return out


SHARE = "share [fraction of the requirement]"
# the shadow values' headers: the objective's unit per unit of the column
DUALS = {"shadow_prices": "", "shadow_prices_current": ", in current-year terms",
         "quasi_rents": " a year of capacity", "labour_values": ""}
_ACCOUNT_UNITS = {"investment_share": "fraction of GDP",
                  "consumption_per_head": "{money} per unit of the plan's population",
                  "gross_output_growth": "fraction, on the year before",
                  "gdp_growth": "fraction, on the year before",
                  "investment_growth": "fraction, on the year before",
                  "consumption_growth": "fraction, on the year before"}


def _with_year(name: str, frame: pd.DataFrame) -> pd.DataFrame:
    """The index as the first column (year), or none when it is only a row number.

    The capacity table's year stays a number; a ``period`` column beside it
    says which row is the capacity left after the plan."""
    if isinstance(frame.index, pd.RangeIndex) and frame.index.name is None:
        return frame.reset_index(drop=True)
    label = frame.index.name or "year"
    out = frame.reset_index(names=label)
    if name == "capacity" and label == "year" and len(out):
        period = ["plan"] * len(out)
        period[-1] = "after the plan"
        out.insert(1, "period", period)
    return out


def flat_table(name: str, frame: pd.DataFrame, result: PlanResult) -> pd.DataFrame:
    """A result table as it is exported: one header row with units, the year (or the
    table's own key) as a column, no bare row numbers.

    Parameters
    ----------
    name : str
        The table's name (``output``, ``shadow_prices``, …).
    frame : pandas.DataFrame
    result : PlanResult

    Returns
    -------
    pandas.DataFrame
    """
    return _with_year(name, _flat(name, frame, result))


def _is_ratio(sheet: str, column: str) -> bool:
    return sheet == "utilisation" or any(w in column for w in RATIO_WORDS)


def _formats(sheet: str, frame: pd.DataFrame) -> tuple[pd.DataFrame, dict[str, str]]:
    """Values rounded to what each column's number format shows, and those formats."""
    out = frame.copy()
    fmts: dict[str, str] = {}
    for c in out.columns:
        col = out[c]
        if c == "year" or pd.api.types.is_integer_dtype(col):
            fmts[c] = "0" if c == "year" else "#,##0"
            continue
        if not pd.api.types.is_float_dtype(col):
            continue
        vals = col.to_numpy(dtype=float)
        finite = vals[np.isfinite(vals)]
        scale = float(np.abs(finite).max()) if finite.size else 1.0
        if _is_ratio(sheet, str(c)):
            dec, fmts[c] = 3, "0.0%"
        else:
            dec = decimals_for(finite)
            fmts[c] = "#,##0." + "0" * dec
        out[c] = [_round(v, dec, scale) for v in vals]
    return out, fmts


def _round(v: float, decimals: int, scale: float) -> float:
    if not math.isfinite(v):
        return v
    return tidy_number(round(tidy_number(v, scale), decimals))


def _text_sheet(rows: Iterable[tuple[str, str]], columns: tuple[str, str]) -> pd.DataFrame:
    return pd.DataFrame(list(rows), columns=list(columns))


def sheets(result: PlanResult, tables: dict[str, pd.DataFrame]) -> dict[str, pd.DataFrame]:
    """The workbook's sheets as flat frames, in order (see the module notes).

    Parameters
    ----------
    result : PlanResult
    tables : dict of str to DataFrame
        The result's tables (empty for a result that is not optimal).

    Returns
    -------
    dict of str to pandas.DataFrame
    """
    lines = [("about", _job(result)), *result.summary()._lines(), ("caution", CAUTION)]
    out: dict[str, pd.DataFrame] = {
        "summary": _text_sheet(lines, ("item", "value")),
        "inputs": _text_sheet(inputs(result), ("input", "value")),
        "sectors": sectors_table(result),
        "glossary": _text_sheet(GLOSSARY, ("term", "meaning"))}
    targets = targets_table(result)
    if not targets.empty:
        out["targets"] = targets
    if not result.ok:
        out.update(_diagnosis(result))
    for name, frame in tables.items():
        out[name[:31]] = flat_table(name, frame, result)
    return out


def _diagnosis(result: PlanResult) -> dict[str, pd.DataFrame]:
    diag = result.diagnosis
    words = [("status", f"{result.status.value} ({result.message})")]
    if diag is None:
        words.append(("diagnosis", "no diagnosis was made for this result"))
        return {"diagnosis": _text_sheet(words, ("item", "value"))}
    words.append(("diagnosis", diag.headline()))
    if diag.views():
        words.append(("other view", diag.views()))
    words.append(("conflict", diag.conflict() or diag.subset_source or "not computed"))
    words.extend(("step", str(step)) for step in diag.steps)
    out = {"diagnosis": _text_sheet(words, ("item", "value"))}
    if not diag.shortfalls.empty:
        short = shortfall_table(result)
        short["in words"] = shortfall_words(result)
        out["shortfalls"] = short.rename(columns={"share": SHARE})
    if diag.infeasible_subset is not None and not diag.infeasible_subset.empty:
        out["conflict"] = diag.infeasible_subset.reset_index(drop=True)
    return out


def _layout(ws: Any, frame: pd.DataFrame, fmts: dict[str, str], text: bool) -> None:
    """Number formats, a frozen header row (and year column), widths and wrapped headers."""
    from openpyxl.styles import Alignment, Font, PatternFill
    from openpyxl.utils import get_column_letter

    head_fill = PatternFill("solid", fgColor="E6E1D3")
    bold = Font(bold=True)
    lines = 1
    for j, c in enumerate(frame.columns, start=1):
        letter = get_column_letter(j)
        cell = ws.cell(row=1, column=j)
        cell.fill = head_fill
        cell.font = bold
        cell.alignment = Alignment(wrap_text=True, vertical="top")
        fmt = fmts.get(c)
        if fmt is not None:
            for (body,) in ws.iter_rows(min_row=2, max_row=len(frame) + 1, min_col=j,
                                        max_col=j):
                body.number_format = fmt
        values = frame[c].tolist()
        longest = max((len(_shown(v, fmt)) for v in values), default=0)
        if text and j == len(frame.columns):
            width = TEXT_WIDTH
            for (body,) in ws.iter_rows(min_row=2, max_row=len(frame) + 1, min_col=j,
                                        max_col=j):
                body.alignment = Alignment(wrap_text=True, vertical="top")
        else:
            words = max((len(w) for w in str(c).split()), default=4)
            width = min(max(longest, words, 8) + 2, MAX_WIDTH if not text else 40)
        ws.column_dimensions[letter].width = width
        lines = max(lines, math.ceil(len(str(c)) / max(width - 2, 1)))
    ws.row_dimensions[1].height = 15 * min(lines, 5)
    first_is_year = len(frame.columns) > 0 and frame.columns[0] == "year"
    ws.freeze_panes = "B2" if first_is_year and len(frame.columns) > 1 else "A2"


def _shown(v: Any, fmt: str | None) -> str:
    if isinstance(v, float) and math.isfinite(v) and fmt:
        if fmt.endswith("%"):
            return f"{100 * v:.1f}%"
        dec = len(fmt.split(".")[1]) if "." in fmt else 0
        return f"{v:,.{dec}f}"
    return str(v)


def write_workbook(result: PlanResult, path: str | os.PathLike[str],
                   tables: dict[str, pd.DataFrame], *, overwrite: bool = False,
                   protect: Iterable[str | os.PathLike[str]] = (), force: bool = False) -> Path:
    """Write the workbook through the atomic writer.

    Parameters
    ----------
    result : PlanResult
    path : str or path-like
        The workbook, written aside and renamed into place.
    tables : dict of str to DataFrame
        The result's tables (empty for a result that is not optimal).
    overwrite : bool, default False
        Replace an existing workbook the library wrote (its document
        properties hold the mark).
    protect : iterable of paths
        Input files that must never be overwritten.
    force : bool, default False
        With ``overwrite``, replace a workbook without the mark too.

    Returns
    -------
    pathlib.Path
    """
    from ..io.atomic import atomic_file
    from ..io.workbooks import finish_workbook

    laid = {}
    for name, frame in sheets(result, tables).items():
        text = name in ("summary", "inputs", "glossary", "diagnosis")
        laid[name] = (*_formats(name, frame), text)
    with atomic_file(path, overwrite=overwrite, protect=protect, force=force) as tmp:
        writer = pd.ExcelWriter(tmp, engine="openpyxl")
        try:
            for name, (frame, fmts, text) in laid.items():
                frame.to_excel(writer, sheet_name=name, index=False)
                _layout(writer.sheets[name], frame, fmts, text)
            finish_workbook(writer.book)  # names stay text; the mark for overwrite
        except BaseException:
            with contextlib.suppress(Exception):  # keep the first error, not close()'s
                writer.close()
            raise
        writer.close()
    return Path(path)
