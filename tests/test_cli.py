"""The command line, end to end."""

from __future__ import annotations

import subprocess
import sys

from click.testing import CliRunner

from growthplan.cli import main
from growthplan.demo import DEMO_DIR


def test_demo_runs_and_writes(tmp_path):
    res = CliRunner().invoke(main, ["demo", "--out", str(tmp_path / "out")])
    assert res.exit_code == 0, res.output
    assert "optimal" in res.output and "professional judgement" in res.output
    assert (tmp_path / "out" / "output.csv").exists()
    again = CliRunner().invoke(main, ["demo", "--out", str(tmp_path / "out")])
    assert again.exit_code == 2 and "overwrite" in again.output


def test_steady_command():
    res = CliRunner().invoke(main, ["steady", str(DEMO_DIR / "flows.csv"), "--capital",
                                    str(DEMO_DIR / "capital.csv"), "--capital-stocks",
                                    str(DEMO_DIR / "capital_stocks.csv")])
    assert res.exit_code == 0, res.output
    assert "spectral radius" in res.output and "dynamic balanced growth" in res.output


def test_bad_file_no_traceback(tmp_path):
    res = subprocess.run([sys.executable, "-m", "growthplan.cli", "steady",
                          str(tmp_path / "none.csv")], capture_output=True, text=True)
    assert res.returncode == 2
    assert "Traceback" not in res.stderr and "existing file" in res.stderr


def test_help():
    for args in (["--help"], ["demo", "--help"], ["steady", "--help"]):
        res = CliRunner().invoke(main, args)
        assert res.exit_code == 0 and "Usage" in res.output
