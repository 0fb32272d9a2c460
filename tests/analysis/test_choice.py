"""Steady states with a choice of techniques: von Neumann, cheapest techniques, the frontier."""

from __future__ import annotations

import doctest
import re
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy.optimize import linprog

import growthplan as gp
from growthplan.analysis import choice

ROOT = Path(__file__).resolve().parents[2]


def corn_table() -> gp.ActivityTable:
    """One commodity, two techniques: alpha (seed 0.5, labour 1), beta (seed 0.2, labour 2)."""
    return gp.activity_table([[0.5, 0.2]], labour=[1.0, 2.0], produces=["corn", "corn"],
                             commodities=["corn"], techniques=["alpha", "beta"])


def samuelson_table() -> gp.ActivityTable:
    """Dated labour as circulating goods: corn by A = 7 labour one period before (through
    the good a1), or by B = 2 labour two periods before (b1 → b2) plus 6 labour now."""
    a = np.zeros((4, 5))
    a[0, 3] = 1.0  # corn_A uses a1
    a[1, 2] = 1.0  # b2 uses b1
    a[2, 4] = 1.0  # corn_B uses b2
    return gp.activity_table(a, labour=[7.0, 2.0, 0.0, 0.0, 6.0],
                             produces=["a1", "b1", "b2", "corn", "corn"],
                             commodities=["a1", "b1", "b2", "corn"],
                             techniques=["a1", "b1", "b2", "corn_A", "corn_B"])


def random_table(rng: np.random.Generator, per_sector: list[int], *, capital: bool = False,
                 kinds: int = 1) -> gp.ActivityTable:
    """Random single-product techniques; every column sums below 0.9, so every set is
    productive at r = 0."""
    n, m = len(per_sector), sum(per_sector)
    a = rng.uniform(0, 1, (n, m)) * (rng.uniform(0, 1, (n, m)) < 0.8)
    a *= rng.uniform(0.3, 0.9, m) / np.maximum(a.sum(axis=0), 1e-9)
    produces = [f"c{i}" for i, k in enumerate(per_sector) for _ in range(k)]
    k = rng.uniform(0, 0.5, (n, m)) if capital else None
    return gp.activity_table(a, labour=rng.uniform(0.1, 1.0, (kinds, m)), capital=k,
                             depreciation=rng.uniform(0.02, 0.2, m) if capital else None,
                             produces=produces, commodities=[f"c{i}" for i in range(n)])


def price_lp(table: gp.ActivityTable, wage: np.ndarray, r: float) -> np.ndarray:
    """Reference prices by scipy's linprog: maximise Σ p s.t. p_i ≤ c_j(p) for every j.

    Duality (the substitution theorem's price side): for the cheapest set s,
    p* = w L_s (I − M_s)^-1 is feasible, and any feasible p has p ≤ p M_s + w L_s, so
    p ≤ p* after iterating with (I − M_s)^-1 ≥ 0: p* is the greatest feasible vector and
    maximises every positive sum. It is also the dual of min w·L x s.t. (B − M)x ≥ 1.
    """
    b = table.outputs.to_numpy()
    m_r = (1 + r) * table.inputs.to_numpy() + \
        table.capital.to_numpy() * (r + table.depreciation.to_numpy())[None, :]
    wl = wage @ table.labour.to_numpy()
    n = b.shape[0]
    res = linprog(-np.ones(n), A_ub=(b - m_r).T, b_ub=wl, bounds=(None, None), method="highs")
    assert res.status == 0, res.message
    return res.x


