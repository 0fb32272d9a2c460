"""Plan → LinearProgram: one sparse matrix with named row and column blocks.

Every back end (HiGHS directly, PuLP) is fed from the same
:class:`LinearProgram`, so they cannot drift apart.

Capacity in service is written as a linear expression in past starts,
``C_jt = C0_j R_j(t) + pipeline_j(t) + Σ_τ S_j(t − τ − θ_j) z_jτ``, not as
state variables: the expression form holds for every retirement profile (a
state recursion exists only for the geometric one), adds no rows or columns,
and its ``T²n/2`` nonzeros are few next to the ``Tn²`` of the input and
capital blocks. Measured against the state form on the same plans
(``tests/benchmarks/bench_capacity_form.py``, geometric retirement): the state
form took 1.02–1.14 times as long with interior point and 1.04–1.95 times
with simplex at 30×20 and 60×25.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from scipy import sparse

from . import objectives as obj
from ._validation import Rule

__all__ = ["Block", "LinearProgram", "PlanData", "compile_plan", "estimate_size",
           "SIZE_LIMIT"]

INF = np.inf
SIZE_LIMIT = 25_000_000  # nonzeros; above this compile_plan refuses unless told otherwise
BYTES_PER_NONZERO = 60    # peak while building: blocks, the stacked copy and CSC arrays


@dataclass(frozen=True)
class Block:
    """A named range of rows or columns laid out as an array of ``shape``."""

    name: str
    start: int
    shape: tuple[int, ...]
    labels: tuple[list, ...]

    @property
    def size(self) -> int:
        return int(np.prod(self.shape)) if self.shape else 1

    @property
    def stop(self) -> int:
        return self.start + self.size

    def take(self, values: np.ndarray) -> np.ndarray:
        """This block's part of a full vector, reshaped to ``shape``."""
        return np.asarray(values[self.start:self.stop]).reshape(self.shape)


@dataclass
class PlanData:
    """The plan's arrays, computed once from the validated models."""

    names: list[str]
    years: list[int]
    a: np.ndarray
    b: np.ndarray
    labour: np.ndarray          # kinds with a supply × sectors
    labour_kinds: list[str]
    labour_all: np.ndarray      # every kind × sectors
    supply: np.ndarray          # kinds × years
    basket: np.ndarray
    floor: np.ndarray
    max_fall: float | None
    demand: np.ndarray          # years × sectors
    theta: np.ndarray
    spending: np.ndarray        # sectors × max lead
    surv: np.ndarray            # sectors × (T+1)
    base: np.ndarray            # (T+1) × sectors: capacity from before the plan
    pipe_deliveries: np.ndarray  # years × commodities
    util: np.ndarray
    upper_starts: np.ndarray    # years × sectors
    proportions: np.ndarray | None
    proportions_source: str
    terminal_rate: float | None
    psi: np.ndarray | None
    has_consumption: bool
    trade: dict | None = None


@dataclass
class LinearProgram:
    """A compiled plan: ``row_lower ≤ M v ≤ row_upper``, ``col_lower ≤ v ≤ col_upper``.

    Attributes
    ----------
    matrix : scipy.sparse.csc_array
    cost : numpy.ndarray
        Objective coefficients, optimised in ``sense``.
    sense : {"max", "min"}
    rows, cols : dict of str to Block
        Named blocks: rows ``balance``, ``capacity``, ``labour``,
        ``consumption_floor``, ``consumption_fall``, ``targets``,
        ``terminal``, ``objective``; columns ``output``, ``starts``,
        ``consumption``, ``level``.
    row_sign : numpy.ndarray
        +1 for "≤" rows, −1 for "≥" rows.
    data : PlanData
    """

    matrix: sparse.csc_array
    row_lower: np.ndarray
    row_upper: np.ndarray
    col_lower: np.ndarray
    col_upper: np.ndarray
    cost: np.ndarray
    sense: str
    rows: dict[str, Block]
    cols: dict[str, Block]
    row_sign: np.ndarray
    data: PlanData
    target_info: list[dict] = field(default_factory=list)
    stages: list[tuple[np.ndarray, str]] = field(default_factory=list)
    capacity_op: sparse.csr_array | None = None    # C = base + G z, kept for the results
    deliveries_op: sparse.csr_array | None = None  # capital goods delivered = W z

    @property
    def shape(self) -> tuple[int, int]:
        return self.matrix.shape

    @property
    def nnz(self) -> int:
        return int(self.matrix.nnz)

    def row_names(self) -> list[str]:
        """Readable unique row names, e.g. ``balance_2030_energy``."""
        return _names(self.rows, self.matrix.shape[0])

    def col_names(self) -> list[str]:
        """Readable unique column names, e.g. ``starts_2030_energy``."""
        return _names(self.cols, self.matrix.shape[1])


