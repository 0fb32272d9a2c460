"""The HTML report: well-formed, self-contained, escaped, readable numbers, impossible plans
explained in words, opened by a real browser when one is installed, and written by the
command line's ``--report``."""

from __future__ import annotations

import html
import os
import re
import shutil
import stat
import subprocess
import sys
from dataclasses import dataclass, field
from html.parser import HTMLParser
from pathlib import Path

import numpy as np
import pytest
import yaml
from conftest import one_sector

import growthplan as gp
from growthplan.demo import DEMO_DIR, demo_plan
from growthplan.results.report import _text as text
from growthplan.results.report import decimals_for, render, tidy_number
from growthplan.results.summary import CAUTION

VOID = {"area", "base", "br", "col", "embed", "hr", "img", "input", "link", "meta", "source",
        "track", "wbr"}
CHROMIUM = shutil.which("chromium") or ("/usr/bin/chromium"
                                        if os.path.exists("/usr/bin/chromium") else None)


class StrictChecker(HTMLParser):
    """Every element closed in order, no stray end tags, one html root."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.stack: list[str] = []
        self.errors: list[str] = []
        self.decl: list[str] = []

    def handle_decl(self, decl: str) -> None:
        self.decl.append(decl)

    def handle_starttag(self, tag: str, attrs: list) -> None:
        if tag not in VOID:
            self.stack.append(tag)

    def handle_startendtag(self, tag: str, attrs: list) -> None:
        if tag not in VOID:
            self.errors.append(f"self-closed <{tag}/>")

    def handle_endtag(self, tag: str) -> None:
        if tag in VOID:
            self.errors.append(f"end tag of void element </{tag}>")
        elif not self.stack or self.stack[-1] != tag:
            self.errors.append(f"</{tag}> closes {self.stack[-1:] or 'nothing'}")
        else:
            self.stack.pop()


@dataclass
class Table:
    caption: str = ""
    head: list[str] = field(default_factory=list)
    rows: list[list[str]] = field(default_factory=list)


class TableReader(HTMLParser):
    """Each table's caption, head cells and body rows, as the text a reader sees."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.tables: list[Table] = []
        self.cell: list[str] | None = None
        self.part = ""

    def handle_starttag(self, tag: str, attrs: list) -> None:
        if tag == "table":
            self.tables.append(Table())
        elif tag in ("thead", "tbody"):
            self.part = tag
        elif tag == "tr" and self.part == "tbody":
            self.tables[-1].rows.append([])
        if tag in ("caption", "th", "td"):
            self.cell = []

    def handle_data(self, data: str) -> None:
        if self.cell is not None:
            self.cell.append(data)

    def handle_endtag(self, tag: str) -> None:
        if tag not in ("caption", "th", "td") or self.cell is None:
            return
        text, self.cell = "".join(self.cell), None
        t = self.tables[-1]
        if tag == "caption":
            t.caption = text
        elif self.part == "thead":
            t.head.append(text)
        else:
            t.rows[-1].append(text)


def tables(doc: str) -> list[Table]:
    reader = TableReader()
    reader.feed(doc)
    return reader.tables


def check_html(doc: str) -> None:
    checker = StrictChecker()
    checker.feed(doc)
    checker.close()
    assert checker.decl == ["DOCTYPE html"]
    assert checker.errors == []
    assert checker.stack == []


def without_data(doc: str) -> str:
    return re.sub(r"data:image/png;base64,[A-Za-z0-9+/=]+", "data:", doc)


@pytest.fixture(scope="module")
def demo():
    r = demo_plan().solve(progress=False)
    assert r.ok
    return r


def impossible_plan() -> gp.Plan:
    plan = demo_plan()
    targets = [t.model_copy(update={"capacity_at_least": 1e6}) if t.capacity_at_least else t
               for t in plan.targets]
    return gp.Plan(**{**{k: getattr(plan, k) for k in type(plan).model_fields},
                      "targets": targets})


