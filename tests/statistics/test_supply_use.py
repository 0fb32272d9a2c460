"""Supply and use tables to symmetric tables, imports, capital coefficients, a plan."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from conftest import assert_optimal
from hypothesis import given, settings
from hypothesis import strategies as st

import growthplan as gp
from growthplan.statistics import (
    MODELS,
    SupplyUseTable,
    capital_coefficients_from_ratios,
    investment_matrix,
)

# A small invented economy: mills also make some food, offices some metal work.
P = ["food", "metal", "services"]
I = ["farms", "mills", "offices"]
V = pd.DataFrame([[200.0, 0, 0], [30, 270, 0], [0, 20, 180]], index=I, columns=P)
U = pd.DataFrame([[40.0, 2, 5], [10, 60, 15], [20, 30, 20]], index=P, columns=I)
F = pd.DataFrame({"households": [150.0, 120, 90], "exports": [33.0, 85, 20]}, index=P)


def sut(**kw) -> SupplyUseTable:
    return SupplyUseTable(U, make=V, final_demand=F, **kw)


# -- Miller & Blair (2009), ch. 5: the formulas, on the worked example above -------------


def test_miller_blair_coefficient_matrices():
    t = sut()
    v, u = V.to_numpy(), U.to_numpy()
    g, q = v.sum(axis=1), v.sum(axis=0)  # g = V i, q = V' i (M&B eqs. 5.1-5.2)
    np.testing.assert_allclose(t.industry_output, g)
    np.testing.assert_allclose(t.product_output, q)
    np.testing.assert_allclose(t.input_coefficients(), u @ np.diag(1 / g))  # B = U ĝ⁻¹
    np.testing.assert_allclose(t.market_shares(), v @ np.diag(1 / q))  # D = V q̂⁻¹
    np.testing.assert_allclose(t.product_mix(), v.T @ np.diag(1 / g))  # C = V' ĝ⁻¹


def test_miller_blair_total_requirements():
    # Miller & Blair (2009), ch. 5: industry technology, product × product (I − BD)⁻¹;
    # industry × industry (I − DB)⁻¹; product technology (I − BC⁻¹)⁻¹
    t = sut()
    v, u = V.to_numpy(), U.to_numpy()
    g, q = v.sum(axis=1), v.sum(axis=0)
    b, d, c = u / g, v / q, v.T / g
    eye = np.eye(3)
    np.testing.assert_allclose(t.symmetric("industry_technology").total_requirements(),
                               np.linalg.inv(eye - b @ d), rtol=1e-12)
    np.testing.assert_allclose(t.symmetric("fixed_product_sales").total_requirements(),
                               np.linalg.inv(eye - d @ b), rtol=1e-12)
    # the product technology table of this example has a negative cell (mills use little
    # food); its coefficients are computed before any remedy
    a_pt = b @ np.linalg.inv(c)
    assert (a_pt < 0).sum() == 1
    cells = t.negative_cells("product_technology")
    np.testing.assert_allclose(cells["coefficient"], a_pt[a_pt < 0])
    # without that secondary output the model is usable and matches the formula
    v2 = V.copy()
    v2.loc["mills", "food"] = 0.0
    f2 = F.copy()
    f2.loc["food", "exports"] -= 30.0
    t2 = SupplyUseTable(U, make=v2, final_demand=f2)
    g2, c2 = v2.to_numpy().sum(axis=1), v2.to_numpy().T / v2.to_numpy().sum(axis=1)
    np.testing.assert_allclose(t2.symmetric("product_technology").total_requirements(),
                               np.linalg.inv(eye - (u / g2) @ np.linalg.inv(c2)), rtol=1e-10)


def test_four_models_agree_when_make_matrix_is_diagonal():
    # Eurostat (2008), ch. 11: with no secondary output every model gives back the use table
    v = pd.DataFrame(np.diag([200.0, 300.0, 200.0]), index=I, columns=P)
    f = pd.DataFrame({"final": [200.0 - 47, 300 - 85, 200 - 70]}, index=P)
    t = SupplyUseTable(U, make=v, final_demand=f)
    for model in MODELS:
        s = t.symmetric(model)
        np.testing.assert_allclose(s.flows.to_numpy(), U.to_numpy(), atol=1e-12)
        np.testing.assert_allclose(s.final_demand.to_numpy(), f.to_numpy(), atol=1e-12)
        np.testing.assert_allclose(s.value_added.to_numpy(), t.value_added.to_numpy(),
                                   atol=1e-12)


def test_product_technology_reproduces_product_output_and_intermediate_use():
    # Eurostat (2008), ch. 11 (by construction of model A): q and U i are kept
    s = sut().symmetric("product_technology", negatives="zero")
    raw = sut()._raw("product_technology")[0]
    np.testing.assert_allclose(raw.sum(axis=1), U.sum(axis=1), rtol=1e-12)
    np.testing.assert_allclose(s.gross_output, V.sum(axis=0))
    # after the remedy, to the RAS tolerance
    np.testing.assert_allclose(s.flows.sum(axis=1), U.sum(axis=1), rtol=1e-10)
    np.testing.assert_allclose(s.flows.sum(axis=1) + s.final_demand.sum(axis=1),
                               V.sum(axis=0), rtol=1e-10)
    cost = s.flows.sum(axis=0) + s.value_added + s.imported_inputs
    np.testing.assert_allclose(cost, s.gross_output, rtol=1e-10)


def test_industry_technology_conserves_industry_inputs():
    # Eurostat (2008), ch. 11, model B: each industry's inputs are shared out over its
    # products in proportion to their output, so nothing is lost or added
    t = sut()
    tr = t.transformation("industry_technology").to_numpy()
    np.testing.assert_allclose(tr.sum(axis=1), 1.0, rtol=1e-14)
    s = t.symmetric("industry_technology")
    pieces = sum(np.outer(U.to_numpy()[:, j], tr[j]) for j in range(3))
    np.testing.assert_allclose(s.flows.to_numpy(), pieces, rtol=1e-12)
    np.testing.assert_allclose(s.flows.to_numpy().sum(), U.to_numpy().sum(), rtol=1e-14)
    np.testing.assert_allclose(s.value_added.sum(), t.value_added.sum(), rtol=1e-14)
    np.testing.assert_allclose(s.flows.sum(axis=0) + s.value_added, V.sum(axis=0),
                               rtol=1e-12)


def test_industry_tables_balance_by_industry():
    # Eurostat (2008), ch. 11, models C and D: rows and columns balance at industry output
    for model in ("fixed_industry_sales", "fixed_product_sales"):
        s = sut().symmetric(model, negatives="zero")
        g = V.sum(axis=1)
        np.testing.assert_allclose(s.flows.sum(axis=1) + s.final_demand.sum(axis=1), g,
                                   rtol=1e-12)
        np.testing.assert_allclose(s.flows.sum(axis=0) + s.value_added, g, rtol=1e-12)


@settings(max_examples=15)
@given(seed=st.integers(0, 10_000), n=st.integers(2, 5))
def test_model_identities_on_random_tables(seed, n):
    # Eurostat (2008), ch. 11: product tables balance at product output, industry tables
    # at industry output; models B and D never give negative flows
    rng = np.random.default_rng(seed)
    names_p, names_i = [f"p{k}" for k in range(n)], [f"i{k}" for k in range(n)]
    v = np.diag(rng.uniform(50, 100, n)) + rng.uniform(0, 5, (n, n)) * (
        rng.uniform(size=(n, n)) < 0.5)
    g = v.sum(axis=1)
    u = rng.uniform(0, 1, (n, n)) * g * rng.uniform(0.2, 0.6) / n
    f = v.sum(axis=0) - u.sum(axis=1)
    t = SupplyUseTable(pd.DataFrame(u, index=names_p, columns=names_i),
                       make=pd.DataFrame(v, index=names_i, columns=names_p),
                       final_demand=pd.Series(f, index=names_p))
    for model in MODELS:
        s = t.symmetric(model, negatives="zero")
        x = s.gross_output.to_numpy()
        np.testing.assert_allclose(x, v.sum(axis=0) if model in MODELS[:2] else g)
        np.testing.assert_allclose(s.flows.sum(axis=1) + s.final_demand.sum(axis=1), x,
                                   rtol=1e-9)
        np.testing.assert_allclose(s.flows.sum(axis=0) + s.value_added, x, rtol=1e-9)
        if model in ("industry_technology", "fixed_product_sales"):
            assert s.negatives.empty


# -- negative flows: reported, remedied only on request --------------------------------


def test_negative_flows_are_reported_not_hidden():
    t = sut()
    cells = t.negative_cells("product_technology")
    assert list(cells[["row", "column"]].itertuples(index=False, name=None)) == [
        ("food", "metal")]
    with pytest.raises(gp.InvalidInput, match=r"symmetric table \[food, metal\] must be >= "
                       r"0: the product_technology model gives 1 negative flow"):
        t.symmetric("product_technology")
    assert t.negative_cells("industry_technology").empty  # model B never gives negatives
    assert t.negative_cells("fixed_product_sales").empty


@pytest.mark.parametrize("remedy", ["zero", "industry_technology"])
def test_remedies_keep_the_model_totals(remedy):
    # common practice: after the remedy, flows are rebalanced (RAS) to the model's totals
    t = sut()
    raw = t._raw("product_technology")[0]
    s = t.symmetric("product_technology", negatives=remedy)
    assert s.remedy == remedy and len(s.negatives) == 1
    assert (s.flows.to_numpy() >= 0).all()
    np.testing.assert_allclose(s.flows.sum(axis=1), raw.sum(axis=1), rtol=1e-10)
    np.testing.assert_allclose(s.flows.sum(axis=0), raw.sum(axis=0), rtol=1e-10)
    if remedy == "zero":
        assert s.flows.loc["food", "metal"] == 0.0
    else:
        assert s.flows.loc["food", "metal"] > 0.0
    s.to_table()  # a valid transactions table


def test_remedy_choices_are_checked():
    with pytest.raises(gp.InvalidInput, match=r"negatives must be 'raise' or 'zero' for an "
                       r"industry × industry table"):
        sut().symmetric("fixed_industry_sales", negatives="industry_technology")
    with pytest.raises(gp.InvalidInput, match=r"negatives must be 'raise', 'zero' or "):
        sut().symmetric("product_technology", negatives="drop")
    with pytest.raises(gp.InvalidInput, match=r"model must be one of"):
        sut().symmetric("commodity")


def test_inventory_changes_may_be_negative():
    # common practice: a fall in inventories is a negative final use, not an error
    f = F.assign(inventories=[-5.0, 0.0, 0.0])
    f.loc["food", "households"] += 5.0
    for model in MODELS:
        s = SupplyUseTable(U, make=V, final_demand=f).symmetric(model, negatives="zero")
        assert (s.final_demand["inventories"] < 0).any()


# -- imports ----------------------------------------------------------------------------


def _with_imports():
    m = pd.Series({"food": 20.0, "metal": 40.0, "services": 0.0})
    f = F.copy()
    f["households"] += m  # imports are used at home
    return m, f


def test_import_proportionality():
    # Miller & Blair (2009), ch. 5 (common practice): each user of a product takes the
    # same import share; exports are domestic
    m, f = _with_imports()
    t = SupplyUseTable(U, make=V, final_demand=f, imports=m)
    use, fd, imported = t.domestic()
    home = U.sum(axis=1) + f["households"]
    share = m / home
    np.testing.assert_allclose(use, U.mul(1 - share, axis=0), rtol=1e-12)
    np.testing.assert_allclose(fd["exports"], F["exports"])
    np.testing.assert_allclose(imported.sum() + (f - fd).to_numpy().sum(), m.sum(), rtol=1e-12)
    np.testing.assert_allclose(use.sum(axis=1) + fd.sum(axis=1), V.sum(axis=0), rtol=1e-12)
    s = t.symmetric("industry_technology")
    np.testing.assert_allclose(s.imported_inputs.sum(), imported.sum(), rtol=1e-12)
    s.to_economy()  # imported inputs sit beside value added: the table balances
    coef = s.input_coefficients().to_numpy()
    v, g, q = V.to_numpy(), V.to_numpy().sum(axis=1), V.to_numpy().sum(axis=0)
    np.testing.assert_allclose(coef, (use.to_numpy() / g) @ (v / q), rtol=1e-12)


def test_imports_use_table_is_subtracted():
    m, f = _with_imports()
    um = pd.DataFrame(0.0, index=P, columns=I)
    um.loc["metal", "mills"] = 25.0
    t = SupplyUseTable(U, make=V, final_demand=f, imports=m, imports_use=um)
    use, fd, imported = t.domestic()
    np.testing.assert_allclose(use, U - um)
    np.testing.assert_allclose(imported, [0.0, 25.0, 0.0])
    np.testing.assert_allclose(f["households"] - fd["households"], [20.0, 15.0, 0.0])
    np.testing.assert_allclose(use.sum(axis=1) + fd.sum(axis=1), V.sum(axis=0), rtol=1e-12)


# -- capital coefficients ------------------------------------------------------------------


def test_capital_coefficients_column_sums_are_the_ratios():
    # by construction (the documented assumption): B's column sums are the ratios
    kappa = {"food": 1.5, "metal": 3.0, "services": 2.0}
    comp = pd.DataFrame({"food": [0.0, 6.0, 4.0], "metal": [0.0, 9.0, 1.0],
                         "services": [0.0, 1.0, 1.0]}, index=P)
    b = capital_coefficients_from_ratios(kappa, comp)
    np.testing.assert_allclose(b.sum(axis=0), list(kappa.values()), rtol=1e-14)
    np.testing.assert_allclose(b.loc["metal", "food"], 0.6 * 1.5)
    one = capital_coefficients_from_ratios({"goods": 2.5}, pd.Series({"goods": 7.0}))
    assert one.iloc[0, 0] == 2.5  # one sector: b is the capital–output ratio (closed form)
    inv = investment_matrix({"food": 10.0, "metal": 20.0, "services": 5.0}, comp)
    np.testing.assert_allclose(inv.sum(axis=0), [10.0, 20.0, 5.0])


def test_capital_stock_by_industry_to_products():
    # Miller & Blair (2009), ch. 5: a row by industry turns like value added, w' ĝ⁻¹ V
    s = sut().symmetric("industry_technology")
    stock = pd.Series({"farms": 400.0, "mills": 900.0, "offices": 300.0})
    by_product = s.by_sector(stock)
    v = V.to_numpy()
    np.testing.assert_allclose(by_product, stock.to_numpy() @ (v / v.sum(axis=1)[:, None]))
    np.testing.assert_allclose(by_product.sum(), stock.sum())
    d = sut().symmetric("fixed_product_sales")
    np.testing.assert_allclose(d.by_sector(stock.to_dict()), stock)


def test_capital_composition_errors():
    with pytest.raises(gp.InvalidInput, match=r"composition\[metal\] must hold some "
                       "investment"):
        capital_coefficients_from_ratios({"food": 1.0, "metal": 2.0},
                                         pd.DataFrame({"food": [1.0], "metal": [0.0]}))
    with pytest.raises(gp.InvalidInput, match=r"capital_output_ratio\[metal\] must be a "
                       "finite number >= 0"):
        capital_coefficients_from_ratios({"food": 1.0, "metal": -2.0}, pd.Series({"a": 1.0}))


# -- malformed tables: one clear message each -----------------------------------------------


@pytest.mark.parametrize(("change", "message"), [
    (lambda k: k.update(supply=V.T), r"make must be given, or supply, but not both"),
    (lambda k: k.update(make=V.rename(columns={"metal": "steel"})),
     r"use must have the products of the make matrix as labels \(missing \['steel'\]; "
     r"unknown \['metal'\]\)"),
    (lambda k: k.update(make=V.where(~((V.index == "mills")[:, None] & (V.columns == "food")),
                                     -30.0)),
     r"make\[mills, food\] must be >= 0 \(no negative supply\)"),
    (lambda k: k.update(final_demand=F.assign(households=F["households"] + [0, 0, 5])),
     r"use\[services\] must balance supply.*Got 'uses 185 against supply 180'"),
    (lambda k: k.update(value_added=pd.Series({"farms": 120.0, "mills": 208.0,
                                               "offices": 160.0})),
     r"value_added\[farms\] must make inputs plus value added of farms equal its output"),
    (lambda k: k.update(use=U.astype(object).where(U != 60, "x")),
     r"use\[metal, mills\] must be a number"),
    (lambda k: k.update(imports=pd.Series({"food": -1.0, "metal": 0.0, "services": 0.0})),
     r"imports\[food\] must be >= 0"),
])
def test_malformed_tables(change, message):
    kwargs = {"use": U, "make": V, "final_demand": F}
    change(kwargs)
    with pytest.raises(gp.InvalidInput, match=message):
        SupplyUseTable(**kwargs)


def test_product_technology_needs_a_square_make_matrix():
    v = V.copy()
    v["tools"] = [0.0, 10.0, 0.0]
    u = pd.concat([U, pd.DataFrame([[0.0, 1, 1]], index=["tools"], columns=I)])
    f = pd.concat([F, pd.DataFrame({"households": [8.0], "exports": [0.0]}, index=["tools"])])
    t = SupplyUseTable(u, make=v, final_demand=f)
    with pytest.raises(gp.InvalidInput, match=r"model must be 'industry_technology' or "
                       r"'fixed_product_sales' when products and industries differ"):
        t.symmetric("product_technology")
    assert t.symmetric("industry_technology").names == P + ["tools"]


def test_product_technology_needs_an_invertible_make_matrix():
    v = pd.DataFrame([[100.0, 100.0], [50.0, 50.0]], index=["a", "b"], columns=["x", "y"])
    u = pd.DataFrame([[10.0, 5.0], [10.0, 5.0]], index=["x", "y"], columns=["a", "b"])
    t = SupplyUseTable(u, make=v, final_demand=pd.Series({"x": 135.0, "y": 135.0}))
    with pytest.raises(gp.InvalidInput, match=r"make must be invertible for the "
                       r"product_technology model"):
        t.symmetric("product_technology")


def test_imports_beyond_home_use():
    m = pd.Series({"food": 500.0, "metal": 0.0, "services": 0.0})
    f = F.copy()
    f["exports"] += m  # re-exports only: the imports have no use at home
    t = SupplyUseTable(U, make=V, final_demand=f, imports=m)
    with pytest.raises(gp.InvalidInput, match=r"imports\[food\] must be at most the use of "
                       r"the product at home"):
        t.domestic()
    um = pd.DataFrame(0.0, index=P, columns=I)
    um.loc["food", "farms"] = 600.0
    with pytest.raises(gp.InvalidInput, match=r"imports_use\[food\] must use at most the "
                       r"imports of food"):
        SupplyUseTable(U, make=V, final_demand=f, imports=m, imports_use=um)


# -- end to end -------------------------------------------------------------------------


def test_supply_and_use_to_an_optimal_plan():
    labour = pd.Series({"farms": 60.0, "mills": 90.0, "offices": 120.0})
    s = sut(labour=labour).symmetric("industry_technology")
    # model B shares each industry's labour over its products (T's rows sum to 1)
    np.testing.assert_allclose(s.labour.to_numpy().sum(), labour.sum(), rtol=1e-14)
    b = capital_coefficients_from_ratios(
        {"food": 1.5, "metal": 3.0, "services": 2.0},
        pd.Series({"food": 0.0, "metal": 0.7, "services": 0.3}), products=s.names)
    econ = s.to_economy(capital={n: {"mean_service_life": 20.0} for n in s.names},
                        capital_coefficients=b)
    assert econ.names == P
    np.testing.assert_allclose(econ.input_coefficients, s.input_coefficients(), rtol=1e-12)
    np.testing.assert_allclose(econ.capital_coefficients, b, rtol=1e-12)
    plan = gp.Plan(economy=econ, years=range(2030, 2036),
                   labour=gp.LabourSupply(start=float(labour.sum()), growth=0.01),
                   objective=gp.objectives.TerminalCapacity(proportions={n: 1.0
                                                                         for n in P}))
    assert_optimal(plan.solve())


# -- Eurostat (2008), ch. 11: the axioms the models are judged by ----------------------------


def _coefficients(t: SupplyUseTable, model: str) -> np.ndarray:
    """The model's coefficients before any remedy of negative flows."""
    return t._raw(model)[0].div(t.product_output, axis=1).to_numpy()


