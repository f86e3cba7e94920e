"""Closed-form (quadratic-phase, Fresnel-integral) horn model."""

import numpy as np
import pytest
import scipy.special as sp
from scipy.optimize import minimize_scalar

from hornproof.analytic import closed_form as cf
from hornproof.analytic import line_source as ls
from hornproof.analytic.geometry import HornGeometry
from hornproof.analytic.pattern_metrics import cut_metrics
from hornproof.units import SPEED_OF_LIGHT, db10

F0 = 10.5e9
LAMBDA0 = SPEED_OF_LIGHT / F0
K0 = 2 * np.pi / LAMBDA0


# --- internal consistency: closed form == quadrature of the same field ----------------------
@pytest.mark.parametrize("kind", ["h-sectoral", "e-sectoral", "pyramidal"])
@pytest.mark.parametrize("theta_deg", [0.0, 4.0, -11.0, 27.0, 63.0, 89.0])
def test_plane_integrals_equal_their_quadrature(horns, complex_quad, kind, theta_deg):
    # internal consistency (not an outside check): same cosine/uniform field, same quadratic
    # phase, integrated by scipy's adaptive quadrature; required ≤ 1e-6 relative.
    horn = horns[kind]
    kappa = K0 * np.sin(np.radians(theta_deg))
    a_, r_h = horn.aperture_a, horn.apex_h
    b_, r_e = horn.aperture_b, horn.apex_e
    phase_h = 0.0 if not np.isfinite(r_h) else K0 / (2 * r_h)
    phase_e = 0.0 if not np.isfinite(r_e) else K0 / (2 * r_e)
    ref_h = complex_quad(lambda x: np.cos(np.pi * x / a_) * np.exp(-1j * phase_h * x * x + 1j * kappa * x), -a_ / 2, a_ / 2)
    ref_e = complex_quad(lambda y: np.exp(-1j * phase_e * y * y + 1j * kappa * y), -b_ / 2, b_ / 2)
    got_h = cf.h_plane_integral(kappa, a_, r_h, K0)
    got_e = cf.e_plane_integral(kappa, b_, r_e, K0)
    assert abs(got_h - ref_h) <= 1e-6 * abs(ref_h)
    assert abs(got_e - ref_e) <= 1e-6 * abs(ref_e)
    # measured: far tighter than required
    assert abs(got_h - ref_h) <= 1e-10 * abs(ref_h)


@pytest.mark.parametrize("kind", ["h-sectoral", "e-sectoral", "pyramidal"])
def test_directivity_and_pattern_equal_their_quadrature(horns, complex_quad, kind):
    # internal consistency: D = (4π/λ²)|∫E dA|²/∫|E|² dA with the quadrature's integrals,
    # at boresight and at one off-principal-plane direction (Huygens element factor).
    horn = horns[kind]
    a_, b_ = horn.aperture_a, horn.aperture_b
    bh = 0.0 if not np.isfinite(horn.apex_h) else K0 / (2 * horn.apex_h)
    be = 0.0 if not np.isfinite(horn.apex_e) else K0 / (2 * horn.apex_e)

    def field_integrals(kx, ky):
        ih = complex_quad(lambda x: np.cos(np.pi * x / a_) * np.exp(-1j * bh * x * x + 1j * kx * x), -a_ / 2, a_ / 2)
        ie = complex_quad(lambda y: np.exp(-1j * be * y * y + 1j * ky * y), -b_ / 2, b_ / 2)
        return ih, ie

    ih, ie = field_integrals(0.0, 0.0)
    d_ref = 4 * np.pi / LAMBDA0**2 * abs(ih * ie) ** 2 / (a_ / 2 * b_)
    assert cf.directivity(horn, F0) == pytest.approx(d_ref, rel=1e-6)
    theta, phi = np.radians(14.0), np.radians(35.0)
    ih, ie = field_integrals(K0 * np.sin(theta) * np.cos(phi), K0 * np.sin(theta) * np.sin(phi))
    p_ref = 4 * np.pi / LAMBDA0**2 * ((1 + np.cos(theta)) / 2) ** 2 * abs(ih * ie) ** 2 / (a_ / 2 * b_)
    assert cf.pattern(horn, F0, 14.0, 35.0) == pytest.approx(p_ref, rel=1e-6)


