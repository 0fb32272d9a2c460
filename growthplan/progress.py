"""Progress display for long solves and sweeps (tqdm: terminal and notebook)."""

from __future__ import annotations

import contextlib
import time
from collections.abc import Iterator


@contextlib.contextmanager
def solve_progress(enabled: bool, label: str) -> Iterator:
    """A HiGHS log callback that advances a progress bar, or None when disabled.

    The bar counts log lines and shows the elapsed time and HiGHS's latest
    line (iteration counts and objective) as its postfix.
    """
    if not enabled:
        yield None
        return
    from tqdm.auto import tqdm

    bar = tqdm(desc=f"solving {label}", unit=" log lines", leave=False)
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
        bar.close()


def sweep_progress(enabled: bool, total: int):
    """A per-scenario progress bar (or a no-op object)."""
    if not enabled:
        return contextlib.nullcontext(_NoBar())
    from tqdm.auto import tqdm

    return tqdm(total=total, desc="scenarios", unit=" plan")


class _NoBar:
    def update(self, n: int = 1) -> None:
        pass
