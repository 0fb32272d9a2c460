"""Ctrl-C and SIGTERM on the command line: a running solve stops through its stop
event, the command exits 3 with one line, and nothing half-written is left."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import threading
import time

import numpy as np
import pytest
from click.testing import CliRunner
from conftest import random_economy

import growthplan as gp
from growthplan.cli import base as cli
from growthplan.cli import main
from growthplan.demo import DEMO_DIR

pytestmark = pytest.mark.skipif(os.name != "posix", reason="POSIX signals")


@pytest.fixture(autouse=True)
def interactive_sigint():
    """Ctrl-C as a terminal's foreground command gets it: a run started in the
    background (``cmd &``, nohup) inherits SIGINT ignored, and the command line
    rightly leaves an ignored signal ignored."""
    saved = signal.signal(signal.SIGINT, signal.default_int_handler)
    yield
    signal.signal(signal.SIGINT, saved)


def _foreground() -> None:  # in the child, before it runs: SIGINT as in a terminal
    signal.signal(signal.SIGINT, signal.SIG_DFL)


@pytest.fixture(scope="module")
def big_plan(tmp_path_factory):
    """A plan whose simplex solve takes several seconds (60 sectors × 25 years)."""
    folder = tmp_path_factory.mktemp("big")
    econ = random_economy(np.random.default_rng(1), 60)
    plan = gp.Plan(economy=econ, years=range(2030, 2055),
                   labour=gp.LabourSupply(start=1e5, growth=0.01))
    return gp.save_plan_file(plan, folder / "plan.yaml")


def start_solve(plan_file, out):
    """The installed command solving ``plan_file``, once HiGHS has started."""
    proc = subprocess.Popen([sys.executable, "-m", "growthplan.cli", "solve", str(plan_file),
                             "--method", "simplex", "--out", str(out), "--progress"],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                            preexec_fn=_foreground)
    seen = b""
    while b"solving" not in seen:  # the progress bar opens when the solve starts
        chunk = os.read(proc.stderr.fileno(), 4096)
        if not chunk:
            break
        seen += chunk
    assert b"solving" in seen, seen
    time.sleep(0.5)  # well inside the solve, which runs for several seconds
    return proc


@pytest.mark.parametrize("signals", [[signal.SIGINT], [signal.SIGTERM],
                                     [signal.SIGINT, signal.SIGINT]],
                         ids=["SIGINT", "SIGTERM", "SIGINT twice"])
def test_signal_stops_a_running_solve(big_plan, tmp_path, signals):
    proc = start_solve(big_plan, tmp_path / "out")
    for sig in signals:  # the second lands while HiGHS is still winding down
        proc.send_signal(sig)
        time.sleep(0.05)
    out, err = proc.communicate(timeout=60)
    assert proc.returncode == 3, (out, err)
    lines = [ln for ln in err.decode().replace("\r", "\n").splitlines() if ln.strip()]
    assert lines[-1] == "interrupted"
    assert b"Traceback" not in err and b"optimal" not in out
    assert not (tmp_path / "out").exists()
    assert os.listdir(tmp_path) == []  # no temporary folder left either


def test_second_signal_stops_at_once(monkeypatch):
    """A solve that does not heed its stop event still ends at the second Ctrl-C."""
    monkeypatch.setattr(cli, "_STOPPING", cli._Flag())  # this process goes on afterwards
    release = threading.Event()
    stops = []

    class Stubborn:
        def solve(self, *, stop, **options):
            stops.append(stop)
            release.wait(10)

    def two_interrupts():
        time.sleep(0.3)
        os.kill(os.getpid(), signal.SIGINT)
        time.sleep(0.3)
        os.kill(os.getpid(), signal.SIGINT)

    threading.Thread(target=two_interrupts, daemon=True).start()
    try:
        with pytest.raises(KeyboardInterrupt):
            cli.solve_stoppable(Stubborn())
    finally:
        release.set()
    assert stops[0].is_set()  # the first signal asked the solve to stop
    assert signal.getsignal(signal.SIGINT) is signal.default_int_handler  # restored


def test_interrupt_while_writing_charts_leaves_no_folder(tmp_path, monkeypatch):
    import growthplan.results.charts as plot

    def interrupted(*args, **kwargs):
        raise KeyboardInterrupt

    monkeypatch.setattr(plot, "plot_starts", interrupted)  # after two charts are written
    res = CliRunner().invoke(main, ["solve", str(DEMO_DIR / "plan.yaml"), "--no-progress",
                                    "--charts", str(tmp_path / "charts")])
    assert res.exit_code == 3, res.output
    assert res.stderr.strip() == "interrupted"
    assert os.listdir(tmp_path) == []


def test_interrupt_while_reading_exits_3(monkeypatch):
    def interrupted(path):
        raise KeyboardInterrupt

    monkeypatch.setattr(gp, "load_plan_file", interrupted)
    res = CliRunner().invoke(main, ["check", str(DEMO_DIR / "plan.yaml")])
    assert res.exit_code == 3 and res.stderr.strip() == "interrupted"
    assert res.exception is None or isinstance(res.exception, SystemExit)


def _catches(pid: int, sig: int) -> bool:
    """Whether process ``pid`` has a handler for ``sig`` (its SigCgt mask, Linux)."""
    try:
        with open(f"/proc/{pid}/status") as status:
            mask = next(ln for ln in status if ln.startswith("SigCgt:")).split()[1]
    except (OSError, StopIteration):
        return False
    return bool(int(mask, 16) >> (sig - 1) & 1)


@pytest.mark.skipif(not os.path.exists("/proc/self/status"), reason="reads /proc")
@pytest.mark.parametrize("sig", [signal.SIGINT, signal.SIGTERM], ids=["SIGINT", "SIGTERM"])
def test_signal_while_the_command_starts_exits_3(sig, tmp_path):
    # reproducer: SIGINT while importing printed a KeyboardInterrupt traceback and
    # exited 130; SIGTERM exited 143 without a word
    proc = subprocess.Popen([sys.executable, "-m", "growthplan.cli", "check",
                             str(DEMO_DIR / "plan.yaml")], stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, preexec_fn=_foreground)
    deadline = time.monotonic() + 30
    # the signal goes as soon as a handler is in place or numpy starts loading,
    # whichever comes first: either way, while the command is still importing
    while not (_catches(proc.pid, signal.SIGTERM) or _maps(proc.pid, b"numpy")) \
            and time.monotonic() < deadline:
        time.sleep(0.001)
    proc.send_signal(sig)
    out, err = proc.communicate(timeout=60)
    assert proc.returncode == 3, (out, err)
    assert err.decode().strip() == "interrupted"
    assert b"valid" not in out  # stopped before the check ran


def _maps(pid: int, name: bytes) -> bool:
    """Whether process ``pid`` has a file whose path holds ``name`` mapped."""
    try:
        with open(f"/proc/{pid}/maps", "rb") as maps:
            return name in maps.read()
    except OSError:
        return False


def _children(pid: int) -> list[int]:
    found = []
    for entry in os.listdir("/proc"):
        if entry.isdigit():
            try:
                with open(f"/proc/{entry}/stat") as f:
                    fields = f.read().rsplit(")", 1)[1].split()
            except OSError:
                continue
            if int(fields[1]) == pid and fields[0] != "Z":
                found.append(int(entry))
    return found


def _alive(pid: int) -> bool:
    try:
        with open(f"/proc/{pid}/stat") as f:
            return f.read().rsplit(")", 1)[1].split()[0] != "Z"
    except OSError:
        return False


@pytest.mark.skipif(not os.path.exists("/proc/self/status"), reason="reads /proc")
@pytest.mark.parametrize("sig", [signal.SIGTERM, signal.SIGKILL], ids=["SIGTERM", "SIGKILL"])
def test_pool_workers_die_with_the_command(sig, tmp_path):
    # reproducer: after SIGTERM to the command both workers lived on with parent 1
    import shutil

    import yaml

    for f in ("flows.csv", "capital.csv", "capital_stocks.csv"):
        shutil.copy(DEMO_DIR / f, tmp_path / f)
    d = yaml.safe_load((DEMO_DIR / "plan.yaml").read_text())
    d["uncertainty"] = {"seed": 5, "draws": 2000, "items": [
        {"what": "capital_coefficients", "correlation": "independent",
         "distribution": {"kind": "uniform", "low": 0.95, "high": 1.05}}]}
    (tmp_path / "plan.yaml").write_text(yaml.safe_dump(d))
    proc = subprocess.Popen([sys.executable, "-m", "growthplan.cli", "stress", "plan.yaml",
                             "--workers", "2", "--no-progress"], cwd=tmp_path,
                            stdout=subprocess.DEVNULL, stderr=subprocess.PIPE,
                            preexec_fn=_foreground)
    deadline = time.monotonic() + 120
    workers: list[int] = []
    while len(workers) < 2 and time.monotonic() < deadline and proc.poll() is None:
        time.sleep(0.1)
        workers = _children(proc.pid)
    assert len(workers) == 2, workers
    time.sleep(0.5)  # the workers are solving draws
    proc.send_signal(sig)
    proc.wait(timeout=30)
    time.sleep(1.0)
    alive = [w for w in workers if _alive(w)]
    for w in alive:  # do not leave them to the next test
        os.kill(w, signal.SIGKILL)
    assert alive == []
    err = proc.stderr.read().decode()  # returns: no worker holds the pipe open
    if sig == signal.SIGTERM:
        assert proc.returncode == 3 and err.strip() == "interrupted", err
