"""``hornproof verify CASE``: the main job.

Both analytic models, the FDTD convergence ladder, per-figure grid-convergence uncertainty,
the comparison (differences, error split, verdicts against the case's ``[checks]``), and the
outputs: ``result.json``, ``fields.h5`` (finest grid), ``s11.s1p``, plots and ``report.html``.

The whole output folder is built under a temporary name beside the target and renamed when
complete, so an interrupted or failed run never leaves a half-written result folder.
"""

import os
import sys
import time
from pathlib import Path

import numpy as np

from ..case.casefile import load_case
from ..output.folders import check_output_folder, publish_folder
from ..cli.predict import predict_case
from ..output.json_document import jsonable
from ..output.terminal import emit_result, safety_lines
from ..report.format import MISSING_VALUE

#: case-file check name -> comparison metrics it applies to (verdict.COMPARED_FIGURES keys)
CHECK_METRICS = {
    "directivity_db": ("directivity_db",),
    "gain_db": ("realized_gain_db",),
    "hpbw_deg": ("hpbw_h_deg", "hpbw_e_deg"),
    "first_null_deg": ("first_null_h_deg", "first_null_e_deg"),
    "sll_db": ("sll_h_db", "sll_e_db"),
}

#: FDTD figures whose ladder gets a convergence estimate
LADDER_FIGURES = ("directivity_dbi", "directivity_2d_db", "gain_dbi", "realized_gain_dbi", "hpbw_h_deg",
                  "hpbw_e_deg", "first_null_h_deg", "first_null_e_deg", "sll_h_db", "sll_e_db", "s11_db")

#: staircased PEC walls converge at about first order (observed in development runs of this
#: project, DEVELOPERS.md "Modelling notes"); used where the ladder cannot give an observed
#: order (two grids) — hornproof's choice, stated in the report
FORMAL_ORDER = 1.0

#: main-lobe window of the pattern error, dB below the FDTD peak
PATTERN_WINDOW_DB = -10.0


def default_out_dir(case):
    return Path("results") / case.name / case.sha256[:12]


def _is_master():
    """True on the process that writes this run's files: the master of the current Meep
    communicator (rank 0 when serial or unsplit; each group's master under ``regress``'s
    process groups)."""
    try:
        from ...sim.mpi import is_group_master

        return is_group_master()
    except Exception:  # pragma: no cover - no MPI layer
        return True


def _say(message):
    if _is_master():
        print(message, file=sys.stderr, flush=True)


def _relative_cost(cpw, dims):
    """Cost of a run relative to cpw = 1: cells × steps ∝ cpw^(dims + 1)."""
    return float(cpw) ** (dims + 1)


def resource_line(case, cells_per_wavelength):
    """One line: grid cells and memory the run will take (``sim.estimate``), before it runs."""
    from ...sim.estimate import available_memory_bytes, estimate_for_layout
    from ...sim.layout import plan_layout

    layout = plan_layout(case.horn, case.frequencies, case.fdtd, cells_per_wavelength)
    est = estimate_for_layout(layout, len(case.frequencies), use_symmetry=case.fdtd.use_symmetry)
    free = available_memory_bytes()
    free_text = "" if free is None else f" of {free / 2**30:.1f} GiB available"
    return (f"estimate: {est.cells:,} grid cells stored, peak memory about "
            f"{est.peak_memory_bytes / 2**20:,.0f} MiB{free_text}")


def _progress_reporter(case, cells_per_wavelength):
    from ...sim.progress import ProgressReporter

    return ProgressReporter(f"hornproof:   {case.name} at {cells_per_wavelength:g} cells per wavelength")


