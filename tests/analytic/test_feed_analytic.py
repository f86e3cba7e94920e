"""Phase centre, Ludwig-3 cross-polarisation and reflector efficiencies against outside facts.

Each check names its source; "exact" marks a closed form derived from the stated physics.
"""

import numpy as np
import pytest

from hornproof.analytic import closed_form, exact_phase
from hornproof.analytic.cross_polar import huygens_source, ludwig3, peak_cross_polar, short_dipole
from hornproof.analytic.geometry import HornGeometry
from hornproof.analytic.phase_centre import fit_phase_centre, phase_centres, shift_reference
from hornproof.analytic.reflector_efficiency import (best_focus, edge_taper_db, f_over_d_from_half_angle,
                                                     half_angle_from_f_over_d, reflector_efficiencies,
                                                     space_attenuation_db)

K = 2 * np.pi / 0.03  # 10 GHz, rad/m
THETA_CUT = np.arange(-180.0, 180.5, 0.5)


# --- phase centre ---------------------------------------------------------------------------
@pytest.mark.parametrize("d", [0.0, 0.012, -0.037])
def test_point_source_displaced_gives_its_displacement(d):
    # exact: a source at z = d radiates e^{+jkd cosθ} about the origin (e^{+jωt}); any real
    # amplitude pattern keeps that phase
    th = np.radians(THETA_CUT)
    field = np.cos(th / 2) ** 4 * np.exp(1j * K * d * np.cos(th)) * np.exp(0.7j)
    fit = fit_phase_centre(THETA_CUT, field, K)
    assert fit["displacement_m"] == pytest.approx(d, abs=1e-12)
    assert fit["ripple_peak_deg"] < 1e-9
    # the −10 dB window of cos⁴(θ/2) in amplitude: 80 log10 cos(θ/2) = −10 → θ ≈ 82.8° (exact),
    # to the last 0.5° sample inside it
    assert fit["window_deg"] == pytest.approx(np.degrees(2 * np.arccos(10 ** (-10 / 80))), abs=0.5)


def test_moving_the_reference_to_the_phase_centre_flattens_the_phase():
    th = np.radians(THETA_CUT)
    field = np.cos(th / 2) ** 6 * np.exp(1j * K * 0.02 * np.cos(th))
    moved = shift_reference(field, THETA_CUT, K, 0.02)
    assert fit_phase_centre(THETA_CUT, moved, K)["displacement_m"] == pytest.approx(0.0, abs=1e-12)


def test_aperture_without_phase_error_has_its_phase_centre_in_the_aperture():
    # exact: a real, even aperture distribution (no flare: apex at infinity) has a real far field
    # with constant phase over the main lobe, so the phase centre is the aperture plane
    horn = HornGeometry(kind="pyramidal", guide_a=22.86e-3, guide_b=10.16e-3, aperture_a=80e-3,
                        aperture_b=60e-3, flare_length=70e-3, wall_thickness=1e-3)
    e_t, e_p = exact_phase.pattern(horn, 10e9, THETA_CUT, 0.0, components=True, phase_law="quadratic",
                                   nodes=400)
    flat_h = exact_phase.line_integral(K * np.sin(np.radians(THETA_CUT)), 80e-3, np.inf, K, "cosine")
    fit = fit_phase_centre(THETA_CUT, flat_h, K)
    assert fit["displacement_m"] == pytest.approx(0.0, abs=1e-9)
    # with the horn's quadratic phase error the centre lies behind the aperture (towards the
    # apex), and no farther back than the apex: geometric optics for a wave from the apex
    # (common practice; E. I. Muehldorf 1970 shows the centre moving from the aperture towards
    # the apex as the phase error grows — shape from memory, no values read off his curves)
    fit_h = fit_phase_centre(THETA_CUT, e_p, K)
    assert -horn.apex_h < fit_h["displacement_m"] < 0