@pytest.fixture(scope="module")
def impossible():
    r = impossible_plan().solve(progress=False)
    assert r.status is gp.Status.INFEASIBLE and r.diagnosis is not None
    return r


def test_numbers_for_reading():
    assert text(-0.0) == "0.00"
    assert text(-1e-13, scale=5.0) == "0.00"
    assert text(4.5e-13) == "0.00"
    assert text(2435.9999999999995) == "2,436.00"
    assert text(-1234.5) == "−1,234.50"
    assert text(0.1234, ratio=True) == "12.3 %"
    assert text(float("nan")) == "–"
    assert tidy_number(-0.0) == 0.0 and str(tidy_number(-0.0)) == "0.0"
    assert decimals_for([24915.3, 10.0]) == 2
    assert decimals_for([0.484317, 0.0]) == 5
    assert decimals_for([1.0, 2.0]) == 2  # no decimals that show only zeros


def test_demo_report(demo, tmp_path):
    umask = os.umask(0o022)
    try:
        path = demo.report(tmp_path / "plan.html")
    finally:
        os.umask(umask)
    assert stat.S_IMODE(path.stat().st_mode) == 0o644
    doc = path.read_text(encoding="utf-8")
    check_html(doc)
    assert html.escape(CAUTION) in doc
    assert "million arvens at 2026 prices" in doc and "thousand person-years" in doc
    assert "National accounts at base-year prices" in doc
    gdp = demo.accounts["gdp"]
    uses = next(t for t in tables(doc) if t.caption.startswith("Output and its uses"))
    assert uses.rows[0][0] == "2027" and uses.rows[0][uses.head.index("GDP")] == \
        f"{gdp.iloc[0]:,.0f}"
    assert html.escape(demo.shadow_prices_money.attrs["note"]) in doc
    assert "Bottlenecks" in doc and demo.bottlenecks(top=1)["name"].iloc[0] in doc
    assert doc.count("<img src=\"data:image/png;base64,") == 9  # matplotlib is a dev extra
    for title in ("Consumption level against its floor", "Targets: reached against required",
                  "Utilisation of capacity by sector and year",
                  "Shadow prices in base-year money"):
        assert f'alt="{title}"' in doc
    assert "Could not draw" not in doc
    assert "met</td>" in doc
    assert "http" not in without_data(doc)  # nothing fetched from the network
    assert "<script" not in doc
    cells = re.findall(r'<td class="num">([^<]*)</td>', doc)
    assert len(cells) > 300
    shape = re.compile(r"−?\d{1,3}(,\d{3})*(\.\d{1,6})?( %)?|–|20\d\d")  # or a year
    assert [c for c in cells if not shape.fullmatch(c)] == []  # no 1e-13, no repr noise
    assert [c for c in cells if c.startswith("−") and not c.strip("−0.,% ")] == []  # no -0
    with pytest.raises(gp.InvalidInput, match="overwrite"):
        demo.report(path)


NUMBER = re.compile(r"(−?)\d{1,3}(?:,\d{3})*(?:\.(\d+))?( %)?")


def test_each_table_has_one_number_format(demo):
    doc = render(demo, charts=False)
    found = tables(doc)
    assert len(found) >= 6
    for t in found:
        formats = {}
        for row in t.rows:
            for cell in row[1:]:  # the first cell names the row (a sector, a year)
                m = NUMBER.fullmatch(cell)
                if m is None:
                    continue
                sign, decimals, percent = m.groups()
                # common practice: a value shown as zero carries no sign
                assert not (sign and not cell.strip("−0.,% ")), (t.caption, cell)
                formats.setdefault(bool(percent), set()).add(len(decimals or ""))
        assert all(len(f) == 1 for f in formats.values()), (t.caption, t.head, formats)
    prices = next(t for t in found if t.head[1:] == demo.plan.economy.names)
    cells = [c for row in prices.rows for c in row[1:]]
    assert len(cells) == 150 and {len(c.split(".")[1]) for c in cells} == {3}
    assert "0.000" in cells  # the solver's 1e-11 noise shows as a plain zero