class TestActivityTable:
    def test_labels_from_frames_and_default_outputs(self):
        a = pd.DataFrame([[0.1, 0.2, 0.0], [0.3, 0.0, 0.1]], index=["grain", "steel"],
                         columns=["g_old", "g_new", "s"])
        t = gp.activity_table(a, labour=[1.0, 0.5, 2.0], produces=["grain", "grain", "steel"])
        assert t.techniques == ["g_old", "g_new", "s"]
        assert t.outputs.loc["grain", "g_new"] == 1.0 and t.outputs.loc["steel", "s"] == 1.0
        assert not t.joint_production
        assert t.capital.to_numpy().sum() == 0 and t.depreciation.sum() == 0
        by_label = gp.activity_table(a, labour=pd.Series({"s": 2.0, "g_old": 1.0,
                                                          "g_new": 0.5}),
                                     produces=pd.Series({"s": "steel", "g_old": "grain",
                                                         "g_new": "grain"}))
        assert by_label.labour_kinds == ["labour"]
        assert by_label.labour.loc["labour"].tolist() == [1.0, 0.5, 2.0]
        assert by_label.produces.tolist() == ["grain", "grain", "steel"]

    def test_products_inferred_from_outputs(self):
        t = gp.activity_table([[0.1, 0.2], [0.2, 0.1]], [[2.0, 0.0], [0.5, 1.0]],
                              labour=[1.0, 1.0])
        assert t.produces.tolist() == ["commodity_1", "commodity_2"]
        assert t.joint_production

    @pytest.mark.parametrize("kwargs, field", [
        ({"inputs": [[-0.1, 0.2]]}, "inputs"),
        ({"produces": ["corn", "rice"]}, "produces"),
        ({"labour": [1.0]}, "labour"),
        ({"depreciation": 1.5}, "depreciation"),
    ])
    def test_bad_input_names_the_field(self, kwargs, field):
        args = {"inputs": [[0.5, 0.2]], "labour": [1.0, 2.0], "produces": ["corn", "corn"],
                "commodities": ["corn"]} | kwargs
        with pytest.raises(gp.InvalidInput, match=rf"^{field} must .*Got"):
            gp.activity_table(args.pop("inputs"), **args)

    def test_joint_production_refused_for_costs(self):
        t = gp.activity_table([[0.1, 0.2], [0.2, 0.1]], [[2.0, 0.0], [0.5, 1.0]],
                              labour=[1.0, 1.0])
        with pytest.raises(gp.InvalidInput, match="no joint production"):
            gp.cheapest_techniques(t)