def test_fast_boresight_formula_equals_general_route(horns):
    # internal: the vectorised Fresnel (u, v, q) formula == the general line-integral assembly
    f = np.linspace(8e9, 12.4e9, 23)
    for horn in horns.values():
        lines = ls.horn_line_sources(horn)
        general = ls.directivity(cf._integral, cf._power, lines, f)
        np.testing.assert_allclose(cf.directivity(horn, f), general, rtol=1e-12)


# --- Balanis's directivity formulas, written as Balanis writes them --------------------------
# C. A. Balanis, Antenna Theory: Analysis and Design, 3rd ed. (Wiley 2005), ch. 13 "Horn
# Antennas" — formulas from memory of that chapter (equation numbers not verified; roughly
# (13-19) for D_E, (13-41)/(13-42) for D_H, (13-52) for the pyramidal identity). ρ1, ρ2 are
# the axial apex distances there; a, b the guide; a1, b1 the aperture. scipy.special.fresnel
# (the reference library) is used directly, not hornproof's wrapper.
def balanis_d_e(a, b1, rho1, lam):
    """E-plane sectoral: D_E = 64 a ρ1/(π λ b1)·[C²(q) + S²(q)], q = b1/√(2λρ1)."""
    s, c = sp.fresnel(b1 / np.sqrt(2 * lam * rho1))
    return 64 * a * rho1 / (np.pi * lam * b1) * (c**2 + s**2)


def balanis_d_h(b, a1, rho2, lam):
    """H-plane sectoral: D_H = 4π b ρ2/(λ a1)·{[C(u) − C(v)]² + [S(u) − S(v)]²},
    u, v = (1/√2)(√(λρ2)/a1 ± a1/√(λρ2))."""
    r = np.sqrt(lam * rho2)
    su, cu = sp.fresnel((r / a1 + a1 / r) / np.sqrt(2))
    sv, cv = sp.fresnel((r / a1 - a1 / r) / np.sqrt(2))
    return 4 * np.pi * b * rho2 / (lam * a1) * ((cu - cv) ** 2 + (su - sv) ** 2)


GEOMETRIES = [  # (A, B, flare length) on WR-90, m — invented sizes spanning small to large phase error
    (0.060, 0.045, 0.080), (0.090, 0.070, 0.160), (0.200, 0.150, 0.250), (0.150, 0.120, 0.600),
]


@pytest.mark.parametrize("big_a, big_b, length", GEOMETRIES)
def test_balanis_sectoral_directivities(wr90, big_a, big_b, length):
    a, b = wr90
    f = np.array([8.2e9, 10.0e9, 12.4e9])
    lam = SPEED_OF_LIGHT / f
    e_horn = HornGeometry("e-sectoral", a, b, a, big_b, length)
    h_horn = HornGeometry("h-sectoral", a, b, big_a, b, length)
    np.testing.assert_allclose(cf.directivity(e_horn, f), balanis_d_e(a, big_b, e_horn.apex_e, lam), rtol=1e-12)
    np.testing.assert_allclose(cf.directivity(h_horn, f), balanis_d_h(b, big_a, h_horn.apex_h, lam), rtol=1e-12)


@pytest.mark.parametrize("big_a, big_b, length", GEOMETRIES)
def test_balanis_pyramidal_identity(wr90, big_a, big_b, length):
    # Balanis ch. 13: D_P = (π λ²/(32 a b))·D_E·D_H, D_E with (a, b1, ρ1), D_H with (b, a1, ρ2)
    a, b = wr90
    f = np.array([8.2e9, 10.0e9, 12.4e9])
    lam = SPEED_OF_LIGHT / f
    horn = HornGeometry("pyramidal", a, b, big_a, big_b, length)
    d_p = np.pi * lam**2 / (32 * a * b) * balanis_d_e(a, big_b, horn.apex_e, lam) * balanis_d_h(b, big_a, horn.apex_h, lam)
    np.testing.assert_allclose(cf.directivity(horn, f), d_p, rtol=1e-12)