def test_phase_centre_moves_towards_the_apex_as_the_flare_error_grows():
    # common practice (Muehldorf 1970, trend from memory): longer phase error → centre further
    # behind the aperture, as a fraction of the apex distance
    fractions = []
    for flare in (0.40, 0.15, 0.06):  # shorter horn → larger phase error
        horn = HornGeometry(kind="h-sectoral", guide_a=22.86e-3, guide_b=10.16e-3, aperture_a=90e-3,
                            aperture_b=10.16e-3, flare_length=flare, wall_thickness=1e-3)
        _, e_p = closed_form.pattern(horn, 10e9, THETA_CUT, 0.0, components=True)
        fit = fit_phase_centre(THETA_CUT, e_p, K)
        fractions.append(-fit["displacement_m"] / horn.apex_h)
    assert fractions[0] < fractions[1] < fractions[2]
    assert 0 < fractions[0] and fractions[2] <= 1.0


def test_phase_centres_per_frequency_and_bad_input():
    th = np.radians(THETA_CUT)
    k = np.array([K, 1.1 * K])
    fields = np.cos(th / 2) ** 4 * np.exp(1j * k[:, None] * 0.01 * np.cos(th))
    out = phase_centres(THETA_CUT, fields, k)
    assert np.allclose(out["displacement_m"], 0.01, atol=1e-12)
    with pytest.raises(ValueError, match="level_db"):
        fit_phase_centre(THETA_CUT, fields[0], K, level_db=3.0)
    assert np.isnan(fit_phase_centre(THETA_CUT, np.full(THETA_CUT.size, np.nan), K)["displacement_m"])


# --- Ludwig-3 cross-polarisation -------------------------------------------------------------
def test_huygens_source_has_no_cross_polar_field_anywhere():
    # Ludwig 1973, definition 3: the reference *is* the Huygens source's polarisation (exact)
    th, ph = np.meshgrid(np.radians(np.arange(0, 181, 5.0)), np.radians(np.arange(0, 360, 7.5)))
    co, cross = ludwig3(*huygens_source(th, ph), ph)
    assert np.max(np.abs(cross)) < 1e-15
    assert np.allclose(np.abs(co) ** 2, 3 * ((1 + np.cos(th)) / 2) ** 2)


def test_short_dipole_45_degree_cross_polar_level_in_closed_form():
    # exact (any antenna text's short-dipole field, with Ludwig's definition 3): at φ = 45°
    # co = (1 + cosθ)/2, cross = −(1 − cosθ)/2 (× √1.5), so cross/co = tan²(θ/2) and the peak
    # cross-polar level over the front hemisphere is at θ = 90°, (1/2)² → −6.02 dB of the
    # co-polar peak
    theta = np.arange(-180.0, 180.5, 0.5)
    th = np.radians(np.abs(theta))
    phi = np.where(theta >= 0, np.pi / 4, np.pi / 4 + np.pi)
    co, cross = ludwig3(*short_dipole(th, phi), phi)
    assert np.allclose(np.abs(cross / np.where(co == 0, np.nan, co))[np.abs(theta) < 170],
                       np.tan(th / 2)[np.abs(theta) < 170] ** 2)
    level, angle = peak_cross_polar(theta, co, cross)
    assert level == pytest.approx(20 * np.log10(0.5), abs=1e-9)
    assert abs(angle) == pytest.approx(90.0)
    # total directivity still 1.5 (1 − (r̂·ŷ)²): power is not lost in the split
    ry = np.sin(th) * np.sin(phi)
    assert np.allclose(np.abs(co) ** 2 + np.abs(cross) ** 2, 1.5 * (1 - ry**2))


def test_aperture_equivalents_differ_in_cross_polar_level():
    # exact (line_source module notes): the Huygens equivalent is Ludwig-3 co-polar, the E-field
    # equivalent leaves sinφ cosφ (1 − cosθ) × F in the cross-polar part
    horn = HornGeometry(kind="pyramidal", guide_a=22.86e-3, guide_b=10.16e-3, aperture_a=80e-3,
                        aperture_b=60e-3, flare_length=70e-3, wall_thickness=1e-3)
    theta = np.arange(-90.0, 90.5, 0.5)
    phi_deg = np.where(theta >= 0, 45.0, 225.0)
    for equivalent, zero in (("huygens", True), ("e-field", False)):
        e_t, e_p = exact_phase.pattern(horn, 10e9, np.abs(theta), phi_deg, equivalent=equivalent, components=True)
        co, cross = ludwig3(e_t, e_p, np.radians(phi_deg))
        level, _ = peak_cross_polar(theta, co, cross)
        assert (level == -np.inf or level < -200) if zero else (-40 < level < -10)


