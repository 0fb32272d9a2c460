"""The workbook: readable sheets first, flat headers with units that pandas reads back, the
same numbers to the rounding shown, frozen headers, and an impossible plan's diagnosis."""

from __future__ import annotations

import math
import os
import stat

import numpy as np
import openpyxl
import pandas as pd
import pytest

import growthplan as gp
from growthplan.demo import demo_plan
from growthplan.results.summary import CAUTION

UNIT = "million arvens at 2026 prices"
LABOUR_UNIT = "thousand person-years"


@pytest.fixture(scope="module")
def demo():
    r = demo_plan().solve(progress=False)
    assert r.ok
    return r


@pytest.fixture(scope="module")
def book(demo, tmp_path_factory):
    path = tmp_path_factory.mktemp("book") / "plan.xlsx"
    umask = os.umask(0o022)
    try:
        demo.to_excel(path)
    finally:
        os.umask(umask)
    return path


def decimals(fmt: str) -> int:
    if fmt.endswith("%"):  # "0.0%" shows a share to three decimals
        return 2 + (len(fmt.rstrip("%").split(".")[1]) if "." in fmt else 0)
    return len(fmt.split(".")[1]) if "." in fmt else 0


def test_sheets_in_reading_order(book):
    assert stat.S_IMODE(book.stat().st_mode) == 0o644
    sheets = pd.read_excel(book, sheet_name=None)
    assert list(sheets)[:5] == ["summary", "inputs", "sectors", "glossary", "targets"]
    summary = sheets["summary"]
    assert list(summary.columns) == ["item", "value"]
    assert CAUTION in summary["value"].tolist()
    terms = sheets["glossary"]["term"].tolist()
    for term in ("starts", "quasi-rents", "surplus", "shadow prices in current-year terms",
                 "shadow prices in base-year money", "GDP", "investment share", "disposal"):
        assert term in terms
    inputs = dict(zip(sheets["inputs"]["input"], sheets["inputs"]["value"], strict=True))
    assert inputs["plan years"] == "2027–2041 (15 years)"
    assert LABOUR_UNIT in inputs["labour supply (labour)"]
    assert "highs" in inputs["solver"]
    targets = sheets["targets"]
    assert targets["verdict"].tolist() == ["met", "met"]
    assert targets["margin"].iloc[0] == 0  # the energy target binds exactly


def test_flat_headers_with_units_and_years(book):
    sheets = pd.read_excel(book, sheet_name=None)
    for name, frame in sheets.items():
        assert all(isinstance(c, str) and not c.startswith("Unnamed") for c in frame.columns), \
            name
    assert list(sheets["labour"].columns) == [
        "year", f"labour used [{LABOUR_UNIT}]", f"labour available [{LABOUR_UNIT}]"]
    assert sheets["employment"].columns[1] == f"labour in agriculture [{LABOUR_UNIT}]"
    assert sheets["output"].columns[1] == f"agriculture [{UNIT}]"
    assert sheets["shadow_prices_money"].columns[1] == f"agriculture [{UNIT} per {UNIT}]"
    assert f"employment [{LABOUR_UNIT}]" in sheets["accounts"].columns
    assert sheets["output"]["year"].tolist() == list(range(2027, 2042))
    # the year stays a number; the row after the plan is marked beside it
    assert sheets["capacity"]["year"].tolist() == list(range(2027, 2043))
    assert sheets["capacity"]["period"].tolist() == ["plan"] * 15 + ["after the plan"]


def test_round_trip_same_numbers_to_the_rounding_shown(demo, book):
    wb = openpyxl.load_workbook(book)
    checked = 0
    for name, table in demo._tables().items():
        if name in ("audit", "target_values"):
            continue
        sheet = pd.read_excel(book, sheet_name=name)
        ws = wb[name]
        expect = table.to_numpy(dtype=float)
        sheet = sheet.drop(columns=["period"], errors="ignore")  # capacity's row marker
        got = sheet.iloc[:, 1:].to_numpy(dtype=float)  # after the year column
        assert got.shape == expect.shape, name
        for j in range(expect.shape[1]):
            fmt = ws.cell(row=2, column=j + 2).number_format
            tol = 0.5 * 10.0 ** -decimals(fmt) + 1e-12
            np.testing.assert_allclose(got[:, j], expect[:, j], rtol=0, atol=tol,
                                       err_msg=f"{name} column {j}")
            checked += 1
    assert checked > 100


def test_values_are_rounded_and_formatted(book):
    wb = openpyxl.load_workbook(book)
    numbers = 0
    for ws in wb.worksheets:
        assert ws.freeze_panes in ("A2", "B2"), ws.title
        assert ws.column_dimensions["A"].width >= 8
        for row in ws.iter_rows(min_row=2):
            for cell in row:
                v = cell.value
                if not isinstance(v, float):
                    continue
                numbers += 1
                assert cell.number_format != "General", (ws.title, cell.coordinate)
                d = decimals(cell.number_format)
                assert v == round(v, d), (ws.title, cell.coordinate, v)  # no 2435.9999999999995
                assert not (v == 0 and math.copysign(1.0, v) < 0), (ws.title, cell.coordinate)
    assert numbers > 1000
    assert wb["output"].freeze_panes == "B2" and wb["summary"].freeze_panes == "A2"
    assert wb["utilisation"]["B2"].number_format == "0.0%"


def test_impossible_plan_workbook_holds_the_diagnosis(tmp_path):
    plan = demo_plan()
    targets = [t.model_copy(update={"capacity_at_least": 1e6}) if t.capacity_at_least else t
               for t in plan.targets]
    r = gp.Plan(**{**{k: getattr(plan, k) for k in type(plan).model_fields},
                   "targets": targets}).solve(progress=False)
    assert r.status is gp.Status.INFEASIBLE
    path = r.to_excel(tmp_path / "bad.xlsx")
    sheets = pd.read_excel(path, sheet_name=None)
    assert {"summary", "inputs", "glossary", "diagnosis", "shortfalls"} <= set(sheets)
    assert "output" not in sheets
    words = dict(zip(sheets["diagnosis"]["item"], sheets["diagnosis"]["value"], strict=True))
    assert words["diagnosis"] == r.diagnosis.headline()
    assert words["conflict"] == r.diagnosis.conflict()
    short = sheets["shortfalls"]
    want = r.diagnosis.shortfalls.iloc[0]
    assert (short["sector"].iloc[0], short["year"].iloc[0]) == ("energy", 2034)
    assert short["shortfall"].iloc[0] == pytest.approx(want["shortfall"], abs=0.005)
    assert "short by" in short["in words"].iloc[0]
    assert sheets["targets"]["verdict"].iloc[0] == "missed"
