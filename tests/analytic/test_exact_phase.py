"""Exact path-length model, and how far the quadratic (classical) approximation holds."""

import numpy as np
import pytest

from hornproof.analytic import closed_form as cf
from hornproof.analytic import exact_phase as ep
from hornproof.analytic import gain_reduction as gr
from hornproof.analytic.design import horn_from_slant_lengths
from hornproof.analytic.geometry import HornGeometry
from hornproof.units import SPEED_OF_LIGHT

F0 = 10.5e9
LAMBDA0 = SPEED_OF_LIGHT / F0
K0 = 2 * np.pi / LAMBDA0
THETA = np.linspace(-180, 180, 721)


@pytest.mark.parametrize("kind", ["h-sectoral", "e-sectoral", "pyramidal"])
def test_quadratic_law_reproduces_the_closed_form(horns, kind):
    # internal consistency: the quadrature with the closed form's own (quadratic) phase
    # equals the Fresnel-integral closed form — checks the node count and the assembly.
    horn = horns[kind]
    f = np.array([8.2e9, 10.5e9, 12.4e9])
    for got, ref in zip(ep.principal_plane_cuts(horn, f, THETA, phase_law="quadratic"),
                        cf.principal_plane_cuts(horn, f, THETA)):
        assert np.max(abs(got - ref)) <= 1e-10 * np.max(ref)
    np.testing.assert_allclose(ep.directivity(horn, f, phase_law="quadratic"), cf.directivity(horn, f), rtol=1e-12)
    th, ph = np.meshgrid(np.arange(0, 181, 10.0), np.arange(0, 360, 30.0), indexing="ij")
    np.testing.assert_allclose(ep.pattern(horn, F0, th, ph, phase_law="quadratic"), cf.pattern(horn, F0, th, ph),
                               rtol=1e-9, atol=1e-12 * cf.directivity(horn, F0))


@pytest.mark.parametrize("width_wl, apex_wl", [(3.0, 2.0), (12.0, 8.0), (40.0, 60.0), (80.0, 4000.0)])
def test_quadrature_has_converged(width_wl, apex_wl):
    # doubling the default Gauss–Legendre node count changes nothing beyond 1e-11 (relative to
    # the largest value), for every angle up to grazing, with and without the amplitude factor
    w, r = width_wl * LAMBDA0, apex_wl * LAMBDA0
    kappa = K0 * np.sin(np.radians(np.linspace(-90, 90, 361)))
    for taper in ("cosine", "uniform"):
        for amp in (False, True):
            n = ep.node_count(w, r, K0, K0, taper)
            base = ep.line_integral(kappa, w, r, K0, taper, amplitude_factor=amp)
            fine = ep.line_integral(kappa, w, r, K0, taper, amplitude_factor=amp, nodes=2 * n)
            assert np.max(abs(base - fine)) <= 1e-11 * np.max(abs(fine))


def test_node_count_grows_with_aperture_and_angle():
    assert ep.node_count(50 * LAMBDA0, 100 * LAMBDA0, K0, K0) > ep.node_count(5 * LAMBDA0, 100 * LAMBDA0, K0, K0)
    assert ep.node_count(5 * LAMBDA0, 100 * LAMBDA0, K0, K0) > ep.node_count(5 * LAMBDA0, 100 * LAMBDA0, 0.0, K0)


def test_exact_path_is_shorter_than_the_quadratic_one_for_an_axial_apex(horns):
    # geometry: √(R² + x²) − R < x²/(2R) (axial R), so the exact edge path is below S, T
    horn = horns["pyramidal"]
    assert horn.exact_edge_path_h(F0) < horn.phase_error_h(F0)
    assert ep.edge_path(horn.aperture_b, horn.apex_e, F0) == pytest.approx(horn.exact_edge_path_e(F0), rel=1e-12)


# --- where the classical formula holds ------------------------------------------------------
# "Pyramidal horn gain calculation with improved accuracy", IEEE AP-S Int. Symp. Digest 1992,
# doi:10.1109/APS.1992.221722 (abstract, published): results "equal to the previous
# approximate calculations for large apertures (A or B > 50 λ) or small peak aperture phase
# error (S or T < 0.2 λ)".
@pytest.mark.parametrize("plane", ["h", "e"])
@pytest.mark.parametrize("size_wl", [5.0, 10.0, 20.0])
@pytest.mark.parametrize("reference", ["axial", "slant"])
def test_classical_formula_holds_below_two_tenths_phase_error(plane, size_wl, reference):
    # our tolerance 0.05 dB (measured ≤ 0.01 dB at 5 λ, 0.19 λ)
    exact = gr.exact_reduction_from_phase_error_db(plane, 0.19, size_wl, phase_reference=reference)
    classical = (gr.h_plane_reduction_db if plane == "h" else gr.e_plane_reduction_db)(0.19)
    assert abs(exact - classical) < 0.05


