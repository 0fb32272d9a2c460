"""The library's limits, stated once: the command line and the Python interface
enforce the same numbers.

Every limit here is a size the library refuses to go past before allocating
anything, so a mistyped number is an :class:`~growthplan.errors.InvalidInput`
naming the limit rather than a ``MemoryError`` minutes later. The module holds
plain numbers only and imports nothing.
"""

from __future__ import annotations

__all__ = [
    "ACTUALS_MAX_BYTES",
    "LABEL_MAX_CHARS",
    "MAX_DRAWS",
    "MAX_ROBUST_SCENARIOS",
    "MAX_SECONDS",
    "MAX_WORKERS",
    "MAX_YEARS",
    "PLAN_FILE_MAX_BYTES",
    "SPEC_MAX_BYTES",
    "TABLE_MAX_BYTES",
    "TABLE_MAX_CELLS",
    "TABLE_MAX_COLUMNS",
]

MAX_DRAWS = 10_000_000
"""Most drawn economies of one stress test, re-optimisation or robust plan."""

MAX_ROBUST_SCENARIOS = 1000
"""Most drawn economies stacked in one robust plan (each one copies the whole LP)."""

MAX_WORKERS = 1024
"""Most worker processes of one sweep or analysis of draws."""

MAX_SECONDS = 1e9
"""Longest time limit of a solve, in seconds (about 32 years)."""

MAX_YEARS = 1000
"""Longest plan, in years."""

LABEL_MAX_CHARS = 32_767
"""Longest name (sector, labour kind, technique, stressor): the most characters
one workbook cell holds, the strictest of the formats the library writes."""

PLAN_FILE_MAX_BYTES = 5 << 20
"""Largest plan file read."""

TABLE_MAX_BYTES = 64 << 20
"""Largest table (CSV or workbook) read."""

TABLE_MAX_CELLS = 4_000_000
"""Most cells of one table read."""

TABLE_MAX_COLUMNS = 100_000
"""Most columns of one table read (checked on the header, before the rows)."""

SPEC_MAX_BYTES = 1 << 20
"""Largest economy spec read."""

ACTUALS_MAX_BYTES = 50 << 20
"""Largest file of actual capacity starts read."""
