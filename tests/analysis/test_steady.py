"""Balanced growth (static, closed, dynamic) and the von Neumann expanding economy."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays

import growthplan as gp

MB_A = [[0.15, 0.25], [0.20, 0.05]]
RHO = 0.1 + np.sqrt(0.0525)  # Perron root of the Miller & Blair A (Hawkins & Simon check)


def econ(a, **kw):
    return gp.Economy(sectors=[f"s{i}" for i in range(len(a))], input_coefficients=a, **kw)


class TestStaticBalancedGrowth:
    @pytest.mark.parametrize("method", ["eigen", "power"])
    def test_rate_is_inverse_perron_root(self, method):
        bg = econ(MB_A).balanced_growth(method=method)
        assert bg.factor == pytest.approx(1 / RHO, rel=1e-10)
        assert bg.rate == pytest.approx(1 / RHO - 1, rel=1e-10)
        assert bg.proportions.sum() == pytest.approx(1.0)
        assert (bg.proportions > 0).all()
        assert bg.residual < 1e-9

    def test_power_reports_iterations(self):
        bg = econ(MB_A).balanced_growth(method="power", tol=1e-13)
        assert bg.method == "power" and bg.iterations > 1

    def test_periodic_matrix_is_reported_and_damped_power_converges(self):
        a = [[0.0, 0.5], [0.5, 0.0]]  # period 2: a plain power iteration oscillates
        bg = econ(a).balanced_growth(method="power")
        assert bg.period == 2
        assert bg.spectral_radius == pytest.approx(0.5)
        np.testing.assert_allclose(bg.proportions, [0.5, 0.5], atol=1e-9)
        assert any("periodic" in n for n in bg.notes)

    def test_vector_with_mixed_signs_is_never_returned(self):
        from growthplan.analysis import steady

        # the guard itself: a leading eigenvector (1, -1) is refused, not returned
        with pytest.raises(gp.NoBalancedGrowth):
            steady.perron(np.array([[0.0, -1.0], [-1.0, 0.0]]))
        with pytest.raises(gp.NoBalancedGrowth):
            steady.perron(np.array([[1.0, -1.0], [-1.0, 1.0]]))

    def test_reducible_with_zero_part(self):
        bg = econ([[0.5, 0.3], [0.0, 0.2]]).balanced_growth()
        assert not bg.irreducible and any("reducible" in n for n in bg.notes)
        np.testing.assert_allclose(bg.proportions, [1.0, 0.0], atol=1e-12)

    def test_reducible_with_non_negative_ray_is_flagged(self):
        a = [[0.2, 0.3], [0.0, 0.5]]
        bg = econ(a).balanced_growth()
        assert not bg.irreducible
        assert (bg.proportions >= 0).all()

    def test_closed_model(self):
        # Closed through labour: M = [[A, h], [l, 0]]; check against numpy directly
        l_ = [[0.3, 0.2]]
        h = [0.4, 0.5]
        e = econ(MB_A, labour_coefficients=l_, wage_basket=h)
        m = np.array([[0.15, 0.25, 0.4], [0.20, 0.05, 0.5], [0.3, 0.2, 0.0]])
        rho = max(abs(np.linalg.eigvals(m)))
        bg = e.balanced_growth()
        assert bg.spectral_radius == pytest.approx(rho)
        assert list(bg.proportions.index) == ["s0", "s1", "households"]

    @given(st.integers(2, 5).flatmap(lambda n: arrays(float, (n, n),
                                                      elements=st.floats(0.01, 1.0))),
           st.integers(0, 4), st.floats(1e-3, 1e3))
    def test_proportions_invariant_to_unit_change(self, a, k, scale):
        """Rescaling sector k's unit by s: A' = D A D^-1, proportions scale by s."""
        a = a * (0.8 / a.sum(axis=0).max())
        k = k % len(a)
        d = np.ones(len(a))
        d[k] = scale
        a2 = (d[:, None] * a) / d[None, :]
        p1 = econ(a).balanced_growth().proportions.to_numpy()
        p2 = econ(a2).balanced_growth().proportions.to_numpy()
        back = p2 / d
        np.testing.assert_allclose(back / back.sum(), p1, rtol=1e-7, atol=1e-12)
        assert (p1 > 0).all()

    def test_sparse_path_matches_dense(self):
        rng = np.random.default_rng(0)
        n = 450  # above the dense limit
        a = rng.uniform(0, 1, (n, n)) * (rng.uniform(0, 1, (n, n)) < 0.02)
        a *= 0.7 / a.sum(axis=0).max()
        bg = econ(a).balanced_growth()
        assert bg.method == "sparse-eigen"
        rho = max(abs(np.linalg.eigvals(a)))
        assert bg.spectral_radius == pytest.approx(rho, rel=1e-8)


def two_equal_blocks(rng: np.random.Generator) -> np.ndarray:
    """Two independent copies of one irreducible block, feeding a slower third part,
    with the sectors shuffled: a reducible matrix whose Perron root is repeated."""
    from scipy.linalg import block_diag

    k = int(rng.integers(2, 6))
    b = rng.uniform(0, 1, (k, k))
    b *= 0.5 / max(abs(np.linalg.eigvals(b)))
    a = block_diag(b, b, rng.uniform(0, 0.05, (2, 2)))
    a[: 2 * k, 2 * k:] = rng.uniform(0, 0.1, (2 * k, 2))
    p = rng.permutation(len(a))
    return a[np.ix_(p, p)]


def cycle(n: int, w: float) -> np.ndarray:
    """Sector i feeds sector i+1 and the last feeds the first, each with weight w."""
    a = np.zeros((n, n))
    a[np.arange(1, n), np.arange(n - 1)] = w
    a[0, n - 1] = w
    return a


class TestRepeatedPerronRoot:
    """Perron–Frobenius theory: a non-negative matrix always has a non-negative
    eigenvector for its spectral radius, so a repeated root never means "no ray"."""

    def test_independent_equal_blocks_have_a_ray(self):
        # Regression: numpy's eigenvector for the repeated root mixed the two blocks with
        # opposite signs and NoBalancedGrowth was raised (about a quarter of these cases).
        rng = np.random.default_rng(1)
        mixed = 0
        for _ in range(40):
            a = two_equal_blocks(rng)
            vals, vecs = np.linalg.eig(a)  # numpy as the reference solver
            raw = np.real(vecs[:, np.argmax(vals.real)])
            mixed += bool(raw.max() > 1e-9 and raw.min() < -1e-9)
            bg = econ(a).balanced_growth()
            assert bg.spectral_radius == pytest.approx(0.5, rel=1e-9)
            assert (bg.proportions >= 0).all() and bg.residual < 1e-9
            assert not bg.unique and any("not unique" in n for n in bg.notes)
            power = econ(a).balanced_growth(method="power")
            np.testing.assert_allclose(bg.proportions, power.proportions, atol=1e-8)
        assert mixed > 0  # the path under test was taken

    def test_diagonal_repeated_root(self):
        # diag(0.5, 0.5): every non-negative vector is a ray; the damped power iteration
        # from equal proportions stays there (closed form), and it is flagged not unique.
        bg = econ([[0.5, 0.0], [0.0, 0.5]]).balanced_growth()
        assert bg.factor == pytest.approx(2.0)
        np.testing.assert_allclose(bg.proportions, [0.5, 0.5])
        assert not bg.unique

    def test_defective_root_is_unique(self):
        # Jordan block: the root 0.5 is repeated but has the one eigenvector (1, 0).
        bg = econ([[0.5, 0.1], [0.0, 0.5]]).balanced_growth()
        assert bg.unique
        np.testing.assert_allclose(bg.proportions, [1.0, 0.0], atol=1e-12)

    def test_lp_finds_the_non_negative_null_space(self):
        from growthplan.analysis import steady

        a = two_equal_blocks(np.random.default_rng(7))
        v = steady._nonneg_null_vector(a, 0.5)
        assert v is not None and (v >= 0).all() and v.sum() == pytest.approx(1.0)
        assert np.abs(a @ v - 0.5 * v).sum() < 1e-9


class TestLongCycles:
    """Closed form: a cycle of length n with every weight w has ρ = w (its eigenvalues
    are w times the n-th roots of unity), period n and uniform Perron vector."""

    def test_cycle_of_500_sectors(self):
        # Regression: ARPACK raised ArpackNoConvergence (every eigenvalue has |λ| = ρ).
        a = cycle(500, 0.5)
        bg = econ(a).balanced_growth()
        assert bg.spectral_radius == pytest.approx(0.5, rel=1e-10)
        assert bg.irreducible and bg.period == 500 and bg.unique
        np.testing.assert_allclose(bg.proportions, 1 / 500, rtol=1e-8)

    def test_spectral_radius_of_long_cycle(self):
        from growthplan.analysis import steady

        # a chord 0 -> 210 breaks the symmetry; reference: numpy.linalg.eigvals, dense
        a = cycle(420, 0.4)
        a[210, 0] = 0.3
        assert steady.spectral_radius(a) == pytest.approx(max(abs(np.linalg.eigvals(a))),
                                                          rel=1e-9)
        assert steady.spectral_radius(cycle(600, 0.7)) == pytest.approx(0.7, rel=1e-10)

    def test_structure_is_a_graph_test(self):
        from scipy.linalg import block_diag

        from growthplan.analysis import steady

        assert steady.structure(cycle(2000, 0.5)) == (True, 2000)
        a = cycle(700, 0.5)
        a[0, 0] = 0.1  # a self-loop makes it aperiodic
        assert steady.structure(a) == (True, 1)
        assert steady.structure(block_diag(cycle(300, 0.5), cycle(300, 0.5)))[0] is False


class TestDynamicBalancedGrowth:
    """Derived closed form: x = A x + (g + δ) B x, so g* + δ = 1/ρ((I − A)^-1 B)."""

    B = [[0.5, 0.8], [0.3, 0.6]]

    def test_reference_ray_without_replacement(self):
        cap = {s: gp.CapitalSpec(initial_capacity=1, mean_service_life=1e6,
                                 declining_balance=1e-9) for s in ("s0", "s1")}
        bg = econ(MB_A, capital_coefficients=self.B, capital=cap).dynamic_balanced_growth()
        m = np.linalg.solve(np.eye(2) - np.array(MB_A), self.B)
        assert max(abs(np.linalg.eigvals(m))) == pytest.approx(1.559780, abs=1e-6)
        assert bg.rate == pytest.approx(0.641116, abs=1e-6)
        np.testing.assert_allclose(bg.proportions, [0.5903, 0.4097], atol=1e-4)

    def test_with_geometric_replacement(self):
        cap = {s: gp.CapitalSpec(initial_capacity=1, mean_service_life=10) for s in ("s0", "s1")}
        bg = econ(MB_A, capital_coefficients=self.B, capital=cap).dynamic_balanced_growth()
        assert bg.rate == pytest.approx(0.641116 - 0.1, abs=1e-6)

    def test_one_sector_closed_form(self):
        # a = 0.6, b = 2, delta = 0.05: g = (1 - a)/b - delta = 0.15
        e = gp.Economy(sectors=["x"], input_coefficients=[[0.6]], capital_coefficients=[[2.0]],
                       capital={"x": gp.CapitalSpec(initial_capacity=1, mean_service_life=20)})
        assert e.dynamic_balanced_growth().rate == pytest.approx(0.15, abs=1e-10)

    def test_fast_decline_closed_form(self):
        # Regression: the bracket search stepped backwards below g = -0.5 and returned a
        # "rate" below -1. Closed form (one sector, geometric δ): g = (1 - a)/b - δ,
        # here 0.1/0.2 - 0.9 = -0.4.
        e = gp.Economy(sectors=["x"], input_coefficients=[[0.9]], capital_coefficients=[[0.2]],
                       capital={"x": gp.CapitalSpec(initial_capacity=1,
                                                    mean_service_life=1 / 0.9)})
        assert e.dynamic_balanced_growth().rate == pytest.approx(-0.4, abs=1e-10)

    def test_harrod_domar(self):
        # Harrod–Domar g = s/v: s = 0.12, v = 3 -> 0.04 (Encyclopaedia Britannica,
        # "Harrod-Domar equation"); s = 0.06 -> 0.02 and s = 0.15 -> 0.05 (from memory:
        # Todaro & Smith, Economic Development, ch. 3). Surplus share s = 1 - a.
        for s, g in ((0.12, 0.04), (0.06, 0.02), (0.15, 0.05)):
            e = gp.Economy(sectors=["x"], input_coefficients=[[1 - s]],
                           capital_coefficients=[[3.0]],
                           capital={"x": gp.CapitalSpec(initial_capacity=1,
                                                        mean_service_life=1e6,
                                                        declining_balance=1e-9)})
            assert e.dynamic_balanced_growth().rate == pytest.approx(g, abs=1e-9)


class TestExpandingEconomy:
    def test_single_product_equals_inverse_perron_root(self):
        r = gp.expanding_economy(MB_A, np.eye(2))
        assert r.expansion_factor == pytest.approx(1 / RHO, rel=1e-9)
        assert r.interest_factor == pytest.approx(1 / RHO, rel=1e-9)
        assert r.value_of_output > 0

    @given(st.integers(1, 4).flatmap(lambda n: arrays(float, (n, n),
                                                      elements=st.floats(0.01, 1.0))))
    def test_property_single_product(self, a):
        a = a * (0.9 / a.sum(axis=0).max())
        rho = max(abs(np.linalg.eigvals(a)))
        r = gp.expanding_economy(a, np.eye(len(a)))
        assert r.expansion_factor == pytest.approx(1 / rho, rel=1e-8)

    def test_joint_production_dominated_process_is_idle(self):
        # Process 2 makes the same goods as process 1 with more inputs: never used.
        p = np.array([[1.0, 2.0], [1.0, 2.0]])
        q = np.array([[2.0, 2.0], [3.0, 3.0]])
        r = gp.expanding_economy(p, q)
        assert r.expansion_factor == pytest.approx(2.0, rel=1e-9)  # good 1 limits: 2/1
        assert r.intensities.iloc[1] == pytest.approx(0.0, abs=1e-9)

    def test_joint_production_square_diagonal_outputs(self):
        # Q diagonal, so Q y >= a P y  <=>  y >= a Q^-1 P y: a* = 1/rho(Q^-1 P) (derived)
        p = np.array([[0.2, 0.4], [0.3, 0.1]])
        q = np.diag([1.5, 0.8])
        r = gp.expanding_economy(p, q)
        rho = max(abs(np.linalg.eigvals(np.linalg.solve(q, p))))
        assert r.expansion_factor == pytest.approx(1 / rho, rel=1e-9)
        assert r.interest_factor == pytest.approx(1 / rho, rel=1e-8)

    def test_bad_shapes(self):
        with pytest.raises(ValueError, match="outputs"):
            gp.expanding_economy(np.ones((2, 2)), np.ones((2, 3)))


class TestDecomposableExpandingEconomy:
    """Kemeny, Morgenstern & Thompson (1956), Econometrica 24: α* = β* is guaranteed only
    for an irreducible (indecomposable) system; a decomposable one may have several
    expansion factors, α* the largest and β* the smallest."""

    def test_diagonal_outputs_closed_form(self):
        # P = I, Q = diag(2, 3): good 2 alone grows threefold (α* = 3); good 1 priced alone
        # earns only 2 (β* = 2). Closed form, derived by hand from the definitions.
        r = gp.expanding_economy(np.eye(2), np.diag([2.0, 3.0]))
        assert r.expansion_factor == pytest.approx(3.0, rel=1e-9)
        assert r.interest_factor == pytest.approx(2.0, rel=1e-9)
        np.testing.assert_allclose(r.intensities, [0.0, 1.0], atol=1e-9)
        assert r.value_of_output == pytest.approx(0.0, abs=1e-9)

    def test_docstring_states_the_irreducibility_condition(self):
        # Regression: the module claimed α* = β* "under their conditions" without saying
        # which, and the diag(2, 3) system contradicts a reading that includes it.
        doc = gp.expanding_economy.__module__
        import importlib

        text = importlib.import_module(doc).__doc__
        assert "irreducible" in text and "diag(2, 3)" in text

    def test_irreducible_joint_production_equal_factors(self):
        # An irreducible system: α* = β* (Kemeny–Morgenstern–Thompson).
        p = np.array([[0.2, 0.4], [0.3, 0.1]])
        q = np.array([[1.0, 0.3], [0.2, 0.9]])
        r = gp.expanding_economy(p, q)
        assert r.expansion_factor == pytest.approx(r.interest_factor, rel=1e-8)
        assert r.value_of_output > 0