def run_fdtd_ladder(case, ladder, *, force=False, log=_say, progress=None):
    """Run the FDTD model once per grid of ``ladder`` (cells per wavelength), coarse first.

    Returns the list of SimResult, in the order of ``ladder`` as given.
    """
    from ...sim.run import simulate

    order = sorted(range(len(ladder)), key=lambda i: ladder[i])
    results = [None] * len(ladder)
    dims = int(case.fdtd.dims)
    rate = None
    for step, i in enumerate(order, start=1):
        cpw = float(ladder[i])
        remaining = sum(_relative_cost(ladder[j], dims) for j in order[step - 1:])
        eta = "" if rate is None else f", about {remaining / rate:.0f} s left for the ladder"
        log(f"hornproof: FDTD grid {step}/{len(ladder)}: {cpw:g} cells per wavelength ({dims}D){eta}")
        log(f"hornproof:   {resource_line(case, cpw)}")
        t0 = time.monotonic()
        result = simulate(case.horn, case.frequencies, case.fdtd, cpw, force=force,
                          progress=progress or _progress_reporter(case, cpw))
        seconds = time.monotonic() - t0
        rate = _relative_cost(cpw, dims) / max(seconds, 1e-3)
        key = "directivity_2d_db" if dims == 2 else "directivity_dbi"
        d = np.asarray(result.directivity_dbi)
        log(f"hornproof:   done in {seconds:.1f} s; {key.replace('_', ' ')} {np.nanmin(d):.2f}..{np.nanmax(d):.2f}, "
            f"power balance error {np.nanmax(np.abs(result.extra.get('power_balance_error', [np.nan]))) * 100:.1f} %")
        for warning in result.run.get("warnings", []) or []:
            log(f"hornproof: warning: {warning}")
        results[i] = result
    return results


def solver_warnings(sim_results, ladder):
    """The solver's one-line warnings, each tagged with the grid it came from."""
    out = []
    for cpw, result in zip(ladder, sim_results):
        for warning in result.run.get("warnings", []) or []:
            out.append(f"FDTD at {cpw:g} cells per wavelength: {warning}")
    return out


def _fdtd_figures(result):
    """JSON-ready per-frequency FDTD figures (cut arrays stay in fields.h5)."""
    figures = {key: value for key, value in result.to_model_result().figures().items()
               if not (isinstance(value, list) and value and isinstance(value[0], list))}
    extra = result.extra
    for key in ("gain_dbi", "realized_gain_dbi", "s11_db", "s11_real", "s11_imag", "vswr",
                "power_balance_error", "incident_power", "reflected_power", "radiated_power"):
        if key in extra:
            figures[key] = jsonable(np.asarray(extra[key], dtype=float))
    if int(result.dims) == 2:
        for key in ("gain_dbi", "realized_gain_dbi"):
            if key in figures:
                figures[key.replace("_dbi", "_2d_db")] = figures.pop(key)
    return figures


def _column(figures, key, nf):
    values = figures.get(key)
    if values is None:
        return np.full(nf, np.nan)
    return np.array([np.nan if v is None else v for v in values], dtype=float)


def ladder_convergence(ladder, level_figures, nf):
    """Convergence estimates of every FDTD figure from the ladder.

    Returns (uncertainty: {figure: [nf]}, estimates: {figure: [ConvergenceEstimate.to_dict()]},
    values: {figure: [[nf] per grid]}).
    """
    from ..numerics.convergence import grid_convergence

    uncertainty, estimates, values = {}, {}, {}
    for key in LADDER_FIGURES:
        stack = np.array([_column(f, key, nf) for f in level_figures])
        if np.all(np.isnan(stack)):
            continue
        values[key] = stack.tolist()
        if len(ladder) == 1:
            uncertainty[key] = [None] * nf
            continue
        found = grid_convergence(stack, cells_per_wavelength=ladder, formal_order=FORMAL_ORDER)
        estimates[key] = [e.to_dict() for e in found]
        uncertainty[key] = [e.uncertainty if np.isfinite(e.uncertainty) else None for e in found]
    return uncertainty, estimates, values


def _interp_cut(theta_to, theta_from, cut):
    cut = np.atleast_2d(np.asarray(cut, dtype=float))
    return np.array([np.interp(theta_to, theta_from, row, left=np.nan, right=np.nan) for row in cut])