class TestOneTechniquePerSector:
    A2 = np.array([[0.15, 0.25], [0.20, 0.05]])
    L2 = np.array([0.6, 1.1])

    def test_von_neumann_is_the_balanced_growth(self):
        # Closed form: with Q = I, P = A the expansion factor is 1/ρ(A) (numpy eigvals and
        # the library's own balanced growth agree).
        econ = gp.Economy(sectors=["farm", "mill"], input_coefficients=self.A2,
                          labour_coefficients=[self.L2])
        vn = gp.von_neumann_choice(gp.activity_table_from_economy(econ))
        rho = max(abs(np.linalg.eigvals(self.A2)))
        assert vn.growth_rate == pytest.approx(1 / rho - 1, rel=1e-9)
        assert vn.growth_rate == pytest.approx(econ.balanced_growth().rate, rel=1e-9)
        assert vn.interest_rate == pytest.approx(vn.growth_rate, rel=1e-8)
        assert vn.techniques == ["farm", "mill"]

    def test_von_neumann_with_capital_closed_form(self):
        # Derived from the conventions: Q y = α P y with P = A + K, Q = I + (1 − δ)K is
        # (I − A − δK) y = (α − 1)(A + K) y, so g = 1/ρ((I − A − δK)^-1 (A + K)).
        k = np.array([[1.2, 0.8], [0.3, 0.6]])
        delta = np.array([0.05, 0.1])
        t = gp.activity_table(self.A2, labour=self.L2, capital=k, depreciation=delta,
                              produces=["c1", "c2"], commodities=["c1", "c2"])
        g = 1 / max(abs(np.linalg.eigvals(
            np.linalg.solve(np.eye(2) - self.A2 - k * delta, self.A2 + k))))
        assert gp.von_neumann_choice(t).growth_rate == pytest.approx(g, rel=1e-8)

    def test_von_neumann_with_wage_basket(self):
        # Workers' consumption h per unit of labour is advanced too: P = A + h l, so the
        # factor is 1/ρ(A + h l) (derived from the definitions).
        h = np.array([0.1, 0.05])
        t = gp.activity_table(self.A2, labour=self.L2, produces=["c1", "c2"],
                              commodities=["c1", "c2"])
        rho = max(abs(np.linalg.eigvals(self.A2 + np.outer(h, self.L2))))
        vn = gp.von_neumann_choice(t, wage_basket=h)
        assert vn.growth_rate == pytest.approx(1 / rho - 1, rel=1e-8)

    def test_one_sector_frontier_closed_form(self):
        # One sector, good as numeraire (p = 1): 1 = (1 + r) a + w l ⇒ w = (1 − (1 + r)a)/l,
        # falling to 0 at R = 1/a − 1 (derived by hand).
        a, l = 0.4, 0.8
        t = gp.activity_table([[a]], labour=[l], produces=["corn"], commodities=["corn"])
        f = gp.wage_profit_frontier(t, points=11)
        assert f.maximal_profit_rate == pytest.approx(1 / a - 1, rel=1e-8)
        r = f.table["profit_rate"].to_numpy()
        np.testing.assert_allclose(f.table["wage"], (1 - (1 + r) * a) / l, rtol=1e-10)
        assert f.switch_points.empty and f.reswitching == []

    def test_two_sector_frontier_closed_form(self):
        # p (I − (1 + r)A) = w l and p·u = 1 ⇒ w = 1 / (u · l adj(I − (1+r)A) / det), with the
        # 2×2 inverse written out (derived by hand).
        a, l, u = self.A2, self.L2, np.array([2.0, 1.0])
        t = gp.activity_table(a, labour=l, produces=["c1", "c2"], commodities=["c1", "c2"])
        f = gp.wage_profit_frontier(t, np.linspace(0, 1.5, 7), numeraire=u)
        for r, w in zip(f.table["profit_rate"], f.table["wage"], strict=True):
            x = 1 + r
            det = (1 - x * a[0, 0]) * (1 - x * a[1, 1]) - x * x * a[0, 1] * a[1, 0]
            p1 = (l[0] * (1 - x * a[1, 1]) + l[1] * x * a[1, 0]) / det  # p per unit wage
            p2 = (l[0] * x * a[0, 1] + l[1] * (1 - x * a[0, 0])) / det
            assert w == pytest.approx(1 / (u[0] * p1 + u[1] * p2), rel=1e-10)

    def test_standard_commodity_makes_the_frontier_straight(self):
        # Sraffa's standard commodity: A x* = ρ x*, l x* = 1; with the net standard product
        # (I − A) x* as numeraire, p x*(1 − (1 + r)ρ) = w and p x*(1 − ρ) = 1, so
        # w = 1 − r/R with R = (1 − ρ)/ρ (derived by hand).
        vals, vecs = np.linalg.eig(self.A2)
        i = int(np.argmax(vals.real))
        rho, x = vals[i].real, np.abs(vecs[:, i].real)
        x = x / (self.L2 @ x)
        t = gp.activity_table(self.A2, labour=self.L2, produces=["c1", "c2"],
                              commodities=["c1", "c2"])
        f = gp.wage_profit_frontier(t, numeraire=(np.eye(2) - self.A2) @ x, points=20)
        big_r = (1 - rho) / rho
        assert f.maximal_profit_rate == pytest.approx(big_r, rel=1e-8)
        np.testing.assert_allclose(f.table["wage"], 1 - f.table["profit_rate"] / big_r,
                                   rtol=1e-9, atol=1e-12)


