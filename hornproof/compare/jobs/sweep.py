"""``hornproof sweep CASE``: model error against one horn parameter, with breakdown thresholds.

For every value of the case's ``[sweep]`` the closed-form and exact-phase models are evaluated
and (unless ``--analytic-only``) the FDTD model is run — the 2D model for sectoral horns by
default — on three grids (``GRID_RATIOS`` × the sweep's cells per wavelength) whose grid
convergence index, combined by root-sum-square with the finest grid's power-balance term
(:mod:`..numerics.power_balance`), is the uncertainty of each point (the index alone:
``uncertainty_ladder``); ``--cells-per-wavelength`` sets the grids
(two grids: GCI with safety factor 3 at an assumed first order; one grid: no uncertainty). The errors are split as in ``verify``:

* phase-approximation error = closed form − exact phase (no numerical uncertainty: both are
  converged quadratures);
* aperture-model error = exact phase − FDTD (uncertainty = the FDTD one).

The breakdown threshold of each is the first swept value where |error| − uncertainty exceeds
the tolerance (``verdict.breakdown_threshold``). The FDTD points run in the point pool
(:mod:`.point_pool`): in parallel process groups under ``mpirun``, each cached in a verified
``points/<hash>.json`` as it finishes, so a killed sweep rerun recomputes nothing it already
finished; a failed point is listed in ``failed_points`` with its reason (NaN figures) and the
sweep exits with status 3 only when every FDTD point failed.
"""

import dataclasses
import time
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ...analytic.predict import predict
from ...errors import InputError, RunError
from ...sim.solver import meep_version
from ...version import build_version
from ..numerics.figures import directivity_key
from ..numerics.metrics import band_centre_index
from ..numerics.verdict import breakdown_threshold
from ..case.sweepspec import PARAMETER_LABELS
from ..output.json_document import jsonable
from ..output.summary import SAFETY_NOTE
from ..output.sweep_json import SWEEP_SCHEMA, write_sweep_json
from .messages import is_writer, say
from .point_cost import point_cost
from .point_pool import PointTask, every_point_failed, run_points


#: default grids of a sweep point, relative to the case's sweep.cells_per_wavelength: three
#: grids give a GCI with an observed order (Celik et al. 2008); two grids force the assumed
#: order and safety factor 3, which in a development run here hid every breakdown
GRID_RATIOS = (1.0, 1.4, 2.0)


@dataclass
class SweepPoint:
    """One swept value at the band centre: both analytic models and (unless analytic only) FDTD.

    Directivities in dB (dBi in 3D, 2D directivity in 2D); peak phase errors S (H-plane) and
    T (E-plane) in wavelengths; NaN where a value is not available.
    """

    value: float
    closed_form: float
    exact_phase: float
    phase_error_h: float
    phase_error_e: float
    fdtd: float = float("nan")
    fdtd_uncertainty: float = float("nan")
    seconds: float | None = None  # FDTD run time over the point's grids (None: no FDTD)
    cached: bool | None = None  # FDTD figures read from the point cache (None: no FDTD)


def sweep_grids(case, dims=None, ladder=None):
    """The model dimension, the grids (cells per wavelength) and the FDTD settings of a sweep."""
    spec = case.sweep
    if spec is None:
        raise InputError(f"{case.path}: sweep: the case has no [sweep] table")
    dims = int(dims or spec.dims)
    if dims == 2 and case.horn.kind == "pyramidal":
        raise InputError(f"{case.path}: sweep.dims: a pyramidal horn has no 2D model; use dims = 3")
    if ladder is None:
        first = float(spec.cells_per_wavelength)
        ladder = [round(first * ratio) for ratio in GRID_RATIOS]
    ladder = [float(c) for c in ladder]
    settings = dataclasses.replace(case.fdtd, dims=dims, cells_per_wavelength=tuple(ladder))
    return dims, ladder, settings


def analytic_point(value, horn, frequencies, centre, dims):
    """A :class:`SweepPoint` with both analytic models at the band centre (no FDTD yet)."""
    models = predict(horn, frequencies, dims=dims)
    return SweepPoint(value=float(value),
                      closed_form=float(np.asarray(models["closed_form"].directivity_dbi)[centre]),
                      exact_phase=float(np.asarray(models["exact_phase"].directivity_dbi)[centre]),
                      phase_error_h=float(horn.phase_error_h(frequencies[centre])),
                      phase_error_e=float(horn.phase_error_e(frequencies[centre])))


