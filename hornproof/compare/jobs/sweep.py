"""``hornproof sweep CASE``: model error against one horn parameter, with breakdown intervals.

For every value of the case's ``[sweep]`` both analytic models are evaluated and (unless
``--analytic-only``) the FDTD model is run as ``verify`` would run the point's own case
(:mod:`.sweep_point`): the real horn in 3D by default, the 2D principal-plane model only when
the sweep asks for it (as a labelled first look, or beside the 3D one to show where they part).
The errors are split as in ``verify``:

* phase-approximation error = closed form − exact phase (no numerical uncertainty: both are
  converged quadratures; evaluated on a dense grid of the swept parameter);
* aperture-model error = exact phase − FDTD, and total error = closed form − FDTD (the FDTD
  point's uncertainty: confident where its ladder allows, a disagreement bound otherwise).

Each error's breakdown is an interval (:func:`..numerics.breakdown.breakdown_interval`), each
model's optimum a value with the range of swept values that could hold it
(:func:`..numerics.breakdown.optimum_interval`). The FDTD points run in the point pool
(:mod:`.point_pool`): in parallel process groups under ``mpirun``, each cached in a verified
``points/<hash>.json`` as it finishes, so a killed sweep rerun recomputes nothing it already
finished; a failed point is listed in ``failed_points`` with its reason (NaN figures) and the
sweep exits with status 3 only when every FDTD point failed.
"""

import time
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ...analytic.predict import predict
from ...errors import InputError, RunError
from ...sim.solver import meep_version
from ...version import build_version
from ..case.sweepspec import SWEEP_PARAMETERS
from ..numerics.breakdown import analytic_breakdown, breakdown_interval, optimum_interval
from ..numerics.figures import directivity_key
from ..numerics.metrics import band_centre_index
from ..output.json_document import jsonable
from ..output.summary import SAFETY_NOTE
from ..output.sweep_json import SWEEP_SCHEMA, write_sweep_json
from .messages import is_writer, say
from .point_cost import point_cost
from .point_pool import PointTask, every_point_failed, run_points
from .sweep_point import point_case, point_definition, point_figures, point_ladder

#: samples of the swept parameter on which the analytic models are evaluated (optima and the
#: phase-approximation breakdown)
DENSE_SAMPLES = 161

#: the three model errors of a sweep
ERROR_KINDS = ("phase_approximation", "aperture_model", "total")

#: how a sweep names its model, by dimension
MODEL_LABELS = {3: "3D model of the real horn",
                2: "2D principal-plane model (a first look: it cannot see the other plane's opening)"}


@dataclass
class SweepPoint:
    """One swept value at the band centre: both analytic models and (unless analytic only) FDTD.

    Directivities in dB (dBi in 3D, 2D directivity in 2D); peak phase errors S (H-plane) and
    T (E-plane) in wavelengths; NaN where a value is not available. ``fdtd_uncertainty`` is the
    uncertainty shown (whatever its kind), ``fdtd_confident`` the one that may support "holds",
    ``fdtd_bound`` the one that may support "past tolerance" (:mod:`..numerics.confidence`).
    """

    value: float
    closed_form: float
    exact_phase: float
    phase_error_h: float
    phase_error_e: float
    fdtd: float = float("nan")
    fdtd_uncertainty: float = float("nan")
    fdtd_confident: float = float("nan")
    fdtd_bound: float = float("nan")
    ladder: str | None = None
    reason: str | None = None
    details: dict | None = None  # the point's ladder, run times, wall, verdict (FDTD only)
    seconds: float | None = None  # FDTD run time over the point's grids (None: no FDTD)
    cached: bool | None = None  # FDTD figures read from the point cache (None: no FDTD)


