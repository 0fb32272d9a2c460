"""Progress display for long solves and sweeps (tqdm: terminal and notebook)."""

from __future__ import annotations

import contextlib
import time
from collections.abc import Callable, Iterator
from typing import Any

_OPEN: set[Any] = set()  # solve bars on screen, cleared before a one-line message


def clear_bars() -> None:
    """Erase the solve bars on screen, so a message printed next starts on a clean line."""
    for bar in list(_OPEN):
        with contextlib.suppress(Exception):  # a bar of another thread may be closing
            bar.clear()


@contextlib.contextmanager
def solve_progress(enabled: bool, label: str) -> Iterator[Callable[[str], None] | None]:
    """A HiGHS log callback that advances a progress bar, or None when disabled.

    The bar counts log lines and shows the elapsed time and HiGHS's latest
    line (iteration counts and objective) as its postfix.

    Parameters
    ----------
    enabled : bool
        Show a bar; False yields None and shows nothing.
    label : str
        Name of the plan, shown in the bar's description.

    Yields
    ------
    callable or None
        A function taking one HiGHS log line, or None when disabled. The bar
        closes when the context exits.
    """
    if not enabled:
        yield None
        return
    from tqdm.auto import tqdm

    bar = tqdm(desc=f"solving {label}", unit=" log lines", leave=False)
    _OPEN.add(bar)
    start = time.perf_counter()

    def callback(line: str) -> None:
        text = line.strip()
        if text:
            bar.set_postfix_str(f"{time.perf_counter() - start:.1f} s | {text[:60]}",
                                refresh=False)
            bar.update(1)

    try:
        yield callback
    finally:
        _OPEN.discard(bar)
        bar.close()


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
