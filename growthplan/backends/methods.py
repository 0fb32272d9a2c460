"""The HiGHS methods a plan may ask for, by name, and the ``auto`` rule: plain
data and one pure function, so that plan files, the command line, the
diagnosis and the back end all read the same rule without loading the solver.

The rule picks the capacity formulation (:mod:`growthplan.lp.build`), the
method and its HiGHS options together from the measurements in
:data:`MEASUREMENTS`; :func:`choose` is the one place it is decided.
"""

from __future__ import annotations

from dataclasses import dataclass, field

__all__ = ["METHODS", "AUTO_IPM_NONZEROS", "AUTO_HIPO_NONZEROS", "SLOW_METHOD_NONZEROS",
           "SLOW_METHODS", "EXTRA_METHODS", "MEASUREMENTS", "Rule", "choose", "HIPO_INSTALL"]

# method name -> HiGHS options
METHODS: dict[str, dict[str, object]] = {
    "simplex": {"solver": "simplex"},
    "ipm": {"solver": "ipm", "run_crossover": "off"},
    "ipm-crossover": {"solver": "ipm", "run_crossover": "on"},
    "pdlp": {"solver": "pdlp"},
    "highs-default": {"solver": "choose"},
    # HiGHS's factorising interior point; presolve off: with presolve on, highspy
    # 1.15.1 ends HiPO's and IPX's solves of these plans with status "Unknown"
    # (postsolve reports dual infeasibilities) although the objective is right
    "hipo": {"solver": "hipo", "run_crossover": "off", "presolve": "off"},
}
EXTRA_METHODS = {"hipo": "hipo"}  # method -> the optional extra that provides it
HIPO_INSTALL = 'pip install "growthplan[hipo]"'
AUTO_IPM_NONZEROS = 4_000
# HiPO in the state form beats IPX in the expression form from here on (MEASUREMENTS)
AUTO_HIPO_NONZEROS = 150_000
SLOW_METHOD_NONZEROS = 200_000  # explicit simplex or crossover above this draws a warning
SLOW_METHODS = ("simplex", "ipm-crossover", "highs-default")

# Solve time of each formulation × method over expression form × IPX (interior point
# without crossover) on the same dense random plans (tests/helpers.py: economy,
# make_plan; tests/benchmarks/bench_scale.py --forms), one 2-core machine, ratios
# from interleaved rounds of one run, min–max. HiPO with highspy 1.15.1 and
# highspy-extras 1.15.1, presolve off; IPX with highspy 1.16.0.
# (plan, nonzeros of the expression form, formulation, method, ratio low, ratio high)
MEASUREMENTS: tuple[tuple[str, int, str, str, float, float], ...] = (
    ("30x20", 47_580, "state", "ipm", 0.97, 1.06),
    ("30x20", 47_580, "state", "hipo", 1.09, 1.37),
    ("60x25", 202_560, "state", "ipm", 0.99, 1.04),
    ("60x25", 202_560, "state", "hipo", 0.74, 0.80),
    ("100x30", 650_900, "state", "ipm", 0.99, 1.05),
    ("100x30", 650_900, "state", "hipo", 0.56, 0.60),
    ("100x30", 650_900, "expression", "hipo", 3.4, 3.7),
    ("150x30", 1_441_350, "state", "hipo", 0.43, 0.44),
    ("200x30", 2_541_800, "state", "hipo", 0.36, 0.36),
    ("400x30", 10_083_600, "state", "hipo", 0.26, 0.26),
)


@dataclass(frozen=True)
class Rule:
    """What a solve will use: formulation, method, HiGHS options and why.

    Attributes
    ----------
    formulation : {"expression", "state"}
    method : str
        A key of :data:`METHODS`.
    options : dict
        HiGHS options beyond the method's own.
    reason : str
        The measured reason, for ``growthplan check`` and the progress line.
    """

    formulation: str
    method: str
    options: dict[str, object] = field(default_factory=dict)
    reason: str = ""

    def describe(self) -> str:
        """One line: ``"state form, hipo (presolve off): <reason>"``."""
        opts = {**METHODS.get(self.method, {}), **self.options}
        shown = ", ".join(f"{k} {v}" for k, v in opts.items()
                          if k not in ("solver", "run_crossover"))
        return (f"{self.formulation} form, {self.method}" + (f" ({shown})" if shown else "")
                + (f": {self.reason}" if self.reason else ""))


def choose(nonzeros: int, *, hipo: bool, method: str = "auto",
           formulation: str = "auto") -> Rule:
    """The formulation, method and options for an LP of this many nonzeros.

    Parameters
    ----------
    nonzeros : int
        Nonzeros of the plan's LP (its expression form when the formulation is
        still to be chosen).
    hipo : bool
        Whether HiPO is installed (the ``hipo`` extra).
    method : str, default "auto"
        A method asked for by name is kept; ``"auto"`` follows the measurements.
    formulation : {"auto", "expression", "state"}
        A formulation asked for is kept; ``"auto"`` goes with the method:
        the state form for HiPO, which exploits its banded normal matrix, the
        expression form otherwise (IPX and simplex gained nothing from the
        state form, 0.97–1.06 of the time).

    Returns
    -------
    Rule
    """
    if method == "auto":
        if nonzeros <= AUTO_IPM_NONZEROS:
            method, reason = "simplex", (f"{nonzeros:,} nonzeros ≤ {AUTO_IPM_NONZEROS:,}: "
                                         "simplex is fastest on the smallest plans")
        elif hipo and nonzeros >= AUTO_HIPO_NONZEROS and formulation != "expression":
            method, reason = "hipo", (f"{nonzeros:,} nonzeros ≥ {AUTO_HIPO_NONZEROS:,}: HiPO "
                                      "in the state form took 0.26–0.80 of IPX's time")
        else:
            method = "ipm"
            reason = (f"{nonzeros:,} nonzeros: interior point without crossover" +
                      ("" if hipo or nonzeros < AUTO_HIPO_NONZEROS else
                       f" (HiPO would be faster here: {HIPO_INSTALL})"))
    else:
        reason = "asked for"
    if formulation == "auto":
        formulation = "state" if method == "hipo" else "expression"
    options: dict[str, object] = {}
    if hipo and method in ("ipm", "ipm-crossover"):
        # the hipo extra pins highspy 1.15.1, whose presolve leaves these plans "Unknown"
        options["presolve"] = "off"
    return Rule(formulation, method, options, reason)
