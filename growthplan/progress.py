"""Progress display for long solves and sweeps (tqdm: terminal and notebook).

A solve's bar is fed by HiGHS's log. It appears only once a solve has run for
``QUIET_SECONDS`` (short solves show nothing) and shows the method, the
iteration, the primal and dual residuals (interior point) or infeasibilities
(simplex), the relative gap and the elapsed time. It never shows the
objective: HiGHS logs it for the model it works on (a maximisation turned
into a minimisation, after presolve), so the number would have the wrong sign
and could differ from the plan's objective.
"""

from __future__ import annotations

import contextlib
import re
import threading
import time
from collections.abc import Callable, Iterator
from typing import IO, Any

__all__ = ["QUIET_SECONDS", "SolveStatus", "solve_progress", "sweep_progress", "clear_bars"]

QUIET_SECONDS = 1.0  # solves shorter than this show no bar
_REFRESH_SECONDS = 0.2  # at most this often the bar is redrawn on a log line
_TICK_SECONDS = 0.5  # and at least this often while the solve runs

_OPEN: set[Any] = set()  # solve bars on screen, cleared before a one-line message

_NUMBER = r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?"
# interior point (IPX): iter, primal obj, dual obj, pinf, dinf, gap, time
_IPM_LINE = re.compile(rf"^\s*(\d+)\*?\s+({_NUMBER})\s+({_NUMBER})\s+({_NUMBER})\s+"
                       rf"({_NUMBER})\s+({_NUMBER})\s+({_NUMBER})\s*$")
# simplex: iteration, objective, "Ph1: n(sum); Du: n(sum)" or "Pr: ...", time with "s"
_SIMPLEX_LINE = re.compile(rf"^\s*(\d+)\s+{_NUMBER}\s+((?:Ph1|Pr|Du):.*?)\s*(?:{_NUMBER}s)?\s*$")
_INFEASIBILITY = re.compile(rf"(Ph1|Pr|Du):\s*(\d+)\(({_NUMBER})\)")
# lines that open a phase, by how they begin (the closing summary names phases too)
_PHASES = (("presolving", "presolve"), ("interior point solve", "interior point"),
           ("ipx version", "interior point"), ("running crossover", "crossover"),
           ("using dual simplex", "simplex"), ("using primal simplex", "simplex"),
           ("performed postsolve", "postsolve"))
_WORDS = {"Ph1": "phase-1 infeasibilities", "Pr": "primal infeasibilities",
          "Du": "dual infeasibilities"}


class SolveStatus:
    """What HiGHS's log says about a running solve, in words for a progress bar.

    Parameters
    ----------
    clock : callable, default time.perf_counter
        Seconds, for the elapsed time (given in tests).
    """

    def __init__(self, clock: Callable[[], float] = time.perf_counter) -> None:
        self.clock = clock
        self.start = clock()
        self.phase = "starting"
        self.iteration: int | None = None
        self.details = ""

    @property
    def elapsed(self) -> float:
        """Seconds since the status was made."""
        return self.clock() - self.start

    def feed(self, line: str) -> None:
        """Read one line of HiGHS's log.

        Parameters
        ----------
        line : str
            The line as HiGHS wrote it.
        """
        text = line.strip()
        if not text:
            return
        m = _IPM_LINE.match(text)
        if m:
            it, _, _, pinf, dinf, gap, _ = m.groups()
            self.phase, self.iteration = "interior point", int(it)
            self.details = (f"primal residual {float(pinf):.1e} | dual residual "
                            f"{float(dinf):.1e} | gap {float(gap):.1e}")
            return
        m = _SIMPLEX_LINE.match(text)
        if m:
            self.phase, self.iteration = "simplex", int(m.group(1))
            self.details = " | ".join(f"{_WORDS[k]} {int(n)} (sum {float(s):.2g})"
                                      for k, n, s in _INFEASIBILITY.findall(m.group(2)))
            return
        low = text.lower()
        for key, phase in (*_PHASES, (low if "pdlp" in low else "\0", "first-order method")):
            if low.startswith(key) and phase != self.phase:
                self.phase, self.iteration, self.details = phase, None, ""
                return

    def text(self) -> str:
        """The status in one line: method, iteration, residuals, elapsed seconds."""
        parts = [self.phase if self.iteration is None
                 else f"{self.phase} iteration {self.iteration}"]
        if self.details:
            parts.append(self.details)
        parts.append(f"{self.elapsed:.0f} s")
        return " | ".join(parts)


