"""The command line, end to end: exit codes, files written, help texts."""

from __future__ import annotations

import os
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
    # the solver line states the rule auto follows: formulation, method and why
    solver = [ln for ln in res.output.splitlines() if ln.strip().startswith("solver:")]
    assert len(solver) == 1 and "form, " in solver[0] and "nonzeros" in solver[0], res.output
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
                                    str(tmp_path / "out"), "--charts", str(tmp_path / "charts")])
    assert res.exit_code == 1
    short = (tmp_path / "out" / "shortfalls.csv").read_text(encoding="utf-8")
    assert "capacity target" in short and "energy" in short
    # its charts show the targets against what was reached and the shortfalls
    assert sorted(p.name for p in (tmp_path / "charts").glob("*.png")) == [
        "diagnosis.png", "targets.png"]


# --- the rough edges: each once through the installed command, variants in process -----

NO_MATPLOTLIB = "import sys\nsys.modules['matplotlib'] = None  # import matplotlib fails"
HOME_RUNS = {  # name: (arguments, prelude)
    "charts without matplotlib": (["solve", "plan.yaml", "--no-progress", "--charts",
                                   "charts"], NO_MATPLOTLIB),
    "time limit 0": (["solve", "plan.yaml", "--time-limit", "0"], ""),
    "existing excel": (["solve", "plan.yaml", "--excel", "mine.xlsx"], ""),
    "excel as csv": (["solve", "plan.yaml", "--excel", "out.csv"], ""),
    "steady with capital coefficients": (["steady", "flows.csv", "--capital", "capital.csv",
                                          "--capital-coefficients", "b.csv"], ""),
    "check without capital goods": (["check", "free.yaml"], ""),
    "solve": (["solve", "plan.yaml", "--no-progress", "--out", "out"], ""),
}


@pytest.fixture(scope="module")
def installed(tmp_path_factory):
    """Every installed-command case started at once; each test gathers its own."""
    d = tmp_path_factory.mktemp("installed")
    for f in ("flows.csv", "capital.csv", "capital_stocks.csv", "plan.yaml"):
        shutil.copy(DEMO_DIR / f, d / f)
    (d / "mine.xlsx").write_text("the user's")
    gp.load_plan_file(d / "plan.yaml")[0].economy.B.to_csv(d / "b.csv", index_label="sector")
    free = yaml.safe_load((d / "plan.yaml").read_text())
    del free["economy"]["capital_stocks"]  # capacity needs no capital goods
    (d / "free.yaml").write_text(yaml.safe_dump(free))
    env = dict(os.environ, OMP_NUM_THREADS="1", OPENBLAS_NUM_THREADS="1")
    procs = {}
    for name, (args, prelude) in HOME_RUNS.items():
        code = f"{prelude}\nimport sys\nfrom growthplan.cli import main\nmain()"
        procs[name] = subprocess.Popen([sys.executable, "-c", code, *args], cwd=d, env=env,
                                       stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                                       text=True)
    results = {}

    def result(name):
        if name not in results:
            out, err = procs[name].communicate(timeout=300)
            results[name] = subprocess.CompletedProcess(HOME_RUNS[name][0],
                                                        procs[name].returncode, out, err)
        return results[name]

    yield d, result
    for p in procs.values():
        if p.poll() is None:
            p.kill()
            p.communicate()


def one_line(returncode, stderr, code, *fragments):
    lines = [ln for ln in stderr.splitlines() if ln.strip()]
    assert returncode == code, (returncode, stderr)
    assert len(lines) == 1 and "Traceback" not in stderr, stderr
    for f in fragments:
        assert f in lines[0], lines[0]
    return lines[0]


def test_charts_without_matplotlib_name_the_extra(installed):
    d, result = installed
    res = result("charts without matplotlib")
    one_line(res.returncode, res.stderr, 2, "--charts", 'pip install "growthplan[plot]"')
    assert res.stdout == "" and not (d / "charts").exists()  # refused before solving


@pytest.fixture
def no_matplotlib(monkeypatch):
    """matplotlib and its loaded modules made unimportable in this process."""
    for name in [m for m in sys.modules if m == "matplotlib" or m.startswith("matplotlib.")]:
        monkeypatch.setitem(sys.modules, name, None)
    monkeypatch.setitem(sys.modules, "matplotlib", None)


def test_demo_charts_without_matplotlib(tmp_path, no_matplotlib):
    res = run("demo", "--no-progress", "--charts", tmp_path / "charts")
    one_line(res.exit_code, res.stderr, 2, "--charts", 'pip install "growthplan[plot]"')
    assert res.stdout == ""