def test_scale_invariance_holds_for_product_technology_only():
    # Eurostat (2008), ch. 11 (the axioms of Kop Jansen & ten Raa, from memory): doubling an
    # industry (its make row and use column) leaves product-technology coefficients unchanged;
    # industry-technology coefficients change with the market shares
    k = pd.Series([1.0, 2.0, 1.0], index=I)
    # the households take up the extra output less the extra intermediate use
    extra = V.mul(k, axis=0).sum(axis=0) - V.sum(axis=0) - ((U * k).sum(axis=1) - U.sum(axis=1))
    scaled = SupplyUseTable(U * k, make=V.mul(k, axis=0),
                            final_demand=F.assign(households=F["households"] + extra))
    for model, holds in (("product_technology", True), ("industry_technology", False)):
        assert np.allclose(_coefficients(scaled, model), _coefficients(sut(), model),
                           rtol=1e-9, atol=1e-12) is holds


def test_price_invariance_holds_for_product_technology_only():
    # Eurostat (2008), ch. 11 (Kop Jansen & ten Raa's price invariance, from memory): valuing
    # products at other prices p turns product-technology coefficients into p̂ A p̂⁻¹; the
    # industry-technology model does not have this property
    p = pd.Series([2.0, 0.5, 1.0], index=P)
    repriced = SupplyUseTable(U.mul(p, axis=0), make=V.mul(p, axis=1),
                              final_demand=F.mul(p, axis=0))
    for model, holds in (("product_technology", True), ("industry_technology", False)):
        expected = np.diag(p) @ _coefficients(sut(), model) @ np.diag(1 / p)
        assert np.allclose(_coefficients(repriced, model), expected, rtol=1e-9) is holds