def _names(blocks: dict[str, Block], total: int) -> list[str]:
    out: list[str] = [""] * total
    for b in blocks.values():
        if not b.shape:
            out[b.start] = b.name
            continue
        grids = np.meshgrid(*[np.asarray(lbl, dtype=object) for lbl in b.labels], indexing="ij")
        flat = zip(*[g.ravel() for g in grids], strict=True)
        for i, parts in enumerate(flat):
            out[b.start + i] = "_".join([b.name, *map(str, parts)])
    return out


def _plan_data(plan) -> PlanData:
    econ = plan.economy
    names, years, T, n = econ.names, plan.years, plan.horizon, econ.n
    specs = [econ.capital[k] for k in names]
    theta = np.array([s.lead_time for s in specs], dtype=int)
    width = int(max(1, theta.max()))
    spending = np.zeros((n, width))
    for j, s in enumerate(specs):
        spending[j, : len(s.spending_profile)] = s.spending_profile
    surv = np.array([s.survival(max_age=T) for s in specs])
    base = np.array([s.initial_capacity * s.initial_survival(T) for s in specs]).T.copy()
    b = np.asarray(econ.capital_coefficients)
    pipe_del = np.zeros((T, n))
    for k, starts in (plan.under_construction or {}).items():
        j = names.index(k)
        v = np.asarray(starts, dtype=float)
        if v.size > max(theta[j], 1) and np.any(v[: v.size - max(theta[j], 1)] > 0):
            raise Rule(f"list only starts still under construction (at most the lead time, "
                       f"{theta[j]} years; older starts belong in initial_capacity)",
                       list(starts), field=f"under_construction.{k}")
        for back, amount in enumerate(v[::-1], start=1):
            tau = -back
            enter = tau + theta[j]
            if enter >= 0:
                ages = np.arange(T + 1) - enter
                ok = ages >= 0
                base[ok, j] += amount * surv[j, ages[ok]]
            for s in range(spending.shape[1]):
                if 0 <= tau + s < T:
                    pipe_del[tau + s] += b[:, j] * spending[j, s] * amount
    util = np.array([s.max_utilisation for s in specs])
    upper = np.full((T, n), INF)
    for sc in plan.starts_ceilings:
        j = names.index(sc.sector)
        rows = [years.index(y) for y in sc.years] if sc.years else list(range(T))
        upper[rows, j] = np.minimum(upper[rows, j], sc.at_most)
    kinds = econ.labour_kinds or []
    labour_all = (np.asarray(econ.labour_coefficients) if econ.labour_coefficients is not None
                  else np.zeros((0, n)))
    sup_kinds = [ls.kind for ls in plan.labour]
    labour = labour_all[[kinds.index(k) for k in sup_kinds]] if sup_kinds else np.zeros((0, n))
    proportions, source = (None, "")
    if any(isinstance(c, obj.TerminalCapacity) for c in obj.components(plan.objective)):
        proportions, source = plan.terminal_proportions()
    rate = plan.terminal.rate if plan.terminal is not None else None
    psi = None
    if rate is not None:
        psi = np.array([s.starts_per_capacity(rate) for s in specs])
    return PlanData(
        names=names, years=years, a=np.asarray(econ.input_coefficients), b=b, labour=labour,
        labour_kinds=sup_kinds, labour_all=labour_all, supply=plan.labour_supply(),
        basket=plan.basket(), floor=plan.consumption_floor(),
        max_fall=plan.consumption.max_fall if plan.consumption else None,
        demand=plan.exogenous_demand(), theta=theta, spending=spending, surv=surv, base=base,
        pipe_deliveries=pipe_del, util=util, upper_starts=upper, proportions=proportions,
        proportions_source=source, terminal_rate=rate, psi=psi,
        has_consumption=plan.consumption is not None, trade=plan.trade_data())