# --- reflector efficiencies --------------------------------------------------------------------
THETA_S = np.arange(0.0, 180.01, 0.25)
PHI_Q = np.arange(0.0, 90.01, 7.5)


def cos_n_feed(n, theta_deg=THETA_S, phi_deg=PHI_Q):
    """Ludwig-3 co-polar cosⁿ feed: G = 2(n+1) cosⁿθ in front, 0 behind (no cross-polar)."""
    th = np.radians(theta_deg)[:, None] * np.ones(len(phi_deg))[None, :]
    g = np.sqrt(2 * (n + 1) * np.clip(np.cos(th), 0, None) ** n)
    return g.astype(complex)


@pytest.mark.parametrize("n,theta0_deg", [(2, 60.0), (4, 50.0), (2, 80.0)])
def test_cos_n_spillover_and_aperture_efficiency_in_closed_form(n, theta0_deg):
    # Stutzman & Thiele, Antenna Theory and Design, 2nd ed., ch. 7 (cosⁿ feeds, from memory):
    # spillover efficiency 1 − cos^{n+1}θ₀ (exact, from ∫ 2(n+1) cosⁿθ dΩ / 4π), and for n = 2
    # the aperture efficiency 24 [sin²(θ₀/2) + ln cos(θ₀/2)]² cot²(θ₀/2) (also Silver 1949);
    # no cross-polar field and a flat phase → polarisation and phase efficiencies 1
    t0 = np.radians(theta0_deg)
    eff = reflector_efficiencies(THETA_S, PHI_Q, cos_n_feed(n), None, t0, quadrant=True)
    assert eff["spillover"] == pytest.approx(1 - np.cos(t0) ** (n + 1), abs=2e-4)
    assert eff["polarisation"] == pytest.approx(1.0, abs=1e-12)
    assert eff["phase"] == pytest.approx(1.0, abs=1e-12)
    product = eff["spillover"] * eff["polarisation"] * eff["phase"] * eff["taper"]
    assert product == pytest.approx(eff["aperture"], rel=1e-12)
    if n == 2:
        closed = 24 * (np.sin(t0 / 2) ** 2 + np.log(np.cos(t0 / 2))) ** 2 / np.tan(t0 / 2) ** 2
        assert eff["aperture"] == pytest.approx(closed, abs=2e-4)


def test_maximum_aperture_efficiency_near_minus_11_db_edge_illumination():
    # common practice (Stutzman & Thiele ch. 7, and the trade's rule of thumb): for cosⁿ feeds
    # the best aperture efficiency is about 0.8, with an edge illumination (feed taper plus the
    # space attenuation) near −11 dB
    for n in (2, 4, 8):
        angles = np.radians(np.arange(20.0, 90.0, 1.0))
        etas = [reflector_efficiencies(THETA_S, PHI_Q, cos_n_feed(n), None, t, quadrant=True)["aperture"]
                for t in angles]
        best = int(np.argmax(etas))
        edge = 10 * n * np.log10(np.cos(angles[best])) + space_attenuation_db(angles[best])
        assert 0.78 < etas[best] < 0.84
        assert -13.0 < edge < -9.0


