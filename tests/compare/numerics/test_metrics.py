"""Tests of hornproof.compare.numerics.metrics on synthetic patterns whose answers follow from algebra.

A Gaussian beam has a parabolic pattern in dB: P(θ) = D0 − k θ² (common practice: the
Gaussian-beam approximation of a horn main lobe). Differences of such patterns are polynomials
in θ, so the RMS and worst point over a known window are known exactly.
"""

import numpy as np
import pytest

from hornproof.compare.numerics import metrics

THETA = np.arange(-90.0, 90.0 + 0.25, 0.5)  # uniform cut, degrees


def gaussian_db(theta, peak_dbi, k, squint=0.0):
    """Gaussian beam in dB: peak − k (θ − squint)²."""
    return peak_dbi - k * (theta - squint) ** 2


def test_offset_gaussians_rms_equals_offset():
    # Two identical Gaussian beams, one raised by 0.7 dB: the dB difference is 0.7 at every
    # angle, so its RMS over any window is exactly 0.7 dB and the worst point is 0.7 dB.
    k = 10.0 / 20.25**2
    ref = gaussian_db(THETA, 20.0, k)
    model = ref + 0.7
    err = metrics.pattern_error(THETA, model, ref)
    assert err.rms_db[0] == pytest.approx(0.7, abs=1e-12)
    assert err.worst_db[0] == pytest.approx(0.7, abs=1e-12)
    # −10 dB edge at ±20.25°, the grid has ±20.0 as the last samples inside: 81 samples.
    assert err.samples[0] == 81


def test_shifted_beam_worst_point_and_rms():
    # Model = reference shifted by δ. difference(θ) = 2kδθ − kδ² (expand the squares), linear
    # in θ, so the worst point is at the main-lobe edge on the side away from the shift
    # (θ = −20°), value −(2kδ·20 + kδ²). The RMS over the symmetric samples θ_i is
    # sqrt(mean((2kδθ_i)²) + (kδ²)²) since the cross term sums to zero.
    k = 10.0 / 20.25**2
    delta = 1.5
    ref = gaussian_db(THETA, 18.0, k)
    model = gaussian_db(THETA, 18.0, k, squint=delta)
    err = metrics.pattern_error(THETA, model, ref)
    assert err.worst_angle_deg[0] == pytest.approx(-20.0)
    assert err.worst_db[0] == pytest.approx(-(2 * k * delta * 20.0 + k * delta**2), rel=1e-12)
    lobe = THETA[np.abs(THETA) <= 20.0]
    expected = np.sqrt(np.mean((2 * k * delta * lobe) ** 2) + (k * delta**2) ** 2)
    assert err.rms_db[0] == pytest.approx(expected, rel=1e-12)


def test_main_lobe_is_contiguous_and_level_is_settable():
    # A main lobe plus a strong sidelobe at 40° that rises above −10 dB: it must not enter
    # the main-lobe window, because the window is the contiguous run around boresight.
    k = 10.0 / 20.25**2
    ref = np.maximum(gaussian_db(THETA, 20.0, k), np.where(np.abs(THETA - 45) < 3, 15.0, -50))
    mask = metrics.main_lobe_mask(THETA, ref)
    assert mask[np.argmin(np.abs(THETA - 45.0))] == np.False_
    assert THETA[mask].min() == pytest.approx(-20.0)
    # At −3 dB the edge is at 20.25·sqrt(0.3) = 11.09°: samples up to ±11.0°.
    mask3 = metrics.main_lobe_mask(THETA, ref, level_db=-3.0)
    assert THETA[mask3].max() == pytest.approx(11.0)
    with pytest.raises(ValueError, match="level_db"):
        metrics.main_lobe_mask(THETA, ref, level_db=3.0)


def test_pattern_error_per_frequency_and_nan_aware():
    # Two frequencies; the second model row has NaN samples inside the lobe (a model that
    # did not compute them): they are skipped, not propagated, and the offset survives.
    k = 10.0 / 20.25**2
    ref = np.vstack([gaussian_db(THETA, 20.0, k), gaussian_db(THETA, 22.0, k)])
    model = ref + np.array([[0.2], [-0.4]])
    model[1, 170:180] = np.nan
    err = metrics.pattern_error(THETA, model, ref)
    np.testing.assert_allclose(err.rms_db, [0.2, 0.4], atol=1e-12)
    np.testing.assert_allclose(err.worst_db, [0.2, -0.4], atol=1e-12)
    assert err.samples.tolist() == [81, 71]
    # An all-NaN reference row gives NaN results, not an exception.
    ref[1] = np.nan
    err = metrics.pattern_error(THETA, model, ref)
    assert np.isnan(err.rms_db[1]) and err.samples[1] == 0
    assert err.to_dict()["rms_db"][1] is None


def test_normalized_pattern_error_removes_the_directivity_offset():
    # Same shape, different peak: the normalised error is zero, the absolute one is not.
    k = 10.0 / 20.25**2
    ref = gaussian_db(THETA, 20.0, k)
    model = ref - 1.3
    assert metrics.pattern_error(THETA, model, ref, normalize=True).rms_db[0] == pytest.approx(0.0, abs=1e-12)
    assert metrics.pattern_error(THETA, model, ref).rms_db[0] == pytest.approx(1.3)


def test_shape_errors():
    with pytest.raises(ValueError, match="theta_deg"):
        metrics.pattern_error(THETA[::-1], THETA, THETA)