def capacity_operator(d: PlanData) -> sparse.csr_array:
    """``G`` with ``C = base + G z``: rows (t, j) for t = 0..T, columns starts (τ, j)."""
    T, n = len(d.years), len(d.names)
    t = np.arange(T + 1)[:, None, None]
    tau = np.arange(T)[None, :, None]
    j = np.arange(n)[None, None, :]
    age = t - tau - d.theta[None, None, :]
    age_b, t_b, tau_b, j_b = np.broadcast_arrays(age, t, tau, j)
    mask = age_b >= 0
    vals = d.surv[j_b[mask], age_b[mask]]
    keep = vals != 0
    rows = (t_b[mask] * n + j_b[mask])[keep]
    cols = (tau_b[mask] * n + j_b[mask])[keep]
    return sparse.csr_array((vals[keep], (rows, cols)), shape=((T + 1) * n, T * n))


def deliveries_operator(d: PlanData) -> sparse.csr_array:
    """``W`` with capital goods delivered by commodity = ``W z``: rows (t, i), cols (τ, j)."""
    T = len(d.years)
    parts = []
    for s in range(d.spending.shape[1]):
        if not np.any(d.spending[:, s]):
            continue
        shift = sparse.eye_array(T, T, k=-s, format="csr")
        parts.append(sparse.kron(shift, sparse.csr_array(d.b * d.spending[:, s][None, :]),
                                 format="csr"))
    n = len(d.names)
    if not parts:
        return sparse.csr_array((T * n, T * n))
    out = parts[0]
    for p in parts[1:]:
        out = out + p
    return sparse.csr_array(out)


class _Builder:
    def __init__(self) -> None:
        self.cols: dict[str, Block] = {}
        self.rows: dict[str, Block] = {}
        self.ncol = 0
        self.parts: list[tuple[str, dict[str, sparse.csr_array]]] = []
        self.lower: list[np.ndarray] = []
        self.upper: list[np.ndarray] = []
        self.sign: list[np.ndarray] = []
        self.nrow = 0

    def col(self, name: str, shape: tuple[int, ...], labels: tuple[list, ...]) -> Block:
        b = Block(name, self.ncol, shape, labels)
        self.cols[name] = b
        self.ncol = b.stop
        return b

    def row(self, name: str, shape: tuple[int, ...], labels: tuple[list, ...],
            coeffs: dict[str, sparse.csr_array], lower: np.ndarray | float,
            upper: np.ndarray | float) -> None:
        b = Block(name, self.nrow, shape, labels)
        if b.size == 0:
            return
        self.rows[name] = b
        self.nrow = b.stop
        self.parts.append((name, coeffs))
        lower = np.broadcast_to(np.asarray(lower, float).ravel(), (b.size,))
        upper = np.broadcast_to(np.asarray(upper, float).ravel(), (b.size,))
        self.lower.append(lower)
        self.upper.append(upper)
        self.sign.append(np.where(np.isfinite(upper), 1.0, -1.0))

    def matrix(self) -> sparse.csc_array:
        blocks = []
        for name, coeffs in self.parts:
            size = self.rows[name].size
            line = [coeffs.get(c, None) for c in self.cols]
            line = [sparse.csr_array((size, b.size)) if m is None else m
                    for m, b in zip(line, self.cols.values(), strict=True)]
            blocks.append(line)
        return sparse.csc_array(sparse.block_array(blocks, format="csc"))


