"""Plan arrays → :class:`~growthplan.lp.program.LinearProgram`.

Columns (the decisions) are laid out here; rows come from the condition
families in :mod:`growthplan.lp.conditions`, each a whole sparse block.

Capacity in service has two formulations (``formulation=``):

- ``"expression"`` (the default): a linear expression in past starts,
  ``C_jt = base_jt + Σ_τ S_j(t − τ − θ_j) z_jτ`` (``base``: capacity from
  before the plan). No rows or columns of its own, but each start appears in
  every later capacity row, so an interior point's normal matrix is dense
  across years.
- ``"state"``: the new capacity ``K = G z`` gets columns of its own, carried
  from year to year by one row per year and technique
  (:class:`~growthplan.lp.conditions.capacity.CapacityStock`, exact for every
  retirement profile). More rows, but banded in years: a factorising
  interior point (HiPO) exploits it, IPX and simplex do not.

Both give the same optimum, the same schedules and the same rows with the same
bounds (so the same shadow prices); the state form adds its stock rows. Which
one ``auto`` uses is decided in :mod:`growthplan.backends.methods` from
measurements.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from ..errors import InvalidInput
from .conditions import CONDITIONS, FORMULATIONS, Context
from .data import PlanData
from .program import Block, LinearProgram

if TYPE_CHECKING:
    from ..model.plan import Plan

__all__ = ["build", "build_plan", "estimate_size", "columns", "capacity_operator",
           "deliveries_operator", "SIZE_LIMIT", "BYTES_PER_NONZERO", "peak_memory",
           "solve_seconds", "FORMULATIONS"]

SIZE_LIMIT = 25_000_000  # nonzeros; larger plans are refused unless told otherwise
BYTES_PER_NONZERO = 60   # peak while building: blocks, the stacked copy and CSC arrays
SECONDS_COEFFICIENT = 1.55e-8  # seconds = COEFFICIENT · nonzeros ** EXPONENT
SECONDS_EXPONENT = 1.47
PROCESS_BYTES = 150 * 2**20    # Python with numpy, scipy, pandas, highspy and growthplan
SOLVE_BYTES_PER_NONZERO = 190  # HiGHS's interior point at its peak: its copies, presolve, factors


def capacity_operator(d: PlanData, profile: np.ndarray | None = None) -> sparse.csr_array:
    """``G`` with ``C = base + G z``: rows (t, k) for t = 0..T, columns starts (τ, k).

    ``k`` runs over techniques (sectors when there are no alternatives).
    ``profile`` (techniques × (T + 2), by age) replaces the survival profile.
    """
    T, n = d.T, d.m
    t = np.arange(T + 1)[:, None, None]
    tau = np.arange(T)[None, :, None]
    j = np.arange(n)[None, None, :]
    age = t - tau - d.theta[None, None, :]
    age_b, t_b, tau_b, j_b = np.broadcast_arrays(age, t, tau, j)
    mask = age_b >= 0
    vals = (d.surv if profile is None else profile)[j_b[mask], age_b[mask]]
    keep = vals != 0
    rows = (t_b[mask] * n + j_b[mask])[keep]
    cols = (tau_b[mask] * n + j_b[mask])[keep]
    return sparse.csr_array((vals[keep], (rows, cols)), shape=((T + 1) * n, T * n))


def deliveries_operator(d: PlanData) -> sparse.csr_array:
    """``W`` with capital goods delivered = ``W z``: rows (t, commodity), columns (τ, technique)."""
    T, n, m = d.T, d.n, d.m
    out = sparse.csr_array((T * n, T * m))
    for s in range(min(d.spending.shape[1], T)):  # deliveries after the plan are not rows
        w = d.spending[:, s][None, :]
        if not np.any(w):
            continue
        if d.changing:  # starts of year τ embody year τ's capital coefficients
            diag = sparse.block_diag([sparse.csr_array(d.b_at(tau) * w) for tau in range(T - s)],
                                     format="csr")
            if s:  # deliveries of year τ + s: rows shifted down s years
                diag = sparse.vstack([sparse.csr_array((s * n, (T - s) * m)), diag])
                diag = sparse.hstack([diag, sparse.csr_array((T * n, s * m))])
            out = out + sparse.csr_array(diag)
            continue
        shift = sparse.eye_array(T, T, k=-s, format="csr")
        out = out + sparse.kron(shift, sparse.csr_array(d.b * w), format="csr")
    return sparse.csr_array(out)


def _formulation(formulation: str) -> str:
    if formulation not in FORMULATIONS:
        raise InvalidInput(f"formulation must be one of {', '.join(FORMULATIONS)}. "
                           f"Got {formulation!r}.", field="formulation")
    return formulation


def columns(d: PlanData, formulation: str = "expression"
            ) -> list[tuple[str, tuple[int, ...], tuple[tuple[Any, ...], ...]]]:
    """The decision columns: (name, shape, labels) in order."""
    years, names = tuple(d.years), tuple(d.tech_names)  # one column per technique
    out: list[tuple[str, tuple[int, ...], tuple[tuple[Any, ...], ...]]] = [
        ("output", (d.T, d.m), (years, names)), ("starts", (d.T, d.m), (years, names))]
    if d.has_consumption:
        out.append(("consumption", (d.T,), (years,)))
    if d.proportions is not None:
        out.append(("level", (), ()))
    for name, side in (("imports", d.imports), ("exports", d.exports)):
        if d.trades and side is not None and side.goods:
            out.append((name, (d.T, len(side.goods)), (years, tuple(side.goods))))
    # several regions: one column per shipment (origin, destination, good) and year
    if d.regions is not None and d.regions.K:
        out.append(("shipments", (d.T, d.regions.K), (years, d.regions.labels)))
    if d.regions is not None and d.regions.consumption_floor is not None and d.has_consumption:
        out.append(("regional_consumption", (d.T, d.regions.R), (years, tuple(d.regions.regions))))
    if _formulation(formulation) == "state":  # new capacity in service, years 0..T
        out.append(("stock", (d.T + 1, d.m), ((*years, years[-1] + 1), names)))
    return out


def _count(d: PlanData, formulation: str = "expression") -> dict[str, int]:
    cols = {name: int(np.prod(shape)) if shape else 1
            for name, shape, _ in columns(d, formulation)}
    rows = nnz = 0
    for cond in CONDITIONS:
        if cond.applies(d):
            r, z = cond.count(d, cols)
            rows, nnz = rows + r, nnz + z
    return {"rows": rows, "columns": sum(cols.values()), "nonzeros": nnz,
            "bytes": nnz * BYTES_PER_NONZERO}


def peak_memory(nonzeros: int) -> int:
    """Peak resident bytes of a process that builds and solves an LP of this size.

    ``PROCESS_BYTES`` for the interpreter and libraries plus
    ``SOLVE_BYTES_PER_NONZERO`` per nonzero, fitted to the peak resident
    memory (``ru_maxrss``) of fresh processes solving the dense random plans
    of ``tests/benchmarks/bench_scale.py --memory`` by interior point.
    """
    return int(PROCESS_BYTES + SOLVE_BYTES_PER_NONZERO * nonzeros)


def solve_seconds(nonzeros: int) -> float:
    """A rough expected solve time by interior point, in seconds.

    ``SECONDS_COEFFICIENT · nonzeros ** SECONDS_EXPONENT``: a least-squares
    power law fitted to the end-to-end times measured on one 2-core machine
    for the dense random plans of the README's performance section from
    60 × 25 to 200 × 30 (1.09 s, 4.9 s and 43.8 s at 0.20, 0.65 and 2.5
    million nonzeros). The time grows faster than any one power over a wide
    range, so on much larger plans this tends to underestimate; other
    machines, sparser plans and other objectives differ, often by a factor
    of two or more. A rough estimate, for planning a run, never a promise.
    """
    return float(SECONDS_COEFFICIENT * max(nonzeros, 1) ** SECONDS_EXPONENT)


def estimate_size(plan: Plan | PlanData, formulation: str = "expression"
                  ) -> dict[str, float]:
    """Size, memory and a rough solve time of a plan's LP, without building it.

    Parameters
    ----------
    plan : Plan or PlanData
    formulation : {"expression", "state"}
        How capacity in service is written (see the module notes).

    Returns
    -------
    dict
        ``rows``, ``columns``, ``nonzeros``: the sum of each condition
        family's own count, exact. ``bytes``: peak memory while building
        (``BYTES_PER_NONZERO`` per nonzero). ``peak_bytes``: peak resident
        memory of a process building and solving the plan
        (:func:`peak_memory`). ``seconds``: a rough expected solve time by
        interior point (:func:`solve_seconds`), from a power law in nonzeros
        fitted to measurements on one 2-core machine; other machines and
        sparser plans differ, often by a factor of two or more.
    """
    d = plan if isinstance(plan, PlanData) else plan.lowered()
    out: dict[str, float] = dict(_count(d, formulation))
    out["peak_bytes"] = peak_memory(int(out["nonzeros"]))
    out["seconds"] = solve_seconds(int(out["nonzeros"]))
    return out


def _upper_bound(plan: Plan) -> int:
    """A cheap bound on the nonzeros (no survival profiles computed), ≥ the exact count."""
    T, n = len(plan.years), plan.economy.n
    assert plan.economy.capital is not None
    width = max(1, max(s.lead_time for s in plan.economy.capital.values()))
    if plan.techniques or (plan.technical_change is not None
                           and plan.technical_change.embodied):
        return 2**62  # the exact count decides (techniques have their own lead times)
    if plan.regions is not None:
        return 2**62  # several regions: the exact count decides (shipments, regional rows)
    return (T * n * n * (1 + width) + T * n * (T + 9) + T * len(plan.labour) * n + 4 * T
            + len(plan.targets) * (T + 1) + n * width * (T + 1) + n + T * n * 2
            + len(plan.limits) * T * (n + 1))  # emission limits: a row per year at most


def guard_size(plan: Plan, size_limit: int | None) -> None:
    """Refuse a plan whose LP would exceed ``size_limit`` nonzeros, before building anything."""
    if size_limit is None or _upper_bound(plan) <= size_limit:
        return
    est = estimate_size(plan)  # the exact count only when the cheap bound is not enough
    if est["nonzeros"] > size_limit:
        raise InvalidInput(
            f"plan is too large to build: about {est['rows']:,} rows, {est['columns']:,} "
            f"columns and {est['nonzeros']:,} nonzeros, {est['peak_bytes'] / 2**30:.1f} GiB "
            f"at peak, above the limit of {size_limit:,} nonzeros. Aggregate sectors "
            "(TransactionsTable.aggregate), shorten the horizon, or pass "
            "size_limit=None (or a larger number) to build it anyway.", field="size_limit")


def build(d: PlanData, *, objective: Any = None, formulation: str = "expression"
          ) -> LinearProgram:
    """Build the LP of a lowered plan.

    Parameters
    ----------
    d : PlanData
    objective : Objective, optional
        Default: the plan's own. ``False`` builds a feasibility problem (zero cost).
    formulation : {"expression", "state"}
        How capacity in service is written (see the module notes).
    """
    cols: dict[str, Block] = {}
    ncol = 0
    for name, shape, labels in columns(d, formulation):
        cols[name] = Block(name, ncol, shape, labels)
        ncol = cols[name].stop
    ctx = Context(d, cols, ncol, capacity_operator(d), deliveries_operator(d))
    rows: dict[str, Block] = {}
    lines, lowers, uppers = [], [], []
    nrow = 0
    for cond in CONDITIONS:
        if not cond.applies(d):
            continue
        rb = cond.build(ctx)
        if rb is None:
            continue
        block = Block(rb.name, nrow, rb.shape, rb.labels)
        if block.size == 0:
            continue
        rows[rb.name] = block
        nrow = block.stop
        lines.append([rb.coeffs.get(c) if rb.coeffs.get(c) is not None
                      else sparse.csr_array((block.size, b.size)) for c, b in cols.items()])
        lowers.append(np.broadcast_to(np.asarray(rb.lower, float).ravel(), (block.size,)))
        uppers.append(np.broadcast_to(np.asarray(rb.upper, float).ravel(), (block.size,)))
    matrix = sparse.csc_array(sparse.block_array(lines, format="csc"))
    col_lower = np.zeros(ncol)
    col_upper = np.full(ncol, np.inf)
    z = cols["starts"]
    col_upper[z.start:z.stop] = d.upper_starts.ravel()
    if "level" in cols:
        col_lower[cols["level"].start] = -np.inf
    for name, side in (("imports", d.imports), ("exports", d.exports)):
        if name in cols and side is not None:
            col_upper[cols[name].start:cols[name].stop] = side.ceilings.ravel()
    o = d.objective if objective is None else objective
    if o is False:
        from .program import Stage

        stages = [Stage(np.zeros(ncol), "min")]
    else:
        stages = o.stages(d, cols, ncol)
    return LinearProgram(
        matrix=matrix, row_lower=np.concatenate(lowers), row_upper=np.concatenate(uppers),
        col_lower=col_lower, col_upper=col_upper, cost=stages[0].cost, sense=stages[0].sense,
        rows=rows, cols=cols, stages=stages, data=d,
        operators={"capacity": ctx.capacity, "deliveries": ctx.deliveries},
        formulation=formulation)


def build_plan(plan: Plan, *, size_limit: int | None = SIZE_LIMIT,
               formulation: str = "expression") -> LinearProgram:
    """Guard the size, lower the plan (once) and build its LP."""
    guard_size(plan, size_limit)
    return build(plan.lowered(), formulation=formulation)
