"""Fabrication tolerances: sensitivities, Monte Carlo and delta-method spreads, worst corners.

Outside facts, each with its source:

* First-order (delta-method) propagation: σ_F² = Σ (∂F/∂x_i)² σ_i², uncorrelated inputs
  (JCGM 100:2008, GUM §5.1.2, from memory); a rectangular distribution on ±t has σ = t/√3
  (GUM §4.3.7, from memory). For small tolerances a Monte Carlo spread must agree with it
  (JCGM 101:2008, GUM Supplement 1, uses the same comparison to validate the linear law).
* An aperture without phase error has D = (4π/λ²)·(8/π²)·A·B for the TE10 cosine taper
  (Silver, Table 6.1 via the taper efficiency 8/π², exact), so ∂D_dB/∂A = 10/(ln 10 · A).
"""

import numpy as np
import pytest

from hornproof.analytic.geometry import HornGeometry
from hornproof.analytic.pattern_metrics import cut_metrics
from hornproof.analytic import closed_form
from hornproof.analytic.tolerance import (aperture_model_figures, free_dimensions, half_power_beamwidth,
                                          perturbed_horn, sensitivities, tolerance_study)
from hornproof.units import db10

F = np.array([9.5e9, 11.5e9])


@pytest.fixture
def pyramidal():
    return HornGeometry("pyramidal", 22.86e-3, 10.16e-3, 90e-3, 70e-3, 160e-3)


def test_small_tolerances_monte_carlo_matches_the_delta_method(pyramidal):
    study = tolerance_study(pyramidal, F, {d: 0.05e-3 for d in "ABLab"}, samples=600, seed=3)
    for name in study.nominal:
        # 600 samples: the standard deviation itself is known to about 1/√(2·600) ≈ 3 %
        np.testing.assert_allclose(study.mc_std[name], study.delta_std[name], rtol=0.12)
        np.testing.assert_allclose(study.mc_mean[name], study.nominal[name], atol=3 * study.delta_std[name].max())


def test_at_the_directivity_maximum_the_delta_method_misses_the_spread():
    # at the aperture width of maximum directivity (fixed length) ∂D/∂A = 0: the linear law
    # sees no spread from A, the Monte Carlo does (second order). On a linear figure the two
    # agree (test above), so this is not a test that cannot fail.
    from scipy.optimize import minimize_scalar
    f, length = 10e9, 0.1
    best = minimize_scalar(lambda a: -closed_form.directivity(
        HornGeometry("h-sectoral", 22.86e-3, 10.16e-3, a, 10.16e-3, length), f),
        bounds=(0.04, 0.2), method="bounded", options={"xatol": 1e-9})
    horn = HornGeometry("h-sectoral", 22.86e-3, 10.16e-3, float(best.x), 10.16e-3, length)
    study = tolerance_study(horn, np.array([f]), {"A": 2e-3}, samples=200,
                            figures={"directivity_dbi": aperture_model_figures()["directivity_dbi"]})
    mc, lin = study.mc_std["directivity_dbi"][0], study.delta_std["directivity_dbi"][0]
    assert mc > 5 * lin
    assert study.mc_mean["directivity_dbi"][0] < study.nominal["directivity_dbi"][0]  # a maximum


def test_aperture_sensitivity_without_phase_error_is_the_area_law():
    # very long horn: phase error ~0, D ∝ A·B (taper efficiency 8/π², exact)
    horn = HornGeometry("pyramidal", 22.86e-3, 10.16e-3, 60e-3, 45e-3, 200.0)
    slopes = sensitivities(horn, F, {"directivity_dbi": aperture_model_figures()["directivity_dbi"]}, ["A", "B"])
    np.testing.assert_allclose(slopes["directivity_dbi"]["A"], 10 / (np.log(10) * 60e-3), rtol=1e-4)
    np.testing.assert_allclose(slopes["directivity_dbi"]["B"], 10 / (np.log(10) * 45e-3), rtol=1e-4)


def test_root_found_beamwidth_matches_the_sampled_cut(pyramidal):
    theta = np.linspace(-90, 90, 3601)
    h, e = closed_form.principal_plane_cuts(pyramidal, F, theta)
    for plane, cut in (("h", h), ("e", e)):
        sampled = cut_metrics(theta, db10(cut))["hpbw_deg"]
        found = [half_power_beamwidth(pyramidal, f, plane) for f in F]
        np.testing.assert_allclose(found, sampled, atol=0.01)


def test_sectoral_horns_keep_their_tied_sides():
    h = HornGeometry("h-sectoral", 22.86e-3, 10.16e-3, 0.09, 10.16e-3, 0.09)
    moved = perturbed_horn(h, {"b": 0.1e-3})
    assert moved.aperture_b == moved.guide_b == pytest.approx(10.26e-3)
    e = HornGeometry("e-sectoral", 22.86e-3, 10.16e-3, 22.86e-3, 0.06, 0.07)
    assert perturbed_horn(e, {"a": -0.1e-3}).aperture_a == pytest.approx(22.76e-3)
    assert "B" not in free_dimensions("h-sectoral") and "A" not in free_dimensions("e-sectoral")
    with pytest.raises(ValueError, match="not a free size"):
        tolerance_study(h, F, {"B": 0.1e-3})


def test_corners_bracket_the_nominal_and_the_sample_range(pyramidal):
    study = tolerance_study(pyramidal, F, {d: 0.2e-3 for d in "ABLab"}, samples=200)
    for name, rows in study.corners.items():
        for row in rows:
            i = row["frequency_index"]
            assert row["high"]["value"] >= study.nominal[name][i] >= row["low"]["value"]
            # a corner of the box is at least as extreme as any sample (figures near-linear here)
            assert row["high"]["value"] >= study.mc_max[name][i] - 1e-6
            assert row["low"]["value"] <= study.mc_min[name][i] + 1e-6


def test_bad_tolerances_are_refused(pyramidal):
    for bad in ({}, {"A": 0.0}, {"A": -1e-4}, {"Z": 1e-4}):
        with pytest.raises(ValueError, match="tolerances"):
            tolerance_study(pyramidal, F, bad, samples=10)