# --- no phase error: Silver's line-source table ---------------------------------------------
@pytest.fixture
def long_horn(wr90):
    """A 40λ × 40λ aperture at the end of a 10⁷ λ flare: peak phase errors ≈ 2e-5 λ."""
    a, b = wr90
    lam = SPEED_OF_LIGHT / 10e9
    return HornGeometry("pyramidal", a, b, 40 * lam, 40 * lam, 1e7 * lam), lam


def test_no_phase_error_limit_matches_silver_table_6_1(long_horn):
    # S. Silver, Microwave Antenna Theory and Design (1949), Table 6.1 (values from memory,
    # exactly reproducible): uniform — HPBW 0.886 λ/L rad, first null sinθ = λ/L, first
    # sidelobe −13.26 dB; cosine — HPBW 1.19 λ/L rad, first null sinθ = 1.5 λ/L, −23.0 dB.
    # L = 40 λ keeps the small-angle forms good to ~2e-4.
    horn, lam = long_horn
    theta = np.linspace(-6, 6, 12001)
    h_cut, e_cut = cf.principal_plane_cuts(horn, 10e9, theta)
    mh, me = cut_metrics(theta, db10(h_cut)), cut_metrics(theta, db10(e_cut))
    length = 40.0  # aperture in wavelengths
    # E-plane: uniform distribution
    assert np.radians(me["hpbw_deg"]) * length == pytest.approx(0.886, rel=2e-3)  # 3 figures quoted
    assert np.sin(np.radians(me["first_null_deg"])) * length == pytest.approx(1.0, rel=1e-4)
    assert me["sll_db"] == pytest.approx(-13.26, abs=0.01)
    # H-plane: cosine distribution
    assert np.radians(mh["hpbw_deg"]) * length == pytest.approx(1.19, rel=2e-3)
    assert np.sin(np.radians(mh["first_null_deg"])) * length == pytest.approx(1.5, rel=1e-4)
    assert mh["sll_db"] == pytest.approx(-23.0, abs=0.05)


def test_taper_efficiency_is_eight_over_pi_squared(long_horn):
    # TE10 cosine taper, uniform in y, no phase error: aperture efficiency 8/π² (exact)
    horn, lam = long_horn
    eff = cf.directivity(horn, 10e9) * lam**2 / (4 * np.pi * horn.aperture_a * horn.aperture_b)
    assert eff == pytest.approx(8 / np.pi**2, rel=1e-7)
    # and exactly with unflared planes
    lines = (ls.LineSource(0.3, np.inf, "cosine"), ls.LineSource(0.2, np.inf, "uniform"))
    d = ls.directivity(cf._integral, cf._power, lines, 10e9)
    assert d * lam**2 / (4 * np.pi * 0.3 * 0.2) == pytest.approx(8 / np.pi**2, rel=1e-14)


# --- optimum phase errors -------------------------------------------------------------------
def _plane_directivity(plane, size, apex):
    """|I(0)|²/∫|e|² of one plane: D ∝ this at fixed other plane."""
    taper = "cosine" if plane == "h" else "uniform"
    return abs(cf.line_integral(0.0, size, apex, K0, taper)) ** 2 / cf.line_power(size, apex, K0, taper)


@pytest.mark.parametrize("plane, expected", [("h", 0.3965), ("e", 0.2624)])
def test_optimum_peak_phase_error_at_fixed_apex(plane, expected):
    # S. J. Orfanidis, Electromagnetic Waves and Antennas, horn chapter: optimum σ_a ≈ 1.2593,
    # σ_b ≈ 1.0246 with S = σ²/4 → S ≈ 0.3965, T ≈ 0.2624 (published, 4-5 figures).
    apex = 25 * LAMBDA0
    res = minimize_scalar(lambda d: -_plane_directivity(plane, d, apex),
                          bounds=(np.sqrt(LAMBDA0 * apex), np.sqrt(8 * LAMBDA0 * apex)), method="bounded",
                          options={"xatol": 1e-10})
    phase_error = res.x**2 / (8 * LAMBDA0 * apex)
    assert phase_error == pytest.approx(expected, abs=2e-4)
    # in σ form, as Orfanidis tabulates it
    sigma = 2 * np.sqrt(phase_error)
    assert sigma == pytest.approx({"h": 1.2593, "e": 1.0246}[plane], abs=2e-4)


