"""Tests of the Grid Convergence Index against the published procedure and known series.

Formulas (Celik et al. 2008, J. Fluids Eng. 130, 078001, steps 3–5, eqs. 3a–c and 4 as
recalled from memory; Roache 1997):
  ε21 = φ2 − φ1, ε32 = φ3 − φ2, s = sign(ε32/ε21)
  p = |ln|ε32/ε21| + q(p)| / ln r21,  q(p) = ln((r21^p − s)/(r32^p − s))
  φ_ext21 = (r21^p φ1 − φ2)/(r21^p − 1)
  e_a21 = |(φ1 − φ2)/φ1|,  e_ext21 = |(φ_ext21 − φ1)/φ_ext21|
  GCI_fine21 = 1.25 e_a21/(r21^p − 1)
"""

import math

import numpy as np
import pytest

from hornproof.compare.numerics import convergence as cv


def test_three_grid_worked_by_hand_constant_ratio():
    # Hand-worked example (our own numbers), r21 = r32 = 2 so q(p) = ln((2^p−1)/(2^p−1)) = 0:
    #   h = 1, 2, 4;  φ1 = 1.0100, φ2 = 1.0400, φ3 = 1.1600
    #   ε21 = 0.0300, ε32 = 0.1200, R = ε21/ε32 = 0.25 -> monotonic
    #   p = ln(0.12/0.03)/ln 2 = ln 4/ln 2 = 2
    #   φ_ext21 = (4·1.0100 − 1.0400)/(4 − 1) = 3.0000/3 = 1.0000
    #   e_a21 = 0.03/1.01 = 0.029703;  e_ext21 = 0.01/1.0000 = 0.010000
    #   GCI_fine21 = 1.25 · 0.029703/3 = 0.012376;  absolute = 1.25 · 0.03/3 = 0.012500
    est = cv.estimate_ladder([4.0, 1.0, 2.0], [1.16, 1.01, 1.04], formal_order=2.0)  # any order
    assert est.status == "monotonic"
    assert est.observed_order == pytest.approx(2.0, abs=1e-9)
    assert est.extrapolated_value == pytest.approx(1.0000, abs=1e-9)
    assert est.approximate_relative_error == pytest.approx(0.029703, abs=1e-6)
    assert est.extrapolated_relative_error == pytest.approx(0.010000, abs=1e-6)
    assert est.gci_fine_relative == pytest.approx(0.012376, abs=1e-6)
    assert est.uncertainty == pytest.approx(0.012500, abs=1e-9)
    assert est.safety_factor == 1.25 and est.confident
    assert est.cell_sizes == [1.0, 2.0, 4.0]


def test_three_grid_worked_by_hand_nonconstant_ratio():
    # The first column of Celik et al. (2008), Table 1, as recalled FROM MEMORY (checked here
    # only to the paper's printed rounding): N = 18000, 8000, 4500 cells (2D), so
    # r21 = sqrt(18000/8000) = 1.5, r32 = sqrt(8000/4500) = 1.3333;
    # φ1 = 6.063, φ2 = 5.972, φ3 = 5.863 -> p = 1.53, φ_ext21 = 6.1685, e_a21 = 1.5 %,
    # e_ext21 = 1.7 %, GCI_fine21 = 2.2 %.
    # Worked by hand with the formulas above: ε21 = −0.091, ε32 = −0.109, s = +1,
    # ln|ε32/ε21| = ln 1.1978 = 0.18049; start p0 = 0.18049/ln 1.5 = 0.4451;
    # q(p0) = ln((1.5^0.4451 − 1)/(1.3333^0.4451 − 1)) = 0.3701 -> p1 = 1.3578;
    # q(p1) = 0.4294 -> p2 = 1.5042; ... fixed point p = 1.5340 (1.5^p = 1.8626);
    # φ_ext21 = (1.8626·6.063 − 5.972)/0.8626 = 6.1685.
    r32 = math.sqrt(8000 / 4500)
    h = [1.0, 1.5, 1.5 * r32]
    est = cv.estimate_ladder(h, [6.063, 5.972, 5.863], formal_order=1.0)
    assert est.status == "monotonic" and est.confident
    assert est.observed_order == pytest.approx(1.53, abs=0.005)
    assert est.extrapolated_value == pytest.approx(6.1685, abs=0.0005)
    assert est.approximate_relative_error == pytest.approx(0.015, abs=0.0005)
    assert est.extrapolated_relative_error == pytest.approx(0.017, abs=0.0005)
    assert est.gci_fine_relative == pytest.approx(0.022, abs=0.0005)
    # An iteration cut short before converging reports failure (NaN), not a half answer.
    assert math.isnan(cv.observed_order(-0.091, -0.109, 1.5, r32, max_iterations=2))


