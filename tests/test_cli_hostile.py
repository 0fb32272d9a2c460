"""Hostile command lines: bad paths, folders, special files, malformed files, bad
options and numbers, conflicting flags, unreadable inputs and unwritable outputs.

Each must end with its documented exit code and exactly one line on stderr,
never a traceback. The counts per exit code are printed at the end of the run.
"""

from __future__ import annotations

import errno
import os
import resource
import shutil
import subprocess
import sys
from collections import Counter

import pytest
import yaml
from click.testing import CliRunner

import growthplan as gp
from growthplan.cli import main
from growthplan.demo import DEMO_DIR

CASES: Counter = Counter()  # reported at the end of the run (conftest)

DEEP = 20_000


@pytest.fixture(scope="module")
def bad(tmp_path_factory):
    """A folder of good and bad inputs."""
    d = tmp_path_factory.mktemp("hostile")
    for f in ("flows.csv", "capital.csv", "capital_stocks.csv", "plan.yaml"):
        shutil.copy(DEMO_DIR / f, d / f)
    good = yaml.safe_load((d / "plan.yaml").read_text())
    (d / "adir").mkdir()
    (d / "a file").write_text("x")
    os.mkfifo(d / "fifo")
    (d / "bad.xlsx").write_bytes(b"PK\x03\x04 not really a workbook")
    (d / "notzip.xlsx").write_text("x")
    (d / "binary.csv").write_bytes(bytes(range(256)) * 4)
    (d / "empty.csv").write_text("")
    (d / "empty.yaml").write_text("")
    (d / "binary.yaml").write_bytes(b"\xff\xfe\x00\x81garbage")
    shutil.copy(d / "plan.yaml", d / "plan.txt")
    shutil.copy(d / "plan.yaml", d / "plan")
    (d / "syntax.yaml").write_text("economy: [1, 2\nplan: }\n")
    (d / "deep_list.yaml").write_text("economy: " + "[" * DEEP + "]" * DEEP + "\n")
    (d / "deep_map.yaml").write_text("economy: " + "{a: " * DEEP + "1" + "}" * DEEP + "\n")
    (d / "deep.toml").write_text("economy = " + "[" * DEEP + "]" * DEEP + "\n")
    (d / "syntax.toml").write_text("economy = = 1\n")
    (d / "list.yaml").write_text("- economy\n- plan\n")
    (d / "nulls.yaml").write_text("economy: null\nplan: null\n")

    def variant_file(name, change):
        data = yaml.safe_load(yaml.safe_dump(good))
        change(data)
        (d / name).write_text(yaml.safe_dump(data))

    variant_file("missing_table.yaml", lambda x: x["economy"].update(flows="nothing.csv"))
    variant_file("folder_table.yaml", lambda x: x["economy"].update(flows="adir"))
    variant_file("corrupt_xlsx_table.yaml", lambda x: x["economy"].update(capital="bad.xlsx"))
    variant_file("notzip_table.yaml", lambda x: x["economy"].update(capital="notzip.xlsx"))
    variant_file("binary_table.yaml", lambda x: x["economy"].update(flows="binary.csv"))
    variant_file("empty_table.yaml", lambda x: x["economy"].update(capital="empty.csv"))
    variant_file("reversed.yaml", lambda x: x["plan"].update(years={"first": 2030,
                                                                     "last": 2020}))
    variant_file("unknown_key.yaml", lambda x: x["plan"].update(bogus=1))
    variant_file("huge.yaml", lambda x: x["plan"]["labour"].update(start=float("inf")))
    variant_file("text_number.yaml", lambda x: x["plan"]["labour"].update(start="12,5"))
    variant_file("bool_years.yaml", lambda x: x["plan"].update(years={"first": True,
                                                                       "last": 2030}))
    variant_file("outside.yaml", lambda x: x["economy"].update(flows="../flows.csv"))
    variant_file("misspelt.yaml", lambda x: x["plan"].update(labor=x["plan"].pop("labour")))
    variant_file("bad_kind.yaml", lambda x: x["plan"].update(objective={"kind": "most"}))
    variant_file("bad_method.yaml", lambda x: x["solve"].update(method="simplx"))
    (d / "charts_in_use").mkdir()
    (d / "charts_in_use" / "holiday.png").write_text("the user's")
    return d