def sweep_dims(case, dims=None):
    """The model dimensions a sweep runs, the main one first: (3,), (2,) or (3, 2)."""
    spec = case.sweep
    if spec is None:
        raise InputError(f"{case.path}: sweep: the case has no [sweep] table")
    if dims is not None:
        dims = int(dims)
        if dims == 2 and case.horn.kind == "pyramidal":
            raise InputError(f"{case.path}: --dims: a pyramidal horn has no 2D model; use 3")
        return (dims,)
    return (3, 2) if spec.principal_plane else (int(spec.dims),)


def analytic_point(value, horn, frequencies, centre, dims):
    """A :class:`SweepPoint` with both analytic models at the band centre (no FDTD yet)."""
    models = predict(horn, frequencies, dims=dims)
    return SweepPoint(value=float(value),
                      closed_form=float(np.asarray(models["closed_form"].directivity_dbi)[centre]),
                      exact_phase=float(np.asarray(models["exact_phase"].directivity_dbi)[centre]),
                      phase_error_h=float(horn.phase_error_h(frequencies[centre])),
                      phase_error_e=float(horn.phase_error_e(frequencies[centre])))


def _number(value):
    return float("nan") if value is None else float(value)


def _at(figures, key, index):
    """``figures[key][index]``, or None when the point's figures have no such list."""
    values = figures.get(key)
    return values[index] if values else None


def fill_fdtd(point, outcome, centre):
    """The FDTD figures of ``point`` at the band centre from its pool outcome (NaN for a failed
    point; ``cached`` None then)."""
    point.cached = {"cached": True, "computed": False}.get(outcome.status)
    if outcome.figures is None:
        point.reason = outcome.reason
        return
    figures = outcome.figures
    point.fdtd = _number(figures["directivity"][centre])
    point.fdtd_uncertainty = _number(figures["uncertainty"][centre])
    point.fdtd_confident = _number(_at(figures, "confident_uncertainty", centre))
    point.fdtd_bound = _number(_at(figures, "disagreement_bound", centre))
    point.ladder = _at(figures, "ladder", centre)
    point.reason = _at(figures, "uncertainty_reason", centre)
    point.seconds = sum(s or 0 for s in figures.get("seconds", []))
    point.details = {key: figures.get(key) for key in ("cells_per_wavelength", "seconds", "verdict",
                                                        "worst_size_residual_percent", "wall_thickness_modelled_mm",
                                                        "wall_thickness_modelled_per_rung_mm")}


def run_model(case, horns, dims, run, analytic_only, log):
    """The :class:`SweepPoint` of every swept horn for one model dimension, and the pool's
    outcomes (empty when analytic only)."""
    freqs, centre, spec = run["frequencies"], run["centre"], case.sweep
    points = [analytic_point(value, horn, freqs, centre, dims) for value, horn in horns]
    if analytic_only:
        return points, []
    tasks = []
    for index, ((value, horn), point) in enumerate(zip(horns, points), start=1):
        ladder = run["ladder"] or point_ladder(spec, horn, freqs, dims)
        pcase = point_case(case, horn, value, dims, ladder)
        tasks.append(PointTask(
            horn, f"sweep point {index}/{len(horns)} ({dims}D): {spec.parameter} = {value:g} "
                  f"(S = {point.phase_error_h:.3f}, T = {point.phase_error_e:.3f} wavelengths)",
            {spec.parameter: value, "dims": dims}, point_cost(horn, freqs, pcase.fdtd, ladder),
            definition=point_definition(pcase), run=lambda force, pcase=pcase: point_figures(pcase, force=force),
            rungs=None))
    outcomes = run_points(tasks, frequencies=freqs, settings=case.fdtd, ladder=[], points_dir=run["points_dir"],
                          force=run["force"], log=log)
    for point, outcome in zip(points, outcomes):
        fill_fdtd(point, outcome, centre)
    return points, outcomes