def pattern_errors(models, sim_results, ladder):
    """Main-lobe pattern error (RMS of the dB difference) of each analytic model against FDTD.

    Returns {plane: {model: {"rms_db": [nf], "worst_db", "worst_angle_deg", "uncertainty_db": [nf]}}}.
    """
    from ..numerics.convergence import grid_convergence
    from ..numerics.metrics import pattern_error

    finest = int(np.argmax(ladder))
    out = {}
    for plane, attribute in (("h_plane", "h_plane_dbi"), ("e_plane", "e_plane_dbi")):
        reference_cut = np.asarray(getattr(sim_results[finest], attribute), dtype=float)
        if np.all(np.isnan(reference_cut)):
            continue
        theta = np.asarray(sim_results[finest].theta_deg, dtype=float)
        out[plane] = {}
        for name, model in models.items():
            model_cut = _interp_cut(theta, model.theta_deg, getattr(model, attribute))
            if np.all(np.isnan(model_cut)):
                continue
            per_level = []
            for result in sim_results:
                cut = _interp_cut(theta, np.asarray(result.theta_deg, dtype=float), getattr(result, attribute))
                per_level.append(pattern_error(theta, model_cut, cut, level_db=PATTERN_WINDOW_DB).rms_db)
            best = pattern_error(theta, model_cut, reference_cut, level_db=PATTERN_WINDOW_DB)
            entry = best.to_dict()
            if len(ladder) > 1:
                est = grid_convergence(np.array(per_level), cells_per_wavelength=ladder, formal_order=FORMAL_ORDER)
                entry["uncertainty_db"] = [e.uncertainty if np.isfinite(e.uncertainty) else None for e in est]
            else:
                entry["uncertainty_db"] = [None] * len(entry["rms_db"])
            out[plane][name] = entry
    return out


def _tolerances(case, fdtd_figures, dims):
    tolerances = {}
    for check, tolerance in case.checks.items():
        for metric in CHECK_METRICS.get(check, ()):
            if metric == "directivity_db" and dims == 2:
                metric = "directivity_2d_db"
            if metric == "realized_gain_db" and dims == 2:
                continue  # no 2D realized gain to compare against the analytic 2D directivity
            from ..numerics.verdict import COMPARED_FIGURES

            key = COMPARED_FIGURES[metric][0]
            if key in fdtd_figures and any(v is not None for v in fdtd_figures[key]):
                tolerances[metric] = float(tolerance)
    return tolerances


def _extra_checks(case, comparison, patterns, fdtd_figures, nf):
    """Checks outside the model-vs-FDTD figure table: pattern RMS and the FDTD return loss."""
    from ..numerics.verdict import verdict

    rows = []
    model = comparison["model_checked"]
    tolerance = case.checks.get("pattern_rms_db")
    if tolerance is not None:
        for plane, by_model in patterns.items():
            entry = by_model.get(model)
            if entry is None:
                continue
            for i in range(nf):
                rms, u = entry["rms_db"][i], entry["uncertainty_db"][i]
                rows.append({"check": f"pattern_rms_{plane}", "frequency_index": i,
                             "value": rms, "uncertainty": u, "limit": tolerance,
                             "verdict": "missing" if rms is None else verdict(rms, tolerance, np.nan if u is None else u)})
    limit = case.checks.get("s11_db")
    if limit is not None:
        s11 = fdtd_figures.get("s11_db") or [None] * nf
        for i in range(nf):
            value = s11[i]
            ok = value is not None and value <= -abs(limit)
            rows.append({"check": "s11_db", "frequency_index": i, "value": value, "uncertainty": None,
                         "limit": -abs(limit), "verdict": "missing" if value is None else ("agrees" if ok else "disagrees")})
    return rows


