"""The ``tolerance`` block of a result: how machining tolerances spread the horn's figures.

Runs :func:`hornproof.analytic.tolerance.tolerance_study` on the case's 3D horn with the
``[tolerance]`` table's sizes, model, sample count and seed. Figures: directivity, the two
half-power beamwidths and the two phase centres (:mod:`.feed_figures`, the same least-squares
fit as the feed section) of the chosen aperture model (other figure functions plug in through
``figures``). S11 has no aperture-model counterpart, and full-wave runs at the corners are not
offered (``NOT_COVERED`` says why: the grids cannot resolve a tenth of a millimetre).
"""

import numpy as np

from ...analytic.tolerance import DIMENSIONS, aperture_model_figures, tolerance_study
from .feed_figures import aperture_feed_field, feed_figures

#: figure -> (label, unit) for tables and plots
FIGURE_LABELS = {"directivity_dbi": ("Directivity", "dBi"), "hpbw_h_deg": ("HPBW, H-plane", "deg"),
                 "hpbw_e_deg": ("HPBW, E-plane", "deg"),
                 "phase_centre_h_mm": ("Phase centre, H-plane", "mm"),
                 "phase_centre_e_mm": ("Phase centre, E-plane", "mm")}  # mm behind the aperture plane
NOT_COVERED = ("S11: the aperture models have no S11, and full-wave runs at the worst corners are not "
               "offered: a machining tolerance of a tenth of a millimetre is a tenth of a cell or less on "
               "hornproof's grids (about 1 mm at 28 cells per wavelength at 10 GHz), below the grid fit's "
               "size residual (up to 1 %), and the ladders' own spread (0.05-0.3 dB) exceeds such a "
               "tolerance's effect; the corners are listed for a finer model or a measurement")


def phase_centre_figures(model):
    """Figure functions ``phase_centre_h_mm`` / ``phase_centre_e_mm`` of an aperture model, in the
    form :func:`hornproof.analytic.tolerance.tolerance_study` takes (mm behind the aperture)."""
    def figure(plane):
        def phase_centre(horn, frequencies):
            field = aperture_feed_field(horn, frequencies, model, sphere=False)
            return feed_figures(field, frequencies, horn)[f"phase_centre_{plane}_mm"]
        return phase_centre
    return {"phase_centre_h_mm": figure("h"), "phase_centre_e_mm": figure("e")}


def tolerance_block(case, figures=None):
    """The ``tolerance`` block (JSON-ready), or None when the case has no ``[tolerance]``."""
    spec = case.tolerance
    if spec is None:
        return None
    figures = figures or {**aperture_model_figures(spec.model), **phase_centre_figures(spec.model)}
    study = tolerance_study(case.horn, case.frequencies, spec.tolerances, figures=figures,
                            model=spec.model, samples=spec.samples, seed=spec.seed)
    out = {}
    for name in figures:
        label, unit = FIGURE_LABELS.get(name, (name, ""))
        out[name] = {
            "label": label, "unit": unit,
            "nominal": study.nominal[name].tolist(),
            "monte_carlo_mean": study.mc_mean[name].tolist(),
            "monte_carlo_std": study.mc_std[name].tolist(),
            "monte_carlo_p2_5": study.mc_low[name].tolist(),
            "monte_carlo_p97_5": study.mc_high[name].tolist(),
            "monte_carlo_min": study.mc_min[name].tolist(),
            "monte_carlo_max": study.mc_max[name].tolist(),
            "delta_method_std": study.delta_std[name].tolist(),
            "sensitivity_per_mm": {dim: (np.asarray(v) * 1e-3).tolist()
                                   for dim, v in study.sensitivity[name].items()},
            "worst_corners": [{"frequency_index": row["frequency_index"],
                               **{side: {"deltas_mm": {d: v * 1e3 for d, v in row[side]["deltas_m"].items()},
                                         "value": row[side]["value"]} for side in ("high", "low")}}
                              for row in study.corners[name]],
        }
    return {
        "model": spec.model,
        "tolerances_mm": {dim: value * 1e3 for dim, value in spec.tolerances.items()},
        "dimension_names": {dim: DIMENSIONS[dim][1] for dim in spec.tolerances},
        "distribution": "independent, uniform within +-tolerance",
        "samples": study.samples, "rejected_samples": study.rejected, "seed": study.seed,
        "figures": out,
        "not_covered": NOT_COVERED,
    }
