"""The designer's warnings: where a design sits past the limits of the models.

The phase-approximation error is computed, not estimated: closed form − exact phase of the same
horn (an internal consistency check against analytic/predict.py). The aperture-model limits are
hornproof's own full-wave evidence (module docstring of analytic/model_limits.py).
"""

import math

import numpy as np
import pytest

from hornproof.analytic.design import optimum_horn
from hornproof.analytic.geometry import HornGeometry
from hornproof.analytic.model_limits import model_limit_warnings, phase_approximation_error_db
from hornproof.analytic.predict import predict

A, B = 22.86e-3, 10.16e-3  # WR-90, EIA RS-261 (REFERENCES.md, from memory)
F = 10e9


def _h_sectoral(angle_deg, length=0.060):
    return HornGeometry("h-sectoral", A, B, A + 2 * length * math.tan(math.radians(angle_deg)), B, length, 1e-3)


def test_phase_approximation_error_is_closed_form_minus_exact_phase():
    horn = _h_sectoral(40)
    models = predict(horn, [F])
    expected = float(np.asarray(models["closed_form"].directivity_dbi)[0] - np.asarray(
        models["exact_phase"].directivity_dbi)[0])
    assert phase_approximation_error_db(horn, F) == pytest.approx(expected, abs=1e-9)


def test_short_wide_horn_is_warned_with_its_phase_error_and_error_size():
    horn = _h_sectoral(45)  # S = 1.19 wavelengths at 10 GHz (cases/sweep-h-flare.toml's table)
    warnings = model_limit_warnings(horn, F)
    text = " ".join(warnings)
    assert "wide flare" in text and "45.0 deg" in text
    assert f"S = {horn.phase_error_h(F):.2f}" in text
    assert "narrow unflared opening" in text  # b = 0.34 wavelength
    # 40 deg: S = 0.87 and the closed form is off the exact phase by more than 0.3 dB: named in dB
    horn = _h_sectoral(40)
    error = phase_approximation_error_db(horn, F)
    assert abs(error) > 0.3
    assert any(f"{error:+.2f} dB" in w and "phase-approximation breakdown" in w for w in model_limit_warnings(horn, F))


def test_long_optimum_pyramidal_horn_is_not_warned():
    # the closed-form optimum of a 400 mm pyramidal horn: S ≈ 0.4, T ≈ 0.26 (Orfanidis optimum,
    # REFERENCES.md), small flare angles, no unflared opening: nothing to warn about
    design = optimum_horn("pyramidal", A, B, 0.400, F)
    assert model_limit_warnings(design.horn, F) == []
