"""Multiregional steady-state figures against pymrio's test system."""

from __future__ import annotations

import warnings

import numpy as np
import pandas as pd
import pytest

from growthplan import Economy, InvalidInput, MultiRegionalEconomy
from growthplan.analysis import regions as an
from growthplan.statistics.regions import (
    interregional_economy,
    read_interregional,
    read_trade_shares,
)

pymrio = pytest.importorskip("pymrio")


@pytest.fixture(scope="module")
def mrio():  # pymrio 0.7's bundled test system: 6 regions × 8 sectors
    io = pymrio.load_test()
    io.calc_all()
    return io


@pytest.fixture(scope="module")
def mre(mrio):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # the table's tiny coefficients are dropped as usual
        return interregional_economy(mrio.Z, mrio.x["indout"])


def test_leontief_inverse_equals_pymrio(mrio, mre) -> None:
    # reference: pymrio 0.7 calc_all() on pymrio.load_test() (its L = (I − A)^-1)
    ours = an.leontief_inverse(mre)
    assert list(ours.index) == list(mrio.L.index)
    np.testing.assert_allclose(ours.to_numpy(), mrio.L.to_numpy(), rtol=0, atol=1e-10)


def test_output_multipliers_equal_pymrio(mrio, mre) -> None:
    # reference: pymrio 0.7, column sums of its L (the output multipliers)
    ours = mre.output_multipliers()
    np.testing.assert_allclose(ours.to_numpy(), mrio.L.sum(axis=0).to_numpy(), rtol=0,
                               atol=1e-10)
    parts = an.multiplier_table(mre)
    np.testing.assert_allclose(parts["intraregional"] + parts["spillover"], ours, atol=1e-12)
    # spillover of reg1's pairs: rows of L outside reg1 (pymrio's L, summed directly)
    ref = mrio.L.loc[mrio.L.index.get_level_values(0) != "reg1", "reg1"].sum(axis=0)
    np.testing.assert_allclose(parts.loc["reg1", "spillover"].to_numpy(), ref.to_numpy(),
                               atol=1e-10)
    np.testing.assert_allclose(mre.spillovers().sum(axis=0), ours, atol=1e-10)


def test_total_output_reproduces_pymrio_x(mrio, mre) -> None:
    # reference: pymrio 0.7's x of the test system (x = L y, y summed over final demand)
    y = mrio.Y.sum(axis=1)
    x = an.required_output(mre, y)
    np.testing.assert_allclose(x.to_numpy(), mrio.x["indout"].to_numpy(), rtol=1e-10)


def test_long_and_wide_layouts_read_the_same_table(tmp_path, mrio) -> None:
    wide = tmp_path / "wide.csv"
    mrio.Z.to_csv(wide)
    z_wide = read_interregional(wide)
    z = mrio.Z.copy()
    z.index = z.index.set_names(["from_region", "from_sector"])
    z.columns = z.columns.set_names(["to_region", "to_sector"])
    long = z.stack([0, 1], future_stack=True).rename("value").reset_index()
    path = tmp_path / "long.csv"
    long.to_csv(path, index=False)
    z_long = read_interregional(path, layout="long")
    np.testing.assert_allclose(z_wide.to_numpy(), mrio.Z.to_numpy(), rtol=1e-15)
    np.testing.assert_allclose(z_long.to_numpy(), mrio.Z.to_numpy(), rtol=1e-15)
    assert list(z_long.index) == list(mrio.Z.index)


def _two_regions(**north_kw: object) -> dict[str, Economy]:
    a_n = [[0.10, 0.30], [0.20, 0.10]]
    a_s = [[0.20, 0.10], [0.10, 0.30]]
    return {"north": Economy(sectors=["grain", "tools"], input_coefficients=a_n,
                             labour_coefficients=[[0.5, 0.3]]),
            "south": Economy(sectors=["grain", "tools"], input_coefficients=a_s,
                             labour_coefficients=[[0.4, 0.6]])}


def test_chenery_moses_coefficients_and_labour_content() -> None:
    econs = _two_regions()
    shares = pd.DataFrame(
        [["grain", "north", "north", 0.7], ["grain", "south", "north", 0.3],
         ["grain", "north", "south", 0.2], ["grain", "south", "south", 0.8],
         ["tools", "north", "north", 1.0], ["tools", "north", "south", 0.4],
         ["tools", "south", "south", 0.6]], columns=["commodity", "from_region", "to_region",
                                                      "share"])
    mre = MultiRegionalEconomy.from_chenery_moses(econs, read_trade_shares(shares))
    a = np.asarray(mre.economy.input_coefficients)
    # A = Ĉ A^reg (Chenery–Moses, Miller & Blair ch. 3, from memory): a_{ri,sj} = c^{rs}_i a^s_ij
    assert a[2, 0] == pytest.approx(0.3 * 0.10)   # south grain into north grain
    assert a[1, 3] == pytest.approx(0.4 * 0.30)   # north tools into south tools
    assert a[3, 1] == 0.0                          # north buys no tools from the south
    # the technical coefficients are kept: each column of A sums over origins to A^reg's
    np.testing.assert_allclose(a[:2] + a[2:], np.hstack([[[0.1, 0.3], [0.2, 0.1]],
                                                         [[0.2, 0.1], [0.1, 0.3]]]))
    lc = mre.labour_content()
    total = np.asarray(mre.economy.labour_coefficients)[0] @ np.linalg.inv(np.eye(4) - a)
    np.testing.assert_allclose(lc.sum(axis=0).to_numpy(), total, atol=1e-12)  # closed form


def test_hostile_multiregional_inputs() -> None:
    econs = _two_regions()
    with pytest.raises(InvalidInput, match="trade_shares"):
        MultiRegionalEconomy.from_chenery_moses(econs, np.full((2, 2, 2), 0.4))
    bad = pd.DataFrame([["grain", "west", "north", 1.0]],
                       columns=["commodity", "from_region", "to_region", "share"])
    with pytest.raises(InvalidInput, match="trade_shares.from_region"):
        MultiRegionalEconomy.from_chenery_moses(econs, bad)
    with pytest.raises(InvalidInput, match="regions"):
        MultiRegionalEconomy(regions=["north", "north"], sectors=["grain"],
                             economy=Economy(sectors=["north/grain", "north/x"],
                                             input_coefficients=np.zeros((2, 2))))
    with pytest.raises(InvalidInput, match="regions"):
        MultiRegionalEconomy.from_regions({"no/rth": econs["north"]})
    other = Economy(sectors=["tools", "grain"], input_coefficients=np.zeros((2, 2)),
                    labour_coefficients=[[1.0, 1.0]])
    with pytest.raises(InvalidInput, match=r"economies\.south\.sectors"):
        MultiRegionalEconomy.from_regions({"north": econs["north"], "south": other})
    flows = pd.DataFrame(np.ones((2, 2)), index=pd.MultiIndex.from_tuples(
        [("a", "x"), ("a", "x")]), columns=pd.MultiIndex.from_tuples([("a", "x"), ("a", "y")]))
    with pytest.raises(InvalidInput, match="interregional table"):
        read_interregional(flows)
    long = pd.DataFrame([["a", "x", "a", "x", 1.0], ["a", "x", "a", "x", 2.0]],
                        columns=["from_region", "from_sector", "to_region", "to_sector",
                                 "value"])
    with pytest.raises(InvalidInput, match="once"):
        read_interregional(long, layout="long")
