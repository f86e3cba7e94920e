"""``hornproof map CASE``: model error over two horn parameters, with breakdown intervals.

For the case's ``[map]`` (:class:`hornproof.compare.case.mapspec.MapSpec`):

1. the **analytic map** — closed form and exact phase on a dense grid of both parameters at
   the band centre, and the phase-approximation error closed form − exact phase
   (:mod:`.map_analytic`; instant);
2. the **estimate** — every FDTD point's rungs and seconds and the whole map's, printed
   before anything runs; beyond ``budget_hours`` the map is refused unless ``force``
   (:mod:`.map_estimate`);
3. the **FDTD points** — every (x, y) pair of the coarse grid on a grid-fitted ladder (the
   map's ``cells_per_wavelength``, or the default ladder: six cells across the narrowest
   opening, ratio 1.3, three rungs), its uncertainty from the ladder's grid convergence index,
   the power-balance term and the grid-fit residual, as verify combines them
   (:func:`.point_pool.run_point`), run in the point pool (process
   groups under ``mpirun``, verified cache in ``points/``, resumable, failed points reported);
4. the **errors** at each FDTD point — phase approximation (closed form − exact phase),
   aperture model (exact phase − FDTD) and total (closed form − FDTD), the last two with the
   FDTD uncertainty — and their **breakdown intervals** along the x parameter for every y
   value (:mod:`..numerics.breakdown`, the sweep's rules): from the first x where |error| plus
   the confident uncertainty could exceed the tolerance to the first where |error| minus the
   ladder's defensible bound surely does (*unresolved* when no point is sure).

The map exits with status 3 only when every FDTD point failed (the document, with the failed
points and their reasons, is written first).
"""

import dataclasses
import time
from pathlib import Path

import numpy as np

from ...errors import InputError, RunError
from ...sim import mpi
from ...sim.grid_fit import default_ladder, flared_plane
from ...sim.solver import meep_version
from ...version import build_version
from ..case.sweepspec import SWEEP_PARAMETERS
from ..numerics.breakdown import analytic_breakdown, breakdown_interval
from ..numerics.metrics import band_centre_index
from ..output.json_document import jsonable
from ..output.map_json import MAP_SCHEMA, write_map_json
from ..output.summary import SAFETY_NOTE
from .map_analytic import analytic_map, model_directivities
from .map_estimate import DEFAULT_BUDGET_HOURS, check_budget, estimate_lines, estimate_map
from .messages import is_writer, say
from .point_pool import PointTask, every_point_failed, run_points

__all__ = ["map_grids", "run_map", "map_document"]


def map_grids(case):
    """The FDTD settings and nominal ladder of the case's map."""
    spec = case.map
    if spec is None:
        raise InputError(f"{case.path}: map: the case has no [map] table")
    f_max = float(np.max(case.frequencies))
    ladder = list(spec.cells_per_wavelength or default_ladder(case.horn, f_max, spec.dims,
                                                              plane=flared_plane(case.horn, spec.dims)))
    settings = dataclasses.replace(case.fdtd, dims=spec.dims, cells_per_wavelength=tuple(ladder))
    return settings, [float(c) for c in ladder]


def _axis(name, values, dense):
    parameter = SWEEP_PARAMETERS[name]
    return {"name": name, "label": parameter.label, "unit": parameter.unit, "values": list(values),
            "analytic": list(dense)}


def _breakdowns(spec, analytic, points, tolerance, analytic_only):
    """Breakdown intervals along x (:func:`..numerics.breakdown.breakdown_interval`, the rules
    of the sweep): the analytic phase-approximation error for every dense y, the FDTD-based
    errors for every FDTD y."""
    out = {"phase_approximation": [
        {"y": float(y), "at": analytic_breakdown(analytic["x"], row, tolerance)["latest"]}
        for y, row in zip(analytic["y"], analytic["phase_approximation_error"])]}
    if analytic_only:
        return out

    def column(row, key):
        return [np.nan if p.get(key) is None else p[key] for p in row]

    for kind in ("aperture_model", "total"):
        rows = []
        for y in spec.y_values:
            row = sorted((p for p in points if p["y"] == y), key=lambda p: p["x"])
            interval = breakdown_interval([p["x"] for p in row], column(row, f"{kind}_error"),
                                          column(row, "confident_uncertainty"), column(row, "disagreement_bound"),
                                          tolerance)
            rows.append({"y": float(y), **interval})
        out[kind] = rows
    return out


def _point_record(x, y, horn, frequency, dims, outcome, centre, estimated):
    closed, exact = model_directivities(horn, frequency, dims)
    record = {"x": float(x), "y": float(y), "closed_form": closed, "exact_phase": exact,
              "phase_approximation_error": closed - exact,
              "phase_error_h_wl": float(horn.phase_error_h(frequency)),
              "phase_error_e_wl": float(horn.phase_error_e(frequency)),
              "fdtd": None, "uncertainty": None, "aperture_model_error": None, "total_error": None,
              "status": "analytic only" if outcome is None else outcome.status,
              "reason": "" if outcome is None else outcome.reason, "estimated_seconds": estimated}
    figures = None if outcome is None else outcome.figures
    if figures is not None:
        fdtd, uncertainty = figures["directivity"][centre], figures["uncertainty"][centre]
        record.update(fdtd=fdtd, uncertainty=uncertainty,
                      aperture_model_error=None if fdtd is None else exact - fdtd,
                      total_error=None if fdtd is None else closed - fdtd,
                      cells_per_wavelength=figures.get("cells_per_wavelength"),
                      convergence_status=(figures.get("convergence_status") or [None] * (centre + 1))[centre],
                      confident_uncertainty=(figures.get("confident_uncertainty") or [None] * (centre + 1))[centre],
                      disagreement_bound=(figures.get("disagreement_bound") or [None] * (centre + 1))[centre],
                      seconds=sum(s or 0 for s in figures.get("seconds") or []))
    return record


