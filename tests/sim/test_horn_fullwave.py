"""Full-wave horn models against outside facts.

* Power balance on a lossless (PEC) model: radiated = incident − reflected (fact of the trade).
* A mirror-symmetric horn fed in TE10 has patterns symmetric about boresight, and a run using
  the mirror planes equals the full run (mirror symmetry of Maxwell's equations; fact of the
  trade).
* Aperture theory for a long, gently flared horn: D = (4π/λ²) · (8/π²) A B · L_H · L_E with the
  TE10 cosine taper across A, uniform field across B and the quadratic aperture phase
  exp(−j k x² / (2 R)) over each plane (C. A. Balanis, *Antenna Theory*, 3rd ed., ch. 13,
  pyramidal horn; R the axial apex distances). It holds best when the phase errors are small
  and the aperture is several wavelengths, which is why the test horn is long and gentle.
* 2D line source (the flared plane alone): D₂ = 2π |∫E dx|² / (λ ∫|E|² dx) for a line
  aperture field E(x) (from the 2D radiation integral; same aperture field as above).
"""

import numpy as np
import pytest

from hornproof.analytic.geometry import HornGeometry
from hornproof.sim.surface import ClosedSurface
from hornproof.sim.settings import FdtdSettings
from hornproof.units import SPEED_OF_LIGHT

WR90 = (22.86e-3, 10.16e-3)  # EIA RS-261 / IEC 60153-2 WR-90, 0.900 x 0.400 in (from memory)
SMALL = HornGeometry("pyramidal", *WR90, 45e-3, 35e-3, 40e-3, 1e-3)
# 3.2 λ x 2.6 λ aperture, 7 λ long at 10 GHz: peak phase errors S = 0.14 λ, T = 0.11 λ
GENTLE = HornGeometry("pyramidal", *WR90, 96e-3, 78e-3, 210e-3, 1e-3)
GENTLE_H = HornGeometry("h-sectoral", *WR90, 96e-3, WR90[1], 210e-3, 1e-3)
GENTLE_E = HornGeometry("e-sectoral", *WR90, WR90[0], 78e-3, 210e-3, 1e-3)


def _line_factor(width, apex, wavelength, taper):
    """|∫E|² and ∫|E|² of a line aperture with quadratic phase (trapezoidal quadrature)."""
    x = np.linspace(-width / 2, width / 2, 4001)
    amplitude = np.cos(np.pi * x / width) if taper == "cosine" else np.ones_like(x)
    k = 2 * np.pi / wavelength
    phase = np.exp(-1j * k * x**2 / (2 * apex)) if np.isfinite(apex) else 1.0
    return abs(np.trapz(amplitude * phase, x)) ** 2, np.trapz(amplitude**2, x)


def aperture_directivity(horn, frequency):
    """Balanis ch. 13 aperture model, boresight directivity (linear)."""
    wl = SPEED_OF_LIGHT / frequency
    ih, nh = _line_factor(horn.aperture_a, horn.apex_h, wl, "cosine")
    ie, ne = _line_factor(horn.aperture_b, horn.apex_e, wl, "uniform")
    return 4 * np.pi / wl**2 * ih * ie / (nh * ne)


def line_source_directivity(width, apex, frequency, taper):
    wl = SPEED_OF_LIGHT / frequency
    integral, norm = _line_factor(width, apex, wl, taper)
    return 2 * np.pi * integral / (wl * norm)


def test_aperture_model_without_phase_error_is_the_textbook_value():
    # no phase error: D = (4π/λ²)(8/π²)AB exactly (aperture efficiency 8/π² of the TE10 cosine
    # taper; Balanis, Antenna Theory, 3rd ed., ch. 13, from memory of the equation form)
    flat = HornGeometry("pyramidal", *WR90, 96e-3, 78e-3, 1e6, 1e-3)
    wl = SPEED_OF_LIGHT / 10e9
    assert aperture_directivity(flat, 10e9) == pytest.approx(4 * np.pi / wl**2 * 8 / np.pi**2 * 96e-3 * 78e-3, rel=1e-4)


def test_back_face_strips_tile_the_face_around_the_hole():
    surface = ClosedSurface(3, (0.0, 0.0, 0.5), (2.0, 1.5, 1.0), hole_half=(0.5, 0.25))
    back = [(c, s) for c, s, w in surface.regions() if abs(c[2] - (-0.5)) < 1e-12]
    area = sum(s[0] * s[1] for c, s in back)
    assert len(back) == 4
    assert area == pytest.approx(4 * 2.0 * 1.5 - 4 * 0.5 * 0.25)
    assert all(w == (1.0 if c[2] > 0 else -1.0) for c, s, w in surface.regions() if s[2] == 0.0)