@pytest.mark.parametrize("plane", ["h", "e"])
@pytest.mark.parametrize("reference", ["axial", "slant"])
def test_classical_formula_holds_for_large_apertures(plane, reference):
    # A or B > 50 λ: agreement within 0.05 dB (our tolerance) even at S or T = 1 λ
    exact = gr.exact_reduction_from_phase_error_db(plane, 1.0, 60.0, phase_reference=reference)
    classical = (gr.h_plane_reduction_db if plane == "h" else gr.e_plane_reduction_db)(1.0)
    assert abs(exact - classical) < 0.05


def test_sectoral_horns_with_small_phase_error_agree_in_directivity(wr90):
    # whole-model check over a band: S, T < 0.2 → exact and closed form within 0.05 dB
    a, b = wr90
    f = np.linspace(8.2e9, 12.4e9, 5)
    for horn in (HornGeometry("pyramidal", a, b, 0.090, 0.070, 0.160),
                 HornGeometry("h-sectoral", a, b, 0.080, b, 0.200),
                 HornGeometry("e-sectoral", a, b, a, 0.060, 0.200)):
        assert np.all(horn.phase_error_h(f) < 0.2) and np.all(horn.phase_error_e(f) < 0.2)
        diff = 10 * np.log10(ep.directivity(horn, f) / cf.directivity(horn, f))
        assert np.max(abs(diff)) < 0.05


# --- the 5 λ, 1 λ case of the same abstract: which convention reproduces it -----------------
# Abstract: "for A or B = 5 λ and S or T = 1 λ, the gain calculated using this improved
# accuracy method is reduced by more than 0.7 dB compared to the classical method." It does not
# say whether S, T use the axial apex distance or the slant length. Only the "lower by more
# than 0.7 dB" statement comes from the abstract; the dB figures below are hornproof's own
# computed values (regression pins, not published numbers):
#   E-plane, B = 5 λ, T = 1 λ:  axial convention −1.42 dB (reproduces it);  slant +0.93 dB (does not)
#   H-plane, A = 5 λ, S = 1 λ:  axial convention +0.25 dB (does not);       slant −2.23 dB (reproduces it)
#   pyramidal 5 λ × 5 λ, S = T = 1 λ: −1.17 dB (axial), −1.30 dB (slant): both reproduce it.
# With the axial convention the exact path is everywhere *shorter* than the quadratic one, yet
# the E-plane gain is lower: T = 1 λ lies just beyond the quadratic E-plane gain factor's deep
# minimum (≈ −10.5 dB near T ≈ 0.9 λ), where a smaller phase error means less gain, not more.
# That makes the E-plane case at exactly T = 1 ill-conditioned (the sign flips within
# T = 0.8 … 1.1 in both conventions). The well-conditioned H-plane, and the E-plane away from
# the trough, agree with the abstract only in the slant convention (test below).
def _exact_minus_classical_db(plane, reference, size_wl=5.0, phase_error=1.0):
    exact = gr.exact_reduction_from_phase_error_db(plane, phase_error, size_wl, phase_reference=reference)
    classical = (gr.h_plane_reduction_db if plane == "h" else gr.e_plane_reduction_db)(phase_error)
    return classical - exact  # gain difference exact − classical, dB


def test_ieee_1992_e_plane_case_with_axial_phase_error():
    # IEEE AP-S 1992 abstract (doi:10.1109/APS.1992.221722): B = 5 λ, T = 1 λ, exact gain lower
    # by more than 0.7 dB (the "< −0.7" check); taken here with T from the axial apex distance
    assert _exact_minus_classical_db("e", "axial") < -0.7
    # hornproof's own computed value, pinned as a regression (not from the abstract)
    assert _exact_minus_classical_db("e", "axial") == pytest.approx(-1.418, abs=0.005)  # pinned
    # with T quoted from the slant length the sign reverses: the abstract is not reproduced
    # (hornproof's own computed value, regression pin)
    assert _exact_minus_classical_db("e", "slant") == pytest.approx(+0.928, abs=0.005)