def check_one_line(res, code: int, fragment: str) -> None:
    lines = [ln for ln in res.stderr.splitlines() if ln.strip()]
    assert res.exit_code == code, (res.exit_code, res.stdout[-500:], res.stderr)
    assert len(lines) == 1, res.stderr
    assert "Traceback" not in res.stdout + res.stderr
    assert fragment in lines[0], lines[0]
    assert res.exception is None or isinstance(res.exception, SystemExit), res.exception
    CASES[f"exit {code}"] += 1


def invoke(bad, monkeypatch, args):
    monkeypatch.chdir(bad)
    return CliRunner().invoke(main, args)


# plan file, fragment of the one error line
PLAN_FILES = [
    ("none.yaml", "existing file"),
    ("adir", "not a folder"),
    ("adir/", "not a folder"),
    ("fifo", "not a pipe"),
    ("/dev/null", "not a pipe"),
    ("/dev/zero", "not a pipe"),
    ("empty.yaml", "empty.yaml"),
    ("binary.yaml", "UTF-8"),
    ("plan.txt", ".toml"),
    ("plan", "no suffix"),
    ("syntax.yaml", "not valid YAML"),
    ("deep_list.yaml", "nesting depth"),
    ("deep_map.yaml", "levels deep"),
    ("deep.toml", "not valid TOML"),
    ("syntax.toml", "not valid TOML"),
    ("list.yaml", "mapping"),
    ("nulls.yaml", "nulls.yaml"),
    ("missing_table.yaml", "nothing.csv"),
    ("folder_table.yaml", "adir"),
    ("corrupt_xlsx_table.yaml", "bad.xlsx"),
    ("notzip_table.yaml", "notzip.xlsx"),
    ("binary_table.yaml", "binary_table.yaml"),
    ("empty_table.yaml", "empty_table.yaml"),
    ("reversed.yaml", "years"),
    ("unknown_key.yaml", "bogus"),
    ("huge.yaml", "labour"),
    ("text_number.yaml", "labour"),
    ("bool_years.yaml", "years"),
    ("outside.yaml", "economy.flows must name a table in the plan file's folder or below "
                     "it. Got '../flows.csv'."),
    ("misspelt.yaml", "plan.labor must be a known field (did you mean 'labour'?)"),
    ("bad_kind.yaml", "plan.objective.kind must be one of 'terminal_capacity'"),
    ("bad_method.yaml", "Did you mean 'simplex'?"),
]


# both commands read plan files the same way; the slow deep files go through one
PLAN_CASES = [pytest.param(cmd, p, frag, id=f"{cmd} {p}") for p, frag in PLAN_FILES
              for cmd in (("solve",) if p.startswith("deep") else ("solve", "check"))]


@pytest.mark.parametrize(("command", "plan_file", "fragment"), PLAN_CASES)
def test_bad_plan_file(bad, monkeypatch, command, plan_file, fragment):
    args = [command, plan_file] + (["--no-progress"] if command == "solve" else [])
    res = invoke(bad, monkeypatch, args)
    check_one_line(res, 2, fragment)


STEADY = [
    (["none.csv"], "existing file"),
    (["adir"], "not a folder"),
    (["fifo"], "not a pipe"),
    (["/dev/zero"], "not a pipe"),
    (["empty.csv"], "flows"),
    (["binary.csv"], "flows"),
    (["bad.xlsx"], "bad.xlsx"),
    (["notzip.xlsx"], "notzip.xlsx"),
    (["flows.csv", "--capital", "adir"], "not a folder"),
    (["flows.csv", "--capital", "bad.xlsx"], "bad.xlsx"),
    (["flows.csv", "--capital", "fifo"], "not a pipe"),
    (["flows.csv", "--capital", "capital.csv", "--capital-stocks", "none.csv"],
     "existing file"),
    (["flows.csv", "--capital-stocks", "capital_stocks.csv"], "capital"),
    (["flows.csv", "--capital", "flows.csv"], "capital"),
    (["flows.csv", "--capital", "capital.csv"], "--capital must come with --capital-stocks"),
    (["flows.csv", "--capital-coefficients", "capital_stocks.csv"], "--capital must be given"),
    (["flows.csv", "--capital", "capital.csv", "--capital-stocks", "capital_stocks.csv",
      "--capital-coefficients", "capital_stocks.csv"], "not come with --capital-coefficients"),
    (["flows.csv", "--capital", "capital.csv", "--capital-coefficients", "adir"],
     "not a folder"),
]


