"""Economy model, validation and steady-state figures against outside references."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest
from hypothesis import given
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays

import growthplan as gp

# Miller & Blair, Input-Output Analysis, 2nd ed. (2009), ch. 2, two-sector example.
MB_A = [[0.15, 0.25], [0.20, 0.05]]
MB_L = [[1.254125, 0.330033], [0.264026, 1.122112]]


@pytest.fixture
def mb() -> gp.Economy:
    return gp.Economy(sectors=["s1", "s2"], input_coefficients=MB_A)


class TestMillerBlair:
    """Miller & Blair (2009), ch. 2; tolerance 1e-6 (the book prints six decimals)."""

    def test_leontief_inverse(self, mb):
        np.testing.assert_allclose(mb.leontief_inverse().to_numpy(), MB_L, atol=1e-6)

    def test_determinant(self, mb):
        """det(I − A) = 0.7575 is the last leading principal minor (Hawkins–Simon)."""
        minors = mb.hawkins_simon().to_numpy()
        np.testing.assert_allclose(minors, [0.85, 0.7575], atol=1e-12)

    def test_output_multipliers(self, mb):  # from memory
        np.testing.assert_allclose(mb.output_multipliers(), [1.518152, 1.452145], atol=1e-6)

    def test_new_final_demand(self, mb):  # from memory: f = (600, 1500)
        np.testing.assert_allclose(mb.required_output([600, 1500]), [1247.5248, 1841.5842],
                                   atol=1e-4)

    def test_price_identity(self, mb):
        # value-added coefficients (0.65, 0.70) give unit prices: an accounting identity
        v = np.array([0.65, 0.70])
        np.testing.assert_allclose(v @ mb.leontief_inverse().to_numpy(), [1.0, 1.0])

    def test_labour_content(self):
        econ = gp.Economy(sectors=["s1", "s2"], input_coefficients=MB_A,
                          labour_coefficients=[[0.3, 0.2]])
        expect = np.array([0.3, 0.2]) @ np.array(MB_L)
        np.testing.assert_allclose(econ.labour_content().to_numpy()[0], expect, atol=1e-6)


class TestHawkinsSimon:
    """Hawkins & Simon, Econometrica (1949); Perron–Frobenius."""

    def test_minors(self, mb):
        np.testing.assert_allclose(mb.hawkins_simon(), [0.85, 0.7575])

    def test_spectral_radius(self, mb):
        assert mb.spectral_radius() == pytest.approx(0.1 + np.sqrt(0.0525), abs=1e-12)

    def test_unproductive_is_refused_with_radius_and_sectors(self):
        with pytest.raises(gp.UnproductiveEconomy) as err:
            gp.Economy(sectors=["a", "b"], input_coefficients=[[0.6, 0.5], [0.5, 0.6]])
        assert err.value.spectral_radius == pytest.approx(1.1)
        assert "1.100000" in str(err.value) and "'a'" in str(err.value)
        assert isinstance(err.value, ValueError)

    def test_unproductive_without_full_column(self):
        # columns sum to 0.9 < 1 but... a cycle cannot be unproductive then; use rows
        a = np.array([[0.0, 0.95], [1.2, 0.0]])  # rho = sqrt(1.14) > 1, column 0 sums 1.2
        with pytest.raises(gp.UnproductiveEconomy, match="spectral radius"):
            gp.Economy(sectors=["a", "b"], input_coefficients=a)


BAD_INPUTS = [
    ("input_coefficients", dict(input_coefficients=[[0.1, 0.2, 0.0], [0.0, 0.1, 0.0]])),
    ("input_coefficients", dict(input_coefficients=[[0.1, np.nan], [0.0, 0.1]])),
    ("input_coefficients", dict(input_coefficients=[[0.1, np.inf], [0.0, 0.1]])),
    ("input_coefficients", dict(input_coefficients=[[0.1, -0.2], [0.0, 0.1]])),
    ("input_coefficients", dict(input_coefficients=[["x", 0.2], [0.0, 0.1]])),
    ("input_coefficients", dict(input_coefficients=pd.DataFrame(
        np.zeros((2, 2)), index=["a", "zz"], columns=["a", "b"]))),
    ("capital_coefficients", dict(capital_coefficients=[[0.1, -1.0], [0.0, 0.1]])),
    ("labour_coefficients", dict(labour_coefficients=[[0.1, 0.2, 0.3]])),
    ("capital", dict(capital={"a": dict(initial_capacity=1, mean_service_life=5)})),
    ("capital.b.mean_service_life", dict(capital={
        "a": dict(initial_capacity=1, mean_service_life=5),
        "b": dict(initial_capacity=1, mean_service_life=0)})),
    ("capital.b.lead_time", dict(capital={
        "a": dict(initial_capacity=1, mean_service_life=5),
        "b": dict(initial_capacity=1, mean_service_life=5, lead_time=1.5)})),
    ("capital.b.lead_time", dict(capital={
        "a": dict(initial_capacity=1, mean_service_life=5),
        "b": dict(initial_capacity=1, mean_service_life=5, lead_time=-1)})),
    ("capital.b.spending_profile", dict(capital={
        "a": dict(initial_capacity=1, mean_service_life=5),
        "b": dict(initial_capacity=1, mean_service_life=5, lead_time=2,
                  spending_profile=[0.5, 0.4])})),
    ("capital.b.max_utilisation", dict(capital={
        "a": dict(initial_capacity=1, mean_service_life=5),
        "b": dict(initial_capacity=1, mean_service_life=5, max_utilisation=1.2)})),
    ("capital.b.max_utilisation", dict(capital={
        "a": dict(initial_capacity=1, mean_service_life=5),
        "b": dict(initial_capacity=1, mean_service_life=5, max_utilisation=0)})),
    ("capital.b.retirement", dict(capital={
        "a": dict(initial_capacity=1, mean_service_life=5),
        "b": dict(initial_capacity=1, mean_service_life=5, retirement="exponentialish")})),
    ("consumption_basket", dict(consumption_basket={"a": 1.0, "nowhere": 2.0})),
]


@pytest.mark.parametrize(("field", "bad"), BAD_INPUTS)
def test_bad_input_names_the_field(field, bad):
    kwargs = dict(sectors=["a", "b"], input_coefficients=[[0.1, 0.2], [0.0, 0.1]])
    kwargs.update(bad)
    with pytest.raises(gp.InvalidInput) as err:
        gp.Economy(**kwargs)
    assert field in str(err.value)
    assert "must" in str(err.value) and "Got" in str(err.value)


@pytest.mark.parametrize(("bad", "says"), [
    (dict(input_coefficients=[[0.1, 0.2], [-0.1, 0.1]]),
     "input_coefficients[food, farm] must be >= 0. Got -0.1."),
    (dict(capital_coefficients=[[0.1, -2.0], [0.0, 0.1]]),
     "capital_coefficients[farm, food] must be >= 0. Got -2.0."),
    (dict(labour_coefficients=pd.DataFrame([[1.0, 2.0], [3.0, -1.0]], index=["skilled", "other"],
                                           columns=["farm", "food"])),
     "labour_coefficients[other, food] must be >= 0. Got -1.0."),
    (dict(wage_basket=[1.0, -1.0], labour_coefficients=[[1.0, 1.0]]),
     "wage_basket[food] must be >= 0. Got -1.0."),
])
def test_a_negative_entry_is_named_by_its_labels(bad, says):
    kwargs = dict(sectors=["farm", "food"], input_coefficients=[[0.1, 0.2], [0.1, 0.1]])
    kwargs.update(bad)
    with pytest.raises(gp.InvalidInput) as err:
        gp.Economy(**kwargs)
    assert str(err.value) == says


def test_a_negative_capital_stock_is_named_in_the_stocks_table():
    flows = pd.DataFrame([[10.0, 20.0], [5.0, 10.0]], index=["farm", "food"],
                         columns=["farm", "food"])
    stocks = pd.DataFrame([[50.0, 40.0], [-3.0, 80.0]], index=["farm", "food"],
                          columns=["farm", "food"])
    capital = {n: dict(initial_capacity=120.0, mean_service_life=15) for n in ("farm", "food")}
    with pytest.raises(gp.InvalidInput) as err:
        gp.Economy.from_flows(flows, pd.Series({"farm": 100.0, "food": 100.0}),
                              capital=capital, capital_stocks=stocks)
    # the user wrote the stock, not the coefficient derived from it
    assert str(err.value) == ("capital_stocks[food, farm] must be a finite capital stock >= 0. "
                              "Got -3.0.")


@pytest.mark.parametrize("sectors", [["a", "a"], ["a", " "], [], "ab", [1, 2]])
def test_bad_sector_names(sectors):
    with pytest.raises(gp.InvalidInput, match="sectors"):
        gp.Economy(sectors=sectors, input_coefficients=np.zeros((2, 2)))


def test_capital_spec_message_template():
    with pytest.raises(gp.InvalidInput) as err:
        gp.CapitalSpec(initial_capacity=1, mean_service_life=-5)
    assert str(err.value) == "mean_service_life must be a number of years >= 1. Got -5."


def test_labels_are_aligned_not_positional():
    a = pd.DataFrame([[0.05, 0.20], [0.25, 0.15]], index=["mill", "farm"],
                     columns=["mill", "farm"])
    econ = gp.Economy(sectors=["farm", "mill"], input_coefficients=a,
                      labour_coefficients=pd.Series({"mill": 0.2, "farm": 0.3}),
                      consumption_basket=pd.Series({"mill": 1.0, "farm": 2.0}))
    np.testing.assert_allclose(econ.input_coefficients, [[0.15, 0.25], [0.20, 0.05]])
    np.testing.assert_allclose(econ.labour_coefficients, [[0.3, 0.2]])
    np.testing.assert_allclose(econ.consumption_basket, [2.0, 1.0])


def test_inputs_are_not_mutated_and_arrays_are_read_only():
    a = np.array([[0.1, 0.2], [0.0, 0.1]])
    before = a.copy()
    econ = gp.Economy(sectors=["a", "b"], input_coefficients=a)
    a[0, 0] = 0.9
    np.testing.assert_array_equal(econ.input_coefficients, before)
    with pytest.raises(ValueError):
        econ.input_coefficients[0, 0] = 0.5


def test_json_round_trip_and_schema():
    econ = gp.Economy(sectors=["a", "b"], input_coefficients=MB_A,
                      capital_coefficients=[[0.5, 0.8], [0.3, 0.6]],
                      labour_coefficients=[[0.3, 0.2], [0.1, 0.1]],
                      labour_kinds=["skilled", "other"],
                      capital={"a": gp.CapitalSpec(initial_capacity=10, mean_service_life=20),
                               "b": gp.CapitalSpec(initial_capacity=5, mean_service_life=8,
                                                   retirement="weibull", shape=1.5,
                                                   lead_time=2)})
    again = gp.Economy.from_json(econ.to_json())
    assert again == econ
    assert again.capital["b"].spending_profile == [0.5, 0.5]
    schema = gp.Economy.json_schema()
    assert {"sectors", "input_coefficients", "capital"} <= set(schema["properties"])
    json.dumps(schema)


def test_bad_json_is_a_growthplan_error():
    with pytest.raises(gp.InvalidInput):
        gp.Economy.from_json('{"sectors": ["a"], "input_coefficients": "x"}')


@st.composite
def productive(draw, max_n=6):
    n = draw(st.integers(1, max_n))
    a = draw(arrays(float, (n, n), elements=st.floats(0, 1)))
    scale = draw(st.floats(0.05, 0.95))
    colmax = a.sum(axis=0).max()
    return a * (scale / colmax) if colmax > 0 else a


@given(productive())
def test_leontief_inverse_property(a):
    """For productive A: (I − A) L = I and L ≥ 0 (Perron–Frobenius)."""
    econ = gp.Economy(sectors=[f"s{i}" for i in range(len(a))], input_coefficients=a)
    inv = econ.leontief_inverse().to_numpy()
    np.testing.assert_allclose((np.eye(len(a)) - a) @ inv, np.eye(len(a)), atol=1e-9)
    assert (inv >= -1e-12).all()


class TestTinyCoefficients:
    """Regression: an input of 1e-30 beside inputs of 0.2 is far below the solver's
    tolerances (common practice: drop entries negligible next to their column)."""

    def test_tiny_entries_are_zeroed_with_a_warning_naming_cells(self):
        a = np.array([[0.2, 1e-30], [0.2, 0.2]])
        b = np.array([[1.0, 2.0], [1e-20, 0.0]])
        lab = np.array([[0.5, 0.3], [1e-16, 0.0]])
        with pytest.warns(gp.errors.TinyCoefficientsWarning) as rec:
            e = gp.Economy(sectors=["farm", "mill"], input_coefficients=a,
                           capital_coefficients=b, labour_coefficients=lab,
                           labour_kinds=["skilled", "unskilled"])
        text = " ".join(str(w.message) for w in rec)
        assert "[farm, mill] = 1e-30" in text and "[mill, farm] = 1e-20" in text
        assert "[unskilled, farm] = 1e-16" in text
        assert e.input_coefficients[0, 1] == 0.0 and e.capital_coefficients[1, 0] == 0.0
        assert e.labour_coefficients[1, 0] == 0.0
        assert a[0, 1] == 1e-30 and b[1, 0] == 1e-20  # the caller's arrays are untouched

    def test_small_but_not_negligible_entries_are_kept(self):
        import warnings

        with warnings.catch_warnings():
            warnings.simplefilter("error")
            e = gp.Economy(sectors=["a", "b"], input_coefficients=[[0.2, 1e-9], [0.2, 0.2]])
        assert e.input_coefficients[0, 1] == 1e-9

    def test_at_most_ten_cells_are_named(self):
        n = 15
        a = np.full((n, n), 1e-20)
        a[0] = 0.5
        with pytest.warns(gp.errors.TinyCoefficientsWarning, match="and 200 more"):
            gp.Economy(sectors=[f"s{i}" for i in range(n)], input_coefficients=a)