def test_ieee_1992_h_plane_case_with_slant_phase_error():
    # "< −0.7": the abstract's statement for A = 5 λ, S = 1 λ (doi:10.1109/APS.1992.221722)
    assert _exact_minus_classical_db("h", "slant") < -0.7
    # −2.229 and +0.251 dB: hornproof's own computed values, regression pins (not published)
    assert _exact_minus_classical_db("h", "slant") == pytest.approx(-2.229, abs=0.005)
    assert _exact_minus_classical_db("h", "axial") == pytest.approx(+0.251, abs=0.005)


def test_ieee_1992_pyramidal_case_in_both_conventions():
    # a 5 λ × 5 λ pyramidal horn with S = T = 1 λ: lower by > 0.7 dB whichever convention
    for reference in ("axial", "slant"):
        total = _exact_minus_classical_db("e", reference) + _exact_minus_classical_db("h", reference)
        assert total < -0.7


def test_slant_convention_matches_the_abstract_away_from_the_e_plane_trough():
    # H-plane, 5 λ: slant → exact lower by > 0.7 dB for S = 0.8 … 1.2; axial → exact never lower
    for s in (0.8, 0.9, 1.0, 1.1, 1.2):
        assert _exact_minus_classical_db("h", "slant", phase_error=s) < -0.7
    for s in (0.2, 0.4, 0.6, 0.8, 1.0, 1.2):
        assert _exact_minus_classical_db("h", "axial", phase_error=s) > 0
    # E-plane, 5 λ, either side of the trough: slant lower by > 0.7 dB; axial higher at 0.8
    for t in (0.8, 1.1):
        assert _exact_minus_classical_db("e", "slant", phase_error=t) < -0.7
    assert _exact_minus_classical_db("e", "axial", phase_error=0.8) > 0.7


def test_e_plane_gain_factor_rises_with_phase_error_at_one_wavelength():
    # the mechanism: dη_e/dT > 0 at T = 1 (past the minimum), so a shorter path lowers the gain
    t = np.array([0.85, 0.9, 0.95, 1.0, 1.05])
    eta = gr.e_plane_efficiency(t)
    assert eta[4] > eta[3] > eta[2]
    assert np.argmin(eta) in (0, 1, 2)


def test_slant_specified_horn_matches_the_slant_closed_form():
    # a horn given by slant lengths: the closed form with phase_reference="slant" is the
    # classical formula for it; the exact model uses its true axial apex distances
    lam = LAMBDA0
    big_b = 5 * lam
    slant_e = big_b**2 / (8 * lam * 1.0)  # T = 1 λ from the slant length
    horn = horn_from_slant_lengths("e-sectoral", 0.9 * lam, 0.4 * lam, 0.9 * lam, big_b, slant_e=slant_e)
    assert horn.slant_e == pytest.approx(slant_e, rel=1e-12)
    classical = 10 * np.log10(cf.directivity(horn, F0, phase_reference="slant"))
    exact = 10 * np.log10(ep.directivity(horn, F0))
    assert exact - classical == pytest.approx(_exact_minus_classical_db("e", "slant"), abs=1e-9)


# --- amplitude factor -----------------------------------------------------------------------
def test_amplitude_factor_power_and_long_horn_limit(complex_quad):
    w, r = 6 * LAMBDA0, 4 * LAMBDA0
    p = ep.line_power(w, r, K0, "cosine", amplitude_factor=True)
    ref = complex_quad(lambda x: np.cos(np.pi * x / w) ** 2 * r / np.sqrt(r * r + x * x), -w / 2, w / 2, points=20)
    assert float(p) == pytest.approx(ref.real, rel=1e-12)
    # for a very long horn the factor is ≈ 1: no change in directivity beyond 1e-8
    long = HornGeometry("pyramidal", 22.86e-3, 10.16e-3, 0.2, 0.15, 1e4)
    assert ep.directivity(long, F0, amplitude_factor=True) == pytest.approx(ep.directivity(long, F0), rel=1e-8)


def test_bad_phase_law_is_rejected(horns):
    with pytest.raises(ValueError, match="phase_law"):
        ep.directivity(horns["pyramidal"], F0, phase_law="cubic")