def run_sweep(case, out_dir, *, dims=None, ladder=None, analytic_only=False, force=False, log=None):
    """Run (or resume) the sweep of ``case``; returns the ``hornproof.sweep/1`` document."""
    log = log or say
    dims, ladder, settings = sweep_grids(case, dims, ladder)
    spec = case.sweep
    try:
        horns = spec.horns(case.horn)
    except ValueError as error:
        raise InputError(f"{case.path}: sweep.values: {error}")
    freqs = np.asarray(case.frequencies, dtype=float)
    centre = band_centre_index(freqs)
    out_dir = Path(out_dir)
    if is_writer():
        out_dir.mkdir(parents=True, exist_ok=True)
    started = time.monotonic()
    points = [analytic_point(value, horn, freqs, centre, dims) for value, horn in horns]
    outcomes = []
    if not analytic_only:
        tasks = [PointTask(horn, f"sweep point {index}/{len(horns)}: {spec.parameter} = {value:g} "
                                 f"(S = {point.phase_error_h:.3f}, T = {point.phase_error_e:.3f} wavelengths)",
                           {spec.parameter: value}, point_cost(horn, freqs, settings, ladder))
                 for index, ((value, horn), point) in enumerate(zip(horns, points), start=1)]
        outcomes = run_points(tasks, frequencies=freqs, settings=settings, ladder=ladder,
                              points_dir=out_dir / "points", force=force, log=log)
        for point, outcome in zip(points, outcomes):
            fill_fdtd(point, outcome, centre)
    document = sweep_document(case, points, horns, dims, ladder, analytic_only, time.monotonic() - started)
    document["failed_points"] = [{"value": point.value, "reason": outcome.reason}
                                 for point, outcome in zip(points, outcomes) if outcome.status == "failed"]
    if is_writer():
        write_sweep_folder(out_dir, document)
    if every_point_failed(outcomes):
        raise RunError(f"{case.path}: every FDTD point of the sweep failed (first: {outcomes[0].reason}); "
                       f"the analytic results are in {out_dir}")
    return document


def fill_fdtd(point, outcome, centre):
    """The FDTD directivity, uncertainty and run time of ``point`` at the band centre from its
    pool outcome (NaN for a failed point; ``cached`` None then)."""
    point.cached = {"cached": True, "computed": False}.get(outcome.status)
    if outcome.figures is None:
        return
    figures = outcome.figures
    point.fdtd = np.nan if figures["directivity"][centre] is None else figures["directivity"][centre]
    uncertainty = figures["uncertainty"][centre]
    point.fdtd_uncertainty = np.nan if uncertainty is None else uncertainty
    point.seconds = sum(s or 0 for s in figures.get("seconds", []))


def error_split(points, tolerance, analytic_only):
    """Errors, their uncertainties and breakdown thresholds along the sweep."""
    values = np.asarray([p.value for p in points])
    closed_form = np.asarray([p.closed_form for p in points])
    exact_phase = np.asarray([p.exact_phase for p in points])
    fdtd = np.asarray([p.fdtd for p in points])
    fdtd_uncertainty = [p.fdtd_uncertainty for p in points]
    phase_error, aperture_error, total_error = closed_form - exact_phase, exact_phase - fdtd, closed_form - fdtd
    zero = np.zeros_like(values)
    breakdown = {"phase_approximation": breakdown_threshold(values, phase_error, zero, tolerance)}
    if not analytic_only:
        usable = np.asarray(fdtd_uncertainty)
        usable = np.where(np.isfinite(usable), usable, 0.0)
        breakdown["aperture_model"] = breakdown_threshold(values, aperture_error, usable, tolerance)
        breakdown["total"] = breakdown_threshold(values, total_error, usable, tolerance)
    errors = {"phase_approximation": phase_error, "aperture_model": None if analytic_only else aperture_error,
              "total": None if analytic_only else total_error}
    uncertainties = {"phase_approximation": zero, "aperture_model": None if analytic_only else fdtd_uncertainty,
                     "total": None if analytic_only else fdtd_uncertainty}
    return errors, uncertainties, breakdown


def sweep_solver_block(points, ladder, dims, seconds):
    """The ``solver`` block of sweep.json (FDTD runs only)."""
    return {"name": "meep", "meep": meep_version(), "dims": dims, "cells_per_wavelength": ladder,
            "uncertainty": ("two-grid GCI, safety factor 3, assumed first order" if len(ladder) == 2 else
                            "grid convergence index over the grids" if len(ladder) > 2 else
                            "single grid: no numerical uncertainty estimated (treated as 0)"),
            "points_computed": sum(1 for p in points if p.cached is False),
            "points_reused": sum(1 for p in points if p.cached),
            "seconds": seconds, "seconds_per_point": [p.seconds for p in points if p.seconds is not None]}


