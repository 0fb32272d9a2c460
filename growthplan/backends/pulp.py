"""PuLP: the interop back end (any PuLP solver, CBC by default).

:func:`to_pulp` writes a programme as a ``pulp.LpProblem`` with readable
names (``starts_2030_energy``) for users who extend it. Three known PuLP
3.3 faults are guarded here: the HiGHS class returns duals with the wrong
sign on maximisation problems (flipped back); both the HiGHS class and CBC
report a time- or iteration-limited LP as optimal (the live HiGHS model
status is read, and an optimal status must also pass the duality-gap
certificate when the problem has no constraints of the user's own).
"""

from __future__ import annotations

import time
from typing import Any

import numpy as np

from ..errors import invalid
from ..lp.conditions import FORMULATIONS
from ..lp.program import LinearProgram
from .base import Backend, Feature, SolverOutcome, Status
from .certificate import optimality_gap

__all__ = ["PulpBackend", "to_pulp", "cbc_solver"]

_PULP_STATUS = {1: Status.OPTIMAL, 0: Status.UNKNOWN, -1: Status.INFEASIBLE,
                -2: Status.UNBOUNDED, 2: Status.UNKNOWN}


def _add_rows(prob: Any, variables: list[Any], lp: LinearProgram, rows: range,
              names: list[str]) -> None:
    import pulp

    csr = lp.matrix.tocsr()
    indptr, indices, data = csr.indptr, csr.indices, csr.data
    for r in rows:
        sl = slice(indptr[r], indptr[r + 1])
        expr = pulp.LpAffineExpression(
            list(zip([variables[i] for i in indices[sl]], data[sl].tolist(), strict=True)))
        lo, up = lp.row_lower[r], lp.row_upper[r]
        name = names[r]
        if np.isfinite(lo) and np.isfinite(up) and lo == up:
            prob.addConstraint(pulp.LpConstraint(expr, pulp.LpConstraintEQ, name, float(lo)))
            continue
        if np.isfinite(lo):
            prob.addConstraint(pulp.LpConstraint(
                expr, pulp.LpConstraintGE, name if not np.isfinite(up) else name + "_lo",
                float(lo)))
        if np.isfinite(up):
            prob.addConstraint(pulp.LpConstraint(
                expr, pulp.LpConstraintLE, name if not np.isfinite(lo) else name + "_up",
                float(up)))


def _objective(prob: Any, variables: list[Any], lp: LinearProgram) -> None:
    import pulp

    prob.sense = pulp.LpMaximize if lp.sense == "max" else pulp.LpMinimize
    nz = np.nonzero(lp.cost)[0]
    prob.setObjective(pulp.LpAffineExpression([(variables[i], float(lp.cost[i])) for i in nz]))


def to_pulp(lp: LinearProgram, name: str = "growthplan") -> tuple[Any, list[Any]]:
    """A ``pulp.LpProblem`` with the same rows, columns, bounds and costs as ``lp``.

    Rows are built from (variable, coefficient) pairs with
    ``LpAffineExpression``, not term by term.

    Parameters
    ----------
    lp : LinearProgram
    name : str, default "growthplan"

    Returns
    -------
    (problem, variables) : tuple of pulp.LpProblem and list of pulp.LpVariable
    """
    import pulp

    prob = pulp.LpProblem(name, pulp.LpMaximize if lp.sense == "max" else pulp.LpMinimize)
    lo = [None if not np.isfinite(v) else float(v) for v in lp.col_lower]
    up = [None if not np.isfinite(v) else float(v) for v in lp.col_upper]
    variables = [prob.add_variable(c, lowBound=lo[i], upBound=up[i])
                 for i, c in enumerate(lp.col_names())]
    _objective(prob, variables, lp)
    _add_rows(prob, variables, lp, range(lp.shape[0]), lp.row_names())
    return prob, variables


def cbc_solver(msg: bool = False, time_limit: float | None = None) -> Any:
    """PuLP's bundled CBC through the non-deprecated ``COIN_CMD`` class."""
    import pulp
    from pulp.apis import coin_api

    path = coin_api.COIN_CMD.executableExtension(coin_api.pulp_cbc_path)
    kwargs: dict[str, Any] = {"msg": msg, "path": path}
    if time_limit is not None:
        kwargs["timeLimit"] = time_limit
    return pulp.COIN_CMD(**kwargs)