# -- aggregation ------------------------------------------------------------------------------


def test_aggregation_keeps_totals_and_sums_tables():
    # common practice: aggregated tables are sums over merged codes, coefficients recomputed
    t = sut(imports=pd.Series({"food": 0.0, "metal": 0.0, "services": 0.0}),
            labour=pd.Series({"farms": 10.0, "mills": 20.0, "offices": 30.0}))
    agg = t.aggregate(products={"food": "goods", "metal": "goods", "services": "services"},
                      industries={"farms": "making", "mills": "making", "offices": "offices"})
    assert agg.products == ["goods", "services"] and agg.industries == ["making", "offices"]
    for a, b in ((t.make, agg.make), (t.use, agg.use), (t.final_demand, agg.final_demand),
                 (t.labour, agg.labour)):
        assert a.to_numpy().sum() == pytest.approx(b.to_numpy().sum(), rel=1e-14)
    np.testing.assert_allclose(agg.use.loc["goods", "making"],
                               U.loc[["food", "metal"], ["farms", "mills"]].to_numpy().sum())
    np.testing.assert_allclose(agg.value_added.sum(), t.value_added.sum())
    # aggregation before or after the industry-technology transformation: the same output
    np.testing.assert_allclose(agg.product_output.sum(), t.product_output.sum())
    with pytest.raises(gp.InvalidInput, match=r"products must map every code once \(missing "
                       r"\['services'\]; unknown \['steel'\]\)"):
        t.aggregate(products={"food": "goods", "metal": "goods", "steel": "x"})


