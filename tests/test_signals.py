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
            cli._solve(Stubborn())
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
