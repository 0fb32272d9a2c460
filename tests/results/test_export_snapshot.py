"""The exported files stay the same: CSV folder, workbook sheets and report text.

Three plans are exported and compared with a stored, normalised snapshot
(``tests/results/snapshots/``): the demo plan, a plan with alternative
techniques and foreign trade, and the same plan with a target it cannot
reach (its exports hold the diagnosis). Numbers are rounded to 8 significant
digits, values below 1e-9 in size count as zero, and lines that depend on the
machine (timings, versions) are dropped, so a change in what the exports say
fails while a change in the last bits of a float does not.

Regenerate after an intended change of the exports::

    PYTHONPATH=. python tests/results/test_export_snapshot.py
"""

from __future__ import annotations

import csv
import html
import io
import math
import re
import sys
from pathlib import Path

import pandas as pd
import pytest

import growthplan as gp

HERE = Path(__file__).resolve().parent
SNAPSHOTS = HERE / "snapshots"
sys.path.insert(0, str(HERE.parent))

from helpers import two_sector  # noqa: E402

# numbers as the exports print them: plain, scientific, or with thousands separators
NUMBER = re.compile(r"(?<![\w.])-?(?:\d{1,3}(?:,\d{3})+(?:\.\d+)?|\d+(?:\.\d+)?(?:[eE][-+]?\d+)?)"
                    r"(?![\w])")
# lines that depend on the machine or the run, not on the plan
VOLATILE = re.compile(r"\bs in all\b|largest violation|\bgrowthplan \d|\bHiGHS \d"
                      r"|^\W*(time|versions)\W*$", re.IGNORECASE)


def _number(text: str) -> str:
    value = float(text.replace(",", ""))
    if not math.isfinite(value):
        return text
    if abs(value) < 1e-9:
        return "0"
    return f"{value:.8g}"


def normalise(text: str) -> str:
    """Numbers at 8 significant digits, machine-dependent lines dropped."""
    out = []
    for line in text.splitlines():
        if VOLATILE.search(line):
            continue
        out.append(NUMBER.sub(lambda m: _number(m.group(0)), line.rstrip()))
    return "\n".join(out)


def _csv_text(text: str) -> str:
    """A CSV file cell by cell, each cell normalised (commas there separate cells)."""
    rows = csv.reader(io.StringIO(text))
    return "\n".join("|".join(normalise(cell) for cell in row) for row in rows)


def _report_text(page: str) -> str:
    """The report's words and figures: tags, styles and embedded images removed."""
    page = re.sub(r"<style>.*?</style>", "", page, flags=re.S)
    page = re.sub(r'<img[^>]*>', "[image]", page)
    page = re.sub(r"</(p|h1|h2|tr|dt|dd|caption|li|figcaption|section)>", "\n", page)
    page = re.sub(r"</t[dh]>", " | ", page)
    text = html.unescape(re.sub(r"<[^>]+>", "", page))
    return "\n".join(line.strip() for line in text.splitlines() if line.strip())


def trade_plan(*, impossible: bool = False) -> gp.Plan:
    """Two sectors with a labour-saving technique for food and machinery imports."""
    targets = [gp.Target("machinery", year=2034, capacity_at_least=1e6 if impossible else 60)]
    return gp.Plan(
        economy=two_sector(), years=range(2030, 2038),
        labour=gp.LabourSupply(start=80, growth=0.02),
        consumption=gp.Consumption(floor=20),
        trade=gp.Trade(import_prices={"machinery": 1.0}, export_prices={"food": 0.8},
                       export_ceilings={"food": 30.0}, inflow=5.0),
        techniques=[gp.Technique(sector="food", label="mechanised", labour=0.2,
                                 capital={"machinery": 2.0})],
        targets=targets, terminal=gp.TerminalGrowth(rate=0.02))


CASES = {"demo": gp.demo_plan, "trade_techniques": trade_plan,
         "impossible": lambda: trade_plan(impossible=True)}


def snapshot(plan: gp.Plan, folder: Path) -> str:
    """Every exported file of the solved plan, normalised, as one text."""
    result = plan.solve()
    result.to_csv(folder / "csv")
    result.to_excel(folder / "plan.xlsx")
    result.report(folder / "report.html")
    parts = [f"status: {result.status.value}"]
    for path in sorted((folder / "csv").iterdir()):
        text = path.read_text(encoding="utf-8")
        body = _csv_text(text) if path.suffix == ".csv" else normalise(text)
        parts.append(f"== csv/{path.name} ==\n{body}")
    book = pd.read_excel(folder / "plan.xlsx", sheet_name=None)
    for name, frame in book.items():
        parts.append(f"== sheet {name} ==\n{_csv_text(frame.to_csv(index=False))}")
    report = (folder / "report.html").read_text(encoding="utf-8")
    parts.append(f"== report ==\n{normalise(_report_text(report))}")
    return "\n".join(parts) + "\n"


@pytest.mark.parametrize("case", sorted(CASES))
def test_exports_match_the_snapshot(case, tmp_path):
    stored = (SNAPSHOTS / f"{case}.txt").read_text(encoding="utf-8")
    now = snapshot(CASES[case](), tmp_path)
    if now != stored:  # show the first differing line rather than two long texts
        for k, (a, b) in enumerate(zip(now.splitlines(), stored.splitlines(), strict=False)):
            assert a == b, f"{case}: line {k + 1} of the exports changed"
        assert now == stored


def test_the_normalisation_keeps_what_matters():
    # 8 significant digits; noise below 1e-9 is zero; thousands separators read
    assert normalise("2435.9999999999995 and -1.2e-13, 12,345.678901234") == \
        "2436 and 0, 12345.679"
    assert normalise("a 1.23456789 b") != normalise("a 1.23457789 b")
    assert normalise("time  0.12 s in all\nstatus optimal") == "status optimal"


if __name__ == "__main__":
    import tempfile

    SNAPSHOTS.mkdir(exist_ok=True)
    for name, make in CASES.items():
        with tempfile.TemporaryDirectory() as tmp:
            (SNAPSHOTS / f"{name}.txt").write_text(snapshot(make(), Path(tmp)),
                                                   encoding="utf-8")
        print("wrote", SNAPSHOTS / f"{name}.txt")
