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


# -- hostile and unusual table files (regressions) ------------------------------------------

def flows_text(a="s1", b="s2") -> str:
    # Miller & Blair (2009), ch. 2 table, as in Z and X above
    return (f"sector,{a},{b},final_demand\n{a},150,500,350\n{b},200,100,1700\n"
            "gross_output,1000,2000,\nlabour,100,300,\n")


@pytest.mark.parametrize("label", ["NA", "null", "None", "nan", "N/A", "#N/A", "NaN"])
def test_sector_labels_that_look_missing_are_kept(tmp_path, label):
    p = tmp_path / "flows.csv"
    p.write_text(flows_text(a=label))
    econ = gp.Economy.from_tables(p)
    assert econ.names == [label, "s2"]
    np.testing.assert_allclose(econ.input_coefficients, [[0.15, 0.25], [0.20, 0.05]])


@pytest.mark.parametrize("cell", ["NA", "nan", "null", "None"])
def test_a_missing_value_word_in_a_cell_is_not_zero(tmp_path, cell):
    p = tmp_path / "flows.csv"
    p.write_text(flows_text().replace("s1,150", f"s1,{cell}"))
    with pytest.raises(gp.InvalidInput, match=r"flows \(flows\.csv\)\[s1, s1\] must be a number"):
        gp.Economy.from_tables(p)


def test_all_numeric_labels_keep_their_spelling(tmp_path):
    p = tmp_path / "flows.csv"
    p.write_text(flows_text(a="01", b="1e3"))
    stocks = tmp_path / "stocks.csv"  # a label column with numbers only
    stocks.write_text("sector,01,1e3\n01,500,800\n1e3,300,600\n")
    cap = {"01": {"mean_service_life": 20, "initial_capacity": 1000.0},
           "1e3": {"mean_service_life": 10, "initial_capacity": 1000.0}}
    econ = gp.Economy.from_tables(p, capital=pd.DataFrame(cap).T, capital_stocks=stocks)
    assert econ.names == ["01", "1e3"]
    np.testing.assert_allclose(econ.capital_coefficients, [[0.5, 0.8], [0.3, 0.6]])


def test_huge_integer_cell_is_invalid_input(tmp_path):
    p = tmp_path / "flows.csv"
    p.write_text(flows_text().replace("s1,150", "s1," + "9" * 400))
    with pytest.raises(gp.InvalidInput, match="flows"):
        gp.Economy.from_tables(p)


@pytest.mark.parametrize("text, match", [
    (flows_text().replace("sector,s1,s2", "sector,s1,s1"), "column label once"),
    (flows_text() + ",5,5,5\n", "label in the first column"),
    (flows_text().replace("s1,150", 's1,"150'), "readable"),
], ids=["duplicate column", "unlabelled row", "unclosed quote"])
def test_malformed_csv_layout(tmp_path, text, match):
    p = tmp_path / "flows.csv"
    p.write_text(text)
    with pytest.raises(gp.InvalidInput, match=match):
        gp.Economy.from_tables(p)


def _workbook(path, formula=None):
    import openpyxl

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "flows"
    for line in flows_text().splitlines():
        ws.append([float(v) if v.isdigit() else (v or None) for v in line.split(",")])
    if formula:
        ws[formula] = "=100+50"  # written by a script: no saved result
    wb.save(path)


def test_excel_formula_without_saved_result_is_refused(tmp_path):
    _workbook(tmp_path / "ok.xlsx")
    econ = gp.Economy.from_tables(tmp_path / "ok.xlsx")
    np.testing.assert_allclose(econ.input_coefficients, [[0.15, 0.25], [0.20, 0.05]])
    _workbook(tmp_path / "f.xlsx", formula="B2")
    with pytest.raises(gp.InvalidInput, match=r"f.xlsx, sheet 'flows', cell B2"):
        gp.Economy.from_tables(tmp_path / "f.xlsx")


@pytest.mark.parametrize("content", [b"not a workbook", b"PK\x03\x04" + b"\0" * 64, b""],
                         ids=["text", "zip header", "empty"])
def test_corrupt_workbook_names_the_file(tmp_path, content):
    p = tmp_path / "broken.xlsx"
    p.write_bytes(content)
    with pytest.raises(gp.InvalidInput, match="broken.xlsx"):
        gp.Economy.from_tables(p)


def test_folder_as_table_names_the_path(tmp_path):
    (tmp_path / "flows.csv").mkdir()
    with pytest.raises(gp.InvalidInput, match="flows.csv") as err:
        gp.Economy.from_tables(tmp_path / "flows.csv")
    assert "\n" not in str(err.value)


def test_numpy_integers_accepted_where_ints_are(tmp_path):
    cap = pd.DataFrame({"initial_capacity": np.array([1000, 1000], dtype=np.int64),
                        "mean_service_life": np.array([20, 10], dtype=np.int32),
                        "lead_time": np.array([2, 1], dtype=np.int64),
                        "spending_profile": ["0.5;0.5", np.int64(1)]}, index=["s1", "s2"])
    stocks = pd.DataFrame([[500.0, 800.0], [300.0, 600.0]], index=["s1", "s2"],
                          columns=["s1", "s2"])
    econ = gp.Economy.from_flows(Z, X, capital=cap, capital_stocks=stocks)
    assert econ.capital["s1"].lead_time == 2 and econ.capital["s2"].spending_profile == [1.0]
    p = tmp_path / "flows.csv"
    p.write_text(flows_text())
    econ = gp.Economy.from_tables(p, capital=cap, capital_stocks=stocks)
    assert econ.capital["s2"].mean_service_life == 10