def estimate_size(plan) -> dict[str, int]:
    """Rows, columns, nonzeros and peak build memory of a plan's LP, without building it.

    Counted block by block from the plan's data (exact for rows, columns and
    nonzeros; memory is ``BYTES_PER_NONZERO`` per nonzero, measured on dense
    plans).
    """
    econ = plan.economy
    T, n = plan.horizon, econ.n
    a = np.asarray(econ.input_coefficients)
    b = np.asarray(econ.capital_coefficients)
    specs = [econ.capital[k] for k in econ.names]
    width = max(1, max(s.lead_time for s in specs))
    w = np.zeros((n, width))
    for j, sp in enumerate(specs):
        w[j, : len(sp.spending_profile)] = sp.spending_profile
    basket = plan.basket()
    has_k = plan.consumption is not None
    labour = np.asarray(econ.labour_coefficients) if plan.labour else np.zeros((0, n))
    if plan.labour:
        kinds = econ.labour_kinds
        labour = labour[[kinds.index(ls.kind) for ls in plan.labour]]
    # capacity expression: entries of G for years 0..T
    g_rows = np.zeros(T + 1, dtype=np.int64)  # nonzeros of G's rows in year t, all sectors
    for sp in specs:
        surv = sp.survival(max_age=T) != 0
        for t in range(T + 1):
            ages = t - sp.lead_time - np.arange(T)
            ok = ages >= 0
            g_rows[t] += int(np.count_nonzero(surv[ages[ok]]))
    nnz_ia = int(np.count_nonzero(np.eye(n) - a))
    deliv = sum((T - s) * int(np.count_nonzero(b * w[:, s][None, :])) for s in range(width)
                if s < T)
    nnz = T * nnz_ia + deliv + (T * int(np.count_nonzero(basket)) if has_k else 0)
    rows = T * n
    nnz += T * n + int(g_rows[:T].sum())  # capacity rows
    rows += T * n
    if labour.shape[0]:
        nnz += T * int(np.count_nonzero(labour))
        rows += T * labour.shape[0]
    cols = 2 * T * n
    if has_k:
        cols += T
        rows += T
        nnz += T
        if plan.consumption.max_fall is not None and T > 1:
            rows += T - 1
            nnz += 2 * (T - 1) if plan.consumption.max_fall < 1 else (T - 1)
    names = econ.names
    for tg in plan.targets:
        rows += 1
        t = tg.year - plan.years[0]
        if tg.what == "capacity":
            j = names.index(tg.sector)
            sp = specs[j]
            surv = sp.survival(max_age=T) != 0
            ages = t - sp.lead_time - np.arange(T)
            nnz += int(np.count_nonzero(surv[ages[ages >= 0]]))
        else:
            nnz += 1
    if plan.terminal is not None:
        for sp in specs:
            surv = sp.survival(max_age=T) != 0
            for t in range(max(0, T - max(sp.lead_time, 1)), T):
                rows += 1
                ages = t - sp.lead_time - np.arange(T)
                g = np.zeros(T, dtype=bool)
                g[ages >= 0] = surv[ages[ages >= 0]]
                g[t] = True  # the start itself (its coefficient 1 − ψ·S(·) stays nonzero)
                nnz += int(np.count_nonzero(g))
    from . import objectives as obj

    if any(isinstance(c, obj.TerminalCapacity) for c in obj.components(plan.objective)):
        cols += 1
        rows += n
        nnz += int(g_rows[T]) + n
    td = plan.trade_data()
    if td is not None:
        ni, ne = len(td["import"][0]), len(td["export"][0])
        cols += T * (ni + ne)
        nnz += 2 * T * (ni + ne)
        if ni or ne:
            rows += T
    return {"rows": int(rows), "columns": int(cols), "nonzeros": int(nnz),
            "bytes": int(nnz) * BYTES_PER_NONZERO}


def _upper_bound(plan) -> int:
    """A cheap bound on the nonzeros (no survival profiles computed), >= estimate_size's."""
    T, n = plan.horizon, plan.economy.n
    width = max(1, max(s.lead_time for s in plan.economy.capital.values()))
    kinds = len(plan.labour)
    return (T * n * n * (1 + width) + T * n * (T + 9) + T * kinds * n + 4 * T
            + len(plan.targets) * (T + 1) + n * width * (T + 1) + n)