def _plots(folder, case, summary, models, sim_results, ladder, uncertainty, estimates):
    from ..report import plots

    dims = int(case.fdtd.dims)
    unit = "dB" if dims == 2 else "dBi"
    finest = sim_results[int(np.argmax(ladder))]
    freqs = np.asarray(case.frequencies, dtype=float)
    centre = int(np.argmin(np.abs(freqs - np.sqrt(freqs.min() * freqs.max()))))
    dkey = "directivity_2d_db" if dims == 2 else "directivity_dbi"
    title = case.title or case.name
    for plane, attribute, letter in (("h_plane", "h_plane_dbi", "H"), ("e_plane", "e_plane_dbi", "E")):
        cut = np.asarray(getattr(finest, attribute), dtype=float)
        if np.all(np.isnan(cut[centre])):
            continue
        theta = np.asarray(finest.theta_deg, dtype=float)
        band = None
        if len(sim_results) > 1:
            # pointwise spread of the ladder's cuts: a plain, visible band (documented in the report)
            stack = np.array([_interp_cut(theta, np.asarray(r.theta_deg), getattr(r, attribute))[centre]
                              for r in sim_results])
            band = np.nanmax(np.abs(stack - cut[centre]), axis=0)
        plots.plot_pattern_overlay(
            theta, _interp_cut(theta, models["closed_form"].theta_deg, getattr(models["closed_form"], attribute))[centre],
            _interp_cut(theta, models["exact_phase"].theta_deg, getattr(models["exact_phase"], attribute))[centre],
            cut[centre], folder / f"pattern_{plane}", fdtd_uncertainty_db=band, plane=letter,
            frequency=freqs[centre], case_title=title, unit=unit)
    fd = summary["models"]["fdtd"]
    plots.plot_directivity_vs_frequency(
        freqs, summary["models"]["closed_form"][dkey], summary["models"]["exact_phase"][dkey], fd[dkey],
        folder / "directivity_vs_frequency",
        fdtd_uncertainty_db=[np.nan if v is None else v for v in uncertainty.get(dkey, [None] * len(freqs))],
        case_title=title, unit=unit, quantity="2D directivity" if dims == 2 else "Directivity")
    if len(ladder) > 1 and dkey in estimates:
        column = [np.nan if row[centre] is None else row[centre]
                  for row in summary["comparison"]["convergence"]["values"]]
        plots.plot_convergence_ladder(ladder, column, folder / "convergence_ladder",
                                      estimate=estimates[dkey][centre],
                                      quantity="2D directivity" if dims == 2 else "Directivity", unit=unit,
                                      frequency=freqs[centre], case_title=title)
    if fd.get("s11_db") is not None:
        plots.plot_s11(freqs, [np.nan if v is None else v for v in fd["s11_db"]], folder / "s11", case_title=title)


def _write_outputs(folder, case, summary, sim_results, ladder):
    from ..output.fields_h5 import write_fields_h5
    from ..output.result_json import write_result_json
    from ..output.touchstone import write_s1p

    finest = sim_results[int(np.argmax(ladder))]
    write_fields_h5(folder / "fields.h5", finest, case_sha256=case.sha256, case_name=case.name)
    s11 = np.asarray(finest.extra["s11_real"]) + 1j * np.asarray(finest.extra["s11_imag"])
    write_s1p(folder / "s11.s1p", case.frequencies, s11, case_name=case.name,
              solver_version=str(finest.run.get("meep_version", "")))
    write_result_json(folder / "result.json", summary)


def solver_block(case, sim_results, ladder, seconds):
    finest = sim_results[int(np.argmax(ladder))]
    run = finest.run
    return jsonable({
        "name": "meep",
        "meep": run.get("meep_version"),
        "dims": int(case.fdtd.dims),
        "cells_per_wavelength": [float(c) for c in ladder],
        "finest_cells_per_wavelength": float(max(ladder)),
        "grid_step_mm": [r.run.get("grid_step_m", np.nan) * 1e3 for r in sim_results],
        "wall_thickness_requested_mm": run.get("wall_thickness_requested_m", np.nan) * 1e3,
        "wall_thickness_modelled_mm": [r.run.get("wall_thickness_modelled_m", np.nan) * 1e3 for r in sim_results],
        "cells_across_guide_b": [r.run.get("cells_across_guide_b") for r in sim_results],
        "modelled_sizes_mm": [{k[len("modelled_"):-2] + "_mm": v * 1e3 for k, v in r.run.items()
                               if k.startswith("modelled_") and k.endswith("_m") and isinstance(v, (int, float))}
                              for r in sim_results],
        "symmetry": run.get("symmetry"),
        "mpi_processes": run.get("mpi_processes"),
        "timesteps": [r.run.get("timesteps") for r in sim_results],
        "seconds_per_grid": [r.run.get("seconds_total") for r in sim_results],
        "seconds": seconds,
        "decay_by": case.fdtd.decay_by,
        "pml_wavelengths": case.fdtd.pml_wavelengths,
        "padding_wavelengths": case.fdtd.padding_wavelengths,
        "formal_order_assumed": FORMAL_ORDER,
        "max_power_balance_error": float(np.nanmax(np.abs(finest.extra.get("power_balance_error", [np.nan])))),
    })