@pytest.mark.parametrize(("args", "fragment"), STEADY, ids=[" ".join(a) for a, _ in STEADY])
def test_bad_tables(bad, monkeypatch, args, fragment):
    check_one_line(invoke(bad, monkeypatch, ["steady", *args]), 2, fragment)


SOLVE = ["solve", "plan.yaml", "--no-progress"]
OPTIONS = [
    ([*SOLVE, "--bogus"], "No such option"),
    (["solve"], "Missing argument"),
    ([*SOLVE, "extra"], "unexpected extra argument"),
    ([*SOLVE, "--time-limit", "abc"], "time-limit"),
    ([*SOLVE, "--time-limit", "-1"], "time-limit"),
    ([*SOLVE, "--time-limit", "0"], "time-limit"),
    ([*SOLVE, "--time-limit", "nan"], "time-limit"),
    ([*SOLVE, "--time-limit", "inf"], "time-limit"),
    ([*SOLVE, "--time-limit", "1e999"], "time-limit"),
    ([*SOLVE, "--time-limit"], "time-limit"),
    ([*SOLVE, "--method", "fastest"], "--method"),
    ([*SOLVE, "--method", ""], "--method"),
    ([*SOLVE, "--out", "adir"], "--out must not exist yet"),
    ([*SOLVE, "--out", ".", "--overwrite"], "current folder"),
    ([*SOLVE, "--out", "..", "--overwrite"], "current folder"),
    ([*SOLVE, "--out", "a file", "--overwrite"], "--out must name a folder"),
    ([*SOLVE, "--out", "", "--overwrite"], "current folder"),  # "" is "."
    ([*SOLVE, "--out", "a file/sub"], "inside a folder"),
    ([*SOLVE, "--excel", "adir", "--overwrite"], "--excel must name a file"),
    ([*SOLVE, "--excel", "a file"], "--excel must not exist yet"),
    ([*SOLVE, "--excel", "plan.yaml", "--overwrite"], "not be the plan file"),
    ([*SOLVE, "--charts", "a file", "--overwrite"], "--charts must name a folder"),
    ([*SOLVE, "--out", "x", "--excel", "x"], "--excel must differ from --out"),
    ([*SOLVE, "--out", "x", "--charts", "./x"], "--charts must differ from --out"),
    ([*SOLVE, "--excel", "out.csv"], "--excel must end in .xlsx"),
    ([*SOLVE, "--excel", "out.XLS"], "--excel must end in .xlsx"),
    ([*SOLVE, "--report", "x.pdf"], "--report must end in .html or .htm"),
    ([*SOLVE, "--charts", "charts_in_use"], "--charts must not exist yet or be empty (pass "
                                            "--overwrite"),
    ([*SOLVE, "--method", "ipm_crossover"], "not one of 'auto', 'simplex'"),
    (["demo", "--no-progress", "--excel", "x.csv"], "--excel must end in .xlsx"),
    (["demo", "--no-progress", "--out", "adir"], "--out must not exist yet"),
    (["demo", "--bogus"], "No such option"),
    (["check", "plan.yaml", "--out", "x"], "No such option"),
    (["schema", "extra"], "unexpected extra argument"),
    (["nosuch"], "No such command"),
    (["steady"], "Missing argument"),
    ([], "name a command"),
]


@pytest.mark.parametrize(("args", "fragment"), OPTIONS, ids=[" ".join(a) for a, _ in OPTIONS])
def test_bad_options(bad, monkeypatch, args, fragment):
    check_one_line(invoke(bad, monkeypatch, args), 2, fragment)
    assert sorted(p.name for p in bad.iterdir() if p.name.startswith(("x", "."))) == []


def test_out_folder_holding_the_plan_file(tmp_path, monkeypatch):
    (tmp_path / "here").mkdir()
    for f in ("flows.csv", "capital.csv", "capital_stocks.csv", "plan.yaml"):
        shutil.copy(DEMO_DIR / f, tmp_path / "here" / f)
    monkeypatch.chdir(tmp_path)
    res = CliRunner().invoke(main, ["solve", "here/plan.yaml", "--no-progress", "--out", "here",
                                    "--overwrite"])
    check_one_line(res, 2, "holding the plan file")
    assert (tmp_path / "here" / "plan.yaml").exists()


def test_unexpected_error_while_reading_is_invalid_input(bad, monkeypatch):
    def broken(path):
        raise RuntimeError("the reader fell over")

    monkeypatch.setattr(gp, "load_plan_file", broken)
    res = invoke(bad, monkeypatch, ["check", "plan.yaml"])
    check_one_line(res, 2, "cannot read plan.yaml: RuntimeError: the reader fell over")


