"""Steady-state emission figures: total intensities, footprints, balanced growth.

Checked against pymrio 0.7 (its test system, ``pymrio.load_test()``, read here as one
economy of all its region-sectors), against a hand computation on the two-sector
example of Miller & Blair (2009, ch. 2) and against the definitions on a balanced ray.
"""

from __future__ import annotations

import warnings

import numpy as np
import pandas as pd
import pytest

import growthplan as gp
from growthplan.analysis.footprint import (
    balanced_emissions,
    direct_intensities,
    emissions_by_sector,
    footprints,
    total_intensities,
)
from growthplan.statistics.satellite import read_satellite


@pytest.fixture(scope="module")
def mrio():
    pymrio = pytest.importorskip("pymrio")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        io = pymrio.load_test()
        io.calc_all()
    return io


def one_economy(io):
    """The test system as one economy: its flows Z and gross output x, region/sector names."""
    names = [f"{r}/{s}" for r, s in io.Z.columns]
    z = pd.DataFrame(io.Z.to_numpy(), index=names, columns=names)
    x = pd.Series(io.x.to_numpy().ravel(), index=names)
    econ = gp.Economy.from_flows(z, x)
    flows = pd.DataFrame(io.emissions.F.to_numpy(), columns=names,
                         index=[s for s, _ in io.emissions.F.index])
    sat = read_satellite(flows, units={s: "kg" for s in flows.index}, output=x)
    return econ, sat, names


def test_total_intensities_equal_pymrio(mrio):
    """M = S (I − A)^-1 of the library equals pymrio's io.emissions.M to 1e-10 (pymrio 0.7
    test system, calc_all()); the direct intensities equal io.emissions.S."""
    econ, sat, _ = one_economy(mrio)
    s_ref = mrio.emissions.S.to_numpy()
    m_ref = mrio.emissions.M.to_numpy()
    s = direct_intensities(econ, sat).to_numpy()
    m = total_intensities(econ, sat).to_numpy()
    np.testing.assert_allclose(s, s_ref, rtol=1e-10, atol=1e-10 * np.abs(s_ref).max())
    np.testing.assert_allclose(m, m_ref, rtol=1e-10, atol=1e-10 * np.abs(m_ref).max())


def test_footprints_equal_pymrio_by_region(mrio):
    """The footprint of each region's final demand, M y_r plus the direct emissions of its
    final demand (F_Y), equals pymrio's consumption-based accounts D_cba_reg (pymrio 0.7
    test system)."""
    econ, sat, names = one_economy(mrio)
    y = mrio.Y.T.groupby(level=0).sum().T   # region-sectors × regions of final demand
    y.index = names
    f_y = mrio.emissions.F_Y.T.groupby(level=0).sum().T
    f_y.index = [s for s, _ in f_y.index]
    fp = footprints(econ, sat, y, direct=f_y)
    ref = mrio.emissions.D_cba_reg
    ref = ref.reset_index(level=1, drop=True) if isinstance(ref.index, pd.MultiIndex) else ref
    np.testing.assert_allclose(fp[ref.columns].to_numpy(), ref.to_numpy(), rtol=1e-9)


def test_footprint_by_hand():
    """Miller & Blair (2009, ch. 2): A = [[.15, .25], [.2, .05]], L = [[1.254125, .330033],
    [.264026, 1.122112]]; with intensities (2, 1) t per unit, M = (2, 1) L =
    (2.772277, 1.782178); the footprint of f = (350, 1700) is M f = 4000 t, which is all
    that the output x = (1000, 2000) emits directly (2·1000 + 1·2000)."""
    econ = gp.Economy(sectors=["farm", "mill"], input_coefficients=[[0.15, 0.25],
                                                                     [0.20, 0.05]])
    sat = gp.Satellite(stressors=[gp.Stressor(name="CO2", unit="t",
                                              intensities={"farm": 2.0, "mill": 1.0},
                                              households=0.1)])
    m = total_intensities(econ, sat)
    np.testing.assert_allclose(m.loc["CO2"], [2.772277, 1.782178], atol=2e-6)
    fp = footprints(econ, sat, {"farm": 350.0, "mill": 1700.0}, consumption_level=50.0)
    assert fp.loc["CO2", "final demand"] == pytest.approx(4000.0, rel=1e-12)
    assert fp.loc["CO2", "households (direct)"] == pytest.approx(5.0)
    by = emissions_by_sector(econ, sat, {"farm": 1000.0, "mill": 2000.0})
    assert by.loc["CO2"].tolist() == [2000.0, 2000.0]


