"""The ``finite_range`` block of a result: the gain a probe at distance R would infer.

For every ``[range]`` distance both aperture models are evaluated at the field point on the
axis (:mod:`hornproof.analytic.finite_range`): the closed form by the effective-length
substitution, the exact-phase model by the exact path. The **correction** is far-field gain
minus range gain (add it to a gain measured at R to get the far-field gain). Its uncertainty
here is the spread between the two models' corrections: a scale of what the aperture models
leave out, not a bound.

The 3D FDTD model's range gain comes from its equivalent surface currents evaluated at the
field point with the full Green's function (:mod:`hornproof.sim.range_gain`), on every rung of
the ladder; its uncertainty (and that of its correction, FDTD far-field directivity minus
range gain on each rung) goes through the same grid-convergence procedure as every FDTD figure
(:func:`hornproof.compare.numerics.convergence.grid_convergence`; confident only as in
:func:`hornproof.compare.numerics.confidence.confident_uncertainty`). A 2D FDTD model has no
range gain (its fields are per unit length of an infinite flared plane).
"""

import numpy as np

from ...analytic.finite_range import closed_form_range_gain, exact_path_range_gain, far_field_distances
from ...units import db10
from ..numerics.confidence import confident_uncertainty
from ..numerics.convergence import grid_convergence

FDTD_2D_NOTE = "not computed: a 2D FDTD model has no range gain (fields per unit length)"
FDTD_NOTE = ("equivalent surface currents evaluated at the field point with the full Green's function; "
             "uncertainty from the ladder (grid convergence), '?' / not confident as for every FDTD figure")
#: formal order of the staircased FDTD model (as jobs.ladder.FORMAL_ORDER)
FORMAL_ORDER = 1.0
FRIIS_NOTE = ("range gain G_R = 4 pi R^2 S(R) / P_in: what a probe on the axis at R infers through the "
              "Friis relation; correction = far-field gain - range gain")


def fdtd_range_rows(sim_results, ladder, loss_db):
    """Per distance: the FDTD range gain (finest rung, less ``loss_db``), its correction and both
    uncertainties from the ladder; None when the runs carry no range gain (2D, or no run)."""
    if not sim_results or any("range_gain_dbi" not in r.extra for r in sim_results):
        return None
    order = np.argsort(ladder)
    ranges = np.array([np.asarray(sim_results[i].extra["range_gain_dbi"], dtype=float) for i in order])
    far = np.array([np.asarray(sim_results[i].directivity_dbi, dtype=float) for i in order])
    cells = [float(ladder[i]) for i in order]
    rows = []
    for d in range(ranges.shape[2]):
        entry = {"gain_dbi": (ranges[-1, :, d] - loss_db).tolist(),
                 "correction_db": (far[-1] - ranges[-1, :, d]).tolist()}
        for key, stack in (("gain", ranges[:, :, d]), ("correction", far - ranges[:, :, d])):
            if len(cells) < 2:
                entry[f"{key}_uncertainty_db"] = [None] * stack.shape[1]
                entry[f"{key}_ladder"] = ["1 rung"] * stack.shape[1]
                continue
            found = grid_convergence(stack, cells_per_wavelength=cells, formal_order=FORMAL_ORDER)
            entry[f"{key}_uncertainty_db"] = [e.uncertainty if np.isfinite(e.uncertainty) else None for e in found]
            judged = [confident_uncertainty(e) for e in found]
            entry[f"{key}_uncertainty_confident"] = [value is not None for value, _ in judged]
            entry[f"{key}_ladder"] = [reason for _, reason in judged]
        rows.append(entry)
    return rows


def range_block(case, wall_loss=None, sim_results=None, ladder=None):
    """The ``finite_range`` block (JSON-ready; lists aligned with ``frequencies_ghz``), or None
    when the case asks for no distance. ``wall_loss`` (``WallLoss`` or None) lowers every gain;
    ``sim_results`` and ``ladder`` (the FDTD rungs, optional) add the FDTD range gain."""
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
    fdtd_rows = fdtd_range_rows(sim_results, ladder, loss) if sim_results else None
    if fdtd_rows is not None:
        for row, fdtd in zip(rows, fdtd_rows):
            row["fdtd"] = fdtd
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
        "fdtd": FDTD_NOTE if fdtd_rows is not None else
                FDTD_2D_NOTE if int(case.fdtd.dims) == 2 else "not computed: no FDTD run",
    }