def test_write_failure_names_the_path(bad, monkeypatch):
    def full(self, folder, overwrite=False, protect=()):
        raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC), str(folder))

    monkeypatch.setattr(gp.PlanResult, "to_csv", full)
    res = invoke(bad, monkeypatch, [*SOLVE, "--out", "x"])
    check_one_line(res, 2, f"cannot write x: {os.strerror(errno.ENOSPC)}")
    assert "optimal" in res.stdout  # the summary was printed before


@pytest.mark.parametrize("debug", ["", "1"])
def test_last_resort_handler(bad, monkeypatch, debug):
    def boom(self, **kwargs):
        raise RuntimeError("something unforeseen")

    monkeypatch.setattr(gp.Plan, "compile", boom)
    monkeypatch.setenv("GROWTHPLAN_DEBUG", debug)
    res = invoke(bad, monkeypatch, ["check", "plan.yaml"])
    assert res.exit_code == 3
    if debug:
        assert "Traceback" in res.stderr and "something unforeseen" in res.stderr
        CASES["exit 3"] += 1
    else:
        check_one_line(res, 3, "unexpected RuntimeError: something unforeseen")
        assert "GROWTHPLAN_DEBUG=1" in res.stderr


# --- the operating system refuses: real processes, as an ordinary user -----------------

def _as_user() -> list[str] | None:
    """A command prefix under which file permissions hold (root ignores them)."""
    if os.geteuid() != 0:
        return []
    setpriv = shutil.which("setpriv")
    return None if setpriv is None else [setpriv, "--inh-caps=-all", "--bounding-set=-all"]


def _small_files() -> None:
    resource.setrlimit(resource.RLIMIT_FSIZE, (1024, 1024))  # a full disk, as the OS says


OS_CASES = {
    "unreadable plan file": (["solve", "locked.yaml", "--no-progress"], None, "locked.yaml"),
    "unreadable table": (["check", "locked_table.yaml"], None, "locked.csv"),
    "read-only folder for --out": ([*SOLVE, "--out", "ro/out"], None, "writable folder"),
    "full disk --out": ([*SOLVE, "--out", "full"], _small_files, "cannot write full"),
    "full disk --excel": ([*SOLVE, "--excel", "full.xlsx"], _small_files,
                          "cannot write full.xlsx"),
}


@pytest.fixture(scope="module", autouse=True)
def os_runs(tmp_path_factory):
    """Every OS case started at once, as the module starts: they run while the
    in-process cases do, and the tests at the end gather them."""
    prefix = _as_user()
    if prefix is None:
        yield None, {}
        return
    d = tmp_path_factory.mktemp("os")
    for f in ("flows.csv", "capital.csv", "capital_stocks.csv", "plan.yaml"):
        shutil.copy(DEMO_DIR / f, d / f)
    shutil.copy(d / "plan.yaml", d / "locked.yaml")
    shutil.copy(d / "flows.csv", d / "locked.csv")
    text = (d / "plan.yaml").read_text().replace("flows: flows.csv", "flows: locked.csv")
    (d / "locked_table.yaml").write_text(text)
    (d / "ro").mkdir()
    for f in ("locked.yaml", "locked.csv"):
        os.chmod(d / f, 0)
    os.chmod(d / "ro", 0o555)
    env = dict(os.environ, OMP_NUM_THREADS="1", OPENBLAS_NUM_THREADS="1")  # side by side
    procs = {name: subprocess.Popen([*prefix, sys.executable, "-m", "growthplan.cli", *args],
                                    cwd=d, preexec_fn=limit, env=env, stdout=subprocess.PIPE,
                                    stderr=subprocess.PIPE, text=True)
             for name, (args, limit, _) in OS_CASES.items()}
    yield d, procs
    for p in procs.values():
        if p.poll() is None:
            p.kill()
            p.communicate()
    os.chmod(d / "ro", 0o755)


@pytest.mark.parametrize("name", list(OS_CASES))
def test_operating_system_refuses(os_runs, name):
    folder, procs = os_runs
    if folder is None:
        pytest.skip("running as root without setpriv: file permissions cannot be tested")
    proc = procs[name]
    stdout, stderr = proc.communicate(timeout=120)
    lines = [ln for ln in stderr.splitlines() if ln.strip()]
    assert proc.returncode == 2, (stdout[-300:], stderr)
    assert len(lines) == 1 and "Traceback" not in stderr, stderr
    assert OS_CASES[name][2] in lines[0], lines[0]
    CASES["exit 2"] += 1