def run_sweep(case, out_dir, *, dims=None, ladder=None, analytic_only=False, force=False, log=None):
    """Run (or resume) the sweep of ``case``; returns the ``hornproof.sweep/2`` document.

    ``dims`` overrides the sweep's model dimension (one model only); ``ladder`` (cells per
    wavelength) overrides every point's ladder."""
    log = log or say
    all_dims = sweep_dims(case, dims)
    spec = case.sweep
    try:
        horns = spec.horns(case.horn)
    except ValueError as error:
        raise InputError(f"{case.path}: sweep.values: {error}")
    freqs = np.asarray(case.frequencies, dtype=float)
    out_dir = Path(out_dir)
    run = {"points_dir": out_dir / "points", "frequencies": freqs, "centre": band_centre_index(freqs),
           "ladder": [float(c) for c in ladder] if ladder else None, "force": force}
    if is_writer():
        out_dir.mkdir(parents=True, exist_ok=True)
    started = time.monotonic()
    models, outcomes = {}, []
    for d in all_dims:
        models[d], done = run_model(case, horns, d, run, analytic_only, log)
        outcomes += done
    document = sweep_document(case, models, analytic_only, time.monotonic() - started)
    document["failed_points"] = [{"value": point.value, "dims": d, "reason": point.reason}
                                 for d, points in models.items() for point in points
                                 if not analytic_only and point.cached is None]
    if is_writer():
        write_sweep_folder(out_dir, document)
    if every_point_failed(outcomes):
        raise RunError(f"{case.path}: every FDTD point of the sweep failed (first: {outcomes[0].reason}); "
                       f"the analytic results are in {out_dir}")
    return document


def _column(points, name):
    return np.asarray([getattr(p, name) for p in points], dtype=float)


def model_block(case, points, dims, analytic_only):
    """Models, errors, uncertainties, breakdown intervals and optima of one model dimension."""
    spec = case.sweep
    frequency = float(spec.frequency) if np.isfinite(spec.frequency) else float(
        case.frequencies[band_centre_index(case.frequencies)])
    tolerance = float(case.checks.get("directivity_db", 0.5))
    values = _column(points, "value")
    closed_form, exact_phase, fdtd = (_column(points, n) for n in ("closed_form", "exact_phase", "fdtd"))
    dense = dense_curves(case, frequency, dims)
    zero = np.zeros_like(values)
    errors = {"phase_approximation": closed_form - exact_phase}
    uncertainties = {"phase_approximation": zero}
    breakdown = {"phase_approximation": analytic_breakdown(dense["values"], dense["closed_form"] - dense["exact_phase"],
                                                           tolerance)}
    optimum = {name: analytic_optimum(dense, name) for name in ("closed_form", "exact_phase")}
    block = {"dims": dims, "label": MODEL_LABELS[dims],
             "figure": {"name": directivity_key(dims),
                        "label": "2D directivity (per-unit-length model)" if dims == 2 else "Directivity",
                        "unit": "dB" if dims == 2 else "dBi"},
             "models": {"closed_form": closed_form, "exact_phase": exact_phase, "fdtd": None},
             "phase_error_h_wl": _column(points, "phase_error_h"), "phase_error_e_wl": _column(points, "phase_error_e"),
             "dense": {"values": dense["values"], "closed_form": dense["closed_form"],
                       "exact_phase": dense["exact_phase"]}}
    if not analytic_only:
        confident, bound = _column(points, "fdtd_confident"), _column(points, "fdtd_bound")
        errors.update(aperture_model=exact_phase - fdtd, total=closed_form - fdtd)
        shown = _column(points, "fdtd_uncertainty")
        for kind in ("aperture_model", "total"):
            uncertainties[kind] = shown
            breakdown[kind] = breakdown_interval(values, errors[kind], confident, bound, tolerance)
        optimum["fdtd"] = fdtd_optimum(spec, case.horn, values, fdtd, confident, bound, frequency)
        block["models"]["fdtd"] = fdtd
        block.update(fdtd_uncertainty=shown, fdtd_confident_uncertainty=confident, fdtd_disagreement_bound=bound,
                     fdtd_ladder=[p.ladder for p in points], fdtd_uncertainty_reason=[p.reason for p in points],
                     points=[dict(p.details or {}, value=p.value, cached=p.cached) for p in points])
    for kind in ERROR_KINDS:
        errors.setdefault(kind, None)
        uncertainties.setdefault(kind, None)
    block.update(errors=errors, uncertainties=uncertainties, breakdown=breakdown, optimum=optimum)
    return block


