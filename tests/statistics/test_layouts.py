"""Readers of the layouts offices publish: wide and long, CSV and workbooks, located errors."""

from __future__ import annotations

import openpyxl
import pandas as pd
import pytest

import growthplan as gp
from growthplan.statistics import TableLayout, read_table

WIDE = """Use table (invented),,,,
code,label,A,B,total
,,Farms,Mills,
P1,food,10,20,30
P2,metal,5,5,10

total,,15,25,40
"""
EXPECTED = pd.DataFrame([[10.0, 20.0], [5.0, 5.0]], index=["P1", "P2"], columns=["A", "B"])
LAYOUT = {"header_row": 2, "label_column": 2, "label_row": 3}


def _write(tmp_path, text, name="t.csv"):
    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return p


def test_wide_csv_with_title_labels_and_totals(tmp_path):
    t = read_table(TableLayout(file=str(_write(tmp_path, WIDE)), **LAYOUT), what="use")
    pd.testing.assert_frame_equal(t.frame, EXPECTED)
    assert t.labels == {"A": "Farms", "B": "Mills", "P1": "food", "P2": "metal"}
    assert t.rows["P2"] == 5 and t.columns["B"] == "D"


def test_workbook_sheet_gives_the_same_table(tmp_path):
    wb = openpyxl.Workbook()
    wb.active.title = "notes"
    ws = wb.create_sheet("use")
    for line in WIDE.splitlines():
        cells = [None if c == "" else (float(c) if c.replace(".", "").isdigit() else c)
                 for c in line.split(",")] if line else []
        ws.append(cells)
    path = tmp_path / "use.xlsx"
    wb.save(path)
    t = read_table(TableLayout(file=str(path), sheet="use", **LAYOUT), what="use")
    pd.testing.assert_frame_equal(t.frame, EXPECTED)
    ws["D5"] = "n/a"
    wb.save(path)
    with pytest.raises(gp.InvalidInput, match=r"^use \(use.xlsx, sheet 'use', row 5 'P2', "
                       r"column D 'B'\) must be a number \(empty for zero\)\. Got 'n/a'\.$"):
        read_table(TableLayout(file=str(path), sheet="use", **LAYOUT), what="use")
    with pytest.raises(gp.InvalidInput, match=r"sheet must be one of \['notes', 'use'\]"):
        read_table(TableLayout(file=str(path), sheet="supply", **LAYOUT), what="use")


def test_long_layout_gives_the_same_table(tmp_path):
    text = "row,column,value,note\nP1,A,10,\nP1,B,20,\nP2,A,5,\nP2,B,5,\nP1,total,30,\n" \
           "P2,total,10,\n"
    t = read_table(TableLayout(file=str(_write(tmp_path, text)), layout="long"), what="use")
    pd.testing.assert_frame_equal(t.frame, EXPECTED)
    with pytest.raises(gp.InvalidInput, match=r"use \(t.csv, row 8, row code 'P1', column code "
                       r"'A'\) must list each cell once \(also in row 2\)\. Got 11\.0\."):
        read_table(TableLayout(file=str(_write(tmp_path, text + "P1,A,11,\n")),
                               layout="long"), what="use")
    with pytest.raises(gp.InvalidInput, match=r"use \(t.csv, row 2, column C 'value', row code "
                       r"'P1', column code 'A'\) must be a number \(empty for zero\)\. Got "
                       r"'x'\."):
        read_table(TableLayout(file=str(_write(tmp_path, text.replace("A,10", "A,x"))),
                               layout="long"), what="use")
    with pytest.raises(gp.InvalidInput, match=r"use \(t.csv, row 7, row code 'P2', column code "
                       r"'total'\) must equal the sum of the other columns of its row"):
        read_table(TableLayout(file=str(_write(tmp_path, text.replace("P2,total,10",
                                                                      "P2,total,12"))),
                               layout="long"), what="use")


@pytest.mark.parametrize(("old", "new", "message"), [
    ("P2,metal,5,5,10", "P2,metal,5,..,10",
     r"^use \(t.csv, row 5 'P2', column D 'B'\) must be a number \(empty for zero\)\. "
     r"Got '\.\.'\.$"),
    ("total,,15,25,40", "total,,15,26,41",
     r"^use \(t.csv, row 7 'total', column D 'B'\) must equal the sum of the rows above "
     r"within 0.5 % \(it is a totals row; the rows sum to 25\)\. Got 26\.0\.$"),
    ("P1,food,10,20,30", "P1,food,10,20,31",
     r"^use \(t.csv, row 4 'P1', column E 'total'\) must equal the sum of the other columns "
     r"of its row within 0.5 % \(it is a totals column; they sum to 30\)\. Got 31\.0\.$"),
    ("P2,metal,5,5,10", ",metal,5,5,10",
     r"^use \(t.csv, row 5, column A\) must hold a row code in every row with values\. "
     r"Got None\.$"),
    ("P2,metal,5,5,10", "P1,metal,5,5,10",
     r"^use \(t.csv, row 5, column A\) must hold each row code once \(also in row 4\)\. "
     r"Got 'P1'\.$"),
    ("code,label,A,B,total", "code,label,A,,total",
     r"^use \(t.csv, row 2, column D\) must hold a column code above every column with "
     r"values\. Got None\.$"),
])
def test_malformed_wide_tables_name_the_cell(tmp_path, old, new, message):
    # each malformed table gives one message naming file, row, column and value
    path = _write(tmp_path, WIDE.replace(old, new))
    with pytest.raises(gp.InvalidInput, match=message):
        read_table(TableLayout(file=str(path), **LAYOUT), what="use")


def test_totals_within_rounding_are_accepted(tmp_path):
    # published tables are rounded (common practice): a gap within 0.5 % is accepted
    t = read_table(TableLayout(file=str(_write(tmp_path, WIDE.replace(
        "total,,15,25,40", "total,,15.05,25,40"))), **LAYOUT), what="use")
    pd.testing.assert_frame_equal(t.frame, EXPECTED)


def test_skip_and_numeric_codes(tmp_path):
    text = "code,1,2,sub\n10,1,2,3\n20,3,4,7\n"
    t = read_table(TableLayout(file=str(_write(tmp_path, text)), skip=["sub"]))
    assert list(t.frame.columns) == ["1", "2"] and list(t.frame.index) == ["10", "20"]


@pytest.mark.parametrize("field", ["code_column", "label_column"])
def test_a_column_beyond_the_table_is_named(tmp_path, field):
    layout = {**LAYOUT, field: 40}
    with pytest.raises(gp.InvalidInput, match=rf"{field} must name one of its 5 column\(s\)\. "
                                              r"Got 40\."):
        read_table(TableLayout(file=str(_write(tmp_path, WIDE)), **layout), what="use")
