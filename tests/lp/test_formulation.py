"""The capacity formulations: the state form is the same LP as the expression form.

The expression form writes capacity in service as ``base + G z``; the state form
carries the new capacity ``K = G z`` from year to year with one row per year and
technique. They are the same problem, so the optimum, the schedules, the audit
and the shadow prices of every shared condition must agree (closed reasoning:
each state-form solution maps to an expression-form one with the same value and
back). Shadow prices are checked against finite differences of the optimum.
"""

from __future__ import annotations

import numpy as np
import pytest
from conftest import assert_optimal, random_economy
from helpers import economy, make_plan, switch_plan
from hypothesis import given, settings
from hypothesis import strategies as st

import growthplan as gp
from growthplan.backends.methods import AUTO_HIPO_NONZEROS, choose
from growthplan.lp.build import build, estimate_size
from growthplan.lp.conditions.capacity import stock_recursion

PROFILES = ["geometric", "sudden_exit", "weibull", "linear", "lognormal"]


def _plan(seed: int, n: int, T: int, profile: str, lead: int, terminal: bool,
          targets: bool) -> gp.Plan:
    rng = np.random.default_rng(seed)
    econ = random_economy(rng, n, profile=profile, lead=lead)
    tg = [gp.Target("s0", year=2030 + T, capacity_at_least=10.0),
          gp.Target("s0", year=2030, output_at_least=1.0)] if targets else []
    return gp.Plan(economy=econ, years=range(2030, 2030 + T),
                   labour=gp.LabourSupply(start=1e4),
                   consumption=gp.Consumption(floor=1.0, max_fall=0.1), targets=tg,
                   terminal=gp.TerminalGrowth(rate=0.02) if terminal else None)


@settings(max_examples=15)
@given(st.integers(0, 10_000), st.integers(1, 4), st.integers(1, 8), st.sampled_from(PROFILES),
       st.integers(0, 3), st.booleans(), st.booleans())
def test_every_formulation_gives_the_same_audited_optimum(seed, n, T, profile, lead,
                                                         terminal, targets):
    """Same optimum (relative 1e-8), same schedules, audit passed, exact size count."""
    plan = _plan(seed, n, T, profile, lead, terminal, targets)
    results = {}
    for form in ("expression", "state"):
        est = plan.estimate_size(form)
        lp = plan.compile(formulation=form, size_limit=None)
        assert (est["rows"], est["columns"], est["nonzeros"]) == (*lp.shape, lp.nnz)
        results[form] = plan.solve(formulation=form, method="simplex")
    e, s = results["expression"], results["state"]
    assert e.status == s.status
    if e.status is not gp.Status.OPTIMAL:
        return
    assert_optimal(s)
    assert s.objective == pytest.approx(e.objective, rel=1e-8, abs=1e-9)
    np.testing.assert_allclose(s.capacity.to_numpy(), e.capacity.to_numpy(), rtol=1e-6,
                               atol=1e-6 * float(np.abs(e.capacity.to_numpy()).max()))


def test_alternative_techniques_in_the_state_form():
    """A stock per technique: the labour-saving switch plan has the same optimum, audit
    and size count in both forms."""
    plan = switch_plan()
    got = {}
    for form in ("expression", "state"):
        est = plan.estimate_size(form)
        lp = plan.compile(formulation=form)
        assert (est["rows"], est["columns"], est["nonzeros"]) == (*lp.shape, lp.nnz)
        got[form] = assert_optimal(plan.solve(formulation=form))
    assert got["state"].objective == pytest.approx(got["expression"].objective, rel=1e-8)
    assert got["state"].lp.formulation == "state"


@pytest.mark.parametrize("profile", PROFILES)
def test_the_stock_recursion_reproduces_the_survival_profile(profile):
    """``K_t = ρ K_{t−1} + Σ f(t − τ − θ) z_τ`` gives ``Σ S(t − τ − θ) z_τ`` (the
    identity ``f(a) = S(a) − ρ S(a − 1)``), vintage by vintage."""
    rng = np.random.default_rng(7)
    plan = _plan(3, 2, 12, profile, 1, True, False)
    d = plan.lowered()
    rho, f = stock_recursion(d)
    z = rng.uniform(0, 5, (d.T, d.m))
    k = np.zeros((d.T + 1, d.m))
    for t in range(d.T + 1):
        for tau in range(d.T):
            age = t - tau - d.theta
            ok = age >= 0
            k[t, ok] += f[ok, age[ok]] * z[tau, ok]
        if t:
            k[t] += rho * k[t - 1]
    direct = np.zeros_like(k)
    for t in range(d.T + 1):
        for tau in range(d.T):
            age = t - tau - d.theta
            ok = age >= 0
            direct[t, ok] += d.surv[ok, age[ok]] * z[tau, ok]
    np.testing.assert_allclose(k, direct, rtol=1e-12, atol=1e-12)
    if profile == "geometric":  # one increment per vintage: the year it enters service
        assert np.count_nonzero(f[:, : d.T + 1]) == d.m
    if profile == "sudden_exit":  # entry and exit (within the horizon)
        assert np.count_nonzero(f[:, : d.T + 1]) <= 2 * d.m