class TestSwitching:
    def test_two_techniques_switch_at_a_quarter(self):
        """Corn as numeraire (p = 1): alpha gives w = 1 − 0.5(1 + r), beta gives
        w = (1 − 0.2(1 + r))/2. They are equal when 1 − 0.5x = 0.5 − 0.1x, x = 1 + r = 1.25,
        so r = 0.25 and w = 0.375; alpha pays more below, beta above. Beta alone can run
        up to R = 1/0.2 − 1 = 4 (derived by hand)."""
        t = corn_table()
        assert gp.cheapest_techniques(t, 1.0, 0.2).techniques["corn"] == "alpha"
        assert gp.cheapest_techniques(t, 1.0, 0.3).techniques["corn"] == "beta"
        f = gp.wage_profit_frontier(t, points=40)
        assert len(f.switch_points) == 1
        sw = f.switch_points.iloc[0]
        assert sw["profit_rate"] == pytest.approx(0.25, abs=1e-12)
        assert sw["wage"] == pytest.approx(0.375, abs=1e-9)
        assert (sw["before"], sw["after"]) == ("corn:alpha", "corn:beta")
        assert f.table["switch"].sum() == 1 and f.reswitching == []
        assert f.maximal_profit_rate == pytest.approx(4.0, rel=1e-8)
        r = f.table["profit_rate"].to_numpy()
        np.testing.assert_allclose(f.table["wage"],
                                   np.maximum(1 - 0.5 * (1 + r), (1 - 0.2 * (1 + r)) / 2),
                                   rtol=1e-10)
        vn = gp.von_neumann_choice(t)
        assert vn.techniques == ["beta"]
        assert vn.growth_rate == pytest.approx(4.0, rel=1e-8)

    def test_reswitching_samuelson(self):
        """Samuelson (1966), "A Summing Up", QJE 80 (from memory): technique A costs
        7(1+r)² in dated labour, B costs 2(1+r)³ + 6(1+r). With wages paid at the end of the
        period both are divided by (1 + r): 7x against 2x² + 6 with x = 1 + r, equal where
        2x² − 7x + 6 = 0, x = 1.5 or 2: switches at r = 0.5 and r = 1, A cheapest below 0.5
        and above 1 (verified here numerically)."""
        t = samuelson_table()
        rates = np.linspace(0.05, 1.45, 15)  # the grid steps over the switch points
        f = gp.wage_profit_frontier(t, rates, numeraire=pd.Series({"corn": 1.0}))
        assert f.switch_points["profit_rate"].tolist() == pytest.approx([0.5, 1.0], abs=1e-12)
        corn = [s.split("corn:")[1] for s in f.table.loc[~f.table["switch"], "techniques"]]
        assert corn == ["corn_A"] * 5 + ["corn_B"] * 5 + ["corn_A"] * 5
        assert f.reswitching == ["a1:a1, b1:b1, b2:b2, corn:corn_A"]
        x = 1 + f.table["profit_rate"].to_numpy()
        np.testing.assert_allclose(f.table["wage"], 1 / np.minimum(7 * x, 2 * x * x + 6),
                                   rtol=1e-10)
        # at a switch point both techniques cost the same: one is listed as a tie
        at = gp.cheapest_techniques(t, 1.0, 0.5)
        assert at.extra_cost.abs().max() < 1e-12 and len(at.ties) == 1

    def test_decomposable_maximal_rate_is_the_interest_rate(self):
        # Two unrelated commodities: c1 by seed 0.5 (R1 = 1), c2 by seed 0.2 (R2 = 4). c2 can
        # grow by 400 % alone, but c1 cannot be priced beyond r = 1, so R = 1, the interest
        # rate β* − 1 of the von Neumann system (Kemeny, Morgenstern and Thompson 1956: β* is
        # the smallest factor, α* the largest; derived by hand here).
        t = gp.activity_table([[0.5, 0.0], [0.0, 0.2]], labour=[1.0, 1.0],
                              produces=["c1", "c2"], commodities=["c1", "c2"])
        vn = gp.von_neumann_choice(t)
        assert vn.growth_rate == pytest.approx(4.0, rel=1e-8)
        assert vn.interest_rate == pytest.approx(1.0, rel=1e-8)
        f = gp.wage_profit_frontier(t, points=10)
        assert f.maximal_profit_rate == pytest.approx(1.0, rel=1e-10)
        r = f.table["profit_rate"].to_numpy()
        # u = (1, 1): p1 = w/(1 − 0.5x), p2 = w/(1 − 0.2x), x = 1 + r
        np.testing.assert_allclose(f.table["wage"],
                                   1 / (1 / (1 - 0.5 * (1 + r)) + 1 / (1 - 0.2 * (1 + r))),
                                   rtol=1e-10)
        with pytest.raises(gp.InvalidInput, match="R = 1"):
            gp.cheapest_techniques(t, 1.0, 1.0)

    def test_profit_rate_beyond_the_maximum_is_refused(self):
        with pytest.raises(gp.InvalidInput, match=r"profit_rate must be below the maximal "
                                                  r"profit rate R = 4"):
            gp.cheapest_techniques(corn_table(), 1.0, 4.5)

    def test_unbounded_maximal_rate_needs_profit_rates(self):
        with pytest.raises(gp.InvalidInput, match="profit_rates must be given"):
            gp.wage_profit_frontier(samuelson_table())


