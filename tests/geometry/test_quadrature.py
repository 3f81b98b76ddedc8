"""Tests of outlinebench.geometry.quadrature: Gauss–Legendre rules and the batched integrator."""

from __future__ import annotations

import numpy as np
import pytest
import scipy.special

from outlinebench.geometry.quadrature import gauss_kronrod, gauss_legendre, integrate_intervals


def test_two_point_rule_matches_abramowitz_stegun():
    # A&S Table 25.4, n = 2: nodes ±0.577350269189626 (= ±1/√3), weights 1, on [−1, 1];
    # mapped to [0, 1]: nodes (1 ∓ 1/√3)/2, weights ½.
    x, w = gauss_legendre(2)
    np.testing.assert_allclose(x, [(1 - 3**-0.5) / 2, (1 + 3**-0.5) / 2], rtol=1e-15)
    np.testing.assert_allclose(w, [0.5, 0.5], rtol=1e-15)


def test_sixteen_point_rule_matches_scipy():
    # Reference library: scipy.special.roots_legendre on [−1, 1], mapped to [0, 1].
    x, w = gauss_legendre(16)
    xs, ws = scipy.special.roots_legendre(16)
    np.testing.assert_allclose(x, (xs + 1) / 2, atol=1e-15)
    np.testing.assert_allclose(w, ws / 2, atol=1e-15)


@pytest.mark.parametrize("m", [1, 3, 8, 16])
def test_exact_for_degree_2m_minus_1(m):
    # Gauss–Legendre with m points is exact for degree ≤ 2m − 1 (A&S §25.4.29):
    # ∫₀¹ x^d dx = 1/(d + 1).
    x, w = gauss_legendre(m)
    for d in range(2 * m):
        assert w @ x**d == pytest.approx(1 / (d + 1), rel=1e-13)


def test_rules_are_read_only_and_order_checked():
    x, _ = gauss_legendre(4)
    with pytest.raises(ValueError):
        x[0] = 1.0
    with pytest.raises(ValueError, match="at least 1"):
        gauss_legendre(0)


def test_batched_integrals_of_different_functions():
    # Closed forms: ∫₀^π sin = 2, ∫₀¹ eˣ = e − 1, ∫₀¹ √x = 2/3 (endpoint singularity).
    funcs = [np.sin, np.exp, np.sqrt]

    def f(owners, t):
        out = np.empty_like(t)
        for k, g in enumerate(funcs):
            sel = owners == k
            out[sel] = g(t[sel])
        return out

    values, errors = integrate_intervals(
        f, [0, 1, 2], [0.0, 0.0, 0.0], [np.pi, 1.0, 1.0], 3, tolerance=1e-13
    )
    np.testing.assert_allclose(values, [2.0, np.e - 1, 2 / 3], rtol=1e-12)
    assert np.all(errors <= 1e-12)


def test_several_starting_intervals_per_integral():
    # ∫₀² |x − 1| dx = 1 (closed form), started as [0, 1] and [1, 2] so the kink is at an end.
    values, _ = integrate_intervals(
        lambda o, t: np.abs(t - 1.0), [0, 0], [0.0, 1.0], [1.0, 2.0], 1, tolerance=1e-14
    )
    assert values[0] == pytest.approx(1.0, rel=1e-15)


def test_zero_integrand_and_round_limit():
    values, errors = integrate_intervals(
        lambda o, t: np.zeros_like(t), [0], [0.0], [1.0], 1, tolerance=1e-12
    )
    assert values[0] == 0.0 and errors[0] == 0.0
    # A kink in the middle of the interval converges only algebraically: with 2 rounds the
    # estimate stays above the target and is reported, not hidden.
    values, errors = integrate_intervals(
        lambda o, t: np.abs(t - 1 / 3), [0], [0.0], [1.0], 1, tolerance=1e-15, max_rounds=2
    )
    assert errors[0] > 0.0
    assert values[0] == pytest.approx(5 / 18, rel=1e-3)  # ∫₀¹ |x − ⅓| = 1/18 + 4/18


def test_kronrod_21_matches_quadpack_table():
    # QUADPACK QK21 (Piessens et al. 1983) on [−1, 1]: outermost node 0.995657163025808080735,
    # its weight 0.011694638867371874278, centre weight 0.149445554002916905664; mapped to
    # [0, 1] the nodes become (x + 1)/2 and the weights halve.
    x, wk, wg = gauss_kronrod(10)
    assert x.shape == wk.shape == wg.shape == (21,)
    assert x[-1] == pytest.approx((1 + 0.995657163025808080735) / 2, abs=1e-15)
    assert wk[-1] == pytest.approx(0.011694638867371874278 / 2, rel=1e-13)
    assert wk[10] == pytest.approx(0.149445554002916905664 / 2, rel=1e-13)
    # The embedded rule is 10-point Gauss–Legendre (A&S Table 25.4: weights 0.2955242247…).
    xs, ws = scipy.special.roots_legendre(10)
    np.testing.assert_allclose(x[wg > 0], (xs + 1) / 2, atol=1e-15)
    np.testing.assert_allclose(wg[wg > 0], ws / 2, atol=1e-15)
    assert np.count_nonzero(wg) == 10


@pytest.mark.parametrize("n", [3, 7, 10])
def test_kronrod_exact_for_degree_3n_plus_1(n):
    # Kronrod extension of n-point Gauss is exact for degree ≤ 3n + 1 (Laurie 1997).
    x, wk, wg = gauss_kronrod(n)
    for d in range(3 * n + 2):
        assert wk @ x**d == pytest.approx(1 / (d + 1), rel=2e-14), d
    for d in range(2 * n):
        assert wg @ x**d == pytest.approx(1 / (d + 1), rel=1e-13), d