def sweep_document(case, points, horns, dims, ladder, analytic_only, seconds):
    """The ``hornproof.sweep/1`` document of finished ``points``."""
    spec = case.sweep
    freqs = np.asarray(case.frequencies, dtype=float)
    centre = band_centre_index(freqs)
    tolerance = float(case.checks.get("directivity_db", 0.5))
    errors, uncertainties, breakdown = error_split(points, tolerance, analytic_only)
    fdtd = [p.fdtd for p in points]
    label, unit = PARAMETER_LABELS[spec.parameter]
    document = {
        "schema": SWEEP_SCHEMA, "case": case.name, "title": case.title, "case_sha256": case.sha256,
        "parameter": {"name": spec.parameter, "label": label, "unit": unit, "values": [p.value for p in points],
                      "held_fixed": "flare half-angles" if spec.parameter == "flare_length_mm" else "flare length"},
        "frequency_ghz": float(freqs[centre] / 1e9),
        "figure": {"name": directivity_key(dims), "label": "2D directivity" if dims == 2 else "Directivity",
                   "unit": "dB"},
        "tolerance": tolerance,
        "models": {"closed_form": [p.closed_form for p in points], "exact_phase": [p.exact_phase for p in points],
                   "fdtd": None if analytic_only else fdtd},
        "fdtd_uncertainty": None if analytic_only else [p.fdtd_uncertainty for p in points],
        "errors": errors,
        "uncertainties": uncertainties,
        "breakdown": breakdown,
        "phase_error_h_wl": [p.phase_error_h for p in points], "phase_error_e_wl": [p.phase_error_e for p in points],
        "optimum": analytic_optimum(case, spec, horns, freqs[centre], dims, fdtd if not analytic_only else None),
        "solver": ({"name": "none (analytic only)"} if analytic_only else
                   sweep_solver_block(points, ladder, dims, seconds)),
        "warnings": list(case.warnings), "safety": SAFETY_NOTE,
        "hornproof_version": build_version(),
    }
    return jsonable(document)


def write_sweep_folder(out_dir, document):
    """sweep.json, its plots and report.html into ``out_dir`` (the writing process only)."""
    # lazy: the plots and the report load matplotlib and templates (slow) only when writing
    from ..report.html import build_sweep_report
    from ..report.sweep_plots import write_sweep_plots

    write_sweep_plots(out_dir, document)
    write_sweep_json(out_dir / "sweep.json", document)
    build_sweep_report(out_dir)


def analytic_optimum(case, spec, horns, frequency, dims, fdtd_values=None, samples=161):
    """Where each model's directivity peaks along the sweep, with the peak phase errors there.

    The analytic models are evaluated on a dense grid of the swept parameter between the first
    and last values; FDTD on its samples (with a parabola through the best three).
    """
    lo, hi = min(spec.values), max(spec.values)
    dense = np.linspace(lo, hi, samples)
    out = {}
    curves = {"closed_form": [], "exact_phase": []}
    dense_horns = []
    for value in dense:
        try:
            horn = spec.horn_at(case.horn, float(value))
        except ValueError:
            continue
        dense_horns.append((float(value), horn))
        models = predict(horn, [frequency], dims=dims)
        for name in curves:
            curves[name].append(float(np.asarray(models[name].directivity_dbi)[0]))
    for name, curve in curves.items():
        if not curve:
            continue
        i = int(np.argmax(curve))
        value, horn = dense_horns[i]
        out[name] = {"value": value, "directivity": curve[i], "interior": 0 < i < len(curve) - 1,
                     "phase_error_h_wl": float(horn.phase_error_h(frequency)),
                     "phase_error_e_wl": float(horn.phase_error_e(frequency))}
    if fdtd_values is not None and np.any(np.isfinite(fdtd_values)):
        v = np.asarray(fdtd_values, dtype=float)
        x = np.asarray([val for val, _ in horns], dtype=float)
        i = int(np.nanargmax(v))
        best = float(x[i])
        if 0 < i < len(x) - 1 and np.all(np.isfinite(v[i - 1:i + 2])):
            a, b, _ = np.polyfit(x[i - 1:i + 2], v[i - 1:i + 2], 2)
            if a < 0:
                best = float(np.clip(-b / (2 * a), x[i - 1], x[i + 1]))
        horn = spec.horn_at(case.horn, best)
        out["fdtd"] = {"value": best, "directivity": float(v[i]), "interior": 0 < i < len(x) - 1,
                       "phase_error_h_wl": float(horn.phase_error_h(frequency)),
                       "phase_error_e_wl": float(horn.phase_error_e(frequency))}
    return out