def test_ideal_feed_gives_unit_taper_and_aperture_efficiency():
    # exact: |g| ∝ sec²(θ/2) inside θ₀ and nothing outside illuminates the aperture uniformly
    t0 = np.radians(60.0)
    th = np.radians(THETA_S)[:, None] * np.ones(PHI_Q.size)
    g = np.where(th <= t0 + 1e-12, 1 / np.cos(th / 2) ** 2, 0.0).astype(complex)
    theta = np.arange(0.0, 180.01, 0.05)
    th = np.radians(theta)[:, None] * np.ones(PHI_Q.size)
    g = np.where(th <= t0 + 1e-12, 1 / np.cos(th / 2) ** 2, 0.0).astype(complex)
    eff = reflector_efficiencies(theta, PHI_Q, g, None, t0, quadrant=True)
    assert eff["taper"] == pytest.approx(1.0, abs=1e-4)
    assert eff["aperture"] == pytest.approx(1.0, abs=2e-3)  # the step at θ₀ costs the trapezoid a little


def test_displaced_feed_loses_phase_efficiency_and_best_focus_finds_it():
    # exact: a feed whose phase centre sits d in front of the focus has phase e^{+jkd cosθ};
    # best_focus returns d, and about it the phase efficiency is 1 again
    t0 = np.radians(65.0)
    d = 0.3 * 0.03
    th = np.radians(THETA_S)[:, None]
    g = cos_n_feed(2) * np.exp(1j * K * d * np.cos(th))
    off = reflector_efficiencies(THETA_S, PHI_Q, g, None, t0, quadrant=True)
    assert off["phase"] < 0.97
    found = best_focus(THETA_S, PHI_Q, g, K, t0, quadrant=True)
    assert found == pytest.approx(d, abs=1e-5)
    moved = g * np.exp(-1j * K * found * np.cos(th))
    assert reflector_efficiencies(THETA_S, PHI_Q, moved, None, t0, quadrant=True)["phase"] == pytest.approx(1, abs=1e-6)


def test_full_and_quadrant_grids_agree_and_geometry_helpers():
    phi_full = np.arange(0.0, 360.0, 7.5)
    t0 = np.radians(55.0)
    a = reflector_efficiencies(THETA_S, PHI_Q, cos_n_feed(3), None, t0, quadrant=True)
    b = reflector_efficiencies(THETA_S, phi_full, cos_n_feed(3, phi_deg=phi_full), None, t0)
    for key in a:
        assert a[key] == pytest.approx(b[key], rel=1e-9)
    # f/D = 1/(4 tan(θ₀/2)): f/D = 0.25 puts the focus in the aperture plane, θ₀ = 90° (exact)
    assert np.degrees(half_angle_from_f_over_d(0.25)) == pytest.approx(90.0)
    assert f_over_d_from_half_angle(half_angle_from_f_over_d(0.4)) == pytest.approx(0.4)
    with pytest.raises(ValueError, match="f_over_d"):
        half_angle_from_f_over_d(-1.0)
    with pytest.raises(ValueError, match="phi_deg"):
        reflector_efficiencies(THETA_S, PHI_Q[:-1], cos_n_feed(2)[:, :-1], None, t0, quadrant=True)
    # edge taper of a cos² power pattern at 60°: 10 log10 cos²60° = −6.02 dB (exact)
    theta = np.arange(-90.0, 90.5, 0.5)
    cut = 10 * np.log10(np.clip(np.cos(np.radians(theta)), 1e-30, None) ** 2)
    assert edge_taper_db(theta, cut, 60.0) == pytest.approx(20 * np.log10(0.5), abs=1e-3)


def test_beamwidth_at_level_of_a_cosine_power_pattern():
    # exact: a cos^n θ power pattern is −10 dB at cos θ = 10^(−1/n) (linear interpolation in dB
    # on a 0.1° grid is good to ~1e-3°)
    from hornproof.analytic.beam_level import beamwidth_at_level
    theta = np.arange(-90.0, 90.05, 0.1)
    for n in (2, 6, 20):
        cut = 10 * n * np.log10(np.clip(np.cos(np.radians(theta)), 1e-30, None))
        expected = 2 * np.degrees(np.arccos(10 ** (-1 / n)))
        assert beamwidth_at_level(theta, cut, -10.0) == pytest.approx(expected, abs=2e-3)
    flat = np.zeros_like(theta)
    assert np.isnan(beamwidth_at_level(theta, flat, -10.0))