def test_accounts_have_years_as_rows_and_few_columns(demo):
    found = [t for t in tables(render(demo, charts=False)) if t.head[:1] == ["year"]
             and t.caption != ""]
    accounts = [t for t in found if "percent" in t.caption or "arvens" in t.caption]
    assert len(accounts) == 3
    for t in accounts:
        assert [r[0] for r in t.rows] == [str(y) for y in demo.plan.years]
        assert len(t.head) <= 10  # year and at most nine measures: a page's width
    heads = {h for t in accounts for h in t.head[1:]}
    assert len(heads) == demo.accounts.shape[1]  # every measure is shown once


def test_captions_say_what_to_read(demo):
    doc = render(demo)
    figures = re.findall(r'<figure><img src="[^"]*" alt="([^"]*)">(.*?)</figure>', doc)
    assert len(figures) == 9
    for title, rest in figures:
        caption = re.fullmatch(r"<figcaption>(.*)</figcaption>", rest)
        assert caption is not None, title
        assert not caption.group(1).startswith(title.split(" (")[0]), title  # not the title


def test_bottlenecks_explain_the_end_effect(demo):
    doc = render(demo, charts=False)
    top = demo.bottlenecks(top=3).groupby("year")["per_value"].max()
    assert top.iloc[-1] > 4 * top.iloc[-2]  # the demo's last year jumps
    assert (f"The jump in 2041 (up to {top.iloc[-1]:.3f} against {top.iloc[-2]:.3f} in 2040) "
            "is an end effect of the terminal condition") in doc
    bottlenecks = next(t for t in tables(doc) if t.head[:1] == ["year"] and
                       t.head[1].startswith("binding conditions"))
    assert len(bottlenecks.rows) == 15  # the last year is shown, not hidden


def test_report_without_matplotlib(demo, monkeypatch):
    monkeypatch.setitem(sys.modules, "matplotlib.figure", None)  # import raises ImportError
    doc = render(demo)
    check_html(doc)
    assert "<img" not in doc and "they need matplotlib" in doc


def test_impossible_plan_report(impossible, tmp_path):
    with pytest.raises(gp.PlanNotOptimal):
        impossible.output  # noqa: B018 - the schedules of an impossible plan raise
    doc = impossible.report(tmp_path / "bad.html").read_text(encoding="utf-8")
    check_html(doc)
    diag = impossible.diagnosis
    row = diag.shortfalls.iloc[0]
    assert row["sector"] == "energy" and row["year"] == 2034
    assert html.escape(diag.headline()) in doc
    assert html.escape(diag.conflict()) in doc
    unit = "million arvens at 2026 prices a year"  # the shortfall's unit, each time
    assert (f"The capacity target energy in 2034 asks for 1,000,000.00 {unit} but at most "
            f"{row['achievable']:,.2f} {unit} can be reached: short by "
            f"{row['shortfall']:,.2f} {unit}") in doc
    assert "missed</td>" in doc
    assert html.escape(CAUTION) in doc
    assert doc.count("<img src=\"data:image/png;base64,") == 2  # targets and shortfalls
    assert 'alt="Shortfalls of the impossible plan"' in doc
    assert "<figcaption>The longest bars are the conditions that fall furthest short" in doc


def test_user_strings_are_escaped():
    econ = one_sector().model_copy(update={"value_unit": "<script>x</script> & \"co\""})
    r = gp.Plan(economy=econ, years=range(2030, 2034)).solve(progress=False)
    doc = render(r, charts=False)
    check_html(doc)
    assert "<script>" not in doc and "&lt;script&gt;x&lt;/script&gt; &amp; &quot;co&quot;" in doc