def verify_case(case, out_dir=None, *, force=False, ladder=None, progress=None):
    """Run the main job on ``case`` and write its result folder.

    Parameters
    ----------
    case : compare.casefile.Case
    out_dir : path, optional
        Result folder (default ``results/<case>/<hash12>``); replaced atomically when done.
    force : bool
        Run even if the resource estimate exceeds free memory.
    ladder : list of float, optional
        Cells per wavelength, overriding the case's ladder.
    progress : callable, optional
        Passed to every ``sim.run.simulate`` call (default: a ``ProgressReporter`` that prints
        on a terminal only).

    Returns
    -------
    dict
        The ``hornproof.result/1`` summary (also written as ``result.json``).
    """
    from ..numerics.verdict import comparison_block

    t0 = time.monotonic()
    ladder = [float(c) for c in (ladder or case.fdtd.cells_per_wavelength)]
    out_dir = Path(out_dir) if out_dir is not None else default_out_dir(case)
    summary, models = predict_case(case)
    nf = len(case.frequencies)
    sim_results = run_fdtd_ladder(case, ladder, force=force, progress=progress)
    level_figures = [_fdtd_figures(r) for r in sim_results]
    finest = int(np.argmax(ladder))
    fdtd = dict(level_figures[finest])
    uncertainty, estimates, values = ladder_convergence(ladder, level_figures, nf)
    if ("directivity_2d_db" if int(case.fdtd.dims) == 2 else "directivity_dbi") in uncertainty:
        # the schema's name for the directivity uncertainty (dB), beside the per-figure keys
        uncertainty["directivity_db"] = uncertainty["directivity_2d_db" if int(case.fdtd.dims) == 2
                                                    else "directivity_dbi"]
    fdtd["uncertainty"] = uncertainty
    fdtd["wall_thickness_modelled_mm"] = sim_results[finest].run.get("wall_thickness_modelled_m", np.nan) * 1e3
    summary["models"]["fdtd"] = fdtd
    dims = int(case.fdtd.dims)
    dkey = "directivity_2d_db" if dims == 2 else "directivity_dbi"
    tolerances = _tolerances(case, fdtd, dims)
    metric_uncertainty = {}
    from ..numerics.verdict import COMPARED_FIGURES

    for metric in tolerances:
        key = COMPARED_FIGURES[metric][0]
        metric_uncertainty[metric] = [np.nan if v is None else v for v in uncertainty.get(key, [None] * nf)]
    convergence = {"figure": dkey, "unit": "dB" if dims == 2 else "dBi", "cells_per_wavelength": ladder,
                   "values": values.get(dkey), "estimates": estimates.get(dkey, []),
                   "all_figures": estimates}
    comparison = comparison_block(case.frequencies, summary["models"], tolerances, metric_uncertainty,
                                  model_checked=case.check_model,
                                  convergence=convergence)
    patterns = pattern_errors(models, sim_results, ladder)
    comparison["pattern_error"] = {"window_db": PATTERN_WINDOW_DB, "planes": patterns}
    extra_checks = _extra_checks(case, comparison, patterns, fdtd, nf)
    comparison["extra_checks"] = extra_checks
    failed = [m["metric"] for m in comparison["metrics"] for row in m["per_frequency"] if row["verdict"] == "disagrees"]
    failed += [row["check"] for row in extra_checks if row["verdict"] == "disagrees"]
    unresolved = [m["metric"] for m in comparison["metrics"] for row in m["per_frequency"] if row["verdict"] == "unresolved"]
    unresolved += [row["check"] for row in extra_checks if row["verdict"] == "unresolved"]
    comparison["failed_checks"] = sorted(set(failed))
    comparison["unresolved_checks"] = sorted(set(unresolved))
    comparison["overall"] = ("disagrees" if failed else "unresolved" if unresolved else
                             "agrees" if (comparison["metrics"] or extra_checks) else "no checks")
    summary["comparison"] = comparison
    summary["solver"] = solver_block(case, sim_results, ladder, time.monotonic() - t0)
    summary["warnings"] = list(summary.get("warnings", [])) + solver_warnings(sim_results, ladder)
    summary = jsonable(summary)
    image = None
    try:
        image = _model_image(case, max(ladder), Path(out_dir))
        if _is_master():
            _publish(out_dir, case, summary, models, sim_results, ladder, uncertainty, estimates, image)
    finally:
        if image is not None:
            Path(image).unlink(missing_ok=True)  # moved into the folder when published
        summary["solver"]["seconds"] = time.monotonic() - t0
    return summary


