"""The demo: its data ship inside the package (and the wheel), the user-visible copy in
data/demo/ stays identical, ``growthplan demo`` explains its plan with units and ends with
what to try next, and ``--copy`` hands the files over for editing."""

from __future__ import annotations

import filecmp
import subprocess
import sys
import zipfile
from pathlib import Path

import pytest
from click.testing import CliRunner

import growthplan as gp
from growthplan.cli import main
from growthplan.demo import DEMO_DIR, DEMO_FILES, SUPPLY_USE_FILES, copy_demo, demo_plan

ROOT = Path(__file__).resolve().parent.parent


def test_the_demo_data_live_in_the_package():
    assert DEMO_DIR == Path(gp.__file__).resolve().parent / "demo_data"
    assert all((DEMO_DIR / name).is_file() for name in DEMO_FILES)


def test_the_copy_in_data_demo_is_identical():
    # data/demo/ is what a reader of the repository sees; the package's copy is what runs.
    # Edit both together (cp data/demo/* growthplan/demo_data/ or the other way round).
    visible = ROOT / "data" / "demo"
    every = sorted((*DEMO_FILES, *SUPPLY_USE_FILES))
    for folder in (visible, DEMO_DIR):
        found = sorted(p.relative_to(folder).as_posix() for p in folder.rglob("*")
                       if p.is_file() and "__pycache__" not in p.parts)
        assert found == every, folder
    match, mismatch, errors = filecmp.cmpfiles(visible, DEMO_DIR, every, shallow=False)
    assert mismatch == [] and errors == [] and sorted(match) == every


def test_the_wheel_carries_the_demo_and_finds_it_where_installed(tmp_path):
    build = subprocess.run([sys.executable, "-m", "pip", "wheel", "--no-deps", "-q", "-w",
                            str(tmp_path / "dist"), str(ROOT)],
                           capture_output=True, text=True, timeout=600, check=False)
    if build.returncode != 0 and "No matching distribution" in build.stderr:
        pytest.skip("the build back end cannot be fetched here")  # no package index
    assert build.returncode == 0, build.stderr[-2000:]
    (wheel,) = (tmp_path / "dist").glob("growthplan-*.whl")
    with zipfile.ZipFile(wheel) as z:
        names = set(z.namelist())
        assert {f"growthplan/demo_data/{n}" for n in (*DEMO_FILES, *SUPPLY_USE_FILES)} <= names
        z.extractall(tmp_path / "site")
    # the unpacked wheel is an installed package: no source tree, no data/ folder near it
    probe = ("import growthplan as gp, growthplan.demo as d; print(d.DEMO_DIR); "
             "print(gp.demo_plan().economy.n)")
    run = subprocess.run([sys.executable, "-c", probe], cwd=tmp_path, capture_output=True,
                         text=True, timeout=120, check=False,
                         env={"PYTHONPATH": str(tmp_path / "site"), "PATH": "/usr/bin:/bin"})
    assert run.returncode == 0, run.stderr[-2000:]
    where, sectors = run.stdout.split()
    assert Path(where) == (tmp_path / "site" / "growthplan" / "demo_data").resolve()
    assert sectors == "10"


def test_copy_demo_hands_the_files_over(tmp_path):
    written = copy_demo(tmp_path / "mine")
    assert [p.name for p in written] == list(DEMO_FILES)
    assert all(filecmp.cmp(p, DEMO_DIR / p.name, shallow=False) for p in written)
    plan = tmp_path / "mine" / "plan.yaml"
    plan.write_text(plan.read_text().replace("capacity_at_least: 3400",
                                             "capacity_at_least: 3500"))
    assert demo_plan(tmp_path / "mine").targets[0].capacity_at_least == 3500
    assert demo_plan().targets[0].capacity_at_least == 3400  # the package's copy untouched
    with pytest.raises(gp.InvalidInput, match="folder"):
        copy_demo(tmp_path / "mine")
    with pytest.raises(gp.InvalidInput, match="hold the demo plan file"):
        demo_plan(tmp_path)


@pytest.fixture(scope="module")
def demo_output():
    res = CliRunner().invoke(main, ["demo", "--no-progress"])
    assert res.exit_code == 0, res.output
    return res.output


def test_the_demo_explains_its_plan(demo_output):
    text = " ".join(demo_output.split())  # wrapped paragraphs read as one line
    assert ("Units: each sector's output, capacity and capacity started in million arvens "
            "at 2026 prices a year") in text
    assert "labour in thousand person-years" in text and "consumption in baskets" in text
    r = demo_plan().solve(progress=False)
    level = r.consumption["level"]
    assert f"Consumption (baskets a year): {level.iloc[0]:,.0f} in 2027 (floor 9,000)" in text
    # both targets met; machinery's output 2033 against 3,600 required
    assert "capacity of energy in 2034: binding (met exactly); required 3,400, reached 3,400 " \
        "(million arvens at 2026 prices a year)" in text
    margin = r.output.loc[2033, "machinery"] - 3600
    assert f"output of machinery in 2033: met, margin {margin:+,.0f}; required 3,600" in text
    assert f"The optimum is {r.level:,.0f} bundles" in text
    assert f"could make {r.terminal_value:,.0f} million arvens at 2026 prices a year" in text
    tail = demo_output[demo_output.index("Try next:"):]
    for hint in ("--report", "--excel", "--charts", "--copy", "data/demo/plan.yaml",
                 "growthplan solve"):
        assert hint in tail, hint
    assert max(len(line) for line in tail.splitlines()) <= 100


def test_demo_copy_on_the_command_line(tmp_path):
    res = CliRunner().invoke(main, ["demo", "--copy", str(tmp_path / "mine")])
    assert res.exit_code == 0, res.output
    assert (tmp_path / "mine" / "plan.yaml").is_file() and "growthplan solve" in res.output
    again = CliRunner().invoke(main, ["demo", "--copy", str(tmp_path / "mine")])
    assert again.exit_code == 2 and "--copy must name a new or empty folder" in again.output
    over = CliRunner().invoke(main, ["demo", "--copy", str(tmp_path / "mine"), "--overwrite"])
    assert over.exit_code == 0, over.output


def test_demo_charts_without_matplotlib_fail_before_the_solve(tmp_path, monkeypatch):
    import importlib.util

    real = importlib.util.find_spec
    monkeypatch.setattr(importlib.util, "find_spec",
                        lambda name, *a: None if name == "matplotlib" else real(name, *a))
    res = CliRunner().invoke(main, ["demo", "--no-progress", "--charts", str(tmp_path / "c")])
    assert res.exit_code == 2
    assert "--charts must be used with matplotlib installed" in res.output
    assert "growthplan result" not in res.output  # nothing solved
    assert not (tmp_path / "c").exists()
