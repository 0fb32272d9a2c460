"""The command line, end to end: exit codes, files written, help texts."""

from __future__ import annotations

import shutil
import subprocess
import sys

import pytest
import yaml
from click.testing import CliRunner

import growthplan as gp
from growthplan.cli import main
from growthplan.demo import DEMO_DIR


@pytest.fixture
def folder(tmp_path):
    for f in ("flows.csv", "capital.csv", "capital_stocks.csv", "plan.yaml"):
        shutil.copy(DEMO_DIR / f, tmp_path / f)
    return tmp_path


def run(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


def test_demo_runs_and_writes(tmp_path):
    res = run("demo", "--no-progress", "--out", tmp_path / "out")
    assert res.exit_code == 0, res.output
    assert "optimal" in res.output and "professional judgement" in res.output
    assert "Arvenna" in res.output
    assert (tmp_path / "out" / "output.csv").exists()
    again = run("demo", "--no-progress", "--out", tmp_path / "out")
    assert again.exit_code == 2 and "overwrite" in again.output


def test_solve_writes_csv_excel_and_charts(folder):
    res = run("solve", folder / "plan.yaml", "--no-progress", "--out", folder / "csv",
              "--excel", folder / "plan.xlsx", "--charts", folder / "charts")
    assert res.exit_code == 0, res.output
    assert (folder / "csv" / "shadow_prices.csv").exists()
    assert (folder / "plan.xlsx").exists()
    assert (folder / "charts" / "starts.png").stat().st_size > 1000


def test_infeasible_exit_code_and_shortfalls(folder):
    d = yaml.safe_load((folder / "plan.yaml").read_text())
    d["plan"]["targets"].append({"sector": "energy", "year": 2029, "capacity_at_least": 1e6})
    (folder / "bad.yaml").write_text(yaml.safe_dump(d))
    res = run("solve", folder / "bad.yaml", "--no-progress")
    assert res.exit_code == 1, res.output
    assert "infeasible" in res.output and "Shortfalls" in res.output


def test_invalid_exit_code(folder):
    d = yaml.safe_load((folder / "plan.yaml").read_text())
    d["plan"]["years"] = {"first": 2030, "last": 2020}
    (folder / "bad.yaml").write_text(yaml.safe_dump(d))
    res = run("solve", folder / "bad.yaml")
    assert res.exit_code == 2 and "years" in res.output


def test_solver_failure_exit_code(folder):
    res = run("solve", folder / "plan.yaml", "--no-progress", "--time-limit", "1e-9")
    assert res.exit_code in (0, 3), res.output  # a tiny plan may finish before the clock


def test_check_and_schema(folder):
    res = run("check", folder / "plan.yaml")
    assert res.exit_code == 0 and "valid" in res.output and "productive" in res.output
    res = run("schema")
    assert res.exit_code == 0 and '"economy"' in res.output


def test_steady_command():
    res = run("steady", DEMO_DIR / "flows.csv", "--capital", DEMO_DIR / "capital.csv",
              "--capital-stocks", DEMO_DIR / "capital_stocks.csv")
    assert res.exit_code == 0, res.output
    assert "spectral radius" in res.output and "dynamic balanced growth" in res.output


def test_bad_file_no_traceback(tmp_path):
    res = subprocess.run([sys.executable, "-m", "growthplan.cli", "solve",
                          str(tmp_path / "none.yaml")], capture_output=True, text=True)
    assert res.returncode == 2
    assert "Traceback" not in res.stderr and "existing file" in res.stderr


@pytest.mark.parametrize("cmd", [[], ["demo"], ["solve"], ["check"], ["steady"], ["schema"]])
def test_help(cmd):
    res = run(*cmd, "--help")
    assert res.exit_code == 0 and "Usage" in res.output


def test_an_impossible_plan_writes_its_diagnosis_with_exit_1(tmp_path):
    plan = gp.demo_plan()
    huge = plan.targets[0].model_copy(update={"capacity_at_least": 1e6})
    path = gp.save_plan_file(plan.model_copy(update={"targets": [huge, plan.targets[1]]}),
                             tmp_path / "plan.yaml")
    res = CliRunner().invoke(main, ["solve", str(path), "--no-progress", "--out",
                                    str(tmp_path / "out")])
    assert res.exit_code == 1
    short = (tmp_path / "out" / "shortfalls.csv").read_text(encoding="utf-8")
    assert "capacity target" in short and "energy" in short
