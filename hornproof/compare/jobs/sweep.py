"""``hornproof sweep CASE``: model error against one horn parameter, with breakdown thresholds.

For every value of the case's ``[sweep]`` the closed-form and exact-phase models are evaluated
and (unless ``--analytic-only``) the FDTD model is run — the 2D model for sectoral horns by
default — on three grids (``GRID_RATIOS`` × the sweep's cells per wavelength) whose grid
convergence index is the uncertainty of each point; ``--cells-per-wavelength`` sets the grids
(two grids: GCI with safety factor 3 at an assumed first order; one grid: no uncertainty). The errors are split as in ``verify``:

* phase-approximation error = closed form − exact phase (no numerical uncertainty: both are
  converged quadratures);
* aperture-model error = exact phase − FDTD (uncertainty = the FDTD one).

The breakdown threshold of each is the first swept value where |error| − uncertainty exceeds
the tolerance (``verdict.breakdown_threshold``). Finished points are cached by a content hash
of everything that defines them (``points/<hash>.json``, written atomically), so a killed sweep
rerun recomputes nothing it already finished.
"""

import hashlib
import json
import time
from pathlib import Path

import numpy as np

from ... import __version__
from ...errors import InputError
from ..case.casefile import load_case
from ..case.sweepspec import PARAMETER_LABELS
from ..output.folders import check_output_folder
from ..output.json_document import jsonable
from ..output.summary import SAFETY_NOTE
from ..output.sweep_json import SWEEP_SCHEMA, write_sweep_json
from ..output.terminal import emit_result, safety_lines
from ..report.format import MISSING_VALUE

#: default grids of a sweep point, relative to the case's sweep.cells_per_wavelength: three
#: grids give a GCI with an observed order (Celik et al. 2008); two grids force the assumed
#: order and safety factor 3, which in a development run here hid every breakdown
GRID_RATIOS = (1.0, 1.4, 2.0)


def _meep_version():
    try:
        import meep

        return meep.__version__
    except Exception:  # pragma: no cover
        return None


def point_key(horn, frequencies, settings, ladder):
    """Content hash of one sweep point: the horn, band, FDTD settings, grids and versions."""
    import dataclasses

    definition = {
        "horn": dataclasses.asdict(horn),
        "frequencies_hz": [float(f) for f in frequencies],
        "settings": jsonable(dataclasses.asdict(settings)),
        "cells_per_wavelength": [float(c) for c in ladder],
        "hornproof": __version__,
        "meep": _meep_version(),
    }
    text = json.dumps(definition, sort_keys=True, default=str)
    return hashlib.sha256(text.encode()).hexdigest()[:20]


def _run_point(horn, frequencies, settings, ladder, force):
    from ...sim.run import simulate
    from ..numerics.convergence import grid_convergence
    from .verify import _fdtd_figures

    results = [simulate(horn, frequencies, settings, float(c), force=force) for c in ladder]
    figures = [_fdtd_figures(r) for r in results]
    dkey = "directivity_2d_db" if settings.dims == 2 else "directivity_dbi"
    values = np.array([[np.nan if v is None else v for v in f[dkey]] for f in figures])
    finest = int(np.argmax(ladder))
    point = {"directivity": values[finest].tolist(), "directivity_per_grid": values.tolist(),
             "hpbw_h_deg": figures[finest].get("hpbw_h_deg"), "hpbw_e_deg": figures[finest].get("hpbw_e_deg"),
             "power_balance_error": figures[finest].get("power_balance_error"),
             "seconds": [r.run.get("seconds_total") for r in results],
             "wall_thickness_modelled_mm": results[finest].run.get("wall_thickness_modelled_m", np.nan) * 1e3}
    if len(ladder) > 1:
        est = grid_convergence(values, cells_per_wavelength=ladder, formal_order=1.0)
        point["uncertainty"] = [e.uncertainty for e in est]
        point["convergence_status"] = [e.status for e in est]
    else:
        point["uncertainty"] = [np.nan] * values.shape[1]
        point["convergence_status"] = ["single"] * values.shape[1]
    return jsonable(point)


