"""Techniques in the exports: the report, the workbook, techniques.csv and the CLI."""

from __future__ import annotations

import base64
import shutil
import sys
from html.parser import HTMLParser

import pandas as pd
import pytest
import yaml
from click.testing import CliRunner

import growthplan as gp
from growthplan.cli import main
from growthplan.demo import DEMO_DIR
from growthplan.results.report import render

pytestmark = pytest.mark.filterwarnings("ignore::growthplan.EndEffectsWarning")  # no terminal


def _goods(techniques: bool = True) -> gp.Plan:
    """One good; a labour-saving, capital-using technique (the README's example)."""
    econ = gp.Economy(sectors=[gp.Sector(name="goods", unit="tonnes")],
                      input_coefficients=[[0.5]],
                      capital_coefficients=[[0.4]], labour_coefficients=[[1.0]],
                      capital={"goods": gp.CapitalSpec(initial_capacity=100,
                                                       mean_service_life=1,
                                                       retirement="sudden_exit")})
    alt = [gp.Technique(sector="goods", label="saving", labour=0.5, capital={"goods": 0.45})]
    return gp.Plan(economy=econ, years=range(2030, 2038),
                   labour=gp.LabourSupply(start=150, growth=0.05),
                   techniques=alt if techniques else [])


@pytest.fixture(scope="module")
def solved() -> gp.PlanResult:
    result = _goods().solve()
    assert result.ok
    return result


class _Page(HTMLParser):
    """Sections by heading: their text, table cells and image sources."""

    def __init__(self) -> None:
        super().__init__()
        self.sections: dict[str, dict[str, list[str]]] = {}
        self._current: dict[str, list[str]] | None = None
        self._in: str | None = None

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        if tag == "h2":
            self._in = "h2"
        elif tag in ("td", "th", "p", "figcaption"):
            self._in = tag
        elif tag == "img" and self._current is not None:
            self._current["img"].append(dict(attrs).get("src") or "")

    def handle_endtag(self, tag: str) -> None:
        self._in = None

    def handle_data(self, data: str) -> None:
        if self._in == "h2":
            self._current = {"cells": [], "text": [], "img": []}
            self.sections[data.strip()] = self._current
        elif self._current is not None and self._in in ("td", "th"):
            self._current["cells"].append(data.strip())
        elif self._current is not None and self._in in ("p", "figcaption"):
            self._current["text"].append(data)


def _parse(text: str) -> _Page:
    page = _Page()
    page.feed(text)
    return page


def test_report_has_a_techniques_section(solved):
    """The table of years of use, the mix chart of the sector with a choice, profits in words."""
    page = _parse(render(solved, charts=True))
    sec = page.sections["Techniques"]
    years = solved.technique_years
    assert int(years.loc["goods:saving", "first_start"]) == 2032  # README: labour binds in 2033
    cells = sec["cells"]
    row = cells.index("goods:saving")
    assert cells[row + 1:row + 5] == ["goods", "saving", "2032", "2037"]
    assert "tonnes" in cells
    assert any("profit of a technique at shadow prices" in t for t in sec["text"])
    assert any("Technique mix of goods" in t for t in sec["text"])
    (img,) = sec["img"]
    assert base64.b64decode(img.split(",", 1)[1])[:8] == b"\x89PNG\r\n\x1a\n"
    # without charts the section keeps its table and says the chart is left out
    bare = _parse(render(solved, charts=False)).sections["Techniques"]
    assert not bare["img"] and "goods:saving" in bare["cells"]


def test_report_techniques_without_matplotlib(solved, monkeypatch):
    """Without matplotlib the section keeps its table and says what the charts need."""
    monkeypatch.setitem(sys.modules, "matplotlib.figure", None)  # import raises ImportError
    doc = render(solved, charts=True)
    sec = _parse(doc).sections["Techniques"]
    assert not sec["img"] and "goods:saving" in sec["cells"]
    assert any("technique-mix charts need matplotlib" in t for t in sec["text"])


