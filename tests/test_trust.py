"""Trust: unit changes, hard numerics, solver faults, size guard, nothing lost, reproducibility."""

from __future__ import annotations

import hashlib
import subprocess
import sys
import textwrap
import threading
from pathlib import Path

import highspy
import numpy as np
import pandas as pd
import pytest
from conftest import assert_optimal, one_sector, random_economy
from helpers import economy, make_plan
from hypothesis import given, settings
from hypothesis import strategies as st

import growthplan as gp

RNG_SEED = 4


def rescaled_plan(k: int, s: float) -> gp.Plan:
    """A fixed plan with sector k's unit changed: 1 old unit = s new units.

    Coefficients transform as A' = D A D⁻¹, B' = D B D⁻¹, l' = l D⁻¹, h' = D h,
    capacities and targets of sector k times s (dimensional analysis; common practice).
    """
    rng = np.random.default_rng(RNG_SEED)
    n = 4
    a = rng.uniform(0, 1, (n, n))
    a *= 0.5 / a.sum(0).max()
    b = rng.uniform(0, 1, (n, n))
    b *= 2 / b.sum(0).max()
    lab, h, c0 = rng.uniform(0.1, 1, n), rng.uniform(0.1, 1, n), rng.uniform(50, 150, n)
    d = np.ones(n)
    d[k] = s
    names = [f"s{i}" for i in range(n)]
    econ = gp.Economy(sectors=names, input_coefficients=d[:, None] * a / d[None, :],
                      capital_coefficients=d[:, None] * b / d[None, :],
                      labour_coefficients=[lab / d], consumption_basket=h * d,
                      capital={x: gp.CapitalSpec(initial_capacity=float(c0[i] * d[i]),
                                                 mean_service_life=15)
                               for i, x in enumerate(names)})
    return gp.Plan(economy=econ, years=range(2030, 2045),
                   labour=gp.LabourSupply(start=float(lab @ c0) * 1.1, growth=0.01),
                   consumption=gp.Consumption(floor=5.0), terminal=gp.TerminalGrowth(rate=0.02),
                   targets=[gp.Target(f"s{k}", year=2040,
                                      capacity_at_least=float(c0[k] * 1.5 * s))],
                   objective=gp.objectives.DiscountedConsumption(rate=0.03))


class TestUnits:
    @settings(max_examples=20)
    @given(st.integers(0, 3), st.integers(-6, 6), st.sampled_from(["simplex", "ipm"]))
    def test_rescaling_a_unit_changes_nothing(self, k, power, method):
        """The consumption objective counts no sector's unit, so it must not move."""
        base = assert_optimal(rescaled_plan(k, 1.0).solve(method=method))
        s = 10.0 ** power
        r = assert_optimal(rescaled_plan(k, s).solve(method=method))
        assert r.objective == pytest.approx(base.objective, rel=1e-6)
        # the consumption path is unit-free: the same up to alternative optima, which
        # cannot change its discounted sum
        k_new = r.consumption["level"].to_numpy()
        weights = 1.03 ** -np.arange(k_new.size)
        assert k_new @ weights == pytest.approx(base.consumption["level"].to_numpy() @ weights,
                                                rel=1e-6)

    @pytest.mark.parametrize("power", [8, 10, -8])
    def test_beyond_a_million(self, power):
        base = assert_optimal(rescaled_plan(1, 1.0).solve())
        r = assert_optimal(rescaled_plan(1, 10.0 ** power).solve())
        assert r.objective == pytest.approx(base.objective, rel=1e-6)