def run_sweep(case, out_dir, *, dims=None, ladder=None, analytic_only=False, force=False, log=None):
    """Run (or resume) the sweep of ``case``; returns the ``hornproof.sweep/1`` document."""
    import dataclasses

    from ...analytic.predict import predict
    from ..numerics.verdict import breakdown_threshold
    from .verify import _is_master

    from .verify import _say

    log = log or _say
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
    try:
        horns = spec.horns(case.horn)
    except ValueError as error:
        raise InputError(f"{case.path}: sweep.values: {error}")
    freqs = np.asarray(case.frequencies, dtype=float)
    centre = int(np.argmin(np.abs(freqs - np.sqrt(freqs.min() * freqs.max()))))
    out_dir = Path(out_dir)
    points_dir = out_dir / "points"
    if _is_master():
        points_dir.mkdir(parents=True, exist_ok=True)
    dkey = "directivity_2d_db" if dims == 2 else "directivity_dbi"
    tolerance = float(case.checks.get("directivity_db", 0.5))
    values, cf, ep, fd, fd_u, phase_h, phase_e, seconds, computed, reused = [], [], [], [], [], [], [], [], 0, 0
    t0 = time.monotonic()
    for index, (value, horn) in enumerate(horns, start=1):
        models = predict(horn, freqs, dims=dims)
        values.append(float(value))
        cf.append(float(np.asarray(models["closed_form"].directivity_dbi)[centre]))
        ep.append(float(np.asarray(models["exact_phase"].directivity_dbi)[centre]))
        phase_h.append(float(horn.phase_error_h(freqs[centre])))
        phase_e.append(float(horn.phase_error_e(freqs[centre])))
        if analytic_only:
            fd.append(np.nan)
            fd_u.append(np.nan)
            continue
        key = point_key(horn, freqs, settings, ladder)
        path = points_dir / f"{key}.json"
        point = None
        if path.is_file():
            try:
                point = json.loads(path.read_text())
                reused += 1
            except (OSError, json.JSONDecodeError):
                point = None  # an unreadable cache entry is recomputed, never trusted
        if point is None:
            log(f"hornproof: sweep point {index}/{len(horns)}: {spec.parameter} = {value:g} "
                f"(S = {phase_h[-1]:.3f}, T = {phase_e[-1]:.3f} wavelengths)")
            point = _run_point(horn, freqs, settings, ladder, force)
            point["parameter"] = spec.parameter
            point["value"] = float(value)
            if _is_master():
                from ...atomic import write_text_atomic

                write_text_atomic(path, json.dumps(point, indent=1) + "\n")
            computed += 1
        else:
            log(f"hornproof: sweep point {index}/{len(horns)}: {spec.parameter} = {value:g} (cached)")
        fd.append(np.nan if point["directivity"][centre] is None else point["directivity"][centre])
        u = point["uncertainty"][centre]
        fd_u.append(np.nan if u is None else u)
        seconds.append(sum(s or 0 for s in point.get("seconds", [])))
    values_a, cf_a, ep_a, fd_a, u_a = map(np.asarray, (values, cf, ep, fd, fd_u))
    phase_err = cf_a - ep_a
    aperture_err = ep_a - fd_a
    total_err = cf_a - fd_a
    zero = np.zeros_like(values_a)
    breakdown = {"phase_approximation": breakdown_threshold(values_a, phase_err, zero, tolerance)}
    if not analytic_only:
        usable_u = np.where(np.isfinite(u_a), u_a, 0.0)
        breakdown["aperture_model"] = breakdown_threshold(values_a, aperture_err, usable_u, tolerance)
        breakdown["total"] = breakdown_threshold(values_a, total_err, usable_u, tolerance)
    label, unit = PARAMETER_LABELS[spec.parameter]
    document = {
        "schema": SWEEP_SCHEMA, "case": case.name, "title": case.title, "case_sha256": case.sha256,
        "parameter": {"name": spec.parameter, "label": label, "unit": unit, "values": values,
                      "held_fixed": "flare half-angles" if spec.parameter == "flare_length_mm" else "flare length"},
        "frequency_ghz": float(freqs[centre] / 1e9),
        "figure": {"name": dkey, "label": "2D directivity" if dims == 2 else "Directivity", "unit": "dB"},
        "tolerance": tolerance,
        "models": {"closed_form": cf, "exact_phase": ep, "fdtd": None if analytic_only else fd},
        "fdtd_uncertainty": None if analytic_only else fd_u,
        "errors": {"phase_approximation": phase_err, "aperture_model": None if analytic_only else aperture_err,
                   "total": None if analytic_only else total_err},
        "uncertainties": {"phase_approximation": zero, "aperture_model": None if analytic_only else fd_u,
                          "total": None if analytic_only else fd_u},
        "breakdown": breakdown,
        "phase_error_h_wl": phase_h, "phase_error_e_wl": phase_e,
        "optimum": analytic_optimum(case, spec, horns, freqs[centre], dims, fd if not analytic_only else None),
        "solver": {"name": "meep", "meep": _meep_version(), "dims": dims, "cells_per_wavelength": ladder,
                   "uncertainty": ("two-grid GCI, safety factor 3, assumed first order" if len(ladder) == 2 else
                                   "grid convergence index over the grids" if len(ladder) > 2 else
                                   "single grid: no numerical uncertainty estimated (treated as 0)"),
                   "points_computed": computed, "points_reused": reused,
                   "seconds": time.monotonic() - t0, "seconds_per_point": seconds} if not analytic_only else
                  {"name": "none (analytic only)"},
        "warnings": list(case.warnings), "safety": SAFETY_NOTE,
        "hornproof_version": __version__,
    }
    document = jsonable(document)
    if _is_master():
        from ..report.html import build_sweep_report

        _plot_sweep(out_dir, document)
        write_sweep_json(out_dir / "sweep.json", document)
        build_sweep_report(out_dir)
    return document


