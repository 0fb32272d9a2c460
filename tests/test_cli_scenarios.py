"""The scenario commands (stress, reoptimise, revise), run as the installed command."""

from __future__ import annotations

import shutil
import subprocess
import sys
import warnings

import numpy as np
import pandas as pd
import pytest
import yaml

import growthplan as gp
from growthplan.demo import DEMO_DIR

SECTORS = ("agriculture", "mining", "energy", "food", "textiles", "chemicals", "metals",
           "machinery", "construction", "services")  # the demo's, as in its flows.csv
SECTION = {"seed": 5, "draws": 3, "items": [
    {"what": "capital_coefficients", "correlation": "independent",
     "distribution": {"kind": "uniform", "low": 0.95, "high": 1.05}},
    {"what": "labour_growth", "relative": False,
     "distribution": {"kind": "triangular", "low": 0.005, "mode": 0.012, "high": 0.015}}]}


@pytest.fixture
def folder(tmp_path):
    for f in ("flows.csv", "capital.csv", "capital_stocks.csv"):
        shutil.copy(DEMO_DIR / f, tmp_path / f)
    d = yaml.safe_load((DEMO_DIR / "plan.yaml").read_text())
    d["uncertainty"] = SECTION
    (tmp_path / "plan.yaml").write_text(yaml.safe_dump(d))
    return tmp_path


def cli(*args, cwd=None):
    return subprocess.run([sys.executable, "-m", "growthplan.cli", *map(str, args)],
                          capture_output=True, text=True, cwd=cwd, timeout=300)


def test_stress_writes_its_tables_and_refuses_to_overwrite(folder):
    out, xlsx = folder / "stress.csv", folder / "stress.xlsx"
    r = cli("stress", folder / "plan.yaml", "--no-progress", "--out", out, "--excel", xlsx)
    assert r.returncode == 0, r.stderr
    assert "3 drawn economies (seed 5)" in r.stdout
    assert "Probability that the whole plan is met" in r.stdout
    table = pd.read_csv(out)
    assert sorted(table["draw"].unique()) == [0, 1, 2]
    assert set(pd.ExcelFile(xlsx).sheet_names) == {"draws", "probability", "figures"}
    before = out.read_bytes()
    again = cli("stress", folder / "plan.yaml", "--no-progress", "--out", out)
    assert again.returncode == 2 and again.stdout == ""  # refused before any solve
    assert again.stderr.strip() == (f"error: --out must not exist yet (pass --overwrite to "
                                    f"replace it). Got '{out}'.")
    assert out.read_bytes() == before
    r = cli("stress", folder / "plan.yaml", "--no-progress", "--out", out, "--overwrite",
            "--draws", "2", "--seed", "9")
    assert r.returncode == 0, r.stderr
    assert sorted(pd.read_csv(out)["draw"].unique()) == [0, 1]


def test_reoptimise_on_two_workers_matches_the_library(folder):
    out = folder / "re.csv"
    r = cli("reoptimise", folder / "plan.yaml", "--no-progress", "--workers", "2", "--out", out)
    assert r.returncode == 0, r.stderr
    assert "Probability that the plan is feasible: 1.000 (3 draws)" in r.stdout
    assert "terminal_capacity" in r.stdout
    plan = gp.load_plan_file(folder / "plan.yaml")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        ref = gp.reoptimise(plan, gp.load_uncertainty(folder / "plan.yaml"),
                            executor=gp.SerialExecutor())
    got = pd.read_csv(out)
    keep_ref = ref.table[ref.table.quantity != "solve_seconds"].reset_index(drop=True)
    keep_got = got[got.quantity != "solve_seconds"].reset_index(drop=True)
    assert len(keep_got) == len(keep_ref)
    np.testing.assert_allclose(keep_got["value"], keep_ref["value"], rtol=1e-12)
    assert (keep_got["name"].astype(str) == keep_ref["name"].astype(str)).all()


def test_revise_prints_the_comparison_and_writes_it(folder):
    rows = [f"{y},energy,60\n{y},services,300\n" for y in (2027, 2028, 2029)]
    rows += [f"2027,{s},0\n" for s in SECTORS if s not in ("energy", "services")]
    (folder / "actuals.csv").write_text("year,sector,starts\n" + "".join(rows))
    out = folder / "cmp.csv"
    r = cli("revise", folder / "plan.yaml", folder / "actuals.csv", "--from-year", "2030",
            "--no-progress", "--out", out)
    assert r.returncode == 0, r.stderr
    assert "Original and revised plan from 2030" in r.stdout and "objective: original" in r.stdout
    table = pd.read_csv(out)
    assert list(table.columns) == ["year", "sector", "quantity", "original", "revised",
                                   "difference", "relative"]
    assert table["year"].min() == 2030
    np.testing.assert_allclose(table["difference"], table["revised"] - table["original"])


@pytest.mark.parametrize("actuals, args, match", [
    ("year,sector,starts\n2027,energy,-1\n", ["--from-year", "2028"], "starts must hold finite"),
    ("year,sector,starts\n2027,energy,1\n", [], "Missing option '--from-year'"),
    # reproducer: actuals without most sectors were taken as "nothing started" silently
    ("year,sector,starts\n2027,energy,1\n", ["--from-year", "2028"],
     "actuals (a.csv) must name every sector of the plan at least once"),
])
def test_revise_refuses_bad_actuals_in_one_line(folder, actuals, args, match):
    (folder / "a.csv").write_text(actuals)
    r = cli("revise", folder / "plan.yaml", folder / "a.csv", "--no-progress", *args,
            "--out", folder / "cmp.csv")
    assert r.returncode == 2, (r.stdout, r.stderr)
    assert match in r.stderr and len(r.stderr.strip().splitlines()) == 1
    assert not (folder / "cmp.csv").exists()


def test_a_plan_file_without_uncertainty_and_an_impossible_plan(folder):
    d = yaml.safe_load((folder / "plan.yaml").read_text())
    del d["uncertainty"]
    (folder / "plain.yaml").write_text(yaml.safe_dump(d))
    r = cli("reoptimise", folder / "plain.yaml", "--no-progress")
    assert r.returncode == 2 and "must have an uncertainty section" in r.stderr
    d = yaml.safe_load((folder / "plan.yaml").read_text())
    d["plan"]["targets"].append({"sector": "energy", "year": 2029, "capacity_at_least": 1e6})
    (folder / "bad.yaml").write_text(yaml.safe_dump(d))
    r = cli("stress", folder / "bad.yaml", "--no-progress")
    assert r.returncode == 1 and "nothing to stress-test" in r.stdout


def test_an_input_table_is_refused_as_output_before_any_solve(folder):
    # flows.csv is a table the plan file reads: --overwrite must not let a result replace it
    before = (folder / "flows.csv").read_bytes()
    r = cli("stress", folder / "plan.yaml", "--no-progress", "--out", folder / "flows.csv",
            "--overwrite")
    assert r.returncode == 2 and r.stdout == ""  # nothing solved
    assert r.stderr.startswith("error: --out must not be an input file")
    assert (folder / "flows.csv").read_bytes() == before