def test_a_report_without_matplotlib_is_written_without_charts(folder, no_matplotlib):
    res = run("solve", folder / "plan.yaml", "--no-progress", "--report", folder / "p.html")
    assert res.exit_code == 0, res.output
    assert "growthplan[plot]" in (folder / "p.html").read_text(encoding="utf-8")
    steps = res.stdout.split("Next:")[1]  # the charts it suggests name the extra
    assert '--charts FOLDER (charts as PNG; needs pip install "growthplan[plot]")' in steps


def test_time_limit_zero_is_refused(installed):
    res = installed[1]("time limit 0")
    one_line(res.returncode, res.stderr, 2, "--time-limit", "more than 0", "Got 0")


def test_method_help_lists_exactly_the_methods_accepted(folder):
    from growthplan.backends.highs import METHODS, hipo_available
    from growthplan.backends.methods import EXTRA_METHODS

    help_text = " ".join(run("solve", "--help").output.split())
    listed = help_text.split("HiGHS method: ", 1)[1].split(" (default")[0]
    assert listed.split(", ") == ["auto", *METHODS]
    for method in listed.split(", "):  # each is taken: a time limit too small stops it
        res = run("solve", folder / "plan.yaml", "--no-progress", "--method", method,
                  "--time-limit", "1e-9")
        if method in EXTRA_METHODS and not hipo_available():  # refused, saying what to install
            one_line(res.exit_code, res.stderr, 2, "solve.method", "growthplan[hipo]")
            continue
        assert res.exit_code in (0, 3) and "--method" not in res.stderr, res.output
    res = run("solve", folder / "plan.yaml", "--method", "fastest")
    one_line(res.exit_code, res.stderr, 2, "--method", "fastest")


def test_existing_output_through_the_installed_command(installed):
    d, result = installed
    res = result("existing excel")
    line = one_line(res.returncode, res.stderr, 2, "--excel", "--overwrite")
    assert "overwrite=True" not in line and res.stdout == ""
    assert (d / "mine.xlsx").read_text() == "the user's"


@pytest.mark.parametrize(("cmd", "option", "name"), [
    ("solve", "--out", "out"), ("solve", "--excel", "plan.xlsx"),
    ("solve", "--report", "plan.html"), ("solve", "--charts", "charts"),
    ("demo", "--out", "out"), ("demo", "--excel", "plan.xlsx"),
    ("demo", "--report", "plan.html"), ("demo", "--charts", "charts")])
def test_existing_outputs_are_refused_before_solving(folder, monkeypatch, cmd, option, name):
    (folder / "out").mkdir()
    (folder / "out" / "mine.txt").write_text("the user's")
    (folder / "charts").mkdir()
    (folder / "charts" / "mine.png").write_text("the user's")
    (folder / "plan.xlsx").write_text("the user's")
    (folder / "plan.html").write_text("the user's")

    def no_solve(*args, **kwargs):
        raise AssertionError("solved before the outputs were checked")

    monkeypatch.setattr(gp.Plan, "solve", no_solve)
    monkeypatch.chdir(folder)
    args = [cmd, *(["plan.yaml"] if cmd == "solve" else []), "--no-progress", option, name]
    res = CliRunner().invoke(main, args)
    assert res.exit_code == 2, res.output
    assert f"{option} must" in res.stderr and "--overwrite" in res.stderr
    assert "overwrite=True" not in res.stderr and res.stdout == ""


def test_a_library_refusal_names_the_flag_not_the_keyword(folder, monkeypatch):
    # the output appears between the check and the write (another program made it)
    import growthplan.cli.plan as commands

    monkeypatch.setattr(commands, "_check_outputs", lambda *a, **k: None)
    (folder / "out").mkdir()
    (folder / "out" / "mine.txt").write_text("the user's")
    monkeypatch.chdir(folder)
    res = CliRunner().invoke(main, ["solve", "plan.yaml", "--no-progress", "--out", "out"])
    assert res.exit_code == 2, res.output
    assert res.stderr.startswith("error: --out must") and "--overwrite" in res.stderr
    assert "overwrite=True" not in res.stderr
    assert (folder / "out" / "mine.txt").read_text() == "the user's"


def test_output_suffixes_through_the_installed_command(installed):
    d, result = installed
    res = result("excel as csv")
    one_line(res.returncode, res.stderr, 2, "--excel must end in .xlsx", "out.csv")
    assert not (d / "out.csv").exists()