@pytest.mark.parametrize("plane, rule", [("h", 3.0), ("e", 2.0)])
def test_rules_of_thumb_are_near_optimal(plane, rule):
    # common practice: A ≈ √(3λρ_h), B ≈ √(2λρ_e) (S = 3/8, T = 1/4). At fixed apex they give
    # within 0.05 dB of the closed form's maximum (our tolerance; measured 0.006 / 0.005 dB).
    apex = 25 * LAMBDA0
    best = -minimize_scalar(lambda d: -_plane_directivity(plane, d, apex),
                            bounds=(np.sqrt(LAMBDA0 * apex), np.sqrt(8 * LAMBDA0 * apex)), method="bounded").fun
    at_rule = _plane_directivity(plane, np.sqrt(rule * LAMBDA0 * apex), apex)
    assert 0 <= 10 * np.log10(best / at_rule) < 0.05


def test_optimum_pyramidal_aperture_efficiency_about_half(wr90):
    # common practice ≈ 0.5; Balanis (ch. 13, optimum pyramidal horn) ≈ 51 %.
    # A pyramidal horn with S = 3/8 and T = 1/4 exactly (apex distances chosen for them):
    a, b = wr90
    big_a, big_b = 12 * LAMBDA0, 9 * LAMBDA0
    r_h, r_e = big_a**2 / (8 * LAMBDA0 * 3 / 8), big_b**2 / (8 * LAMBDA0 * 1 / 4)
    d = cf.boresight_directivity(big_a, big_b, r_h, r_e, LAMBDA0)
    eff = d * LAMBDA0**2 / (4 * np.pi * big_a * big_b)
    assert eff == pytest.approx(0.51, abs=0.01)


# --- aperture equivalents -------------------------------------------------------------------
def test_equivalents_agree_at_boresight_and_differ_by_the_known_factor(horns):
    # Balanis §12.5 / Table 12.1: Huygens E ∝ (1+cosθ)/2 in both planes; E-field (2M over a
    # ground plane) E ∝ 1 in the E-plane, cosθ in the H-plane (exact, by construction).
    theta = np.linspace(-89, 89, 179)
    horn = horns["pyramidal"]
    h_hu, e_hu = cf.principal_plane_cuts(horn, F0, theta, equivalent="huygens")
    h_ef, e_ef = cf.principal_plane_cuts(horn, F0, theta, equivalent="e-field")
    i0 = np.flatnonzero(theta == 0)[0]
    assert h_hu[i0] == pytest.approx(h_ef[i0], rel=1e-15)
    assert e_hu[i0] == pytest.approx(e_ef[i0], rel=1e-15)
    c = np.cos(np.radians(theta))
    np.testing.assert_allclose(e_hu / e_ef, ((1 + c) / 2) ** 2, rtol=1e-12)
    np.testing.assert_allclose(h_hu / h_ef, ((1 + c) / (2 * c)) ** 2, rtol=1e-12)


def test_unknown_equivalent_is_rejected(horns):
    with pytest.raises(ValueError, match="equivalent"):
        cf.principal_plane_cuts(horns["pyramidal"], F0, [0.0], equivalent="kirchhoff")


def test_full_pattern_contains_the_cuts_and_components(horns):
    horn = horns["pyramidal"]
    theta = np.linspace(-90, 90, 61)
    h_cut, e_cut = cf.principal_plane_cuts(horn, F0, theta)
    np.testing.assert_allclose(cf.pattern(horn, F0, theta, 0.0), h_cut, rtol=1e-12)
    np.testing.assert_allclose(cf.pattern(horn, F0, theta, 90.0), e_cut, rtol=1e-12, atol=1e-12 * e_cut.max())
    th, ph = np.meshgrid(np.arange(0, 91, 5.0), np.arange(0, 360, 15.0), indexing="ij")
    e_t, e_p = cf.pattern(horn, F0, th, ph, components=True)
    np.testing.assert_allclose(abs(e_t) ** 2 + abs(e_p) ** 2, cf.pattern(horn, F0, th, ph), rtol=1e-12)
    # E-plane: only E_θ; H-plane: only E_φ
    assert np.max(abs(cf.pattern(horn, F0, theta, 90.0, components=True)[1])) < 1e-6
    assert np.max(abs(cf.pattern(horn, F0, theta, 0.0, components=True)[0])) == 0