class TestHardNumerics:
    def test_near_unproductive_economy(self):
        econ = gp.Economy(sectors=["a", "b"], input_coefficients=[[0.5, 0.4995], [0.4995, 0.5]],
                          capital_coefficients=[[1.0, 1.0], [1.0, 1.0]],
                          capital={s: gp.CapitalSpec(initial_capacity=100, mean_service_life=20)
                                   for s in ("a", "b")})
        assert econ.spectral_radius() == pytest.approx(0.9995)
        plan = gp.Plan(economy=econ, years=range(2030, 2045))
        r = assert_optimal(plan.solve())
        # independent solver: PuLP's bundled CBC on the same LP
        from growthplan.backends.pulp import cbc_solver

        other = assert_optimal(plan.solve(backend=gp.PulpBackend(cbc_solver())))
        assert r.objective == pytest.approx(other.objective, rel=1e-6)

    def test_spectral_radius_one_is_refused(self):
        with pytest.raises(gp.UnproductiveEconomy):
            gp.Economy(sectors=["a", "b"], input_coefficients=[[0.5, 0.5], [0.5, 0.5]])

    @pytest.mark.parametrize("years", [50, 80])
    def test_long_horizons(self, years):
        econ = random_economy(np.random.default_rng(1), 5)
        plan = gp.Plan(economy=econ, years=range(2030, 2030 + years),
                       consumption=gp.Consumption(floor=1.0),
                       terminal=gp.TerminalGrowth(rate=0.01))
        r = assert_optimal(plan.solve())
        assert r.audit.max_violation < 1e-6
        # independent solver: PuLP's bundled CBC on the same LP
        from growthplan.backends.pulp import cbc_solver

        other = assert_optimal(plan.solve(backend=gp.PulpBackend(cbc_solver())))
        assert r.objective == pytest.approx(other.objective, rel=1e-6)


class TestSolverFaults:
    def test_interrupt(self):
        stop = threading.Event()
        stop.set()
        r = make_plan(economy(30), 20).solve(method="simplex", stop=stop)
        assert r.status is gp.Status.INTERRUPTED and not r.ok
        with pytest.raises(gp.PlanNotOptimal):
            _ = r.starts

    def test_unknown_status_is_reported(self, monkeypatch):
        monkeypatch.setattr(highspy.Highs, "getModelStatus",
                            lambda self: highspy.HighsModelStatus.kUnknown)
        r = gp.Plan(economy=one_sector(), years=range(2030, 2035)).solve()
        assert r.status is gp.Status.UNKNOWN and not r.ok
        with pytest.raises(gp.SolverFailure, match="unknown"):
            r.raise_for_status()

    def test_ipm_iteration_limit(self):
        r = make_plan(economy(30), 20).solve(method="ipm", options={"ipm_iteration_limit": 2})
        assert r.status is gp.Status.ITERATION_LIMIT and not r.ok

    def test_status_table_has_one_optimal(self):
        from growthplan.backends.highs import STATUS_TABLE

        optimal = [k for k, v in STATUS_TABLE.items() if v is gp.Status.OPTIMAL]
        assert set(optimal) <= {highspy.HighsModelStatus.kOptimal,
                                highspy.HighsModelStatus.kModelEmpty}

    def test_audit_failure_is_not_optimal(self, monkeypatch):
        real = gp.HighsBackend.solve

        def corrupt(*a, **k):
            out = real(*a, **k)
            out.x = out.x * 1.05  # a solver that returns a wrong point as optimal
            return out

        monkeypatch.setattr(gp.HighsBackend, "solve", corrupt)
        r = gp.Plan(economy=one_sector(), years=range(2030, 2035)).solve()
        assert r.status is gp.Status.NOT_VERIFIED and not r.ok
        assert "audit" in r.warnings[0]


class TestSizeGuard:
    @pytest.mark.parametrize("n,years", [(30, 20), (400, 40)])
    def test_estimate_matches_the_built_matrix(self, n, years):
        plan = make_plan(economy(n), years)
        est = plan.estimate_size()
        lp = plan.compile(size_limit=None)
        assert (est["rows"], est["columns"], est["nonzeros"]) == (*lp.shape, lp.nnz)

    def test_refusal_names_the_estimate_and_the_way_on(self):
        plan = make_plan(economy(30), 20)
        with pytest.raises(gp.InvalidInput) as err:
            plan.solve(size_limit=10_000)
        msg = str(err.value)
        assert "43,530 nonzeros" in msg and "size_limit=None" in msg