class TestPolicyIterationAgainstLP:
    @pytest.mark.parametrize("seed", range(6))
    def test_prices_match_linprog(self, seed):
        # Reference: scipy.optimize.linprog on the price LP (duality argument in price_lp).
        rng = np.random.default_rng(seed)
        t = random_table(rng, [3, 2, 3, 2], capital=True, kinds=2)
        w = np.array([1.0, 1.7])
        r = 0.3 * gp.von_neumann_choice(t).growth_rate
        got = gp.cheapest_techniques(t, w, r)
        np.testing.assert_allclose(got.prices, price_lp(t, w, r), rtol=1e-8)
        assert got.extra_cost.min() > -1e-10
        assert (got.extra_cost[got.techniques.to_numpy()].abs() < 1e-10).all()

    @pytest.mark.parametrize("seed, capital", [(11, False), (12, True), (13, True)])
    def test_frontier_is_the_envelope_of_every_set(self, seed, capital):
        # Brute force over all 2·3·2 sets: the frontier's wage is the largest wage of any
        # productive set at each rate, switch points included (the envelope; definition).
        import itertools

        rng = np.random.default_rng(seed)
        t = random_table(rng, [2, 3, 2], capital=capital)
        a, lab = t.inputs.to_numpy(), t.labour.to_numpy()[0]
        k, d = t.capital.to_numpy(), t.depreciation.to_numpy()
        groups = [np.nonzero(t.produces.to_numpy() == c)[0] for c in t.commodities]
        f = gp.wage_profit_frontier(t, points=15)
        for r, w in zip(f.table["profit_rate"], f.table["wage"], strict=True):
            best = 0.0
            for s in itertools.product(*groups):
                ms = (1 + r) * a[:, list(s)] + k[:, list(s)] * (r + d[list(s)])
                if max(abs(np.linalg.eigvals(ms))) < 1:
                    p = np.linalg.solve((np.eye(3) - ms).T, lab[list(s)])
                    best = max(best, 1 / p.sum())
            assert w == pytest.approx(best, rel=1e-9)


@st.composite
def economies(draw):
    n = draw(st.integers(2, 3))
    per = [draw(st.integers(2, 3)) for _ in range(n)]
    seed = draw(st.integers(0, 2**32 - 1))
    demands = draw(st.lists(st.lists(st.floats(0.0, 1.0), min_size=n, max_size=n),
                            min_size=3, max_size=3))
    return per, seed, np.array(demands) + 0.01


class TestNonSubstitution:
    @given(economies())
    def test_cost_minimising_set_does_not_depend_on_final_demand(self, case):
        """Non-substitution theorem (Samuelson 1951; Arrow, Koopmans and Georgescu-Roegen in
        Koopmans (ed.) 1951, Activity Analysis of Production and Allocation): one primary
        factor, no joint production, constant returns ⇒ the techniques that minimise labour
        are the same for every final demand. Each demand's labour-minimising activities
        (scipy's linprog) run only techniques that cost no more than the cheapest at
        w = 1, r = 0 (ties compared by cost, not label), and use labour p·d."""
        per, seed, demands = case
        t = random_table(np.random.default_rng(seed), per)
        cheap = gp.cheapest_techniques(t, wage=1.0, profit_rate=0.0)
        net = t.outputs.to_numpy() - t.inputs.to_numpy()
        lab = t.labour.to_numpy()[0]
        for d in demands:
            res = linprog(lab, A_ub=-net, b_ub=-d, bounds=(0, None), method="highs")
            assert res.status == 0
            used = res.x > 1e-9 * res.x.max()
            scale = cheap.prices.max()
            assert (cheap.extra_cost.to_numpy()[used] <= 1e-9 * scale).all()
            assert res.fun == pytest.approx(float(cheap.prices.to_numpy() @ d), rel=1e-8)


