"""The solve progress display: what it shows from HiGHS's log, and when it stays quiet."""

from __future__ import annotations

import io
import re
import threading

from helpers import economy, make_plan

import growthplan as gp
from growthplan.progress import QUIET_SECONDS, SolveStatus, solve_progress

# lines as HiGHS 1.16 writes them for a maximisation (objectives negated in its own model)
IPM_LOG = [
    "IPX version 1.0\n",
    "Interior point solve\n",
    " Iter       primal obj         dual obj       pinf       dinf       gap      time\n",
    "   0   -3.57538886e+03  -1.06300178e+04   6.21e-02   1.65e-01  9.93e-01       0.0\n",
    "  12   -1.36264241e+04  -1.36459957e+04   2.60e-07   1.04e-07  1.44e-03       0.1\n",
    "  28*  -1.36336912e+04  -1.36336913e+04   2.88e-14   2.09e-16  6.44e-09       0.2\n",
    "    objective value:                                    -1.36336912e+04\n",
]
SIMPLEX_LOG = [
    "Using dual simplex solver\n",
    "  Iteration        Objective     Infeasibilities num(sum)\n",
    "          0    -5.1200000000e+05 Ph1: 25(22400); Du: 1(512) 0.1s\n",
    "       3778    -1.1151469107e+04 Pr: 390(2.9714e+07) 5.2s\n",
]
NEGATIVE = re.compile(r"(?<![\deE.+-])-\d")  # a negative number, not an exponent like e-07


class Clock:
    def __init__(self) -> None:
        self.now = 0.0

    def __call__(self) -> float:
        return self.now


def test_interior_point_shows_iteration_and_residuals_never_the_objective():
    clock = Clock()
    status = SolveStatus(clock)
    for line, t in zip(IPM_LOG, [0.0, 0.0, 0.0, 1.0, 2.0, 3.0, 3.0], strict=True):
        clock.now = t
        status.feed(line)
        assert not NEGATIVE.search(status.text()), status.text()
        assert "1.36" not in status.text() and "3.57" not in status.text()
    assert status.text() == ("interior point iteration 28 | primal residual 2.9e-14 | "
                             "dual residual 2.1e-16 | gap 6.4e-09 | 3 s")


def test_simplex_shows_iteration_and_infeasibilities_never_the_objective():
    status = SolveStatus(Clock())
    status.feed(SIMPLEX_LOG[2])
    assert status.text() == ("simplex iteration 0 | phase-1 infeasibilities 25 (sum 2.2e+04) "
                             "| dual infeasibilities 1 (sum 5.1e+02) | 0 s")
    status.feed(SIMPLEX_LOG[3])
    assert status.text().startswith("simplex iteration 3778 | primal infeasibilities 390")
    assert not NEGATIVE.search(status.text()) and "1.115" not in status.text()


def test_a_real_log_of_a_maximisation_never_shows_a_negative_number():
    # the plan maximises; HiGHS's interior point logs its objective negated
    plan = make_plan(economy(8), 6)
    lp = plan.compile()
    status = SolveStatus()
    lines: list[str] = []
    shown: list[str] = []

    def feed(line: str) -> None:
        lines.append(line)
        status.feed(line)
        shown.append(status.text())

    out = gp.HighsBackend("ipm").solve(lp, callback=feed)
    assert out.status is gp.Status.OPTIMAL and out.objective > 0
    assert any(NEGATIVE.search(s) for s in lines)  # the raw log has them
    assert any(s.startswith(f"interior point iteration {out.iterations['ipm']} |")
               for s in shown)
    assert not any(NEGATIVE.search(s) for s in shown)


def _shown(times: list[float]) -> str:
    clock, sink = Clock(), io.StringIO()
    with solve_progress(True, "8 sectors × 6 years", clock=clock, file=sink) as cb:
        assert cb is not None
        for line, t in zip(IPM_LOG, times, strict=True):
            clock.now = t
            cb(line)
    return sink.getvalue()


def test_quiet_for_a_solve_shorter_than_a_second():
    assert QUIET_SECONDS == 1.0
    assert _shown([0.0, 0.1, 0.2, 0.3, 0.5, 0.7, 0.9]) == ""


def test_shown_once_a_solve_runs_longer():
    text = _shown([0.0, 0.1, 0.2, 0.3, 1.5, 2.5, 3.0])
    assert "solving 8 sectors × 6 years" in text and "interior point iteration 28" in text
    assert not NEGATIVE.search(text.replace("8 sectors × 6 years", ""))


def test_disabled_gives_no_callback():
    with solve_progress(False, "x") as cb:
        assert cb is None


def test_a_solve_with_progress_on_returns_the_same_plan():
    plan = make_plan(economy(6), 5)
    assert plan.solve(progress=True).objective == plan.solve().objective


def test_shown_after_the_quiet_time_even_when_highs_logs_nothing():
    # simplex may write no line for many seconds: the bar still appears and its clock runs
    clock, sink = Clock(), io.StringIO()
    with solve_progress(True, "plan", clock=clock, file=sink) as cb:
        assert cb is not None
        cb(SIMPLEX_LOG[2])
        clock.now = 2.0
        for _ in range(100):  # the bar is drawn by a background tick, at most in 0.5 s
            if "simplex iteration 0" in sink.getvalue():
                break
            threading.Event().wait(0.05)
    assert "solving plan: simplex iteration 0" in sink.getvalue()
    assert "| 2 s" in sink.getvalue()
