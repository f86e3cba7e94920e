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
the tolerance (``verdict.breakdown_threshold``). Finished points are cached by a content hash
of everything that defines them (``points/<hash>.json``, written atomically), so a killed sweep
rerun recomputes nothing it already finished.
"""

import dataclasses
import json
import time
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ...analytic.predict import predict
from ...atomic import write_text_atomic
from ...errors import InputError
from ...hashing import content_sha256
from ...sim import run as fdtd_run
from ...sim.grid_fit import fit_ladder, flared_plane
from ...sim.solver import meep_version
from ...version import build_version
from ..numerics.convergence import grid_convergence
from ..numerics.figures import directivity_key
from ..numerics.metrics import band_centre_index
from ..numerics.verdict import breakdown_threshold
from ..case.sweepspec import PARAMETER_LABELS
from ..output.json_document import jsonable
from ..output.summary import SAFETY_NOTE
from ..output.sweep_json import SWEEP_SCHEMA, write_sweep_json
from ..numerics.power_balance import power_balance_uncertainty_db, root_sum_square
from .ladder import fdtd_figures
from .messages import is_writer, say


#: default grids of a sweep point, relative to the case's sweep.cells_per_wavelength: three
#: grids give a GCI with an observed order (Celik et al. 2008); two grids force the assumed
#: order and safety factor 3, which in a development run here hid every breakdown
GRID_RATIOS = (1.0, 1.4, 2.0)


#: hex digits of a sweep point's content hash (its cache file name)
POINT_KEY_LENGTH = 20


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


def point_key(horn, frequencies, settings, ladder):
    """Content hash of one sweep point: the horn, band, FDTD settings, grids and versions."""
    definition = {
        "horn": dataclasses.asdict(horn),
        "frequencies_hz": [float(f) for f in frequencies],
        "settings": jsonable(dataclasses.asdict(settings)),
        "cells_per_wavelength": [float(c) for c in ladder],
        "hornproof": build_version(),
        "meep": meep_version(),
    }
    return content_sha256(definition, POINT_KEY_LENGTH)


def run_point(horn, frequencies, settings, ladder, force):
    """FDTD figures of one sweep point on every grid of ``ladder`` (each rung fitted to this
    point's horn, :func:`hornproof.sim.grid_fit.fit_ladder`), JSON-ready."""
    fits = fit_ladder(horn, float(np.max(frequencies)), int(settings.dims), list(ladder),
                      plane=flared_plane(horn, settings.dims))
    ladder = [fit.cells_per_wavelength for fit in fits]
    results = [fdtd_run.simulate(horn, frequencies, settings, float(c), force=force) for c in ladder]
    figures = [fdtd_figures(r) for r in results]
    key = directivity_key(settings.dims)
    values = np.array([[np.nan if v is None else v for v in f[key]] for f in figures])
    finest = int(np.argmax(ladder))
    point = {"directivity": values[finest].tolist(), "directivity_per_grid": values.tolist(),
             "hpbw_h_deg": figures[finest].get("hpbw_h_deg"), "hpbw_e_deg": figures[finest].get("hpbw_e_deg"),
             "power_balance_error": figures[finest].get("power_balance_error"),
             "seconds": [r.run.get("seconds_total") for r in results],
             "cells_per_wavelength": ladder,
             "worst_size_residual_percent": [100.0 * fit.worst_relative_residual for fit in fits],
             "wall_thickness_modelled_mm": results[finest].run.get("wall_thickness_modelled_m", np.nan) * 1e3}
    if len(ladder) > 1:
        found = grid_convergence(values, cells_per_wavelength=ladder, formal_order=1.0)
        point["uncertainty_ladder"] = [e.uncertainty for e in found]
        # with the finest grid's power-balance term, as in verify (numerics.power_balance)
        point["uncertainty"] = root_sum_square(point["uncertainty_ladder"],
                                               power_balance_uncertainty_db(point["power_balance_error"])).tolist()
        point["convergence_status"] = [e.status for e in found]
    else:
        point["uncertainty"] = [np.nan] * values.shape[1]
        point["convergence_status"] = ["single"] * values.shape[1]
    return jsonable(point)


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


def read_cached_point(path):
    """A finished point's FDTD figures from the cache, or None (missing or unreadable: an
    unreadable cache entry is recomputed, never trusted)."""
    if not path.is_file():
        return None
    try:
        return json.loads(path.read_text())
    except (OSError, json.JSONDecodeError):
        return None


def add_fdtd(point, horn, run, centre, label, log):
    """Fill the FDTD directivity, uncertainty and run time of ``point`` at the band centre, from
    the cache of finished points or by running the grids (then cached)."""
    path = run["points_dir"] / f"{point_key(horn, run['frequencies'], run['settings'], run['ladder'])}.json"
    figures = read_cached_point(path)
    point.cached = figures is not None
    if figures is None:
        log(f"{label} (S = {point.phase_error_h:.3f}, T = {point.phase_error_e:.3f} wavelengths)")
        figures = run_point(horn, run["frequencies"], run["settings"], run["ladder"], run["force"])
        figures["parameter"] = run["parameter"]
        figures["value"] = point.value
        if is_writer():
            write_text_atomic(path, json.dumps(figures, indent=1) + "\n")
    else:
        log(f"{label} (cached)")
    point.fdtd = np.nan if figures["directivity"][centre] is None else figures["directivity"][centre]
    uncertainty = figures["uncertainty"][centre]
    point.fdtd_uncertainty = np.nan if uncertainty is None else uncertainty
    point.seconds = sum(s or 0 for s in figures.get("seconds", []))


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
    run = {"points_dir": out_dir / "points", "frequencies": freqs, "settings": settings, "ladder": ladder,
           "force": force, "parameter": spec.parameter}
    if is_writer():
        run["points_dir"].mkdir(parents=True, exist_ok=True)
    started = time.monotonic()
    points = []
    for index, (value, horn) in enumerate(horns, start=1):
        point = analytic_point(value, horn, freqs, centre, dims)
        if not analytic_only:
            label = f"hornproof: sweep point {index}/{len(horns)}: {spec.parameter} = {value:g}"
            add_fdtd(point, horn, run, centre, label, log)
        points.append(point)
    document = sweep_document(case, points, horns, dims, ladder, analytic_only, time.monotonic() - started)
    if is_writer():
        write_sweep_folder(out_dir, document)
    return document


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