class TestFromEconomy:
    def test_alternative_technique_with_capital_and_by_products(self):
        econ = gp.Economy(sectors=["grain", "tools"], input_coefficients=[[0.2, 0.1],
                                                                          [0.1, 0.2]],
                          capital_coefficients=[[0.0, 0.0], [1.0, 0.5]],
                          labour_coefficients=[[1.0, 0.8]],
                          capital={s: gp.CapitalSpec(initial_capacity=1.0,
                                                     mean_service_life=10)
                                   for s in ("grain", "tools")})
        alt = {"sector": "grain", "label": "grain_mech", "inputs": {"grain": 0.15,
                                                                     "tools": 0.1},
               "labour": 0.4, "capital": {"tools": 2.0}}
        t = gp.activity_table_from_economy(econ, [alt])
        assert t.techniques == ["grain", "tools", "grain_mech"]
        assert t.depreciation["grain"] == pytest.approx(0.1)
        assert t.depreciation["grain_mech"] == pytest.approx(0.1)
        assert t.capital.loc["tools", "grain_mech"] == 2.0
        # at r = 0 the labour-saving technique wins (its capital costs only depreciation)
        low = gp.cheapest_techniques(t, 1.0, 0.0)
        high = gp.cheapest_techniques(t, 1.0, 0.3)
        assert low.techniques["grain"] == "grain_mech"
        assert high.techniques["grain"] == "grain"
        np.testing.assert_allclose(high.prices, price_lp(t, np.array([1.0]), 0.3), rtol=1e-8)
        joint = gp.activity_table_from_economy(
            econ, [alt | {"label": "grain_straw", "by_products": {"tools": 0.05}}])
        assert joint.joint_production
        vn = gp.von_neumann_choice(joint)
        assert vn.growth_rate > 0 and set(vn.techniques) <= set(joint.techniques)

    def test_bad_alternative(self):
        econ = gp.Economy(sectors=["grain"], input_coefficients=[[0.2]],
                          labour_coefficients=[[1.0]])
        with pytest.raises(gp.InvalidInput, match=r"alternatives\[0\].sector must"):
            gp.activity_table_from_economy(econ, [{"sector": "fish", "label": "x"}])
        with pytest.raises(gp.InvalidInput, match=r"alternatives\[0\].label must"):
            gp.activity_table_from_economy(econ, [{"sector": "grain", "label": "grain"}])


def test_plot_wage_profit():
    pytest.importorskip("matplotlib")
    import matplotlib.pyplot as plt

    ax = gp.plot_wage_profit(gp.wage_profit_frontier(samuelson_table(),
                                                     np.linspace(0, 1.5, 16)))
    try:
        assert len(ax.get_lines()) == 3  # A, B, A again
        labels = [t.get_text() for t in ax.get_legend().get_texts()]
        assert "switch point" in labels and len(labels) == 3
    finally:
        plt.close(ax.figure)


def test_readme_section_runs():
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    block = re.search(r"## Steady state with a choice of techniques.*?```python\n(.*?)```",
                      text, re.S).group(1)
    namespace: dict = {}
    exec(compile(block, "README.md", "exec"), namespace)  # noqa: S102 - our own README
    assert namespace["frontier"].switch_points["profit_rate"].tolist() == \
        pytest.approx([0.25], abs=1e-9)


def test_docstring_examples():
    failures, tried = doctest.testmod(choice, optionflags=doctest.NORMALIZE_WHITESPACE)
    assert tried > 0 and failures == 0
