"""The diagnosis on random impossible plans: each missed aim by its gap to the reachable maximum.

For every plan one aim (an output, capacity or consumption target, or a consumption
floor in one year) is raised beyond reach. Its reachable maximum ``M`` is computed
apart from the library's solver path: scipy.optimize.linprog (SciPy's own HiGHS
interface) maximises that quantity alone, the aim's own bound dropped and every other
condition of the plan's programme kept. The diagnosis must report that aim alone, short
by ``R − M`` to 1e-9 of ``R``, and no fact (labour, foreign exchange): relaxing the
aim suffices. Plans made impossible by their facts (labour or foreign exchange against
exogenous demand) report the fact; plans over an emissions cap report the cap in its own
unit. Every impossible plan names a conflict.
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from conftest import random_economy
from scipy.optimize import linprog
from scipy.sparse import csr_array, vstack

import growthplan as gp

KINDS = ("output", "capacity", "consumption", "floor")
FAST, SLOW = 12, 200        # aims: default run, -m slow (at least 200)
CONFLICT_FAST, CONFLICT_SLOW = 3, 50  # per kind of impossibility


def base_plan(seed: int, kind: str, value: float, year_index: int, sector: int
              ) -> gp.Plan:
    """A small random plan with one aim of ``kind`` at ``value`` (labour ample)."""
    rng = np.random.default_rng(seed)
    n, T = int(rng.integers(2, 5)), int(rng.integers(3, 6))
    econ = random_economy(rng, n)
    years = range(2030, 2030 + T)
    supply = float(np.asarray(econ.labour_coefficients).sum() * 400)
    year = 2030 + year_index % T
    name = econ.names[sector % n]
    floor = [0.0] * T
    targets = []
    if kind == "floor":
        floor[year_index % T] = value
    elif kind == "consumption":
        targets.append(gp.Target(year=year, consumption_at_least=value))
    else:
        targets.append(gp.Target(name, year=year, **{f"{kind}_at_least": value}))
    # no other aim (terminal growth, floors in other years) the re-solve could trade
    # against the raised one: its gap to the maximum is then the least shortfall
    return gp.Plan(economy=econ, years=years, labour=gp.LabourSupply(start=supply),
                   consumption=gp.Consumption(floor=floor), targets=targets)


def aim_row(lp, kind: str, year_index: int) -> int:
    if kind == "floor":
        return lp.rows["consumption_floor"].start + year_index % lp.data.T
    return lp.rows["targets"].start


def reachable_maximum(seed: int, kind: str, year_index: int, sector: int) -> float:
    """``M`` by scipy's linprog: maximise the aim's row with its bound dropped."""
    plan = base_plan(seed, kind, 0.0, year_index, sector)
    lp = plan.compile()
    r = aim_row(lp, kind, year_index)
    offset = 0.0 - lp.row_lower[r]  # a capacity target counts capacity from before the plan
    a = csr_array(lp.matrix)
    keep = np.arange(lp.shape[0]) != r
    lo, up = lp.row_lower[keep], lp.row_upper[keep]
    a_k = a[keep]
    has_up, has_lo = np.isfinite(up), np.isfinite(lo)
    a_ub = vstack([a_k[has_up], -a_k[has_lo]])
    b_ub = np.concatenate([up[has_up], -lo[has_lo]])
    bounds = [(None if not np.isfinite(x) else x, None if not np.isfinite(y) else y)
              for x, y in zip(lp.col_lower, lp.col_upper, strict=True)]
    res = linprog(-a[[r]].toarray().ravel(), A_ub=a_ub, b_ub=b_ub, bounds=bounds,
                  method="highs", options={"primal_feasibility_tolerance": 1e-10,
                                           "dual_feasibility_tolerance": 1e-10})
    assert res.status == 0, res.message
    return float(-res.fun + offset)


def cases(count: int) -> list:
    out = []
    for i in range(count):
        rng = np.random.default_rng(1000 + i)
        out.append(pytest.param(1000 + i, KINDS[i % 4], int(rng.integers(0, 5)),
                                int(rng.integers(0, 4)), float(rng.uniform(1.02, 3.0)),
                                id=f"{KINDS[i % 4]}-{i}"))
    return out


def check_aim(seed: int, kind: str, year_index: int, sector: int, factor: float) -> None:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        m = reachable_maximum(seed, kind, year_index, sector)
        assert m > 0
        required = m * factor
        r = base_plan(seed, kind, required, year_index, sector).solve()
    assert r.status is gp.Status.INFEASIBLE, (r.status, r.message)
    short = r.diagnosis.shortfalls
    # the raised aim alone, and no fact: relaxing the aim suffices
    assert len(short) == 1, short
    assert set(short["kind"]) == {"aim"}
    row = short.iloc[0]
    word = "consumption floor" if kind == "floor" else f"{kind} target"
    assert row.condition == word
    assert float(row.shortfall) == pytest.approx(required - m, abs=1e-9 * required)
    assert float(row.achievable) == pytest.approx(m, abs=1e-9 * required)
    assert r.diagnosis.conflict()


@pytest.mark.parametrize(("seed", "kind", "year_index", "sector", "factor"), cases(FAST))
def test_missed_aim_is_short_by_its_gap(seed, kind, year_index, sector, factor):
    check_aim(seed, kind, year_index, sector, factor)


@pytest.mark.slow
@pytest.mark.parametrize(("seed", "kind", "year_index", "sector", "factor"),
                         cases(SLOW))
def test_missed_aim_is_short_by_its_gap_sweep(seed, kind, year_index, sector, factor):
    check_aim(seed, kind, year_index, sector, factor)


def fact_plan(seed: int, kind: str) -> gp.Plan:
    """Impossible by a fact: exogenous demand needs more labour, or more imports, than allowed."""
    rng = np.random.default_rng(seed)
    n, T = int(rng.integers(2, 5)), int(rng.integers(3, 6))
    econ = random_economy(rng, n)
    cap = np.array([econ.capital[s].initial_capacity for s in econ.names])
    a = np.asarray(econ.input_coefficients)
    lab = np.asarray(econ.labour_coefficients)[0]
    years = range(2030, 2030 + T)
    if kind == "labour":
        # demand whose gross output (Leontief inverse) fills half of the tightest
        # capacity: the capacity allows it, the labour supply does not
        x = np.linalg.solve(np.eye(n) - a, np.ones(n))
        scale = 0.5 * float(np.min(cap / x))
        demand = {s: scale for s in econ.names}
        supply = float(lab @ (scale * x) * rng.uniform(0.3, 0.8))
        return gp.Plan(economy=econ, years=years, labour=gp.LabourSupply(start=supply),
                       final_demand=demand)
    if kind == "emissions":
        # the same demand, its emissions (output times intensity) above a yearly cap
        x = np.linalg.solve(np.eye(n) - a, np.ones(n))
        scale = 0.5 * float(np.min(cap / x))
        intensity = rng.uniform(0.1, 1.0, n)
        sat = gp.Satellite(stressors=[gp.Stressor(
            name="CO2", unit="t", intensities=dict(zip(econ.names, intensity, strict=True)))])
        need = float(intensity @ (scale * x))
        return gp.Plan(economy=econ, years=years, final_demand={s: scale for s in econ.names},
                       satellite=sat,
                       limits=[gp.Cap(what="CO2", at_most=need * rng.uniform(0.3, 0.8))])
    # foreign exchange: demand for good 0 beyond what the first year's capacity can make
    demand = {econ.names[0]: float(cap[0] * rng.uniform(1.5, 3.0))}
    return gp.Plan(economy=econ, years=years, final_demand=demand,
                   trade=gp.Trade(import_prices={econ.names[0]: 1.0},
                                  inflow=float(rng.uniform(0.0, 5.0))))


def check_fact(seed: int, kind: str) -> None:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        r = fact_plan(seed, kind).solve()
    assert r.status is gp.Status.INFEASIBLE, (r.status, r.message)
    short = r.diagnosis.shortfalls
    if kind == "emissions":  # a cap is a limit the analyst sets: relaxed like an aim
        assert all(c.startswith("emissions") for c in short["condition"]), short
        assert "exceed" in r.diagnosis.headline()
        assert r.diagnosis.conflict(), r.diagnosis.subset_source
        return
    word = "labour" if kind == "labour" else "foreign exchange"
    assert word in set(short["condition"]), short
    assert "fact" in set(short["kind"])
    assert "No relaxation of the targets and floors alone" in r.diagnosis.headline()
    assert r.diagnosis.conflict(), r.diagnosis.subset_source


def conflict_cases(count: int) -> list:
    return [pytest.param(kind, 2000 + i, id=f"{kind}-{i}")
            for kind in ("target", "floor", "labour", "foreign_exchange", "emissions")
            for i in range(count)]


def check_conflict(kind: str, seed: int) -> None:
    if kind in ("labour", "foreign_exchange", "emissions"):
        check_fact(seed, kind)
        return
    rng = np.random.default_rng(seed)
    aim = "floor" if kind == "floor" else ("output", "capacity", "consumption")[seed % 3]
    year_index, sector = int(rng.integers(0, 5)), int(rng.integers(0, 4))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        m = reachable_maximum(seed, aim, year_index, sector)
        r = base_plan(seed, aim, m * float(rng.uniform(1.02, 3.0)), year_index,
                      sector).solve()
    assert r.status is gp.Status.INFEASIBLE
    assert r.diagnosis.conflict(), r.diagnosis.subset_source


@pytest.mark.parametrize(("kind", "seed"), conflict_cases(CONFLICT_FAST))
def test_every_impossible_plan_names_a_conflict(kind, seed):
    check_conflict(kind, seed)


@pytest.mark.slow
@pytest.mark.parametrize(("kind", "seed"), conflict_cases(CONFLICT_SLOW))
def test_every_impossible_plan_names_a_conflict_sweep(kind, seed):
    check_conflict(kind, seed)
