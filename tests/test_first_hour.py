"""A new analyst's first hour, through the installed command and the public API:
units on every figure, words a colleague reads, files a colleague can open."""

from __future__ import annotations

import os
import re
import shutil
import stat
import subprocess
import sys
import warnings
from pathlib import Path

import pytest
import yaml

import growthplan as gp
from growthplan.demo import DEMO_DIR

ROOT = Path(__file__).resolve().parent.parent


def cli(*args: object, cwd: Path, umask: int | None = None) -> subprocess.CompletedProcess[str]:
    """``python -m growthplan.cli`` as a user runs it, with this tree on the path."""
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    pre = (lambda: os.umask(umask)) if umask is not None else None  # noqa: E731
    return subprocess.run([sys.executable, "-m", "growthplan.cli", *map(str, args)],
                          cwd=cwd, env=env, capture_output=True, text=True, timeout=300,
                          preexec_fn=pre)


@pytest.fixture(scope="module")
def copied(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """The demo copied as ``demo --copy`` writes it, to edit."""
    d = tmp_path_factory.mktemp("first-hour")
    res = cli("demo", "--copy", "my-plan", cwd=d)
    assert res.returncode == 0, res.stderr
    return d / "my-plan"


@pytest.fixture(scope="module")
def solved(copied: Path) -> tuple[Path, subprocess.CompletedProcess[str]]:
    """``solve`` of the copied plan with every export, under umask 022."""
    d = copied.parent / "solved"
    d.mkdir()
    res = cli("solve", copied / "plan.yaml", "--no-progress", "--out", "out", "--excel",
              "plan.xlsx", "--charts", "charts", "--report", "plan.html", cwd=d, umask=0o022)
    assert res.returncode == 0, res.stderr
    return d, res


def test_the_public_door_lists_no_stray_names():
    assert "PackageNotFoundError" not in dir(gp)
    assert not [n for n in dir(gp) if n.endswith("Error") and n not in gp.__all__]


def test_load_plan_file_returns_a_plan_that_solves_with_the_files_settings(tmp_path):
    for f in ("flows.csv", "capital.csv", "capital_stocks.csv", "plan.yaml"):
        shutil.copy(DEMO_DIR / f, tmp_path / f)
    d = yaml.safe_load((tmp_path / "plan.yaml").read_text())
    d["solve"] = {"method": "ipm", "time_limit": 120}
    (tmp_path / "plan.yaml").write_text(yaml.safe_dump(d))
    plan = gp.load_plan_file(tmp_path / "plan.yaml")
    assert isinstance(plan, gp.Plan)
    assert plan.solve_options["method"] == "ipm" and plan.solve_options["time_limit"] == 120
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        result = plan.solve()
        simplex = plan.solve(method="simplex")
    assert result.ok and result.solver["method"].startswith("ipm")
    assert simplex.solver["method"] == "simplex"
    assert gp.Plan(economy=plan.economy, years=plan.years).solve_options == {}


def test_every_folder_and_file_follows_the_umask(solved):
    d, _ = solved
    for folder in (d / "out", d / "charts"):
        assert stat.S_IMODE(folder.stat().st_mode) == 0o755, folder
        for f in folder.iterdir():
            assert stat.S_IMODE(f.stat().st_mode) == 0o644, f
    for f in (d / "plan.xlsx", d / "plan.html"):
        assert stat.S_IMODE(f.stat().st_mode) == 0o644, f


def test_check_reports_every_misspelt_key_at_once(copied):
    text = (copied / "plan.yaml").read_text()
    bad = (text.replace("  targets:", "  tagrets:").replace("max_fall:", "maxfall:")
           .replace("first_year_within:", "first_year_whithin:")
           .replace("method: auto", "methd: auto"))
    (copied / "misspelt.yaml").write_text(bad)
    res = cli("check", "misspelt.yaml", cwd=copied)
    assert res.returncode == 2
    assert "3 problems" in res.stderr or "4 problems" in res.stderr, res.stderr
    for key, meant in (("tagrets", "targets"), ("first_year_whithin", "first_year_within"),
                       ("methd", "method")):
        assert f"{key} must be a known field (did you mean '{meant}'?)" in res.stderr
    # within the plan's models too: a target's key and the consumption's, together
    bad = text.replace("capacity_at_least", "capacity_atleast").replace("max_fall:",
                                                                        "maxfall:")
    (copied / "misspelt.yaml").write_text(bad)
    res = cli("check", "misspelt.yaml", cwd=copied)
    assert "2 problems" in res.stderr and "capacity_atleast" in res.stderr
    assert "maxfall" in res.stderr


def test_a_revision_speaks_of_its_actuals_and_names_its_columns(copied):
    import growthplan as gp

    names = gp.demo_plan().economy.names  # actuals name every sector, 0 where none started
    starts = {"energy": 60, "services": 300}
    rows = [f"{y},{n},{starts.get(n, 0)}\n" for y in (2027, 2028, 2029) for n in names]
    (copied / "actuals.csv").write_text("year,sector,starts\n" + "".join(rows))
    res = cli("revise", "plan.yaml", "actuals.csv", "--from-year", "2030", "--no-progress",
              "--out", "cmp.csv", "--overwrite", cwd=copied)
    assert res.returncode == 0, res.stderr
    said = res.stdout + res.stderr
    assert "departs from the base year" not in said  # its base is the actuals
    assert "revision" in said and "from 2030" in said
    assert "=...)" not in said and "Plan(" not in said  # no Python for a command-line user
    assert "(million arvens at 2026 prices a year)" in res.stdout
    header = (copied / "cmp.csv").read_text().splitlines()[0].split(",")
    assert header == ["year", "sector", "quantity", "original", "revised", "difference",
                      "relative"]


def test_no_message_suggests_python_syntax_to_a_command_line_user(copied):
    d = yaml.safe_load((copied / "plan.yaml").read_text())
    d["plan"].pop("terminal")
    d["plan"].pop("first_year_within")
    (copied / "open-ended.yaml").write_text(yaml.safe_dump(d))
    res = cli("solve", "open-ended.yaml", "--no-progress", cwd=copied)
    said = res.stdout + res.stderr
    assert "end effects" in said and "terminal: {rate: ...}" in said
    assert "=...)" not in said and "Plan(" not in said


UNIT = "million arvens at 2026 prices"  # the demo's money (its sectors are in money)
LABOUR = "thousand person-years"
CONSUMPTION = "units of the consumption level"


def _headers(path: Path) -> list[str]:
    return path.read_text(encoding="utf-8").splitlines()[0].split(",")


def test_every_exported_figure_carries_its_unit(solved):
    import pandas as pd

    d, _ = solved
    out = d / "out"
    for f in out.glob("*.csv"):
        head = pd.read_csv(f, nrows=1).columns
        assert not [c for c in head if c.startswith("Unnamed")], f  # no bare row numbers
    assert _headers(out / "starts.csv")[1] == f"agriculture [{UNIT} a year]"
    assert _headers(out / "utilisation.csv")[1] == "agriculture [fraction of capacity]"
    assert _headers(out / "shadow_prices.csv")[1] == f"agriculture [terminal bundles per {UNIT}]"
    assert _headers(out / "quasi_rents.csv")[1] == (
        f"agriculture [terminal bundles per {UNIT} a year of capacity]")
    assert _headers(out / "labour_values.csv")[1] == f"labour [terminal bundles per {LABOUR}]"
    assert "shadow_prices_current" in {f.stem for f in out.glob("*.csv")}
    assert all("[" in c for c in pd.read_csv(out / "shadow_prices_current.csv").columns[1:])
    acc = pd.read_csv(out / "accounts.csv").columns
    assert "investment_share [fraction of GDP]" in acc
    assert f"employment [{LABOUR}]" in acc and not [c for c in acc if "labour labour" in c]
    assert _headers(out / "labour.csv") == ["year", f"labour used [{LABOUR}]",
                                            f"labour available [{LABOUR}]"]
    cap = pd.read_csv(out / "capacity.csv")
    assert cap["year"].tolist() == list(range(2027, 2043))  # numeric, the year after too
    assert cap["period"].iloc[-1] == "after the plan"
    book = pd.read_excel(d / "plan.xlsx", sheet_name=None)
    assert pd.api.types.is_integer_dtype(book["capacity"]["year"])
    for sheet in ("shadow_prices", "shadow_prices_current", "quasi_rents", "labour_values",
                  "utilisation", "starts"):
        assert all("[" in str(c) for c in book[sheet].columns[1:]), sheet
    assert book["starts"].columns[1].endswith(" a year]")


def test_an_impossible_plans_shortfalls_carry_units_without_doubled_words(copied):
    d = yaml.safe_load((copied / "plan.yaml").read_text())
    d["plan"]["labour"]["start"] = 2000  # far below what the floor needs
    (copied / "short.yaml").write_text(yaml.safe_dump(d))
    res = cli("solve", "short.yaml", "--no-progress", "--out", "short-out", "--excel",
              "short.xlsx", "--report", "short.html", "--overwrite", cwd=copied)
    assert res.returncode == 1, res.stderr
    # the aims are relaxed before the facts: the consumption path is what gives way
    assert "Shortfalls" in res.stdout and CONSUMPTION in res.stdout and " %" in res.stdout
    table = (copied / "short-out" / "shortfalls.csv").read_text(encoding="utf-8")
    assert "unit" in table.splitlines()[0] and CONSUMPTION in table
    assert "share [fraction of the requirement]" in table.splitlines()[0]
    html = (copied / "short.html").read_text(encoding="utf-8")
    assert f"{CONSUMPTION} can be reached" in html
    import pandas as pd

    sheet = pd.read_excel(copied / "short.xlsx", sheet_name="shortfalls")
    assert (sheet["unit"].fillna("") != "").all()
    assert all(u in w for u, w in zip(sheet["unit"], sheet["in words"], strict=True))
    for text in (res.stdout, table, html, " ".join(sheet["in words"])):
        assert "labour labour" not in text


def _uncommented(text: str) -> str:
    """The demo plan with its commented ``uncertainty:`` section switched on."""
    head, _, tail = text.partition("# uncertainty:")
    lines = [ln[2:] if ln.startswith("# ") else ln for ln in tail.splitlines()]
    return head + "uncertainty:" + "\n".join(lines) + "\n"


def test_scenario_commands_need_no_hand_written_yaml(copied):
    text = (copied / "plan.yaml").read_text()
    assert text == (DEMO_DIR / "plan.yaml").read_text()
    assert text == (ROOT / "data" / "demo" / "plan.yaml").read_text()  # the two copies agree
    assert "# uncertainty:" in text and gp.load_uncertainty(copied / "plan.yaml") is None
    # the commented section, switched on, is a valid one with the common cases
    (copied / "with-section.yaml").write_text(_uncommented(text))
    spec = gp.load_uncertainty(copied / "with-section.yaml")
    gp.load_plan_file(copied / "with-section.yaml")  # its selections fit the plan
    assert {i.what for i in spec.items} >= {"capital_coefficients", "labour_growth"}
    # the plan as copied, with --vary instead of a section
    res = cli("reoptimise", "plan.yaml", "--no-progress", "--draws", "3", "--vary",
              "capital_coefficients=uniform:0.9:1.1", "--out", "re.csv", "--overwrite",
              cwd=copied)
    assert res.returncode == 0, res.stderr
    assert "3 drawn economies" in res.stdout
    # shares in percent in text, with their unit; every figure has one
    assert "share of GDP" in res.stdout and " %" in res.stdout
    lines = {ln.split()[0]: ln for ln in res.stdout.splitlines() if ln.strip()}
    assert "million arvens at 2026 prices" in lines["gdp_first"]
    assert "%" in lines["peak_labour_use"] and "labour supply" in lines["peak_labour_use"]
    res = cli("stress", "plan.yaml", "--no-progress", "--vary", "capital_coefficients=unifrm:1",
              cwd=copied)
    assert res.returncode == 2 and "capital_coefficients=uniform:0.9:1.1" in res.stderr
    res = cli("stress", "plan.yaml", "--no-progress", cwd=copied)
    assert res.returncode == 2 and "--vary" in res.stderr and "demo --copy" in res.stderr


def test_the_report_reads_as_words_with_units(solved):
    import html
    import re

    d, _ = solved
    page = (d / "plan.html").read_text(encoding="utf-8")
    text = html.unescape(re.sub(r"<[^>]+>", " ", re.sub(r"<style>.*?</style>|<img[^>]*>", "",
                                                        page, flags=re.S)))
    for symbol in ("TerminalCapacity", "λ", "C_T", "π", "=...", "terminal_capacity"):
        assert symbol not in text, symbol
    assert re.search(r'class="badge ok">optimal<', page)  # one status word
    assert "terminal bundles" in text and "million arvens at 2026 prices a year" in text
    assert "not scarce" in text and "2027: only machinery" in text  # the early zeros
    assert "Disposal is the value of what was made but not used" in text
    assert "consumption per head (million arvens at 2026 prices per unit of the plan's " \
           "population)" in text


def test_the_shadow_price_map_labels_its_cells_and_resists_an_outlier():
    pytest.importorskip("matplotlib")
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        result = gp.demo_plan().solve()
    money = result.shadow_prices_money
    ax = gp.plot.plot_shadow_prices(result, money=True)
    assert len(ax.texts) == money.size  # every cell carries its value
    low, high = ax.images[0].get_clim()
    values = money.to_numpy(dtype=float)
    # the demo's first-year machinery price (11.2) is an outlier: the colours stop well
    # below it, so the other years' prices keep their shades
    assert values.max() > 2 * high and high >= float(pd_quantile(values, 0.95)) - 1e-12
    assert "11" in {t.get_text() for t in ax.texts}
    plt.close("all")


def pd_quantile(values, q):
    import numpy as np

    return np.percentile(values[np.isfinite(values)], 100 * q)


def test_solve_after_an_edit_says_each_targets_margin(solved, copied):
    _, res = solved
    out = res.stdout
    # the demo's energy target binds; machinery output is met with room to spare
    assert "capacity of energy in 2034: binding (met exactly); required 3,400" in out
    assert re.search(r"output of machinery in 2033: met, margin \+[\d,]+; required 3,600", out)
    assert "(million arvens at 2026 prices a year)" in out
    assert "Output by sector in the first, middle and last plan year (million arvens at 2026 " \
           "prices a year)" in out
    assert "What binds first (value of one more unit, in terminal bundles per unit" in out
    # every base-year price is 1: per_value would only repeat value
    assert "per_value" not in out
    d = yaml.safe_load((copied / "plan.yaml").read_text())
    d["plan"]["targets"][0]["capacity_at_least"] = 20000  # the edit that makes it impossible
    (copied / "too-much.yaml").write_text(yaml.safe_dump(d))
    res = cli("solve", "too-much.yaml", "--no-progress", cwd=copied)
    assert res.returncode == 1
    assert re.search(r"capacity of energy in 2034: missed by [\d,]+; required 20,000, "
                     r"reached [\d,]+", res.stdout)


def test_steady_prints_units_and_no_doubled_words(copied):
    res = cli("steady", "flows.csv", "--capital", "capital.csv", "--capital-stocks",
              "capital_stocks.csv", cwd=copied)
    assert res.returncode == 0, res.stderr
    out = res.stdout
    assert "% a year" in out and "Units:" in out
    assert "labour content: person-years per money at base-year prices" in out
    assert "labour_content_labour" not in out and "labour labour" not in out
    assert re.search(r"agriculture +\d\.\d{4} +\d\.\d{4} +\d+\.\d\d % +\d+\.\d\d %", out)


def test_demo_suggests_only_what_it_did_not_write(tmp_path):
    res = cli("demo", "--no-progress", "--report", "arvenna.html", cwd=tmp_path)
    assert res.returncode == 0, res.stderr
    tried = res.stdout.split("Try next:")[1]
    assert "--report" not in tried and "--excel" in tried and "--copy" in tried
    helptext = cli("demo", "--help", cwd=tmp_path).stdout
    assert "--progress / --no-progress" in helptext
    assert "Show the solver's progress." in " ".join(helptext.split())