class PulpBackend:
    """Any PuLP solver (default: the bundled CBC).

    Parameters
    ----------
    solver : pulp.LpSolver, optional
        The solver (default: the bundled CBC, quiet).
    problem : pulp.LpProblem, optional
        A problem from :meth:`growthplan.Plan.to_pulp`, perhaps with constraints
        of the user's own; it is solved in place of a fresh one (rows added by
        objective stages are appended to it).
    gap_tolerance : float, default 1e-6
        Largest relative duality gap of a believed optimum; checked only when
        the problem holds no constraints of the user's own.
    formulation : {"auto", "expression", "state"}
        How capacity in service is written in the LP (``"auto"``: the
        expression form; :mod:`growthplan.lp.build`).
    """

    name = "pulp"
    features: frozenset[Feature] = frozenset({Feature.DUALS})

    def __init__(self, solver: Any = None, *, problem: Any = None,
                 gap_tolerance: float = 1e-6, formulation: str = "auto") -> None:
        if formulation not in ("auto", *FORMULATIONS):
            raise invalid("formulation", f"be one of auto, {', '.join(FORMULATIONS)}",
                          formulation)
        self.formulation = formulation
        self.solver = solver
        self.problem = problem
        self.gap_tolerance = gap_tolerance
        self._rows_in_problem: int | None = None

    def __repr__(self) -> str:
        return f"PulpBackend({type(self.solver or cbc_solver()).__name__})"

    def alternatives(self) -> list[Backend]:
        """No other back end is tried: the user chose this solver.

        Returns
        -------
        list of Backend
            Always empty.
        """
        return []

    def _problem(self, lp: LinearProgram) -> tuple[Any, bool]:
        if self.problem is None:
            return to_pulp(lp)[0], False
        prob = self.problem
        var = prob.variablesDict()
        names = lp.col_names()
        variables = [var[c] for c in names]
        if self._rows_in_problem is None:  # the rows the problem was made with
            self._rows_in_problem = lp.shape[0]
        have = {c.name for c in prob.constraints()}
        row_names = lp.row_names()
        new = [r for r in range(self._rows_in_problem, lp.shape[0]) if row_names[r] not in have]
        if new:
            _add_rows(prob, variables, lp, range(new[0], new[-1] + 1), row_names)
        _objective(prob, variables, lp)
        return prob, True

    def solve(self, lp: LinearProgram, *, stop: Any = None,
              callback: Any = None) -> SolverOutcome:
        """Solve ``lp`` with the PuLP solver (``stop`` and ``callback`` are not supported).

        Parameters
        ----------
        lp : LinearProgram
            The problem; with a given ``problem``, rows it lacks are appended
            and its objective is set from ``lp``.
        stop, callback : optional
            Accepted for the back-end protocol and ignored.

        Returns
        -------
        SolverOutcome
            With duals in ``lp``'s own sense; an optimum the duality gap does
            not certify has status ``not_verified``.
        """
        import pulp

        from .highs import STATUS_TABLE

        solver = self.solver or cbc_solver()
        prob, given = self._problem(lp)
        t0 = time.perf_counter()
        prob.solve(solver)
        seconds = time.perf_counter() - t0
        var = prob.variablesDict()
        x = np.array([var[c].varValue if c in var and var[c].varValue is not None else np.nan
                      for c in lp.col_names()], dtype=float)
        status = _PULP_STATUS.get(prob.sol_status, Status.UNKNOWN)
        message = (f"{pulp.LpStatus.get(prob.status, prob.status)} (solution: "
                   f"{pulp.LpSolution.get(prob.sol_status, prob.sol_status)})")
        is_highs = isinstance(solver, pulp.HiGHS)
        if is_highs and getattr(prob, "solverModel", None) is not None:
            ms = prob.solverModel.getModelStatus()
            status = STATUS_TABLE.get(ms, Status.UNKNOWN)
            message = prob.solverModel.modelStatusToString(ms)
        cons = {c.name: c for c in prob.constraints()}
        rows = lp.row_names()
        y = np.array([cons[r].pi if r in cons and cons[r].pi is not None else np.nan
                      for r in rows], dtype=float)
        if is_highs and lp.sense == "max":
            y = -y  # PuLP's HiGHS class negates the costs and never flips the duals back
        extra = len(cons) > len(rows)
        if status is Status.OPTIMAL and not extra:
            if np.any(np.isnan(y)) or np.any(np.isnan(x)):
                status, message = Status.UNKNOWN, message + " (no duals to certify optimality)"
            else:
                gap = optimality_gap(lp, x, y)
                if gap > self.gap_tolerance:
                    status = Status.NOT_VERIFIED
                    message += f" (duality gap {gap:.3g}: not optimal)"
        objective = float(lp.cost @ x) if np.all(np.isfinite(x)) else float("nan")
        return SolverOutcome(status=status, message=message, objective=objective, x=x,
                             row_dual=None if np.any(np.isnan(y)) else y,
                             method=f"pulp:{type(solver).__name__}", seconds=seconds,
                             options={"extra_constraints": extra, "given_problem": given},
                             solver_version=f"PuLP {pulp.__version__}")
