"""Transactions tables: coefficients from flows, files, aggregation."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import growthplan as gp
from growthplan.demo import DEMO_DIR, demo_economy

# Miller & Blair (2009), ch. 2: flows, final demand and gross output
Z = pd.DataFrame([[150.0, 500.0], [200.0, 100.0]], index=["s1", "s2"], columns=["s1", "s2"])
X = pd.Series({"s1": 1000.0, "s2": 2000.0})


def test_coefficients_from_flows():
    econ = gp.Economy.from_flows(Z, X, labour=pd.Series({"s1": 100.0, "s2": 300.0}))
    np.testing.assert_allclose(econ.input_coefficients, [[0.15, 0.25], [0.20, 0.05]])
    np.testing.assert_allclose(econ.labour_coefficients, [[0.1, 0.15]])


def test_balance_gap_zero_for_textbook_table():
    t = gp.TransactionsTable(Z, X, final_demand=pd.Series({"s1": 350.0, "s2": 1700.0}))
    np.testing.assert_allclose(t.balance_gap(), 0.0)


def test_zero_output_is_a_clear_error():
    with pytest.raises(gp.InvalidInput, match="gross_output.*> 0"):
        gp.Economy.from_flows(Z, pd.Series({"s1": 1000.0, "s2": 0.0}))


def test_text_in_a_cell_names_the_cell():
    bad = Z.astype(object).copy()
    bad.iloc[0, 1] = "n/a"
    with pytest.raises(gp.InvalidInput, match=r"flows\[s1, s2\]"):
        gp.Economy.from_flows(bad, X)


def test_labels_in_another_order():
    z2 = Z.loc[["s2", "s1"], ["s1", "s2"]]
    econ = gp.Economy.from_flows(z2, X[["s2", "s1"]])
    np.testing.assert_allclose(econ.input_coefficients, [[0.15, 0.25], [0.20, 0.05]])


def test_aggregation_sums_flows_and_recomputes():
    z = pd.DataFrame(np.arange(1, 10, dtype=float).reshape(3, 3) * 10,
                     index=list("abc"), columns=list("abc"))
    x = pd.Series({"a": 200.0, "b": 300.0, "c": 400.0})
    t = gp.TransactionsTable(z, x, labour=pd.Series({"a": 1.0, "b": 2.0, "c": 3.0}))
    agg = t.aggregate({"a": "ab", "b": "ab", "c": "c"})
    assert agg.names == ["ab", "c"]
    np.testing.assert_allclose(agg.flows.to_numpy(), [[10 + 20 + 40 + 50, 30 + 60],
                                                      [70 + 80, 90]])
    a = agg.input_coefficients().to_numpy()
    np.testing.assert_allclose(a[:, 0], np.array([120, 150]) / 500)  # not an average
    np.testing.assert_allclose(agg.labour_coefficients().to_numpy(), [[3 / 500, 3 / 400]])
    with pytest.raises(gp.InvalidInput, match="mapping"):
        t.aggregate({"a": "x"})


def test_csv_and_excel_round_trip(tmp_path):
    frame = Z.copy()
    frame["final_demand"] = [350.0, 1700.0]
    frame.loc["gross_output"] = [1000.0, 2000.0, np.nan]
    frame.loc["labour:skilled"] = [50.0, 100.0, np.nan]
    frame.loc["labour:other"] = [50.0, 200.0, np.nan]
    frame.index.name = "sector"
    frame.to_csv(tmp_path / "flows.csv")
    frame.to_excel(tmp_path / "flows.xlsx")
    for path in (tmp_path / "flows.csv", tmp_path / "flows.xlsx"):
        econ = gp.Economy.from_tables(path)
        np.testing.assert_allclose(econ.input_coefficients, [[0.15, 0.25], [0.20, 0.05]])
        assert econ.labour_kinds == ["skilled", "other"]


def test_missing_file_and_missing_row(tmp_path):
    with pytest.raises(gp.InvalidInput, match="existing file"):
        gp.Economy.from_tables(tmp_path / "nope.csv")
    Z.to_csv(tmp_path / "f.csv")
    with pytest.raises(gp.InvalidInput, match="gross_output"):
        gp.Economy.from_tables(tmp_path / "f.csv")


def test_non_utf8_file(tmp_path):
    p = tmp_path / "latin.csv"
    p.write_bytes("sector,caf\xe9\ncaf\xe9,1\ngross_output,2\n".encode("latin-1"))
    with pytest.raises(gp.InvalidInput, match="UTF-8"):
        gp.Economy.from_tables(p)


def test_capital_from_stocks():
    stocks = pd.DataFrame([[500.0, 800.0], [300.0, 600.0]], index=["s1", "s2"],
                          columns=["s1", "s2"])
    cap = {"s1": {"mean_service_life": 20, "initial_capacity": 1000.0},
           "s2": {"mean_service_life": 10, "initial_capacity": 1000.0}}
    econ = gp.Economy.from_flows(Z, X, capital=cap, capital_stocks=stocks)
    np.testing.assert_allclose(econ.capital_coefficients, [[0.5, 0.8], [0.3, 0.6]])


def test_demo_tables_load():
    econ = demo_economy()
    assert econ.n == 10 and (DEMO_DIR / "README.md").exists()
    assert econ.spectral_radius() < 1
    assert econ.capital["energy"].lead_time == 3
    assert econ.capital["energy"].spending_profile == [0.2, 0.4, 0.4]
