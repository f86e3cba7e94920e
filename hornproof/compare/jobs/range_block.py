"""The ``finite_range`` block of a result: the gain a probe at distance R would infer.

For every ``[range]`` distance both aperture models are evaluated at the field point on the
axis (:mod:`hornproof.analytic.finite_range`): the closed form by the effective-length
substitution, the exact-phase model by the exact path. The **correction** is far-field gain
minus range gain (add it to a gain measured at R to get the far-field gain). Its uncertainty
here is the spread between the two models' corrections: a scale of what the aperture models
leave out, not a bound. The FDTD model's finite-range gain is not computed by this version (its
near-to-far transform is far-zone only); the block says so.
"""

import numpy as np

from ...analytic.finite_range import closed_form_range_gain, exact_path_range_gain, far_field_distances
from ...units import db10

FDTD_NOTE = ("not computed: the FDTD near-to-far transform here is far-zone only; a finite-distance "
             "transform of the equivalent currents is not implemented yet")
FRIIS_NOTE = ("range gain G_R = 4 pi R^2 S(R) / P_in: what a probe on the axis at R infers through the "
              "Friis relation; correction = far-field gain - range gain")


def range_block(case, wall_loss=None):
    """The ``finite_range`` block (JSON-ready; lists aligned with ``frequencies_ghz``), or None
    when the case asks for no distance. ``wall_loss`` (``WallLoss`` or None) lowers every gain."""
    if not case.range_distances:
        return None
    f = case.frequencies
    loss = np.zeros(f.size) if wall_loss is None else np.asarray(wall_loss.total_db)
    far = {"closed_form": db10(closed_form_range_gain(case.horn, f, np.inf)) - loss,
           "exact_phase": db10(exact_path_range_gain(case.horn, f, np.inf)) - loss}
    rows = []
    for distance in case.range_distances:
        near = {"closed_form": db10(closed_form_range_gain(case.horn, f, distance)) - loss,
                "exact_phase": db10(exact_path_range_gain(case.horn, f, distance)) - loss}
        correction = {name: far[name] - near[name] for name in far}
        rows.append({
            "distance_m": float(distance),
            "closed_form_gain_dbi": near["closed_form"].tolist(),
            "exact_phase_gain_dbi": near["exact_phase"].tolist(),
            "closed_form_correction_db": correction["closed_form"].tolist(),
            "exact_phase_correction_db": correction["exact_phase"].tolist(),
            "correction_db": correction["exact_phase"].tolist(),
            "correction_uncertainty_db": np.abs(correction["exact_phase"] - correction["closed_form"]).tolist(),
        })
    criteria = far_field_distances(case.horn, f)
    return {
        "note": FRIIS_NOTE,
        "uncertainty_note": "correction_uncertainty_db: |exact-phase - closed-form correction|, "
                            "a model spread, not a bound",
        "gain_is": "directivity less wall loss" if wall_loss is not None else
                   "directivity (perfectly conducting walls)",
        "far_field_gain_dbi": {name: values.tolist() for name, values in far.items()},
        "far_field_distance_m": {name: values.tolist() for name, values in criteria.items()},
        "distances": rows,
        "fdtd": FDTD_NOTE,
    }
