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
# with the hipo extra, HiPO replaces IPX from here on (MEASUREMENTS: IPX in the state
# form was as fast or faster up to 100 × 30, HiPO about twice as fast at 150 × 30)
AUTO_HIPO_NONZEROS = 1_000_000
SLOW_METHOD_NONZEROS = 200_000  # explicit simplex or crossover above this draws a warning
SLOW_METHODS = ("simplex", "ipm-crossover", "highs-default")

# Bare solve (HiGHS's run) of a formulation × method against the expression form × IPX
# as auto runs it on the same install, on the dense random plans of tests/helpers.py
# (economy, make_plan) by tests/benchmarks/bench_scale.py --forms: one 2-core machine
# shared with other work (load average 9-14, so wall clocks were 3-10 times the CPU
# times), 3 interleaved rounds in one process; ratios of the process CPU time, min and
# median over the rounds. IPX is HiGHS's interior point without crossover.
# (highspy, plan, expression-form nonzeros, formulation, method, presolve, min, median)
MEASUREMENTS: tuple[tuple[str, str, int, str, str, str, float, float], ...] = (
    # the default install: the state form gains nothing with IPX, presolve on or off
    ("1.16.0", "30x20", 43_530, "state", "ipm", "on", 1.01, 0.90),
    ("1.16.0", "30x20", 43_530, "expression", "ipm", "off", 1.02, 0.98),
    ("1.16.0", "30x20", 43_530, "state", "ipm", "off", 0.96, 0.99),
    ("1.16.0", "60x25", 202_560, "state", "ipm", "on", 1.15, 1.10),
    ("1.16.0", "60x25", 202_560, "expression", "ipm", "off", 0.97, 0.98),
    ("1.16.0", "60x25", 202_560, "state", "ipm", "off", 0.98, 1.08),
    # the hipo extra (1.15.1, presolve off: on, it leaves these plans "Unknown"): there
    # the expression form is slow and the state form several times faster, by IPX or HiPO
    ("1.15.1", "30x20", 43_530, "state", "ipm", "off", 0.40, 0.44),
    ("1.15.1", "30x20", 43_530, "state", "hipo", "off", 0.44, 0.40),
    ("1.15.1", "60x25", 202_560, "state", "ipm", "off", 0.26, 0.27),
    ("1.15.1", "60x25", 202_560, "state", "hipo", "off", 0.25, 0.26),
)
# Across the two installs (process CPU time of the same bare solves; auto's choice on
# each): the hipo install's state form × IPX took 1.04 of the default install's
# expression form × IPX at 30 × 20, 0.96 at 60 × 25 and 0.59 at 100 × 30 (6.0 s
# against 10.2 s, bench_scale.py); HiPO took 0.90 at 60 × 25. In wall clock on a
# quieter machine, the state form × HiPO took 0.56–0.60 at 100 × 30, 0.43–0.44 at
# 150 × 30 (HiPO 18 s, IPX on the state form 34 s), 0.36 at 200 × 30 and 164 s against
# 637 s at 400 × 30, so auto moves from IPX to HiPO between 100 × 30 and 150 × 30.


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
        the state form for HiPO, which exploits its banded normal matrix, and
        for IPX on the ``hipo`` install (highspy 1.15.1 with presolve off,
        where it took 0.13–0.38 of the expression form's time); the
        expression form otherwise (with highspy 1.16 IPX gained nothing from
        the state form).

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
                                      "in the state form, about twice as fast as IPX there")
        else:
            method = "ipm"
            reason = (f"{nonzeros:,} nonzeros: interior point without crossover" +
                      ("" if hipo or nonzeros < AUTO_HIPO_NONZEROS else
                       f" (HiPO would be faster here: {HIPO_INSTALL})"))
    else:
        reason = "asked for"
    interior = method in ("ipm", "ipm-crossover", "hipo")
    if formulation == "auto":
        # HiPO exploits the state form; on the hipo install IPX gains from it too
        formulation = "state" if method == "hipo" or (hipo and interior) else "expression"
    options: dict[str, object] = {}
    if hipo and method in ("ipm", "ipm-crossover"):
        # the hipo extra pins highspy 1.15.1, whose presolve leaves these plans "Unknown"
        options["presolve"] = "off"
    return Rule(formulation, method, options, reason)
