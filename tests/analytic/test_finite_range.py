"""Finite-range gain: the effective-length substitution and the exact path to a field point.

Outside facts, each with its source:

* In the quadratic-phase approximation a horn's gain measured at range R is the far-field
  formula with each apex length ρ replaced by ρR/(ρ + R) (T. S. Chu and R. A. Semplak, "Gain of
  electromagnetic horns", Bell Syst. Tech. J. 44 (1965); the standard effective-length
  substitution; from memory). R → ∞ recovers the far field.
* At R = 2D²/λ the path from the aperture edge exceeds the axial path by λ/16 (a phase error of
  π/8): the usual far-field criterion (IEEE Std 149-1979 §2.3; Balanis §2.2.4; from memory).
* A probe closer to an aperture with phase error sees a lower apparent gain (common practice:
  range gain corrections are positive, far-field gain − range gain > 0, for horns at ranges of
  the order of 2D²/λ).
"""

import numpy as np
import pytest

from hornproof.analytic import closed_form, exact_phase
from hornproof.analytic.finite_range import (closed_form_range_gain, effective_length, exact_path_range_gain,
                                             far_field_distances)
from hornproof.analytic.geometry import HornGeometry
from hornproof.units import SPEED_OF_LIGHT

F = np.array([9.5e9, 10.5e9, 11.5e9])


@pytest.fixture
def pyramidal():
    return HornGeometry("pyramidal", 22.86e-3, 10.16e-3, 90e-3, 70e-3, 160e-3)


def test_effective_length_limits():
    assert effective_length(0.3, np.inf) == 0.3
    assert effective_length(np.inf, 2.0) == 2.0
    assert effective_length(0.3, 0.6) == pytest.approx(0.2)


def test_infinite_range_is_the_far_field(pyramidal):
    np.testing.assert_allclose(closed_form_range_gain(pyramidal, F, np.inf), closed_form.directivity(pyramidal, F),
                               rtol=1e-14)
    np.testing.assert_allclose(exact_path_range_gain(pyramidal, F, np.inf), exact_phase.directivity(pyramidal, F),
                               rtol=1e-10)


@pytest.mark.parametrize("kind, sizes", [("pyramidal", (0.09, 0.07, 0.16)), ("h-sectoral", (0.09, 10.16e-3, 0.09)),
                                         ("e-sectoral", (22.86e-3, 0.06, 0.07))])
@pytest.mark.parametrize("distance", [0.3, 1.0, 5.0])
def test_fresnel_path_integral_reproduces_the_effective_length_substitution(kind, sizes, distance):
    # Chu & Semplak's substitution (from memory) against a direct 2D quadrature of the same
    # quadratic aperture field with the Fresnel path: they must be the same number
    horn = HornGeometry(kind, 22.86e-3, 10.16e-3, *sizes)
    direct = exact_path_range_gain(horn, F, distance, phase_law="quadratic", path="fresnel")
    np.testing.assert_allclose(direct, closed_form_range_gain(horn, F, distance), rtol=1e-9)


def test_exact_path_tends_to_the_far_field_and_to_the_fresnel_form(pyramidal):
    far = exact_phase.directivity(pyramidal, F)
    np.testing.assert_allclose(exact_path_range_gain(pyramidal, F, 1e5), far, rtol=1e-5)
    # at a few metres the exact and Fresnel paths differ by far less than the range effect itself
    exact = exact_path_range_gain(pyramidal, F, 3.0, phase_law="quadratic")
    fresnel = exact_path_range_gain(pyramidal, F, 3.0, phase_law="quadratic", path="fresnel")
    assert np.max(np.abs(10 * np.log10(exact / fresnel))) < 0.01


def test_range_gain_falls_as_the_probe_comes_closer(pyramidal):
    distances = np.array([0.4, 0.8, 1.6, 3.2, np.inf])
    for model in (closed_form_range_gain, exact_path_range_gain):
        gains = np.array([model(pyramidal, 10e9, r) for r in distances])
        assert np.all(np.diff(gains) > 0)


def test_two_d_squared_over_lambda_is_the_sixteenth_wave_criterion(pyramidal):
    wl = SPEED_OF_LIGHT / F
    found = far_field_distances(pyramidal, F)
    r = found["2D^2/lambda (largest side)"]
    d = max(pyramidal.aperture_a, pyramidal.aperture_b)
    np.testing.assert_allclose((np.hypot(r, d / 2) - r) / wl, 1 / 16, rtol=0.01)
    assert np.all(found["2D^2/lambda (diagonal)"] > r)


def test_bad_distance_is_refused(pyramidal):
    for bad in (0.0, -1.0, np.nan):
        with pytest.raises(ValueError, match="distance"):
            closed_form_range_gain(pyramidal, F, bad)