def _optimum(lp, rows=None, by=0.0):
    if rows is not None:
        lo, up = lp.row_lower.copy(), lp.row_upper.copy()
        lo[rows] = np.where(np.isfinite(lo[rows]), lo[rows] - by, lo[rows])
        up[rows] = np.where(np.isfinite(up[rows]), up[rows] + by, up[rows])
        lp = lp.replace(row_lower=lo, row_upper=up)
    out = gp.HighsBackend("simplex").solve(lp)
    assert out.status is gp.Status.OPTIMAL
    return out


def test_shadow_prices_map_to_the_same_conditions():
    """Every condition both forms share has the same shadow price, and it is the
    change of the optimum when the condition is relaxed (finite differences)."""
    plan = make_plan(economy(4, seed=3), 6)
    d = plan.lowered()
    lps = {f: build(d, formulation=f) for f in ("expression", "state")}
    duals = {f: _optimum(lp).row_dual for f, lp in lps.items()}
    e, s = lps["expression"], lps["state"]
    for name, blk in e.rows.items():
        other = s.rows[name]
        np.testing.assert_allclose(duals["state"][other.start:other.stop],
                                   duals["expression"][blk.start:blk.stop],
                                   rtol=1e-7, atol=1e-9, err_msg=name)
    base = {f: _optimum(lp).objective for f, lp in lps.items()}
    eps = 1e-4
    checked = 0
    for name in ("balance", "capacity", "labour"):
        for f, lp in lps.items():
            blk = lp.rows[name]
            y = duals[f][blk.start:blk.stop]
            for i in np.argsort(-np.abs(y))[:2]:  # the two conditions that bind hardest
                r = blk.start + int(i)
                diff = (_optimum(lp, [r], eps).objective - base[f]) / eps
                assert abs(diff) == pytest.approx(abs(y[i]), rel=1e-4, abs=1e-8), (f, name, i)
                checked += 1
    assert checked == 12


def test_auto_picks_by_measurement_and_keeps_what_is_asked():
    """The rule: simplex on the smallest LPs, IPX in the expression form, HiPO in the
    state form only when it is installed and the LP is large enough."""
    assert choose(1_000, hipo=False).method == "simplex"
    r = choose(10**6, hipo=False)
    assert (r.formulation, r.method) == ("expression", "ipm")
    assert "hipo" in r.reason  # tells how to get the faster method
    r = choose(AUTO_HIPO_NONZEROS, hipo=True)
    assert (r.formulation, r.method, r.options) == ("state", "hipo", {})
    r = choose(AUTO_HIPO_NONZEROS - 1, hipo=True)
    assert (r.formulation, r.method, r.options) == ("state", "ipm", {"presolve": "off"})
    assert choose(AUTO_HIPO_NONZEROS, hipo=True, formulation="expression").method == "ipm"
    assert choose(10**6, hipo=False, method="ipm").options == {}
    assert choose(10**6, hipo=False, method="simplex", formulation="state").formulation \
        == "state"


def test_a_formulation_not_known_is_refused():
    plan = make_plan(economy(3), 3)
    with pytest.raises(gp.InvalidInput, match="formulation"):
        plan.solve(formulation="stocks")
    with pytest.raises(gp.InvalidInput, match="formulation"):
        estimate_size(plan, "stocks")


def test_hipo_without_the_extra_says_how_to_install_it():
    from growthplan.backends.highs import hipo_available

    if hipo_available():
        pytest.skip("HiPO is installed here")
    with pytest.raises(gp.InvalidInput, match=r"growthplan\[hipo\]"):
        make_plan(economy(3), 3).solve(method="hipo")