def test_fixed_point_iterates_match_hand_work():
    # One step of eq. 3b from p0 = 0.4451 (hand value above) must give p1 = 1.3578.
    r21, r32 = 1.5, math.sqrt(8000 / 4500)
    p0 = math.log(0.109 / 0.091) / math.log(r21)
    assert p0 == pytest.approx(0.4451, abs=1e-4)
    q = math.log((r21**p0 - 1) / (r32**p0 - 1))
    assert q == pytest.approx(0.3701, abs=1e-4)
    # and the library's converged order satisfies the fixed-point equation itself
    p = cv.observed_order(-0.091, -0.109, r21, r32)
    q_p = math.log((r21**p - 1) / (r32**p - 1))
    assert p == pytest.approx(abs(math.log(0.109 / 0.091) + q_p) / math.log(r21), abs=1e-10)


@pytest.mark.parametrize("order", [1.0, 2.0])
def test_synthetic_series_recovers_order_and_limit(order):
    # φ(h) = φ0 + C h^p is the asymptotic error model behind Richardson extrapolation
    # (Roache 1997): three grids with non-uniform ratios must give back p and φ0 exactly
    # (to round-off), and the GCI must bound the true error |φ1 − φ0|.
    phi0, c = 15.3, -4.0
    h = np.array([0.05, 0.0725, 0.12])  # r21 = 1.45, r32 = 1.655
    phi = phi0 + c * h**order
    est = cv.estimate_ladder(h, phi, formal_order=order)
    assert est.status == "monotonic"
    assert est.observed_order == pytest.approx(order, rel=1e-8)
    assert est.extrapolated_value == pytest.approx(phi0, abs=1e-9)
    assert est.uncertainty >= abs(phi[0] - phi0)


def test_first_order_with_equal_differences_is_monotonic():
    # φ0 + C h on h = 1/24, 1/16, 1/12 (r21 = 1.5, r32 = 1.333) has ε21 = ε32 exactly, so
    # Celik's R = ε21/ε32 = 1 would read "divergent"; the series converges at p = 1 (by
    # construction), and per unit ln h the ratio is ln(1.333)/ln(1.5) = 0.71 < 1.
    cpw = np.array([12.0, 16.0, 24.0])
    est = cv.grid_convergence(15.0 - 20.0 / cpw, cells_per_wavelength=cpw)[0]
    assert est.status == "monotonic" and est.confident
    assert est.observed_order == pytest.approx(1.0, rel=1e-8)
    assert est.extrapolated_value == pytest.approx(15.0, abs=1e-9)
    assert cv.classify_ladder(-0.4, -0.4) == "divergent"  # same numbers, equal ratios
    assert cv.classify_ladder(-0.4, -0.4, r21=1.5, r32=4 / 3) == "monotonic"


def test_cells_per_wavelength_and_multi_frequency():
    # Two frequencies in one call; a cells-per-wavelength ladder (h ∝ 1/cpw), unsorted.
    cpw = np.array([30.0, 10.0, 20.0])
    h = 1.0 / cpw
    col1 = 2.0 + 0.5 * h           # p = 1
    col2 = -7.0 + 3.0 * h**2       # p = 2
    est = cv.grid_convergence(np.column_stack([col1, col2]), cells_per_wavelength=cpw,
                              formal_order=1.0, max_order=2.5)
    assert [e.status for e in est] == ["monotonic", "monotonic"]
    assert est[0].observed_order == pytest.approx(1.0, rel=1e-8)
    assert est[1].observed_order == pytest.approx(2.0, rel=1e-8)
    assert est[1].extrapolated_value == pytest.approx(-7.0, abs=1e-10)


def test_oscillatory_and_divergent_are_flagged_with_spread_bound():
    # R = ε21/ε32 < 0 oscillatory, R > 1 divergent (Celik et al. 2008): no extrapolated value
    # and no observed order; the uncertainty is a bound from the spread (max − min).
    osc = cv.estimate_ladder([1.0, 1.5, 2.25], [10.0, 10.2, 9.9])
    assert osc.status == "oscillatory"
    assert math.isnan(osc.extrapolated_value) and math.isnan(osc.observed_order)
    assert osc.uncertainty == pytest.approx(0.3) and osc.uncertainty_kind == "spread-bound"
    assert not osc.confident
    div = cv.estimate_ladder([1.0, 1.5, 2.25], [10.0, 10.5, 10.6])  # ε21 = 0.5 > ε32 = 0.1
    assert div.status == "divergent" and not div.confident
    assert div.uncertainty == pytest.approx(0.6)


