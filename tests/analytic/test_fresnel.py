"""Fresnel integrals and the quadratic-phase line integral."""

import numpy as np
import pytest

from hornproof.analytic import fresnel as fr


# Abramowitz & Stegun, Handbook of Mathematical Functions, Table 7.7 (values from memory,
# 7 decimals as tabulated): C(x), S(x) in the π t²/2 convention.
@pytest.mark.parametrize("x, c_ref, s_ref", [
    (0.5, 0.4923442, 0.0647324),
    (1.0, 0.7798934, 0.4382591),
    (2.0, 0.4882534, 0.3434157),
])
def test_fresnel_against_abramowitz_stegun_table_7_7(x, c_ref, s_ref):
    c, s = fr.fresnel(x)
    assert c == pytest.approx(c_ref, abs=5e-8)  # table rounding
    assert s == pytest.approx(s_ref, abs=5e-8)
    assert fr.fresnel_c(x) == c and fr.fresnel_s(x) == s


def test_fresnel_limits_and_symmetry():
    # A&S 7.3.20: C(x), S(x) -> 1/2 as x -> ∞ (exact); both odd functions.
    c, s = fr.fresnel(1e6)
    assert abs(c - 0.5) < 1e-6 and abs(s - 0.5) < 1e-6
    x = np.linspace(0, 5, 11)
    c1, s1 = fr.fresnel(x)
    c2, s2 = fr.fresnel(-x)
    np.testing.assert_array_equal(c2, -c1)
    np.testing.assert_array_equal(s2, -s1)


def test_order_is_c_then_s_unlike_scipy():
    import scipy.special as sp

    s_scipy, c_scipy = sp.fresnel(0.7)
    assert fr.fresnel(0.7) == (c_scipy, s_scipy)
    assert fr.fresnel_e(0.7) == pytest.approx(c_scipy - 1j * s_scipy, rel=0, abs=0)


def test_tail_from_faddeeva_matches_fresnel_integrals():
    # internal consistency: the wofz form of ∫_x^∞ exp(−jπt²/2) dt against 1/2(1−j) − E(x)
    x = np.linspace(-12, 12, 481)
    tail = fr.fresnel_tail(x)
    expected = 0.5 * (1 - 1j) - fr.fresnel_e(x)
    np.testing.assert_allclose(tail, expected, rtol=0, atol=2e-14)


@pytest.mark.parametrize("kappa, h, beta", [
    (0.0, 1.0, 1.0), (3.0, 1.0, 1.0), (-3.0, 1.0, 1.0), (30.0, 1.0, 2.0), (0.5, 2.0, 1e-3),
    (100.0, 1.0, 1e-6), (5.0, 1.0, 1e-9), (1.0, 1.0, 10.0), (-40.0, 0.5, 50.0), (2.0, 3.0, 0.0),
])
def test_quadratic_phase_integral_equals_its_quadrature(kappa, h, beta, complex_quad):
    # internal consistency: the closed form equals a direct quadrature of the same integrand
    numeric = complex_quad(lambda x: np.exp(-1j * beta * x * x + 1j * kappa * x), -h, h, points=40)
    closed = fr.quadratic_phase_integral(kappa, h, beta)
    assert abs(closed - numeric) <= 1e-10 * abs(numeric)


def test_quadratic_phase_integral_is_continuous_at_the_flat_switch():
    # the switch to 2h·sinc below β h² = 1e-10 rad must not jump
    below = fr.quadratic_phase_integral(7.0, 1.0, 0.99e-10)
    above = fr.quadratic_phase_integral(7.0, 1.0, 1.01e-10)
    assert abs(below - above) < 1e-9 * abs(above)


def test_quadratic_phase_integral_broadcasts():
    out = fr.quadratic_phase_integral(np.linspace(-5, 5, 7)[:, None], 1.0, np.array([0.0, 0.5, 2.0]))
    assert out.shape == (7, 3)
    assert np.isscalar(fr.quadratic_phase_integral(1.0, 1.0, 1.0)) or fr.quadratic_phase_integral(1.0, 1.0, 1.0).ndim == 0