@pytest.mark.fullwave
def test_power_balance_and_gain_of_a_small_horn():
    from hornproof.sim.run import simulate

    result = simulate(SMALL, np.array([9e9, 10e9, 11e9]), FdtdSettings(pattern_step_deg=3.0), 14)
    extra = result.extra
    # radiated (closed-box flux) = incident − reflected (PEC, lossless) within 2 %
    assert np.all(np.abs(extra["power_balance_error"]) < 0.02)
    accepted = extra["incident_power"] - extra["reflected_power"]
    assert extra["radiated_power"] == pytest.approx(accepted, rel=0.02)
    # gain = radiation efficiency × directivity (IEEE Std 145-2013); PEC walls: efficiency 1,
    # so G = D exactly: the power-balance error does not leak into gain
    assert result.run["radiation_efficiency"] == 1.0
    assert np.array_equal(extra["gain_dbi"], result.directivity_dbi)
    # realized gain = G (1 − |S11|²) (IEEE Std 145-2013), so realized gain ≤ G ≤ D
    mismatch = -10 * np.log10(1 - np.abs(extra["s11_real"] + 1j * extra["s11_imag"]) ** 2)
    assert extra["gain_dbi"] - extra["realized_gain_dbi"] == pytest.approx(mismatch, abs=1e-9)
    assert np.all(extra["gain_dbi"] <= result.directivity_dbi)
    assert np.all(extra["realized_gain_dbi"] <= extra["gain_dbi"])
    # a horn is a well matched antenna: |S11| below −10 dB (common practice, from memory)
    assert np.all(extra["s11_db"] < -10.0)
    assert result.run["wall_thickness_modelled_m"] >= 2 * result.run["grid_step_m"] - 1e-12


@pytest.mark.fullwave
def test_mirror_symmetric_run_equals_full_run():
    from hornproof.sim.run import simulate

    freqs = np.array([9.5e9, 11e9])
    with_mirrors = simulate(SMALL, freqs, FdtdSettings(use_symmetry=True, pattern_step_deg=3.0), 8)
    full = simulate(SMALL, freqs, FdtdSettings(use_symmetry=False, pattern_step_deg=3.0), 8)
    assert with_mirrors.run["symmetry"] and not full.run["symmetry"]
    # same answer within 1 % (directivity, radiated power, |S11|)
    d_sym = 10 ** (with_mirrors.directivity_dbi / 10)
    d_full = 10 ** (full.directivity_dbi / 10)
    assert d_sym == pytest.approx(d_full, rel=0.01)
    assert with_mirrors.extra["radiated_power"] == pytest.approx(full.extra["radiated_power"], rel=0.01)
    s_sym = np.abs(with_mirrors.extra["s11_real"] + 1j * with_mirrors.extra["s11_imag"])
    s_full = np.abs(full.extra["s11_real"] + 1j * full.extra["s11_imag"])
    assert s_sym == pytest.approx(s_full, rel=0.01, abs=1e-3)
    # the full run, free to be asymmetric, is symmetric about boresight (main beam, ±60°)
    theta = full.theta_deg
    keep = np.abs(theta) <= 60
    for cut in (full.h_plane_dbi, full.e_plane_dbi):
        assert np.max(np.abs(cut[:, keep] - cut[:, keep][:, ::-1])) < 0.1


@pytest.mark.fullwave
def test_gentle_horn_directivity_matches_aperture_theory_at_16_cells():
    from hornproof.sim.run import simulate

    result = simulate(GENTLE, np.array([10e9]), FdtdSettings(pattern_step_deg=3.0), 16)
    expected = 10 * np.log10(aperture_directivity(GENTLE, 10e9))
    # within 0.5 dB of aperture theory (measured here at 10 GHz: 19.19 / 19.41 / 19.07 /
    # 19.15 dBi at 10 / 12 / 16 / 20 cells against 18.98 dBi). 16 cells, not fewer: at 10 and
    # 12 the wall staircase steps every ~λ/2 and reflects coherently (S11 −1.3 dB at 12 cells)
    assert result.directivity_dbi[0] == pytest.approx(expected, abs=0.5)
    assert not result.run["warnings"]
    assert abs(result.extra["power_balance_error"][0]) < 0.02
    # a long gentle flare is well matched: |S11| < −20 dB (common practice; measured −33 dB)
    assert result.extra["s11_db"][0] < -20.0