def parting(case, main, principal):
    """Where the 3D and 2D aperture-model errors part along the sweep, and by how much."""
    tolerance = float(case.checks.get("directivity_db", 0.5))
    values = np.asarray(case.sweep.values, dtype=float)
    difference = np.asarray(main["errors"]["aperture_model"]) - np.asarray(principal["errors"]["aperture_model"])
    confident = np.hypot(main["fdtd_confident_uncertainty"], principal["fdtd_confident_uncertainty"])
    bound = np.hypot(main["fdtd_disagreement_bound"], principal["fdtd_disagreement_bound"])
    finite = np.isfinite(difference)
    largest = int(np.nanargmax(np.abs(difference))) if np.any(finite) else None
    return {"difference": difference, "confident_uncertainty": confident, "disagreement_bound": bound,
            "interval": breakdown_interval(values, difference, confident, bound, tolerance),
            "largest": None if largest is None else {"value": float(values[largest]),
                                                     "difference": float(difference[largest]),
                                                     "uncertainty": float(confident[largest])}}


def sweep_document(case, models, analytic_only, seconds):
    """The ``hornproof.sweep/2`` document; ``models`` maps each model dimension run (the main
    one first) to its list of :class:`SweepPoint`."""
    spec = case.sweep
    freqs = np.asarray(case.frequencies, dtype=float)
    centre = band_centre_index(freqs)
    (main_dims, *others) = list(models)
    blocks = {d: model_block(case, points, d, analytic_only) for d, points in models.items()}
    main = blocks[main_dims]
    parameter = SWEEP_PARAMETERS[spec.parameter]
    document = {
        "schema": SWEEP_SCHEMA, "case": case.name, "title": case.title, "case_sha256": case.sha256,
        "parameter": {"name": spec.parameter, "label": parameter.label, "unit": parameter.unit,
                      "values": [p.value for p in models[main_dims]], "held_fixed": parameter.held_fixed},
        "frequency_ghz": float(freqs[centre] / 1e9),
        "tolerance": float(case.checks.get("directivity_db", 0.5)),
        **main,
        "principal_plane": blocks[others[0]] if others else None,
        "parting": (parting(case, main, blocks[others[0]]) if others and not analytic_only else None),
        "solver": ({"name": "none (analytic only)"} if analytic_only else
                   sweep_solver_block(models, seconds)),
        "warnings": list(case.warnings), "safety": SAFETY_NOTE,
        "hornproof_version": build_version(),
    }
    return jsonable(document)


def sweep_solver_block(models, seconds):
    """The ``solver`` block of sweep.json (FDTD runs only)."""
    points = [p for group in models.values() for p in group]
    return {"name": "meep", "meep": meep_version(), "dims": list(models),
            "ladder": "each point's own ladder, fitted to its horn (see points)",
            "uncertainty": "as verify: grid convergence index, power balance and geometry residual, "
                           "root-sum-square; confident only from a monotone ladder of three or more rungs",
            "points_computed": sum(1 for p in points if p.cached is False),
            "points_reused": sum(1 for p in points if p.cached),
            "seconds": seconds, "seconds_per_point": [p.seconds for p in points if p.seconds is not None]}


def write_sweep_folder(out_dir, document):
    """sweep.json, its plots and report.html into ``out_dir`` (the writing process only)."""
    # lazy: the plots and the report load matplotlib and templates (slow) only when writing
    from ..report.html import build_sweep_report
    from ..report.sweep_plots import write_sweep_plots

    write_sweep_plots(out_dir, document)
    write_sweep_json(out_dir / "sweep.json", document)
    build_sweep_report(out_dir)