@pytest.mark.parametrize(("option", "name", "rule"), [
    ("--excel", "out", "end in .xlsx"), ("--excel", "out.xls", "end in .xlsx"),
    ("--report", "x.pdf", "end in .html or .htm"), ("--report", "x.txt", "end in .html")])
def test_output_suffixes(folder, monkeypatch, option, name, rule):
    monkeypatch.chdir(folder)
    res = CliRunner().invoke(main, ["solve", "plan.yaml", option, name])
    assert res.exit_code == 2 and f"{option} must {rule}" in res.stderr, res.output
    assert not (folder / name).exists()


def test_steady_with_capital_prints_the_dynamic_growth_or_refuses(installed, monkeypatch):
    d, result = installed
    econ = gp.Economy.from_tables(d / "flows.csv", capital=d / "capital.csv",
                                  capital_stocks=d / "capital_stocks.csv")
    rate = f"{100 * econ.dynamic_balanced_growth().rate:.3f} %"
    coefficients = result("steady with capital coefficients")
    monkeypatch.chdir(d)
    stocks = run("steady", "flows.csv", "--capital", "capital.csv", "--capital-stocks",
                 "capital_stocks.csv")
    for code, out in ((coefficients.returncode, coefficients.stdout),
                      (stocks.exit_code, stocks.stdout)):
        assert code == 0, out
        assert "static balanced growth rate (current inputs only, ignoring capital)" in out
        assert f"dynamic balanced growth rate (with capital and its replacement) {rate}" \
            in out, out
    res = run("steady", "flows.csv", "--capital", "capital.csv")
    one_line(res.exit_code, res.stderr, 2,
             "--capital must come with --capital-stocks or --capital-coefficients")
    res = run("steady", "flows.csv", "--capital-coefficients", "b.csv")
    one_line(res.exit_code, res.stderr, 2, "--capital must be given")
    alone = run("steady", "flows.csv")
    assert alone.exit_code == 0 and "dynamic" not in alone.stdout


def test_check_refuses_what_solve_finds_unbounded(installed, monkeypatch):
    d, result = installed
    res = result("check without capital goods")
    one_line(res.returncode, res.stderr, 2, "capital_coefficients", "unbounded")
    monkeypatch.chdir(d)
    assert run("solve", "free.yaml", "--no-progress").exit_code == 4


def test_check_refuses_solver_settings_the_solve_would_refuse(folder):
    d = yaml.safe_load((folder / "plan.yaml").read_text())
    d["solve"] = {"method": "fastest"}
    (folder / "method.yaml").write_text(yaml.safe_dump(d))
    for cmd in ("check", "solve"):
        res = run(cmd, folder / "method.yaml")
        one_line(res.exit_code, res.stderr, 2, "solve.method", "fastest")


def test_check_counts_in_the_singular(folder):
    d = yaml.safe_load((folder / "plan.yaml").read_text())
    d["plan"]["targets"] = d["plan"]["targets"][:1]
    (folder / "one.yaml").write_text(yaml.safe_dump(d))
    res = run("check", folder / "one.yaml")
    assert res.exit_code == 0, res.output
    assert "1 target," in res.stdout and "1 targets" not in res.stdout
    assert "10 sectors" in res.stdout


def test_solve_prints_key_schedules_and_next_steps(installed):
    res = installed[1]("solve")
    assert res.returncode == 0, res.stderr
    assert "Output by sector in the first, middle and last plan year" in res.stdout
    table = res.stdout.split("last plan year:")[1]
    assert "2027" in table and "2034" in table and "2041" in table
    assert "What binds first" in res.stdout
    steps = res.stdout.split("Next:")[1]
    assert "--excel" in steps and "--report" in steps and "--charts" in steps
    assert "--out" not in steps  # it was used


def test_chart_folder_with_the_users_file_refused_before_solving(folder, monkeypatch):
    monkeypatch.chdir(folder)
    first = run("solve", "plan.yaml", "--no-progress", "--charts", "charts")
    assert first.exit_code == 0, first.output
    again = run("solve", "plan.yaml", "--no-progress", "--charts", "charts", "--overwrite")
    assert again.exit_code == 0, again.output  # the library's own charts are replaced
    (folder / "charts" / ".growthplan-manifest").unlink()  # now none are known as ours

    def no_solve(*args, **kwargs):
        raise AssertionError("solved before the outputs were checked")

    monkeypatch.setattr(gp.Plan, "solve", no_solve)
    res = run("solve", "plan.yaml", "--no-progress", "--charts", "charts", "--overwrite")
    one_line(res.exit_code, res.stderr, 2, "--charts must not hold files growthplan did not "
             "write", "output.png")