def test_coarse_staircase_is_flagged():
    from hornproof.sim.layout import plan_layout
    from hornproof.sim.walls import staircase_warnings

    layout = plan_layout(GENTLE, np.array([9e9, 10e9]), FdtdSettings(), 12)
    assert staircase_warnings(layout, layout.meep_frequency(np.array([9e9, 10e9])))


@pytest.mark.fullwave
@pytest.mark.slow
def test_gentle_horn_directivity_matches_aperture_theory_at_20_cells():
    from hornproof.sim.run import simulate

    result = simulate(GENTLE, np.array([9e9, 10e9]), FdtdSettings(pattern_step_deg=2.0), 20)
    expected = 10 * np.log10([aperture_directivity(GENTLE, f) for f in (9e9, 10e9)])
    assert result.directivity_dbi == pytest.approx(expected, abs=0.5)
    assert np.all(np.abs(result.extra["power_balance_error"]) < 0.02)


@pytest.mark.fullwave
def test_h_sectoral_2d_model_matches_line_source():
    from hornproof.sim.run import simulate

    freqs = np.array([9e9, 10e9])
    result = simulate(GENTLE_H, freqs, FdtdSettings(dims=2, pattern_step_deg=1.0), 20)
    # TE10 cosine taper across A with the H-plane quadratic phase
    expected = 10 * np.log10([line_source_directivity(GENTLE_H.aperture_a, GENTLE_H.apex_h, f, "cosine")
                              for f in freqs])
    assert result.dims == 2
    assert result.directivity_dbi == pytest.approx(expected, abs=0.3)
    assert np.all(np.isnan(result.e_plane_dbi))
    assert np.all(np.abs(result.extra["power_balance_error"]) < 0.02)
    # 2D gains per unit length follow the same definitions: realized ≤ G = D (PEC walls). To
    # 1e-9 dB, not bit for bit: in full-suite runs from a fresh clone the two differed in the
    # last bit (cause not found; both come from the same boresight directivity times 1)
    np.testing.assert_allclose(result.extra["gain_dbi"], result.directivity_dbi, rtol=0, atol=1e-9)
    assert np.all(result.extra["realized_gain_dbi"] <= result.extra["gain_dbi"])


@pytest.mark.fullwave
def test_e_sectoral_2d_model_matches_line_source():
    from hornproof.sim.run import simulate

    freqs = np.array([9e9, 10e9])
    result = simulate(GENTLE_E, freqs, FdtdSettings(dims=2, pattern_step_deg=1.0), 20)
    # uniform field across B (TEM between the plates) with the E-plane quadratic phase
    expected = 10 * np.log10([line_source_directivity(GENTLE_E.aperture_b, GENTLE_E.apex_e, f, "uniform")
                              for f in freqs])
    assert result.directivity_dbi == pytest.approx(expected, abs=0.3)
    assert np.all(np.isnan(result.h_plane_dbi))
    assert np.all(np.abs(result.extra["power_balance_error"]) < 0.02)


@pytest.mark.fullwave
@pytest.mark.slow
def test_full_pattern_integrates_to_the_radiated_power():
    from hornproof.sim.run import simulate

    settings = FdtdSettings(pattern_step_deg=3.0, full_pattern_step_deg=5.0)
    result = simulate(SMALL, np.array([10e9, 11e9]), settings, 14)
    pattern = result.full_pattern
    # ∮U dΩ = P_rad (power balance of the far field); measured 1.045 at 10 cells and
    # 1.016–1.018 at 14 cells (the near-to-far surface has the feed guide's footprint cut
    # out of its back face); 3 % here
    assert result.extra["sphere_power_ratio"] == pytest.approx(1.0, abs=0.03)
    # the grid's φ = 0 and φ = 90° meridians are the principal-plane cuts
    j = int(np.argmin(np.abs(pattern["theta_deg"] - 30.0)))
    k = int(np.argmin(np.abs(result.theta_deg - 30.0)))
    i90 = int(np.argmin(np.abs(pattern["phi_deg"] - 90.0)))
    assert pattern["co_polar_dbi"][:, j, 0] == pytest.approx(result.h_plane_dbi[:, k], abs=1e-6)
    assert pattern["co_polar_dbi"][:, j, i90] == pytest.approx(result.e_plane_dbi[:, k], abs=1e-6)
