"""Workbooks the library writes: text stays text, and the file carries the library's mark.

A spreadsheet program takes a cell whose text begins with ``=`` for a formula,
and one beginning with ``+``, ``-`` or ``@`` may be turned into one when it is
edited; a sector named ``=1+1`` or ``=HYPERLINK(...)`` must reach the reader as
the name it is. :func:`finish_workbook` stores every such cell as a string with
Excel's quote prefix (shown as text, never evaluated) and writes the mark
(:data:`~growthplan.io.marks.MARK`) into the document properties, by which a
later ``overwrite=True`` knows the file is the library's to replace.
"""

from __future__ import annotations

from typing import Any

from .marks import MARK

__all__ = ["finish_workbook", "FORMULA_STARTS"]

FORMULA_STARTS = ("=", "+", "-", "@")


def finish_workbook(book: Any) -> None:
    """Make every text cell of an openpyxl ``book`` plain text; mark the book as ours."""
    for ws in book.worksheets:
        for row in ws.iter_rows():
            for cell in row:
                value = cell.value
                if isinstance(value, str) and value.startswith(FORMULA_STARTS):
                    cell.data_type = "s"  # openpyxl made "=…" a formula
                    cell.quotePrefix = True
    props = book.properties
    props.creator = "growthplan"
    props.description = MARK
