"""How fast the library's door opens: ``import growthplan`` and ``growthplan --help``.

Each is timed in fresh Python processes (median of ``--runs``, 10 by default),
against a bare ``python -c pass`` started the same way, so the figures are
what a user waits for. Goals: ``import growthplan`` ≤ 0.4 s and
``growthplan --help`` ≤ 0.6 s on a quiet machine. Also reports which heavy
modules the import loaded (none of highspy, pulp, pandas, scipy should be).

Run: ``python tests/benchmarks/bench_import.py [--runs 10]``
"""

from __future__ import annotations

import argparse
import os
import resource
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
HEAVY = ("highspy", "pulp", "pandas", "scipy", "scipy.stats", "matplotlib", "openpyxl")


def _time(args: list[str], runs: int) -> tuple[float, float]:
    """Median wall-clock and median CPU seconds (user + system) of fresh processes.

    On a shared machine the wall clock includes waiting for a core; the CPU
    time is what a quiet machine would show.
    """
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    wall, cpu = [], []
    for _ in range(runs):
        before = resource.getrusage(resource.RUSAGE_CHILDREN)
        t0 = time.perf_counter()
        subprocess.run(args, check=True, env=env, stdout=subprocess.DEVNULL)
        wall.append(time.perf_counter() - t0)
        after = resource.getrusage(resource.RUSAGE_CHILDREN)
        cpu.append(after.ru_utime - before.ru_utime + after.ru_stime - before.ru_stime)
    return statistics.median(wall), statistics.median(cpu)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--runs", type=int, default=10)
    runs = parser.parse_args().runs
    py = sys.executable
    bare = _time([py, "-c", "pass"], runs)
    door = _time([py, "-c", "import growthplan"], runs)
    script = Path(py).parent / "growthplan"  # the console script, as a user runs it
    command = [str(script)] if script.exists() else [py, "-m", "growthplan.cli"]
    help_ = _time([*command, "--help"], runs)
    loaded = subprocess.run(
        [py, "-c", "import sys, growthplan; print(' '.join(m for m in "
         f"{HEAVY!r} if m in sys.modules))"],
        check=True, capture_output=True, text=True,
        env={**os.environ, "PYTHONPATH": str(ROOT)}).stdout.strip()
    print(f"median of {runs} fresh processes: wall clock, CPU (user + system)")
    print(f"  python -c pass          {bare[0]:6.3f} s  {bare[1]:6.3f} s")
    for what, (wall, cpu), goal in (("import growthplan", door, 0.4),
                                    ("growthplan --help", help_, 0.6)):
        print(f"  {what:<22}  {wall:6.3f} s  {cpu:6.3f} s  (goal <= {goal} s; "
              f"{wall / goal:.2f} of it on the wall clock, {cpu / goal:.2f} in CPU)")
    print(f"  heavy modules loaded by the import: {loaded or 'none'}")


if __name__ == "__main__":
    main()