def test_failed_writes_leave_nothing(os_runs):
    folder, procs = os_runs
    if folder is None:
        pytest.skip("running as root without setpriv")
    for p in procs.values():
        p.communicate(timeout=120)
    assert sorted(p.name for p in folder.iterdir() if p.name.startswith((".", "full"))) == []
    assert list((folder / "ro").iterdir()) == []


# -- output paths the operating system refuses --------------------------------------------

LONG = "a" * 300  # longer than any file system's 255-byte name


@pytest.mark.parametrize("args, fragment", [
    # reproducers: each gave "unexpected OSError", exit 3
    (["check", f"{LONG}.yaml"], "plan file must be a path the system accepts"),
    (["solve", "plan.yaml", "--excel", f"{LONG}.xlsx"], "--excel must be a path the system"),
    (["solve", "plan.yaml", "--report", f"{LONG}.html"], "--report must be a path the system"),
    (["solve", "plan.yaml", "--out", LONG], "--out must be a path the system accepts"),
    (["solve", "plan.yaml", "--out", f"{LONG}/tables"], "--out must be a path the system"),
    (["solve", "plan.yaml", "--charts", LONG], "--charts must be a path the system"),
    (["demo", "--copy", LONG], "--copy must be a path the system accepts"),
    (["stress", "plan.yaml", "--out", f"{LONG}.csv"], "--out must be a path the system"),
    (["revise", "plan.yaml", "flows.csv", "--from-year", "2030", "--excel", f"{LONG}.xlsx"],
     "--excel must be a path the system"),
])
def test_output_paths_the_system_refuses_are_invalid_input(bad, monkeypatch, args, fragment):
    check_one_line(invoke(bad, monkeypatch, args), 2, fragment)


# -- --overwrite replaces only files growthplan wrote -------------------------------------

@pytest.mark.parametrize("args, name", [
    # reproducers: each replaced the analyst's own file
    (["demo", "--excel", "mine.xlsx", "--overwrite"], "mine.xlsx"),
    (["demo", "--report", "mine.html", "--overwrite"], "mine.html"),
    (["stress", "plan.yaml", "--out", "mine.csv", "--overwrite"], "mine.csv"),
    (["reoptimise", "plan.yaml", "--excel", "mine.xlsx", "--overwrite"], "mine.xlsx"),
])
def test_overwrite_refuses_files_growthplan_did_not_write(bad, monkeypatch, args, name):
    (bad / name).write_text("the analyst's own")
    try:
        res = invoke(bad, monkeypatch, args)
        check_one_line(res, 2, "be a file growthplan wrote to be replaced (it holds no "
                               "'written by growthplan' mark; pass --force")
        assert (bad / name).read_text() == "the analyst's own"
    finally:
        (bad / name).unlink()


def test_force_needs_overwrite(bad, monkeypatch):
    check_one_line(invoke(bad, monkeypatch, ["demo", "--excel", "x.xlsx", "--force"]), 2,
                   "--force must come with --overwrite")


def test_force_replaces_and_then_the_file_is_ours(bad, monkeypatch, tmp_path):
    mine = tmp_path / "mine.html"
    mine.write_text("the analyst's own")
    res = invoke(bad, monkeypatch, ["demo", "--no-progress", "--report", str(mine),
                                    "--overwrite", "--force"])
    assert res.exit_code == 0, res.stderr
    assert "written by growthplan" in mine.read_text()
    res = invoke(bad, monkeypatch, ["demo", "--no-progress", "--report", str(mine),
                                    "--overwrite"])
    assert res.exit_code == 0, res.stderr


def test_outputs_appear_together_or_not_at_all(bad, monkeypatch, tmp_path):
    # reproducer: the workbook failed after the report and the CSV folder were written
    import growthplan.results.workbook as workbook

    def failing(*args, **kwargs):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(workbook, "write_workbook", failing)
    out, excel, report = tmp_path / "tables", tmp_path / "plan.xlsx", tmp_path / "plan.html"
    res = invoke(bad, monkeypatch, ["demo", "--no-progress", "--out", str(out),
                                    "--report", str(report), "--excel", str(excel)])
    check_one_line(res, 2, "No space left on device")
    assert sorted(tmp_path.iterdir()) == []  # no report, no folder, no temporary files
