"""Scenario sweeps: same figures serially, on a process pool and on a local Dask cluster."""

from __future__ import annotations

from concurrent.futures import ProcessPoolExecutor

import numpy as np
import pandas as pd
import pytest
from conftest import one_sector

import growthplan as gp
from growthplan.sweep import variant

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
