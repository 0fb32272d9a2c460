"""Scenario sweeps: same figures serially, on a process pool and on a local Dask cluster."""

from __future__ import annotations

import os
import signal
from concurrent.futures import ProcessPoolExecutor

import numpy as np
import pandas as pd
import pytest
from conftest import one_sector

import growthplan as gp
from growthplan.scenarios.sweep import variant

YEARS = range(2030, 2040)


def base_plan() -> gp.Plan:
    return gp.Plan(economy=one_sector(), years=YEARS, labour=gp.LabourSupply(start=60,
                                                                           growth=0.0),
                   terminal=gp.TerminalGrowth(rate=0.02))


GRID = {"labour.0.growth": [0.0, 0.01, 0.02, 0.04],
        "economy.capital.goods.mean_service_life": [10.0, 15.0, 20.0, 30.0]}


def figures(s: gp.Sweep) -> pd.DataFrame:
    return s.table.drop(columns=["solve_seconds"])


def test_variant_changes_only_the_named_field():
    v = variant(base_plan(), {"labour.0.growth": 0.03, "terminal.rate": 0.05})
    assert v.labour[0].growth == 0.03 and v.terminal.rate == 0.05
    assert v.economy is base_plan().economy or v.economy == base_plan().economy
    with pytest.raises(gp.InvalidInput, match="parameter 'labour.0.grwth'"):
        variant(base_plan(), {"labour.0.grwth": 0.03})


def test_serial_sweep_figures_are_right():
    s = gp.sweep(base_plan(), GRID, executor=gp.SerialExecutor())
    assert len(s.table) == 16 and (s.table.status == "optimal").all()
    # more labour growth never lowers the objective (it only relaxes a limit)
    for life, part in s.table.groupby("economy.capital.goods.mean_service_life"):
        obj = part.sort_values("labour.0.growth").objective.to_numpy()
        assert (np.diff(obj) >= -1e-7).all(), life
    assert s.results[0].plan.labour[0].growth == 0.0


def test_process_pool_and_dask_agree_with_serial():
    serial = gp.sweep(base_plan(), GRID, executor=gp.SerialExecutor(), keep_results=False)
    with ProcessPoolExecutor(max_workers=2) as pool:
        pooled = gp.sweep(base_plan(), GRID, executor=pool, keep_results=False)
    pd.testing.assert_frame_equal(figures(serial), figures(pooled))
    distributed = pytest.importorskip("distributed")
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  dashboard_address=None) as cluster, \
            distributed.Client(cluster) as client:
        dasked = gp.sweep(base_plan(), GRID, executor=client.get_executor(),
                          keep_results=False)
    pd.testing.assert_frame_equal(figures(serial), figures(dasked))


def test_failed_scenario_is_reported_not_fatal():
    s = gp.sweep(base_plan(), scenarios={"fine": {"terminal.rate": 0.01},
                                         "broken": {"labour.0.growth": -5.0}},
                 executor=gp.SerialExecutor())
    assert list(s.table.scenario) == ["fine", "broken"]
    assert s.table.status.tolist() == ["optimal", "error"]
    assert "labour" in s.failed.iloc[0].error
    assert s.results[1] is None


def test_default_process_pool():
    s = gp.sweep(base_plan(), {"terminal.rate": [0.0, 0.03]}, max_workers=2)
    assert (s.table.status == "optimal").all()


class DiesWhenUnpacked:
    """A parameter value whose unpickling ends the process that receives it: a
    scenario that kills its worker (os._exit, or SIGKILL as an outside killer)."""

    def __init__(self, how: str = "exit") -> None:
        self.how = how

    def __reduce__(self):
        if self.how == "exit":
            return os._exit, (7,)
        return signal.raise_signal, (signal.SIGKILL,)


@pytest.mark.parametrize("how", ["exit", "kill"])
def test_a_dying_worker_takes_only_its_own_scenario(how):
    scenarios = {f"fine {k}": {"terminal.rate": 0.01 * k} for k in range(5)}
    scenarios["killer"] = {"terminal.rate": DiesWhenUnpacked(how)}
    scenarios.update({f"later {k}": {"labour.0.growth": 0.01 * k} for k in range(4)})
    s = gp.sweep(base_plan(), scenarios=scenarios, max_workers=2, keep_results=False)
    assert list(s.table.scenario) == list(scenarios)
    assert s.failed.scenario.tolist() == ["killer"]
    assert "worker died while solving scenario killer" in s.failed.iloc[0].error
    fine = s.table[s.table.scenario != "killer"]
    assert (fine.status == "optimal").all(), fine[["scenario", "status", "error"]]
    # the survivors carry the same figures as a reference run in this process
    ref = gp.sweep(base_plan(), scenarios={k: v for k, v in scenarios.items()
                                           if k != "killer"},
                   executor=gp.SerialExecutor(), keep_results=False)
    np.testing.assert_allclose(fine.objective.to_numpy(), ref.table.objective.to_numpy(),
                               rtol=1e-9)