def analytic_optimum(case, spec, horns, frequency, dims, fdtd_values=None, samples=161):
    """Where each model's directivity peaks along the sweep, with the peak phase errors there.

    The analytic models are evaluated on a dense grid of the swept parameter between the first
    and last values; FDTD on its samples (with a parabola through the best three).
    """
    from ...analytic.predict import predict

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


def _plot_sweep(folder, document):
    from ..report import plots

    p = document["parameter"]
    errors, unc = document["errors"], document["uncertainties"]

    def arr(v):
        return None if v is None else np.array([np.nan if x is None else x for x in v], dtype=float)

    plots.plot_error_vs_parameter(
        arr(p["values"]), arr(errors["phase_approximation"]), arr(errors["aperture_model"]),
        folder / "error_vs_parameter", total_error=arr(errors.get("total")), phase_approximation_uncertainty=0.0,
        aperture_model_uncertainty=arr(unc["aperture_model"]), total_uncertainty=arr(unc.get("total")),
        tolerance=document["tolerance"],
        breakdown=document["breakdown"], parameter_label=p["label"], parameter_unit=p["unit"],
        error_label=f"{document['figure']['label']} error", error_unit="dB",
        case_title=f"{document['title']} — at {document['frequency_ghz']:.3g} GHz")
    _plot_directivity_vs_parameter(folder / "directivity_vs_parameter", document)