def compile_plan(plan, *, size_limit: int | None = SIZE_LIMIT) -> LinearProgram:
    """Compile a validated :class:`~growthplan.Plan` into a :class:`LinearProgram`.

    Parameters
    ----------
    size_limit : int or None
        Largest number of nonzeros to build (default 25 million, about 1.5 GB
        at peak); None builds any size.

    Raises
    ------
    InvalidInput
        When the estimate exceeds ``size_limit``; the message gives the
        estimate and the ways on.
    """
    from .errors import InvalidInput

    if size_limit is not None and _upper_bound(plan) > size_limit:
        est = estimate_size(plan)  # exact count only when the cheap bound is not enough
        if est["nonzeros"] > size_limit:
            raise InvalidInput(
                f"plan is too large to build: about {est['rows']:,} rows, {est['columns']:,} "
                f"columns and {est['nonzeros']:,} nonzeros, {est['bytes'] / 2**30:.1f} GiB at "
                f"peak, above the limit of {size_limit:,} nonzeros. Aggregate sectors "
                "(TransactionsTable.aggregate), shorten the horizon, or pass "
                "size_limit=None (or a larger number) to build it anyway.", field="size_limit")
    try:
        d = _plan_data(plan)
    except Rule as exc:
        from ._validation import raise_plain

        raise raise_plain(exc, "") from None
    T, n = len(d.years), len(d.names)
    years, names = d.years, d.names
    eye_t = sparse.eye_array(T, format="csr")
    bld = _Builder()
    xb = bld.col("output", (T, n), (years, names))
    zb = bld.col("starts", (T, n), (years, names))
    kb = bld.col("consumption", (T,), (years,)) if d.has_consumption else None
    lb = bld.col("level", (), ()) if d.proportions is not None else None
    imb = exb = None
    if d.trade is not None:
        imp_goods, imp_price, _ = d.trade["import"]
        exp_goods, exp_price, _ = d.trade["export"]
        if imp_goods:
            imb = bld.col("imports", (T, len(imp_goods)), (years, imp_goods))
        if exp_goods:
            exb = bld.col("exports", (T, len(exp_goods)), (years, exp_goods))

    g = capacity_operator(d)
    g_plan = g[: T * n]
    w_op = deliveries_operator(d)
    base = d.base
    # 1. commodity balance: (I − A) x_t − W z − h κ_t ≥ g_t + pipeline deliveries
    bal = {"output": sparse.kron(eye_t, sparse.csr_array(np.eye(n) - d.a), format="csr"),
           "starts": -w_op}
    if kb is not None:
        bal["consumption"] = sparse.kron(eye_t, sparse.csr_array(-d.basket[:, None]),
                                         format="csr")
    trade = d.trade or {}
    for blk, side, sign in ((imb, "import", 1.0), (exb, "export", -1.0)):
        if blk is not None:
            goods = trade[side][0]
            sel = np.zeros((n, len(goods)))
            sel[[names.index(g) for g in goods], np.arange(len(goods))] = sign
            bal[blk.name] = sparse.kron(eye_t, sparse.csr_array(sel), format="csr")
    bld.row("balance", (T, n), (years, names), bal, d.demand + d.pipe_deliveries, INF)
    # 2. capacity: x_jt − u_j G z ≤ u_j base_jt
    ucol = np.tile(d.util, T)
    bld.row("capacity", (T, n), (years, names),
            {"output": sparse.eye_array(T * n, format="csr"),
             "starts": sparse.csr_array(-(sparse.diags_array(ucol) @ g_plan))},
            -INF, (base[:T] * d.util[None, :]))
    # 3. labour: l_k x_t ≤ supply_kt
    if d.labour.shape[0]:
        k = d.labour.shape[0]
        rows_lab = sparse.kron(eye_t, sparse.csr_array(d.labour), format="csr")
        bld.row("labour", (T, k), (years, d.labour_kinds), {"output": rows_lab}, -INF,
                d.supply.T)
    # 3b. foreign exchange: p^m m_t − p^e e_t ≤ F_t
    if imb is not None or exb is not None:
        fx = {}
        if imb is not None:
            fx["imports"] = sparse.kron(eye_t, sparse.csr_array(imp_price[None, :]),
                                        format="csr")
        if exb is not None:
            fx["exports"] = sparse.kron(eye_t, sparse.csr_array(-exp_price[None, :]),
                                        format="csr")
        bld.row("foreign_exchange", (T,), (years,), fx, -INF, trade["inflow"])
    # 4-5. consumption floor and fall
    if kb is not None:
        bld.row("consumption_floor", (T,), (years,), {"consumption": eye_t}, d.floor, INF)
        if d.max_fall is not None and T > 1:
            fall = sparse.eye_array(T - 1, T, k=1, format="csr") - (1 - d.max_fall) * \
                sparse.eye_array(T - 1, T, format="csr")
            bld.row("consumption_fall", (T - 1,), (years[1:],),
                    {"consumption": sparse.csr_array(fall)}, 0.0, INF)
    # 6. targets
    info = []
    t_rows: dict[str, list] = {"output": [], "starts": [], "consumption": []}
    t_lower = []
    for i, tg in enumerate(plan.targets):
        t = tg.year - years[0]
        j = names.index(tg.sector) if tg.sector is not None else None
        entry = {"index": i, "what": tg.what, "sector": tg.sector or "", "year": tg.year,
                 "required": tg.value}
        row = {c: sparse.csr_array((1, b.size)) for c, b in bld.cols.items()}
        if tg.what == "output":
            row["output"] = sparse.csr_array(([1.0], ([0], [t * n + j])), shape=(1, T * n))
            t_lower.append(tg.value)
        elif tg.what == "capacity":
            row["starts"] = sparse.csr_array(g[[t * n + j]])
            t_lower.append(tg.value - base[t, j])
        else:
            coef = 1.0 if j is None else d.basket[j]
            row["consumption"] = sparse.csr_array(([coef], ([0], [t])), shape=(1, T))
            t_lower.append(tg.value)
        info.append(entry)
        for c in t_rows:
            if c in row:
                t_rows[c].append(row[c])
    if plan.targets:
        coeffs = {c: sparse.csr_array(sparse.vstack(v)) for c, v in t_rows.items()
                  if v and c in bld.cols}
        bld.row("targets", (len(plan.targets),), ([f"{e['what']}_{e['sector']}_{e['year']}"
                                                    for e in info],),
                coeffs, np.array(t_lower), INF)
    # 7. terminal growth: z_jt − ψ_j G z ≥ ψ_j base_jt in each sector's final window
    if d.psi is not None:
        window = [(t, j) for j in range(n) for t in range(T - max(int(d.theta[j]), 1), T)
                  if t >= 0]
        idx = np.array([t * n + j for t, j in window])
        psi = np.array([d.psi[j] for _, j in window])
        zsel = sparse.csr_array((np.ones(len(window)), (np.arange(len(window)), idx)),
                                shape=(len(window), T * n))
        term = zsel - sparse.diags_array(psi) @ g_plan[idx]
        bld.row("terminal", (len(window),), ([f"{years[t]}_{names[j]}" for t, j in window],),
                {"starts": sparse.csr_array(term)},
                psi * np.array([base[t, j] for t, j in window]), INF)
    # 8. terminal capacity objective: G_T z − π λ ≥ −base_T
    if lb is not None:
        assert d.proportions is not None
        bld.row("objective", (n,), (names,),
                {"starts": sparse.csr_array(g[T * n:]),
                 "level": sparse.csr_array(-d.proportions[:, None])}, -base[T], INF)

    ncol = bld.ncol

    def cost_of(o) -> np.ndarray:
        c = np.zeros(ncol)
        if isinstance(o, obj.TerminalCapacity):
            assert lb is not None
            c[lb.start] = 1.0
        elif isinstance(o, obj.DiscountedConsumption):
            assert kb is not None
            c[kb.start:kb.stop] = (1.0 + o.rate) ** -np.arange(T, dtype=float)
        elif isinstance(o, obj.LeastLabour):
            c[xb.start:xb.stop] = np.tile(d.labour_all.sum(axis=0), T)
        elif isinstance(o, obj.LeastForeignExchange):
            if imb is not None:
                c[imb.start:imb.stop] = np.tile(trade["import"][1], T)
            if exb is not None:
                c[exb.start:exb.stop] = -np.tile(trade["export"][1], T)
        return c

    o = plan.objective
    if isinstance(o, obj.Fastest):
        o = o.then
    if isinstance(o, obj.Weighted):
        weighted = np.zeros(ncol)
        for term_ in o.terms:
            weighted += term_.weight * (1.0 if term_.objective.sense == "max" else -1.0) \
                * cost_of(term_.objective)
        stages = [(weighted, "max")]
    elif isinstance(o, obj.Lexicographic):
        stages = [(cost_of(p), p.sense) for p in o.objectives]
    else:
        stages = [(cost_of(o), o.sense)]
    cost, sense = stages[0]
    col_lower = np.zeros(ncol)
    col_upper = np.full(ncol, INF)
    col_upper[zb.start:zb.stop] = d.upper_starts.ravel()
    if lb is not None:
        col_lower[lb.start] = -INF
    for blk, side in ((imb, "import"), (exb, "export")):
        if blk is not None:
            col_upper[blk.start:blk.stop] = trade[side][2].ravel()
    return LinearProgram(
        matrix=bld.matrix(), row_lower=np.concatenate(bld.lower),
        row_upper=np.concatenate(bld.upper), col_lower=col_lower, col_upper=col_upper,
        cost=cost, sense=sense, rows=bld.rows, cols=bld.cols,
        row_sign=np.concatenate(bld.sign), data=d, target_info=info, stages=stages,
        capacity_op=g, deliveries_op=w_op)