def test_a_users_pool_that_breaks_is_retried_on_fresh_pools():
    scenarios = {"a": {"terminal.rate": 0.01}, "killer": {"terminal.rate": DiesWhenUnpacked()},
                 "b": {"terminal.rate": 0.02}}
    with ProcessPoolExecutor(max_workers=2) as pool:
        s = gp.sweep(base_plan(), scenarios=scenarios, executor=pool, keep_results=True)
    assert s.table.status.tolist() == ["optimal", "error", "optimal"]
    assert s.results[1] is None and s.results[2].plan.terminal.rate == 0.02


class CountingExecutor(gp.SerialExecutor):
    """Serial, counting the tasks it was given."""

    def __init__(self) -> None:
        self.calls = 0

    def submit(self, fn, /, *args, **kwargs):
        self.calls += 1
        return super().submit(fn, *args, **kwargs)


@pytest.mark.parametrize("grid, scenarios, match", [
    ({"labour.0.growth": [0.0], "terminal.rat": [0.01]}, None,
     r"parameter 'terminal.rat' must name an existing field .* Did you mean 'terminal.rate'"),
    (None, {"a": {"labour.0.growth": 0.01}, "b": {"labour.0.grwoth": 0.02}},
     r"'labour.0.grwoth' .* Did you mean 'labour.0.growth'"),
    ({"economy.capital.goods.mean_service_lfe": [10.0]}, None,
     r"Did you mean 'economy.capital.goods.mean_service_life'"),
    ({"consumption.floor": [1.0]}, None, r"consumption is not set"),
    ({"labour.2.growth": [0.0]}, None, r"must index labour by 0..0"),
])
def test_misspelt_parameters_fail_before_any_scenario_runs(grid, scenarios, match):
    ex = CountingExecutor()
    with pytest.raises(gp.InvalidInput, match=match):
        gp.sweep(base_plan(), grid, scenarios=scenarios, executor=ex)
    assert ex.calls == 0


def test_one_labour_kind_is_reached_without_its_index():
    s = gp.sweep(base_plan(), {"labour.growth": [0.0, 0.02]}, executor=gp.SerialExecutor())
    ref = gp.sweep(base_plan(), {"labour.0.growth": [0.0, 0.02]},
                   executor=gp.SerialExecutor())
    assert list(s.table.columns[:2]) == ["scenario", "labour.growth"]
    assert [r.plan.labour[0].growth for r in s.results] == [0.0, 0.02]
    np.testing.assert_array_equal(s.table.objective, ref.table.objective)


class Tracking(gp.SerialExecutor):
    """Runs each task at once, counting the futures still referenced when one is sent."""

    def __init__(self) -> None:
        import weakref

        self.alive = weakref.WeakSet()
        self.most = 0

    def submit(self, fn, /, *args, **kwargs):
        fut = super().submit(fn, *args, **kwargs)
        self.alive.add(fut)
        self.most = max(self.most, len(self.alive))
        return fut


def test_rows_stream_to_a_file_with_few_futures_in_flight(tmp_path):
    grid = {"terminal.rate": [0.0, 0.01, 0.02, 0.03, 0.04], "labour.growth": [0.0, 0.01]}
    ex = Tracking()
    s = gp.sweep(base_plan(), grid, executor=ex, keep_results=False, out=tmp_path / "s.csv",
                 in_flight=3)
    assert ex.most <= 3
    streamed = pd.read_csv(tmp_path / "s.csv")
    assert len(streamed) == 10 and streamed["error"].isna().all()
    pd.testing.assert_frame_equal(streamed.drop(columns=["solve_seconds", "error"]),
                                  figures(s).reset_index(drop=True), check_dtype=False)
    with pytest.raises(gp.InvalidInput, match="overwrite"):
        gp.sweep(base_plan(), grid, executor=ex, out=tmp_path / "s.csv")
    again = gp.sweep(base_plan(), {"terminal.rate": [0.0]},
                     scenarios={"broken": {"labour.0.growth": -5.0}}, executor=ex,
                     out=tmp_path / "s.csv", overwrite=True)
    streamed = pd.read_csv(tmp_path / "s.csv")
    assert streamed["status"].tolist() == again.table["status"].tolist() == ["optimal",
                                                                              "error"]
    assert "labour" in streamed["error"].iloc[1]
