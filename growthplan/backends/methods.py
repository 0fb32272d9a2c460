"""The HiGHS methods a plan may ask for, by name, and the thresholds of the
``auto`` rule: plain data, so that plan files and the command line can check a
method without loading the solver."""

from __future__ import annotations

__all__ = ["METHODS", "AUTO_IPM_NONZEROS", "SLOW_METHOD_NONZEROS", "SLOW_METHODS"]

# method name -> HiGHS options
METHODS: dict[str, dict[str, object]] = {
    "simplex": {"solver": "simplex"},
    "ipm": {"solver": "ipm", "run_crossover": "off"},
    "ipm-crossover": {"solver": "ipm", "run_crossover": "on"},
    "pdlp": {"solver": "pdlp"},
    "highs-default": {"solver": "choose"},
}
AUTO_IPM_NONZEROS = 4_000
SLOW_METHOD_NONZEROS = 200_000  # explicit simplex or crossover above this draws a warning
SLOW_METHODS = ("simplex", "ipm-crossover", "highs-default")