def _plot_directivity_vs_parameter(path_stem, document):
    from ..report import plots

    p = document["parameter"]
    x = np.asarray(p["values"], dtype=float)
    fig, ax = plots.new_figure()
    for name in ("closed_form", "exact_phase", "fdtd"):
        y = document["models"].get(name)
        if y is None:
            continue
        y = np.array([np.nan if v is None else v for v in y], dtype=float)
        ax.plot(x, y, "-o", markersize=4, color=plots.MODEL_COLOURS[name], label=plots.MODEL_LABELS[name])
        if name == "fdtd" and document.get("fdtd_uncertainty") is not None:
            u = np.array([np.nan if v is None else v for v in document["fdtd_uncertainty"]], dtype=float)
            if np.any(np.isfinite(u)):
                ax.errorbar(x, y, yerr=np.where(np.isfinite(u), u, 0), fmt="none",
                            ecolor=plots.MODEL_COLOURS[name], capsize=3, linewidth=1)
    for name, best in (document.get("optimum") or {}).items():
        if best and best.get("interior") and name in plots.MODEL_COLOURS:
            ax.axvline(best["value"], color=plots.MODEL_COLOURS[name], linestyle=":", linewidth=1.2,
                       label=f"{plots.MODEL_LABELS[name].split(' (')[0]} peak: {best['value']:.3g} {p['unit']}, "
                             f"S = {best['phase_error_h_wl']:.2f}, T = {best['phase_error_e_wl']:.2f} wl")
    ax.set_xlabel(f"{p['label']} ({p['unit']})")
    ax.set_ylabel(f"{document['figure']['label']} ({document['figure']['unit']})")
    ax.set_title(f"{document['title']}\n{document['figure']['label']} at {document['frequency_ghz']:.3g} GHz "
                 f"vs {p['label'].lower()} ({p['held_fixed']} fixed)", loc="left", fontsize=10)
    ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.16), ncol=1, fontsize=8, frameon=False)
    fig.subplots_adjust(bottom=0.38)
    plots.save_figure(fig, path_stem)


def format_sweep(document):
    p = document["parameter"]
    lines = [f"{document['case']}: {document['title']}",
             f"  {document['figure']['label']} at {document['frequency_ghz']:.3g} GHz vs {p['label']} ({p['unit']}), "
             f"{p['held_fixed']} fixed; tolerance {document['tolerance']:g} dB",
             f"  {p['unit']:>8} {'S wl':>6} {'T wl':>6} {'closed':>8} {'exact':>8} {'FDTD':>8} {'+-':>6} "
             f"{'phase err':>9} {'aperture err':>12}"]

    def f(v, w=8, d=2):
        return MISSING_VALUE.rjust(w) if v is None else f"{v:{w}.{d}f}"

    fd = document["models"]["fdtd"] or [None] * len(p["values"])
    u = document["fdtd_uncertainty"] or [None] * len(p["values"])
    ap = document["errors"]["aperture_model"] or [None] * len(p["values"])
    for i, value in enumerate(p["values"]):
        lines.append(f"  {value:8.3g} {document['phase_error_h_wl'][i]:6.3f} {document['phase_error_e_wl'][i]:6.3f} "
                     f"{f(document['models']['closed_form'][i])} {f(document['models']['exact_phase'][i])} "
                     f"{f(fd[i])} {f(u[i], 6)} {f(document['errors']['phase_approximation'][i], 9)} {f(ap[i], 12)}")
    for key, where in document["breakdown"].items():
        text = ("never within the sweep" if where is None else "already at the first value" if where == "below range"
                else f"{where:.3g} {p['unit']}")
        lines.append(f"  breakdown of the {key.replace('_', ' ')}: {text}")
    for name, best in (document.get("optimum") or {}).items():
        lines.append(f"  {name.replace('_', ' ')} peaks at {best['value']:.3g} {p['unit']} "
                     f"(S = {best['phase_error_h_wl']:.3f}, T = {best['phase_error_e_wl']:.3f} wavelengths)"
                     + ("" if best["interior"] else " — at the edge of the sweep"))
    lines.append(safety_lines())
    return "\n".join(lines)


def sweep_command(args):
    case = load_case(args.case)
    out_dir = check_output_folder(Path(args.out) if args.out else Path("results") / f"{case.name}-sweep",
                                  "--out" if args.out else "the default sweep folder",
                                  markers=("sweep.json",), allow_partial=("points",))
    document = run_sweep(case, out_dir, dims=args.dims, ladder=args.cells_per_wavelength,
                         analytic_only=args.analytic_only, force=args.force)
    from .verify import _is_master

    if _is_master():
        emit_result(args.json, document, format_sweep(document), f"report: {out_dir / 'report.html'}")
    return 0
