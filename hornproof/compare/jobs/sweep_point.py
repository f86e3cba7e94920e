"""One point of a sweep: the case with the swept horn, evaluated exactly as ``verify`` would.

A sweep point *is* a verify of a case that differs from the sweep's case only in its horn (and
in the model dimension when the sweep asks for the 2D first look): the same grid-fitted ladder
(the sweep's ladder, or the default ladder of the point's horn),
the same refinement goal, the same uncertainty (grid convergence, power balance and geometry
residual, root-sum-square) and the same rules on which uncertainty is confident
(:mod:`..numerics.confidence`). :func:`point_figures` keeps what a sweep needs of it, per band
frequency, JSON-ready.
"""

import dataclasses
import math

import numpy as np

from ...hashing import content_sha256
from ...sim.grid_fit import default_ladder, flared_plane
from ...sim.solver import meep_version
from ...version import build_version
from ..numerics.confidence import confident_uncertainty, ladder_health, with_outside_terms
from ..numerics.figures import directivity_key
from ..output.json_document import jsonable
from .messages import say
from .point_pool import POINT_KEY_LENGTH
from .verify import evaluate_case, non_ladder_uncertainty


def point_ladder(spec, horn, frequencies, dims):
    """Nominal ladder of one point: the sweep's, or the default ladder of the point's horn."""
    if spec.cells_per_wavelength:
        return [float(c) for c in spec.cells_per_wavelength]
    return default_ladder(horn, float(np.max(frequencies)), int(dims), plane=flared_plane(horn, dims))


def point_case(case, horn, value, dims, ladder):
    """The case of one sweep point: ``case`` with ``horn``, model dimension ``dims`` and nominal
    ``ladder``, no sweep; named ``<case>@<value>`` and hashed by its content."""
    fdtd = dataclasses.replace(case.fdtd, dims=int(dims), cells_per_wavelength=tuple(float(c) for c in ladder))
    definition = {"case_sha256": case.sha256, "horn": dataclasses.asdict(horn),
                  "fdtd": jsonable(dataclasses.asdict(fdtd))}
    return dataclasses.replace(case, horn=horn, fdtd=fdtd, sweep=None, name=f"{case.name}@{value:g}",
                               sha256=content_sha256(definition))


def point_definition(pcase):
    """Everything that defines one sweep point, JSON-ready: the horn, band, FDTD settings,
    checks and the hornproof and Meep versions (the point pool hashes it, :mod:`.point_pool`)."""
    return {
        "horn": dataclasses.asdict(pcase.horn),
        "frequencies_hz": [float(f) for f in pcase.frequencies],
        "settings": jsonable(dataclasses.asdict(pcase.fdtd)),
        "checks": dict(pcase.checks), "check_model": pcase.check_model,
        "hornproof": build_version(),
        "meep": meep_version(),
    }


def point_key(pcase):
    """Content hash of one sweep point: the name of its file in the point pool's cache."""
    return content_sha256(point_definition(pcase), POINT_KEY_LENGTH)


def _hypot(value, extra):
    return None if value is None or not math.isfinite(value) else float(math.hypot(value, extra))


def directivity_uncertainties(estimates, extra):
    """Per frequency: (shown, confident, bound, ladder label, reason) of the directivity, each
    uncertainty root-sum-square with the non-ladder part ``extra`` (as ``verdict.judge``)."""
    rows = []
    for estimate, more in zip(estimates, extra):
        shown = None if estimate is None else estimate.get("uncertainty")
        confident, bound = with_outside_terms(estimate, more)
        rows.append((_hypot(shown, more), confident, bound, ladder_health(estimate),
                     confident_uncertainty(estimate)[1]))
    return rows


def point_figures(pcase, *, force=False, log=None):
    """Evaluate one point (``jobs.verify.evaluate_case``) and keep what a sweep needs, per band
    frequency: directivity and its uncertainties, beamwidths, ladder, run times; JSON-ready."""
    summary, _, sim_results, ladder, convergence, fits = evaluate_case(pcase, force=force, log=log or say)
    dims = int(pcase.fdtd.dims)
    key = directivity_key(dims)
    nf = len(pcase.frequencies)
    fdtd = summary["models"]["fdtd"]
    _, estimates, _ = convergence
    metric = "directivity_db" if dims == 3 else "directivity_2d_db"
    extra = non_ladder_uncertainty(fdtd, {metric: 0.0}, nf)[metric]
    rows = directivity_uncertainties(estimates.get(key) or [None] * nf, extra)
    return jsonable({
        "directivity": fdtd.get(key), "uncertainty": [r[0] for r in rows],
        "confident_uncertainty": [r[1] for r in rows], "disagreement_bound": [r[2] for r in rows],
        "ladder": [r[3] for r in rows], "uncertainty_reason": [r[4] for r in rows],
        "hpbw_h_deg": fdtd.get("hpbw_h_deg"), "hpbw_e_deg": fdtd.get("hpbw_e_deg"),
        "power_balance_error": fdtd.get("power_balance_error"),
        "verdict": summary["comparison"]["overall"],
        "dims": dims, "cells_per_wavelength": [float(c) for c in ladder],
        "seconds": [r.run.get("seconds_total") for r in sim_results],
        "worst_size_residual_percent": [100.0 * fit.worst_relative_residual for fit in fits],
        "wall_thickness_modelled_mm": fdtd.get("wall_thickness_modelled_mm"),
        "wall_thickness_modelled_per_rung_mm": summary["solver"].get("wall_thickness_modelled_mm"),
    })