def test_report_lists_the_sectors_with_a_choice():
    """Of the demo's ten sectors only agriculture has two techniques: the table holds those."""
    plan = gp.demo_plan()
    plan = plan.model_copy(update={"techniques": [
        gp.Technique(sector="agriculture", label="mechanised", labour=0.12, first_year=2029,
                     capital={"machinery": 1.7, "construction": 0.8}, mean_service_life=15)]})
    result = plan.solve(progress=False)
    sec = _parse(render(result, charts=False)).sections["Techniques"]
    keys = {c for c in sec["cells"] if c in result.technique_years.index}
    assert keys == {"agriculture", "agriculture:mechanised"}
    assert any("1 of 10 sectors" in t and "other 9 sectors" in t for t in sec["text"])
    # a base entry alone (restricting nothing) gives no choice: every technique is listed
    only = plan.model_copy(update={"techniques": [
        gp.Technique(sector="agriculture", label="base", first_year=2027)]}).solve(progress=False)
    cells = _parse(render(only, charts=False)).sections["Techniques"]["cells"]
    assert {c for c in cells if c in only.technique_years.index} == set(plan.economy.names)


def test_report_without_techniques_has_no_section():
    result = _goods(techniques=False).solve()
    assert "Techniques" not in _parse(render(result, charts=False)).sections
    assert "Summary" in _parse(render(result, charts=False)).sections


def test_workbook_sheet_reads_back(solved, tmp_path):
    """The techniques sheet: flat header, year first, units, the schedules of every technique."""
    path = solved.to_excel(tmp_path / "plan.xlsx")
    sheet = pd.read_excel(path, sheet_name="techniques")
    assert list(sheet.columns) == ["year", "sector", "technique", "key", "unit", "output",
                                   "capacity", "starts"]
    assert set(sheet["unit"]) == {"tonnes a year"}
    assert len(sheet) == 2 * len(solved.plan.years)
    mine = solved.techniques.set_index(["year", "technique"])
    for r in sheet.itertuples():
        for col in ("output", "capacity", "starts"):
            want = float(mine.loc[(r.year, r.key), col])
            assert getattr(r, col) == pytest.approx(want, rel=1e-4, abs=1e-6)
    assert "techniques" not in pd.ExcelFile(
        _goods(techniques=False).solve().to_excel(tmp_path / "none.xlsx")).sheet_names


def test_csv_folder_has_techniques(solved, tmp_path):
    folder = solved.to_csv(tmp_path / "out")
    back = pd.read_csv(folder / "techniques.csv")
    assert list(back.columns)[:2] == ["year", "sector"]
    saving = back[back["technique"] == "saving"].set_index("year")["starts"]
    assert saving.loc[2032] > 0 and saving.loc[2031] == pytest.approx(0, abs=1e-9)
    total = back.groupby("year")["output"].sum()
    pd.testing.assert_series_equal(total, solved.output["goods"].rename("output"),
                                   check_index_type=False, rtol=1e-9)
    none = _goods(techniques=False).solve().to_csv(tmp_path / "none")
    assert not (none / "techniques.csv").exists()


def test_cli_solve_prints_technique_years(tmp_path, monkeypatch):
    """`growthplan solve` prints the technique years after the key schedules."""
    for f in ("flows.csv", "capital.csv", "capital_stocks.csv"):
        shutil.copy(DEMO_DIR / f, tmp_path / f)
    data = yaml.safe_load((DEMO_DIR / "plan.yaml").read_text())
    data["plan"]["techniques"] = [
        {"sector": "agriculture", "label": "mechanised", "labour": 0.12, "first_year": 2029,
         "capital": {"machinery": 1.7, "construction": 0.8}, "mean_service_life": 15}]
    (tmp_path / "plan.yaml").write_text(yaml.safe_dump(data, sort_keys=False),
                                        encoding="utf-8")
    monkeypatch.chdir(tmp_path)
    res = CliRunner().invoke(main, ["solve", "plan.yaml", "--no-progress", "--out", "out"])
    assert res.exit_code == 0, res.output
    assert "Techniques (first year started, last year used):" in res.stdout
    after = res.stdout.split("Techniques (first year started")[1]
    assert res.stdout.index("Output by sector") < res.stdout.index("Techniques (first")
    line = next(x for x in after.splitlines() if x.startswith("agriculture:mechanised"))
    assert "mechanised" in line and "never" not in line
    assert (tmp_path / "out" / "techniques.csv").exists()