def run_map(case, out_dir, *, analytic_only=False, force=False, budget_hours=DEFAULT_BUDGET_HOURS, log=None,
            world=None, runner=None):
    """Run (or resume) the map of ``case``; returns the ``hornproof.map/1`` document.

    ``world`` and ``runner`` are passed to :func:`.point_pool.run_points` (tests pass a fake
    solver). Raises ``InputError`` when the estimate is beyond ``budget_hours`` and not
    ``force``; ``RunError`` (after writing the document) when every FDTD point failed.
    """
    log = log or say
    started = time.monotonic()
    settings, ladder = map_grids(case)
    spec = case.map
    freqs = np.asarray(case.frequencies, dtype=float)
    centre = band_centre_index(freqs)
    frequency = float(freqs[centre])
    out_dir = Path(out_dir)
    grid = [(x, y, spec.horn_at(case.horn, x, y)) for _, _, x, y in spec.fdtd_grid()]
    x_label, y_label = SWEEP_PARAMETERS[spec.x_parameter].label, SWEEP_PARAMETERS[spec.y_parameter].label
    estimate = None
    outcomes = [None] * len(grid)
    if not analytic_only:
        processes = mpi.size() if world is None else world.size
        estimate = estimate_map(grid, freqs, settings, ladder, processes)
        for line in estimate_lines(estimate, x_label, y_label):
            log(line)
        check_budget(estimate, budget_hours, force, case.path)
    analytic = analytic_map(case.horn, spec, frequency, spec.dims)
    if is_writer():
        out_dir.mkdir(parents=True, exist_ok=True)
    if not analytic_only:
        tasks = [PointTask(horn, f"map point {k}/{len(grid)}: {x_label} = {x:g}, {y_label} = {y:g}",
                           {spec.x_parameter: x, spec.y_parameter: y}, estimate["points"][k - 1]["seconds"] or 1.0)
                 for k, (x, y, horn) in enumerate(grid, start=1)]
        outcomes = run_points(tasks, frequencies=freqs, settings=settings, ladder=ladder,
                              points_dir=out_dir / "points", force=force, log=log, world=world, runner=runner)
    points = [_point_record(x, y, horn, frequency, spec.dims, outcome, centre,
                            None if estimate is None else estimate["points"][k]["seconds"])
              for k, ((x, y, horn), outcome) in enumerate(zip(grid, outcomes))]
    document = map_document(case, spec, analytic, points, ladder, estimate, analytic_only,
                            time.monotonic() - started, frequency, budget_hours)
    if is_writer():
        write_map_folder(out_dir, document)
    if not analytic_only and every_point_failed(outcomes):
        raise RunError(f"{case.path}: every FDTD point of the map failed (first: {outcomes[0].reason}); "
                       f"the analytic map is in {out_dir}")
    return document


def map_document(case, spec, analytic, points, ladder, estimate, analytic_only, seconds, frequency, budget_hours):
    """The ``hornproof.map/1`` document (JSON-ready)."""
    tolerance = float(case.checks.get("directivity_db", 0.5))
    dims = int(spec.dims)
    document = {
        "schema": MAP_SCHEMA, "case": case.name, "title": case.title, "case_sha256": case.sha256,
        "model": ("3D model" if dims == 3 else
                  "2D principal-plane model (a first look: it cannot see the other plane's opening)"),
        "dims": dims,
        "frequency_ghz": frequency / 1e9,
        "figure": {"name": "directivity_dbi" if dims == 3 else "directivity_2d_db",
                   "label": "Directivity" if dims == 3 else "2D directivity", "unit": "dB"},
        "tolerance": tolerance,
        "x": _axis(spec.x_parameter, spec.x_values, analytic["x"]),
        "y": _axis(spec.y_parameter, spec.y_values, analytic["y"]),
        "analytic": {key: analytic[key] for key in ("closed_form", "exact_phase", "phase_approximation_error",
                                                    "phase_error_h_wl", "phase_error_e_wl")},
        "points": points,
        "breakdown": _breakdowns(spec, analytic, points, tolerance, analytic_only),
        "breakdown_axis": "x",
        "analytic_only": bool(analytic_only),
        "estimate": estimate,
        "budget_hours": float(budget_hours),
        "failed_points": [{"x": p["x"], "y": p["y"], "reason": p["reason"]} for p in points if p["status"] == "failed"],
        "solver": ({"name": "none (analytic only)"} if analytic_only else
                   {"name": "meep", "meep": meep_version(), "dims": dims, "cells_per_wavelength_nominal": ladder,
                    "uncertainty": "grid convergence index over the fitted rungs (Celik et al. 2008), "
                                   "root-sum-square with the finest rung's power-balance term and the "
                                   "grid-fit residual (as verify)",
                    "points_computed": sum(1 for p in points if p["status"] == "computed"),
                    "points_reused": sum(1 for p in points if p["status"] == "cached"),
                    "points_failed": sum(1 for p in points if p["status"] == "failed"),
                    "seconds": seconds}),
        "warnings": list(case.warnings), "safety": SAFETY_NOTE,
        "hornproof_version": build_version(),
    }
    return jsonable(document)


def write_map_folder(out_dir, document):
    """map.json, its figures and report.html into ``out_dir`` (the writing process only)."""
    # lazy: plots and the report load matplotlib and templates only when writing
    from ..report.map_page import build_map_report
    from ..report.map_plots import write_map_plots

    write_map_plots(out_dir, document)
    write_map_json(out_dir / "map.json", document)
    build_map_report(out_dir)