def test_balanced_emissions_on_the_ray():
    """On the balanced ray x, emissions per unit of output value are S x / p·x and per
    unit of GDP S x / p·(I − A) x (definitions), growing at the ray's rate."""
    econ = gp.Economy(sectors=["farm", "mill"], input_coefficients=[[0.15, 0.25],
                                                                     [0.20, 0.05]])
    sat = gp.Satellite(stressors=[gp.Stressor(name="CO2", unit="t",
                                              intensities={"farm": 2.0, "mill": 1.0})],
                       impacts=[gp.Impact(name="GHG", unit="t CO2-eq", factors={"CO2": 1.0})])
    table = balanced_emissions(econ, sat)
    bg = econ.balanced_growth()
    x = bg.proportions.to_numpy()
    a = np.array([[0.15, 0.25], [0.20, 0.05]])
    e = 2.0 * x[0] + 1.0 * x[1]
    assert table.loc["CO2", "per_output_value"] == pytest.approx(e / x.sum())
    assert table.loc["CO2", "per_gdp"] == pytest.approx(e / (x - a @ x).sum())
    assert table.loc["GHG", "growth"] == pytest.approx(bg.rate)


def test_reader_refuses_bad_cells(tmp_path):
    """Flows with no output, missing units and negative cells are refused with the field."""
    path = tmp_path / "emissions.csv"
    path.write_text("stressor,farm,mill\nCO2,10,-1\n", encoding="utf-8")
    with pytest.raises(gp.InvalidInput, match="satellite table"):
        read_satellite(path, units={"CO2": "t"})
    path.write_text("stressor,farm,mill\nCO2,10,4\n", encoding="utf-8")
    with pytest.raises(gp.InvalidInput, match="units"):
        read_satellite(path, units={})
    with pytest.raises(gp.InvalidInput, match="output"):
        read_satellite(path, units={"CO2": "t"}, output={"farm": 5.0, "mill": 0.0})
    sat = read_satellite(path, units={"CO2": "t"}, output={"farm": 5.0, "mill": 2.0})
    assert sat.stressors[0].intensities == {"farm": 2.0, "mill": 2.0}


def test_dynamic_balanced_emissions_one_sector():
    """One sector, a = 0.6, b = 2, geometric life 20 (δ = 0.05): the dynamic ray grows at
    (1 − a − b δ)/b = 0.15 (Harrod–Domar with replacement); emissions per unit of GDP are
    e/(1 − a) = 0.5/0.4 = 1.25."""
    econ = gp.Economy(sectors=["goods"], input_coefficients=[[0.6]],
                      capital_coefficients=[[2.0]],
                      capital={"goods": gp.CapitalSpec(initial_capacity=100,
                                                       mean_service_life=20)})
    sat = gp.Satellite(stressors=[gp.Stressor(name="CO2", unit="t",
                                              intensities={"goods": 0.5})])
    table = balanced_emissions(econ, sat, dynamic=True)
    assert table.loc["CO2", "growth"] == pytest.approx(0.15, rel=1e-9)
    assert table.loc["CO2", "per_gdp"] == pytest.approx(1.25, rel=1e-12)
    assert table.loc["CO2", "per_output_value"] == pytest.approx(0.5, rel=1e-12)