def dense_curves(case, frequency, dims, samples=DENSE_SAMPLES):
    """Both analytic models on a dense grid of the swept parameter (first to last value), with
    the peak phase errors S, T; values that make no horn are left out."""
    spec = case.sweep
    out = {"values": [], "closed_form": [], "exact_phase": [], "phase_error_h_wl": [], "phase_error_e_wl": []}
    for value in np.linspace(min(spec.values), max(spec.values), samples):
        try:
            horn = spec.horn_at(case.horn, float(value))
        except ValueError:
            continue
        models = predict(horn, [frequency], dims=dims)
        out["values"].append(float(value))
        for name in ("closed_form", "exact_phase"):
            out[name].append(float(np.asarray(models[name].directivity_dbi)[0]))
        out["phase_error_h_wl"].append(float(horn.phase_error_h(frequency)))
        out["phase_error_e_wl"].append(float(horn.phase_error_e(frequency)))
    return {key: np.asarray(values, dtype=float) for key, values in out.items()}


def analytic_optimum(dense, name):
    """Where an analytic model peaks on the dense grid: the sample, ± half a dense step."""
    curve = dense[name]
    if curve.size == 0:
        return None
    i = int(np.argmax(curve))
    step = float(np.max(np.diff(dense["values"]))) if curve.size > 1 else 0.0
    return {"value": float(dense["values"][i]), "figure": float(curve[i]), "uncertainty": 0.0,
            "interior": 0 < i < curve.size - 1,
            "range": [float(dense["values"][i]) - step / 2, float(dense["values"][i]) + step / 2],
            "bounded": True,
            "phase_error_h_wl": float(dense["phase_error_h_wl"][i]),
            "phase_error_e_wl": float(dense["phase_error_e_wl"][i])}


def fdtd_optimum(spec, base_horn, values, fdtd, confident, bound, frequency):
    """Where the FDTD directivity peaks among the swept values, with the range that could hold
    the peak given each point's uncertainty (:func:`..numerics.breakdown.optimum_interval`)."""
    best = optimum_interval(values, fdtd, confident, bound)
    if best is None:
        return None
    horn = spec.horn_at(base_horn, best["value"])
    best.update(phase_error_h_wl=float(horn.phase_error_h(frequency)),
                phase_error_e_wl=float(horn.phase_error_e(frequency)))
    return best



def _interval_figure(interval, first_value):
    """(value, uncertainty) of a breakdown interval for regress: its midpoint and half-width;
    "past tolerance from the start" is the first swept value (no width); a breakdown that holds
    throughout or is unresolved has no value (None): a change of status is a regression."""
    status = interval.get("status") if isinstance(interval, dict) else None
    if status == "past tolerance from the start":
        return float(first_value), 0.0
    if status != "breaks":
        return None, None
    low = first_value if interval["earliest"] == "below range" else interval["earliest"]
    high = interval["latest"]
    return 0.5 * (low + high), 0.5 * (high - low)


def regress_figures(document, frequency_index):
    """The sweep's figures a nightly run compares with its baseline: each breakdown interval and
    each model's optimum as a value ± half its width, named ``sweep_<what>_<unit>``."""
    unit = document["parameter"]["unit"]
    first = min(document["parameter"]["values"])
    figures = {}
    for kind, interval in (document.get("breakdown") or {}).items():
        value, uncertainty = _interval_figure(interval, first)
        figures[f"sweep_breakdown_{kind}_{unit}"] = {"value": value, "uncertainty": uncertainty}
    for model, best in (document.get("optimum") or {}).items():
        if best:
            low, high = best.get("range") or (best["value"], best["value"])
            figures[f"sweep_optimum_{model}_{unit}"] = {"value": best["value"], "uncertainty": 0.5 * (high - low)}
    return {"frequency_index": int(frequency_index), "parameter": document["parameter"]["name"],
            "model": document.get("label"), "figures": figures}