def test_hertzian_dipole_two_grid_richardson():
    # Observed in an earlier development run of this project (a different model set-up; not a
    # reference value): point dipole directivity 1.80 / 1.57 / 1.53 at 10 / 20 / 30 cells per λ;
    # Richardson from the last two with p = 2 gives 1.499.
    # By hand: r = 30/20 = 1.5, r^2 = 2.25, (2.25·1.53 − 1.57)/1.25 = 1.498 (the quoted 1.499
    # comes from unrounded values; the inputs are rounded to 0.01, so tolerance 0.002).
    # The exact answer is 1.5 (Hertzian dipole; C. A. Balanis, Antenna Theory, 3rd ed., §4.2).
    est = cv.grid_convergence([1.57, 1.53], cells_per_wavelength=[20, 30], formal_order=2.0)[0]
    assert est.status == "two-grid" and "assumed-order" in est.flags
    assert est.extrapolated_value == pytest.approx(1.499, abs=0.002)
    assert est.safety_factor == 3.0
    assert est.uncertainty == pytest.approx(3.0 * 0.04 / 1.25, rel=1e-9)
    assert abs(1.53 - 1.5) <= est.uncertainty  # the GCI covers the true error
    # All three grids: ε21 = −0.04, ε32 = −0.23, r21 = 1.5, r32 = 2 -> monotonic with an order
    # near the expected second order (the Yee scheme is second order in a smooth medium with no
    # staircased walls; common practice, from memory).
    three = cv.grid_convergence([1.80, 1.57, 1.53], cells_per_wavelength=[10, 20, 30],
                                formal_order=2.0)[0]
    assert three.status == "monotonic"
    assert 1.7 < three.observed_order < 2.5
    assert three.extrapolated_value == pytest.approx(1.5, abs=0.01)


def test_non_monotonic_h_plane_ladder_is_flagged():
    # Observed in an earlier development run of this project (a different model set-up; not a
    # reference value): a narrow H-plane horn's ladder went up, then down, over 20 / 28 / 40
    # cells per λ with a spread of about 0.3 dB. The values below are invented to match that
    # description (up 0.3 dB, then down 0.2 dB).
    est = cv.grid_convergence([11.8, 12.1, 11.9], cells_per_wavelength=[20, 28, 40])[0]
    assert est.status == "oscillatory"
    assert not est.confident and "spread-bound" in est.flags
    assert est.uncertainty == pytest.approx(0.3, abs=1e-9)
    assert est.fine_value == pytest.approx(11.9)


def test_order_out_of_range_falls_back_to_formal_order():
    # p ≈ 5 from a ladder whose differences collapse: flagged and re-estimated with the
    # formal order (1) and Fs = 3 (Roache 1997); hornproof's floor carries the coarse pair to
    # the fine grid at the largest accepted order (2 × formal = 2): 3 ε32 / (2² (2² − 1)).
    h = np.array([1.0, 2.0, 4.0])
    phi = 1.0 + 0.01 * h**5
    est = cv.estimate_ladder(h, phi, formal_order=1.0)
    assert est.status == "monotonic" and "order-out-of-range" in est.flags
    assert est.observed_order == pytest.approx(5.0, rel=1e-6)
    assert est.order_used == 1.0 and est.safety_factor == 3.0 and est.confident  # through Fs = 3
    eps21, eps32 = phi[1] - phi[0], phi[2] - phi[1]
    assert est.uncertainty == pytest.approx(max(3 * eps21 / (2 - 1), 3 * eps32 / (4 * (4 - 1))))
    # Here the floor decides (0.93 vs 2.48); a fine pair that agrees by chance still gets one:
    lucky = cv.estimate_ladder(h, [1.0, 1.0 + 1e-9, 1.3], formal_order=1.0)
    assert lucky.uncertainty == pytest.approx(3 * 0.3 / 12, rel=1e-6)


def test_converged_single_and_bad_input():
    conv = cv.estimate_ladder([1, 2, 3], [5.0, 5.001, 5.0015], noise_floor=0.01)
    assert conv.status == "converged" and conv.uncertainty == pytest.approx(0.01)
    single = cv.estimate_ladder([1.0], [3.0])
    assert single.status == "single" and math.isnan(single.uncertainty)
    nan_dropped = cv.estimate_ladder([1.0, 2.0, 4.0], [1.0, np.nan, 1.2])
    assert nan_dropped.status == "two-grid"
    # JSON null (a grid that produced no value) is dropped the same way
    from_json = cv.grid_convergence([[1.0, 2.0], [None, 2.1], [1.2, 2.3]], cell_sizes=[1.0, 2.0, 4.0])
    assert from_json[0].status == "two-grid" and from_json[1].status == "monotonic"
    with pytest.raises(ValueError, match="cell_sizes"):
        cv.estimate_ladder([1.0, 1.0], [1.0, 2.0])
    with pytest.raises(ValueError, match="cells_per_wavelength"):
        cv.grid_convergence([1.0, 2.0])
    with pytest.raises(ValueError, match="values"):
        cv.grid_convergence([1.0, 2.0, 3.0], cells_per_wavelength=[10, 20])