# -- labour by kind -----------------------------------------------------------------------------


def test_employment_head_count_and_labour_input():
    from growthplan.statistics import employment_table, labour_coefficients

    e = pd.DataFrame({"skilled": [10.0, 20.0, 30.0], "unskilled": [40.0, 5.0, 6.0]}, index=I)
    heads = employment_table(e, unit="thousand persons", person_years_per_person=0.9,
                             expected=I)
    assert heads.unit == "thousand person-years" and heads.kinds == ["skilled", "unskilled"]
    np.testing.assert_allclose(heads.labour.loc["skilled"], [9.0, 18.0, 27.0])
    years = employment_table(e.T, unit="million hours", industries="columns")
    assert years.unit == "million hours" and "as published" in years.assumption
    t = sut(labour=heads.labour)
    # an industry table keeps labour by industry: l = L ĝ⁻¹ (closed form)
    d = t.symmetric("fixed_product_sales").to_table().labour_coefficients()
    np.testing.assert_allclose(d, labour_coefficients(heads, t.industry_output))
    with pytest.raises(gp.InvalidInput, match=r"unit must say labour input"):
        employment_table(e, unit="thousand arvens")
    with pytest.raises(gp.InvalidInput, match=r"person_years_per_person must be given only "
                       r"for a head count"):
        employment_table(e, unit="thousand person-years", person_years_per_person=0.9)
    with pytest.raises(gp.InvalidInput, match=r"must give the labour of every industry"):
        employment_table(e.iloc[:2], unit="thousand persons", expected=I)