@pytest.mark.skipif(CHROMIUM is None, reason="no chromium installed")
def test_a_browser_renders_the_report(demo, tmp_path):
    path = demo.report(tmp_path / "plan.html")
    shot = tmp_path / "shot.png"
    proc = subprocess.run(
        [CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
         "--no-first-run", "--disable-background-networking", "--disable-component-update",
         "--disable-sync", f"--user-data-dir={tmp_path / 'profile'}", f"--screenshot={shot}",
         "--window-size=1280,2000", "--enable-logging=stderr", "--v=0",
         path.resolve().as_uri()],
        capture_output=True, text=True, timeout=120, check=False)
    assert shot.exists() and shot.stat().st_size > 50_000, proc.stderr[-2000:]
    errors = [line for line in proc.stderr.splitlines()
              if "Uncaught" in line or "CONSOLE" in line]
    assert errors == []
    import matplotlib.image

    pixels = matplotlib.image.imread(shot)
    assert pixels.shape[:2] == (2000, 1280)
    assert float(np.std(pixels[..., :3])) > 0.05  # not a blank page


# a probe added to a copy of the report (the report itself holds no script)
WIDTH_PROBE = (
    "<script>document.title = JSON.stringify({page: document.documentElement.scrollWidth, "
    "view: document.documentElement.clientWidth, wide: Array.from("
    "document.querySelectorAll('.scroll')).filter(d => d.scrollWidth > d.clientWidth)"
    ".map(d => (d.querySelector('caption') || {}).textContent || '?')});</script>")


@pytest.mark.skipif(CHROMIUM is None, reason="no chromium installed")
def test_every_table_fits_a_1280_pixel_window(demo, tmp_path):
    import json

    page = tmp_path / "probe.html"
    page.write_text(render(demo, charts=False).replace("</body>", WIDTH_PROBE + "</body>"),
                    encoding="utf-8")
    proc = subprocess.run(
        [CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
         "--no-first-run", "--disable-background-networking", "--disable-component-update",
         "--disable-sync", f"--user-data-dir={tmp_path / 'profile'}", "--window-size=1280,2000",
         "--dump-dom", page.resolve().as_uri()],
        capture_output=True, text=True, timeout=120, check=False)
    title = re.search(r"<title>(.*?)</title>", proc.stdout, re.S)
    assert title is not None, proc.stderr[-2000:]
    found = json.loads(html.unescape(title.group(1)))
    assert found["wide"] == []  # no table needs a sideways scroll
    assert found["page"] <= found["view"]


def cli(*args, cwd: Path) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "growthplan.cli", *map(str, args)],
                          cwd=cwd, capture_output=True, text=True, timeout=300, check=False)


def test_cli_demo_writes_a_report(tmp_path):
    res = cli("demo", "--no-progress", "--report", "plan.html", cwd=tmp_path)
    assert res.returncode == 0, res.stderr
    doc = (tmp_path / "plan.html").read_text(encoding="utf-8")
    check_html(doc)
    assert "Growth plan 2027–2041" in doc and html.escape(CAUTION) in doc
    again = cli("demo", "--no-progress", "--report", "plan.html", cwd=tmp_path)
    assert again.returncode == 2 and "--report must not exist yet" in again.stderr
    assert (tmp_path / "plan.html").read_text(encoding="utf-8") == doc


def test_cli_solve_reports_an_impossible_plan(tmp_path):
    for f in ("flows.csv", "capital.csv", "capital_stocks.csv", "plan.yaml"):
        shutil.copy(DEMO_DIR / f, tmp_path / f)
    d = yaml.safe_load((tmp_path / "plan.yaml").read_text())
    d["plan"]["targets"].append({"sector": "energy", "year": 2029, "capacity_at_least": 1e6})
    (tmp_path / "bad.yaml").write_text(yaml.safe_dump(d))
    res = cli("solve", "bad.yaml", "--no-progress", "--report", "bad.html", cwd=tmp_path)
    assert res.returncode == 1, res.stderr  # infeasible, as without --report
    doc = (tmp_path / "bad.html").read_text(encoding="utf-8")
    check_html(doc)
    assert "Why the plan is impossible" in doc and "short by" in doc
    refused = cli("solve", "bad.yaml", "--no-progress", "--report", "bad.yaml", "--overwrite",
                  cwd=tmp_path)
    assert refused.returncode == 2 and "not be the plan file" in refused.stderr