def _model_image(case, cells_per_wavelength, out_dir):
    """model.png of the finest grid. Every MPI rank takes part (Meep's arrays are collective);
    the master writes it beside the result folder, and ``_publish`` moves it in."""
    from ...sim.metal_map import metal_cuts  # lazy: Meep and matplotlib load only when an image is drawn
    from ..report.model_image import model_image

    out_dir.parent.mkdir(parents=True, exist_ok=True)
    path = out_dir.parent / f".{out_dir.name}.model.png"
    layout, cuts = metal_cuts(case.horn, case.fdtd, cells_per_wavelength, frequencies=case.frequencies)
    if _is_master():
        model_image(layout, cuts, path)
    return path


def _publish(out_dir, case, summary, models, sim_results, ladder, uncertainty, estimates, image=None):
    """Write every output into a staging folder, then swap it into place (``publish_folder``)."""
    from ..report.html import build_report

    def write(staging):
        _write_outputs(staging, case, summary, sim_results, ladder)
        _plots(staging, case, summary, models, sim_results, ladder, uncertainty, estimates)
        if image is not None and image.is_file():
            os.replace(image, staging / "model.png")
        build_report(staging)

    publish_folder(out_dir, write)


def format_verdicts(summary):
    """People's view of a verify run: one line per checked metric and frequency."""
    comparison = summary["comparison"]
    lines = [f"{summary['case']}: {summary.get('title') or ''}",
             f"  checked model: {comparison['model_checked']} against FDTD "
             f"(grids {', '.join(f'{c:g}' for c in summary['solver']['cells_per_wavelength'])} cells per wavelength)",
             f"  {'metric':<24} {'f GHz':>7} {'closed':>8} {'exact':>8} {'FDTD':>8} {'+-':>6} {'diff':>7} {'tol':>5}  verdict"]

    def fmt(v, w=8, d=2):
        return MISSING_VALUE.rjust(w) if v is None else f"{v:{w}.{d}f}"

    for metric in comparison["metrics"]:
        for row in metric["per_frequency"]:
            lines.append(f"  {metric['label'] + ' (' + metric['unit'] + ')':<24} {row['frequency_ghz']:7.3f} "
                         f"{fmt(row['closed_form'])} {fmt(row['exact_phase'])} {fmt(row['fdtd'])} "
                         f"{fmt(row['fdtd_uncertainty'], 6)} {fmt(row['difference'], 7)} {metric['tolerance']:5.2f}  "
                         f"{row['verdict']}")
    freqs = summary["frequencies_ghz"]
    for row in comparison.get("extra_checks", []):
        lines.append(f"  {row['check']:<24} {freqs[row['frequency_index']]:7.3f} {'':>8} {'':>8} "
                     f"{fmt(row['value'])} {fmt(row['uncertainty'], 6)} {'':>7} {abs(row['limit']):5.2f}  {row['verdict']}")
    lines.append(f"  overall: {comparison['overall']}")
    if comparison.get("unresolved_checks"):
        lines.append("  unresolved: the numerical uncertainty exceeds the tolerance; use finer cells "
                     "(--cells-per-wavelength) to decide")
    lines.append(safety_lines())
    return "\n".join(lines)


def verify_command(args):
    case = load_case(args.case)
    if args.cells_per_wavelength:
        case = case.with_cells(args.cells_per_wavelength)
    for warning in case.warnings:
        _say(f"hornproof: warning: {warning}")
    out_dir = check_output_folder(Path(args.out) if args.out else default_out_dir(case),
                                  "--out" if args.out else "the default result folder")
    summary = verify_case(case, out_dir, force=args.force)
    if _is_master():
        emit_result(args.json, summary, format_verdicts(summary), f"report: {out_dir / 'report.html'}")
    return 1 if summary["comparison"]["failed_checks"] else 0