class TestNothingLost:
    @pytest.fixture
    def result(self):
        return assert_optimal(gp.Plan(economy=one_sector(), years=range(2030, 2035)).solve())

    def test_interrupted_csv_export_keeps_previous_folder(self, result, tmp_path, monkeypatch):
        folder = result.to_csv(tmp_path / "out")
        before = {p.name: p.read_bytes() for p in folder.iterdir()}
        calls = {"n": 0}
        real = pd.DataFrame.to_csv

        def failing(self, *a, **k):
            calls["n"] += 1
            if calls["n"] == 3:
                raise OSError("disk full (injected)")
            return real(self, *a, **k)

        monkeypatch.setattr(pd.DataFrame, "to_csv", failing)
        with pytest.raises(OSError, match="injected"):
            result.to_csv(tmp_path / "out", overwrite=True)
        after = {p.name: p.read_bytes() for p in folder.iterdir()}
        assert after == before
        assert [p.name for p in tmp_path.iterdir()] == ["out"]  # no half-written leftovers

    def test_interrupted_excel_export_keeps_previous_workbook(self, result, tmp_path,
                                                              monkeypatch):
        book = result.to_excel(tmp_path / "plan.xlsx")
        before = book.read_bytes()

        def failing(self, *a, **k):
            raise OSError("disk full (injected)")

        monkeypatch.setattr(pd.DataFrame, "to_excel", failing)
        with pytest.raises(OSError, match="injected"):
            result.to_excel(book, overwrite=True)
        assert book.read_bytes() == before
        assert [p.name for p in tmp_path.iterdir()] == ["plan.xlsx"]

    def test_no_overwrite_without_asking(self, result, tmp_path):
        (tmp_path / "mine").mkdir()
        (tmp_path / "mine" / "notes.txt").write_text("keep me")
        with pytest.raises(gp.InvalidInput, match="overwrite"):
            result.to_csv(tmp_path / "mine")
        assert (tmp_path / "mine" / "notes.txt").read_text() == "keep me"


def _digest(result) -> str:
    h = hashlib.sha256()
    for name in ("output", "starts", "capacity", "shadow_prices"):
        h.update(getattr(result, name).to_numpy().tobytes())
    return h.hexdigest()


class TestReproducibility:
    @pytest.mark.parametrize("method", ["simplex", "ipm"])
    def test_repeated_solves_are_bit_identical(self, method):
        plan = make_plan(economy(30), 12)
        digests = {_digest(assert_optimal(plan.solve(method=method))) for _ in range(3)}
        assert len(digests) == 1

    def test_across_processes(self):
        script = textwrap.dedent(f"""
            import sys, warnings, hashlib
            sys.path.insert(0, {str(Path(__file__).parent)!r})
            warnings.simplefilter("ignore")
            from helpers import economy, make_plan
            r = make_plan(economy(30), 12).solve(method="ipm")
            h = hashlib.sha256()
            for name in ("output", "starts", "capacity", "shadow_prices"):
                h.update(getattr(r, name).to_numpy().tobytes())
            print(h.hexdigest())
        """)
        runs = {subprocess.run([sys.executable, "-c", script], capture_output=True, text=True,
                               check=True).stdout.strip().splitlines()[-1] for _ in range(2)}
        here = _digest(make_plan(economy(30), 12).solve(method="ipm"))
        assert runs == {here}

    def test_result_records_versions_and_options(self):
        r = gp.Plan(economy=one_sector(), years=range(2030, 2035)).solve(method="simplex")
        v = r.solver["versions"]
        assert v["highs"].count(".") == 2 and v["pulp"] and v["growthplan"]
        assert r.solver["options"]["solver"] == "simplex"
        assert r.solver["options"]["random_seed"] == 0