def clear_bars() -> None:
    """Erase the solve bars on screen, so a message printed next starts on a clean line."""
    for bar in list(_OPEN):
        with contextlib.suppress(Exception):  # a bar of another thread may be closing
            bar.clear()


@contextlib.contextmanager
def solve_progress(enabled: bool, label: str, *, quiet: float = QUIET_SECONDS,
                   clock: Callable[[], float] = time.perf_counter,
                   file: IO[str] | None = None) -> Iterator[Callable[[str], None] | None]:
    """A HiGHS log callback that shows a solve's progress, or None when disabled.

    Nothing is shown until the solve has run ``quiet`` seconds; then a bar
    shows :meth:`SolveStatus.text` (method, iteration, residuals, elapsed
    time), never the objective.

    Parameters
    ----------
    enabled : bool
        Show a bar; False yields None and shows nothing.
    label : str
        Name of the plan, shown in the bar's description.
    quiet : float, default QUIET_SECONDS
        Seconds before the bar appears.
    clock : callable, default time.perf_counter
        Seconds (given in tests).
    file : file-like, optional
        Where the bar is drawn (default: tqdm's, standard error).

    Yields
    ------
    callable or None
        A function taking one HiGHS log line, or None when disabled. The bar
        closes when the context exits.
    """
    if not enabled:
        yield None
        return
    status = SolveStatus(clock)
    lock = threading.Lock()
    done = threading.Event()
    held: dict[str, Any] = {"bar": None, "drawn": -_REFRESH_SECONDS}

    def draw(now: float) -> None:  # under the lock
        bar = held["bar"]
        if bar is None:
            from tqdm.auto import tqdm

            bar = held["bar"] = tqdm(bar_format="{desc}", leave=False, file=file)
            _OPEN.add(bar)
        held["drawn"] = now
        bar.set_description_str(f"solving {label}: {status.text()}", refresh=True)

    def callback(line: str) -> None:
        with lock:
            status.feed(line)
            now = status.elapsed
            if now >= quiet and now - held["drawn"] >= _REFRESH_SECONDS:
                draw(now)

    def tick() -> None:
        # HiGHS may log nothing for many seconds (simplex, factorisations): the bar
        # appears after the quiet time and its clock moves on without new lines
        while not done.wait(_TICK_SECONDS):
            with lock:
                now = status.elapsed
                if now >= quiet and now - held["drawn"] >= _TICK_SECONDS:
                    draw(now)

    ticker = threading.Thread(target=tick, name="solve-progress", daemon=True)
    ticker.start()
    try:
        yield callback
    finally:
        done.set()
        ticker.join()
        if held["bar"] is not None:
            _OPEN.discard(held["bar"])
            held["bar"].close()


def sweep_progress(enabled: bool, total: int) -> contextlib.AbstractContextManager[Any]:
    """A per-scenario progress bar (or a no-op object).

    Parameters
    ----------
    enabled : bool
        Show a bar; False gives an object whose ``update`` does nothing.
    total : int
        Number of scenarios the bar counts up to.

    Returns
    -------
    contextlib.AbstractContextManager
        A context manager yielding an object with ``update(n=1)``.
    """
    if not enabled:
        return contextlib.nullcontext(_NoBar())
    from tqdm.auto import tqdm

    return tqdm(total=total, desc="scenarios", unit=" plan")


class _NoBar:
    def update(self, n: int = 1) -> None:
        pass