def test_pattern_power_integrates_to_about_one(horns):
    # aperture approximation: ∫D dΩ/(4π) ≈ 1 (radiated = aperture power) to ~ a few % for a
    # horn of several wavelengths (our tolerance 5 %; the small-aperture error is the point).
    horn = HornGeometry("pyramidal", 22.86e-3, 10.16e-3, 8 * LAMBDA0, 6 * LAMBDA0, 0.5)
    th = np.linspace(0, 180, 361)
    ph = np.linspace(0, 360, 361)[:-1]
    d = cf.pattern(horn, F0, th[:, None], ph[None, :])
    total = np.trapz(np.sum(d, axis=1) * np.radians(ph[1] - ph[0]) * np.sin(np.radians(th)), np.radians(th))
    assert total / (4 * np.pi) == pytest.approx(1.0, abs=0.05)


def test_rear_hemisphere_conventions(horns):
    # documented behaviour beyond 90°: the same formula; Huygens → 0 at 180°, e-field mirrors
    horn = horns["pyramidal"]
    theta = np.array([30.0, 150.0, 180.0])
    h_hu, e_hu = cf.principal_plane_cuts(horn, F0, theta)
    assert e_hu[2] < 1e-25 * e_hu[0]
    h_ef, e_ef = cf.principal_plane_cuts(horn, F0, theta, equivalent="e-field")
    assert e_ef[1] == pytest.approx(e_ef[0], rel=1e-12)
    assert h_ef[1] == pytest.approx(h_ef[0], rel=1e-12)


# --- phase reference ------------------------------------------------------------------------
def test_slant_phase_reference_uses_the_slant_lengths(horns):
    horn = horns["pyramidal"]
    f = np.array([9e9, 11e9])
    lam = SPEED_OF_LIGHT / f
    slant = cf.directivity(horn, f, phase_reference="slant")
    np.testing.assert_allclose(slant, cf.boresight_directivity(horn.aperture_a, horn.aperture_b, horn.slant_h,
                                                               horn.slant_e, lam), rtol=1e-14)
    assert np.all(slant > cf.directivity(horn, f))  # longer distance, smaller phase error here
    with pytest.raises(ValueError, match="phase_reference"):
        cf.directivity(horn, f, phase_reference="edge")


# --- 2D counterpart -------------------------------------------------------------------------
def test_two_dimensional_directivity_limits():
    # uniform line source of width w, no phase: D₂ = k w (2D maximum, exact); cosine: k w·8/π²
    w = 7.3 * LAMBDA0
    for taper, eff in (("uniform", 1.0), ("cosine", 8 / np.pi**2)):
        d2 = ls.directivity_2d(cf._integral, cf._power, ls.LineSource(w, np.inf, taper), F0)
        assert d2 == pytest.approx(K0 * w * eff, rel=1e-13)


def test_two_dimensional_cut_power_integrates_to_about_one(horns):
    # ∫ D₂ dθ / (2π) ≈ 1 in the aperture approximation (tolerance 5 %)
    theta = np.linspace(-180, 180, 3601)
    for kind in ("h-sectoral", "e-sectoral"):
        _, d2 = cf.flared_plane_cut_2d(horns[kind], F0, theta)
        assert np.trapz(d2, np.radians(theta)) / (2 * np.pi) == pytest.approx(1.0, abs=0.05)
    with pytest.raises(ValueError, match="dims"):
        cf.directivity_2d(horns["pyramidal"], F0)


def test_cut_shapes_over_frequency(horns):
    theta = np.linspace(-180, 180, 721)
    h, e = cf.principal_plane_cuts(horns["pyramidal"], np.array([9e9, 10e9, 11e9]), theta)
    assert h.shape == e.shape == (3, 721)
    h1, _ = cf.principal_plane_cuts(horns["pyramidal"], 10e9, theta)
    assert h1.shape == (721,)
    np.testing.assert_allclose(h1, h[1], rtol=1e-14)
    with pytest.raises(ValueError, match="frequency"):
        cf.directivity(horns["pyramidal"], [-1.0])