# -- capital stocks from investment ---------------------------------------------------------------


def test_stocks_from_investment_closed_form():
    from growthplan.statistics import stocks_from_investment

    inv = pd.DataFrame({"food": [0.0, 6.0, 4.0], "metal": [0.0, 9.0, 1.0]}, index=P)
    # g = 0: the stock is investment times the service life (closed form)
    k0 = stocks_from_investment(inv, {"food": 20.0, "metal": 10.0})
    np.testing.assert_allclose(k0.sum(axis=0), [200.0, 100.0])
    # steady growth g: K = I (1 + g) / (g + 1/L); checked against the perpetual inventory
    # K_t = I_t + (1 − 1/L) K_{t−1} run for a long time (independent recursion)
    g, life = 0.04, 20.0
    k = stocks_from_investment(inv, life, past_growth=g)
    stock = 0.0
    for t in range(2000):
        stock = 10.0 * (1 + g) ** (t - 1999) + (1 - 1 / life) * stock
    assert k["food"].sum() == pytest.approx(stock, rel=1e-9)
    # one sector: stock over output is the capital–output ratio (closed form)
    one = stocks_from_investment(pd.DataFrame({"goods": [30.0]}, index=["goods"]), 25.0)
    assert one.iloc[0, 0] / 250.0 == pytest.approx(30.0 * 25.0 / 250.0)
    with pytest.raises(gp.InvalidInput, match=r"past_growth must be above minus"):
        stocks_from_investment(inv, 2.0, past_growth=-0.6)
