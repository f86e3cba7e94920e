"""``hornproof exposure CASE --power-w P``: on-axis distances beyond which reference levels hold.

An estimate from the horn's own figures, not a compliance assessment (the caution is part of
the document). For each band frequency:

* the gain used: the larger of the two aperture models' directivities of the 3D horn (walls
  taken as lossless, which is the conservative side), or ``--gain-dbi`` if given;
* the conservative distance per reference level: far-field power density P·G/(4πR²), capped by
  the aperture surface bound 4P/A (:mod:`hornproof.analytic.exposure`, FCC OET Bulletin 65);
* the aperture-model distance: where P·G_R(R)/(4πR²) meets the level, G_R the exact-path range
  gain (:mod:`hornproof.analytic.finite_range`), given only when it lies beyond the reactive
  near-field boundary (closer, the aperture models do not hold).
"""

import numpy as np
from scipy.optimize import brentq

from ...analytic import closed_form, exact_phase
from ...analytic.exposure import REFERENCE_LEVELS, aperture_surface_bound, compliance_distance
from ...analytic.finite_range import exact_path_range_gain, far_field_distances
from ...units import GHZ, db10
from ..output.safety import RF_EXPOSURE_CAUTION

EXPOSURE_SCHEMA = "hornproof.exposure/1"
#: the estimate's own caution, before the general RF-exposure text
ESTIMATE_CAUTION = ("This is an on-axis estimate from simple formulas and aperture models, not a compliance "
                    "assessment: reference levels are quoted from memory and must be checked against the "
                    "documents; local regulations and licensed RF practice govern.")
REACTIVE_KEY = "reactive near-field boundary 0.62 sqrt(D^3/lambda)"


def model_distance(horn, frequency, power, level, conservative, reactive):
    """Distance (m) where the exact-path aperture model's axial density meets ``level``; None when
    that is inside the reactive near field or the conservative distance is 0."""
    if not (np.isfinite(level) and conservative > reactive):
        return None

    def excess(log_r):
        r = float(np.exp(log_r))
        return np.log(power * float(exact_path_range_gain(horn, frequency, r)) / (4 * np.pi * r * r) / level)

    low, high = np.log(reactive), np.log(conservative * 1.01)
    if excess(low) <= 0:
        return None  # already below the level at the reactive boundary: no model distance claimed
    return float(np.exp(brentq(excess, low, high, xtol=1e-6)))


def exposure_summary(case, power_w, gain_dbi=None):
    """The ``hornproof.exposure/1`` document for ``case`` driven with ``power_w`` watts."""
    if not (np.isfinite(power_w) and power_w > 0):
        raise ValueError(f"power_w must be a positive finite power in W, got {power_w!r}")
    horn, f = case.horn, case.frequencies
    if gain_dbi is None:
        gains = np.maximum(db10(closed_form.directivity(horn, f)), db10(exact_phase.directivity(horn, f)))
        gain_source = "larger of the closed-form and exact-phase directivities of the 3D horn (walls lossless)"
    else:
        gains = np.full(f.size, float(gain_dbi))
        gain_source = "given on the command line (--gain-dbi)"
    area = horn.aperture_a * horn.aperture_b
    criteria = far_field_distances(horn, f)
    rows = []
    for i, frequency in enumerate(f):
        gain = 10 ** (gains[i] / 10)
        limits = []
        for ref in REFERENCE_LEVELS:
            level = float(ref.levels(frequency))
            distance = float(compliance_distance(power_w, gain, area, level))
            model = None if gain_dbi is not None else model_distance(
                horn, frequency, power_w, level, distance, float(criteria[REACTIVE_KEY][i]))
            limits.append({"key": ref.key, "label": ref.label, "source": ref.source,
                           "level_w_per_m2": level if np.isfinite(level) else None,
                           "distance_m": distance if np.isfinite(distance) else None,
                           "aperture_model_distance_m": model})
        rows.append({"frequency_ghz": float(frequency / GHZ), "gain_dbi": float(gains[i]),
                     "far_field_2d2_over_lambda_m": float(criteria["2D^2/lambda (diagonal)"][i]),
                     "reactive_near_field_m": float(criteria[REACTIVE_KEY][i]), "limits": limits})
    return {
        "schema": EXPOSURE_SCHEMA, "case": case.name, "case_sha256": case.sha256, "title": case.title,
        "power_w": float(power_w), "aperture_area_m2": area,
        "aperture_surface_bound_w_per_m2": float(aperture_surface_bound(power_w, area)),
        "gain_source": gain_source,
        "method": "conservative: S = P G / (4 pi R^2) on the axis, capped by 4 P / A at the aperture "
                  "(FCC OET Bulletin 65, 1997); aperture model: the exact-path range gain in place of G",
        "frequencies": rows,
        "not_covered": "local (6-min, small-area) and peak/pulse limits; off-axis points; reflections "
                       "from nearby surfaces; several transmitters",
        "caution": ESTIMATE_CAUTION + " " + RF_EXPOSURE_CAUTION,
    }
