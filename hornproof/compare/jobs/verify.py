"""``hornproof verify CASE``: the main job.

Both analytic models, the FDTD convergence ladder (:mod:`.ladder`), per-figure grid-convergence
uncertainty, the comparison (differences, error split, verdicts against the case's ``[checks]``),
and the outputs: ``result.json``, ``fields.h5`` (finest grid), ``s11.s1p``, plots and
``report.html``.

The whole output folder is built under a temporary name beside the target and renamed when
complete, so an interrupted or failed run never leaves a half-written result folder.
"""

import re
import time
from pathlib import Path

import numpy as np

from ..numerics.convergence import grid_convergence
from ..numerics.figures import CHECK_METRICS, METRICS, directivity_key
from ..numerics.metrics import interpolate_cut, pattern_error
from ..numerics.power_balance import POWER_BALANCE_FIGURES, with_power_balance
from ..numerics.verdict import comparison_block, judge
from ..output.csv_tables import write_csv_tables
from ..output.folders import publish_folder
from ..output.json_document import jsonable
from .ladder import FORMAL_ORDER, fdtd_figures, ladder_convergence, run_fdtd_ladder, solver_block, solver_warnings
from .feed_figures import add_feed_figures, aperture_cut_fields, feed_block
from .grid_plan import combine_uncertainty, fitted_ladder, geometry_residual
from .messages import is_writer, say
from .predict import predict_case
from .range_and_shop import add_range_and_shop
from .refine import RefinementGoal, refine
from .result_folder import draw_model_image, move_model_image, write_result_files
from .sidelobe_match import add_feature_notes, matched_sidelobes

#: main-lobe window of the pattern error, dB below the FDTD peak
PATTERN_WINDOW_DB = -10.0


def case_goal(case):
    """The case's own refinement goal (``[fdtd] target_uncertainty_db``), or None."""
    target = getattr(case.fdtd, "target_uncertainty_db", None)
    return None if target is None else RefinementGoal(float(target))


def default_out_dir(case):
    """``results/<case>/<hash12>``: where ``verify`` writes without ``--out``."""
    return Path("results") / case.name / case.sha256[:12]


def pattern_errors(models, sim_results, ladder):
    """Main-lobe pattern error (RMS of the dB difference) of each analytic model against FDTD.

    Returns {plane: {model: {"rms_db": [nf], "worst_db", "worst_angle_deg", "uncertainty_db": [nf]}}}.
    """
    finest = int(np.argmax(ladder))
    out = {}
    for plane, attribute in (("h_plane", "h_plane_dbi"), ("e_plane", "e_plane_dbi")):
        reference_cut = np.asarray(getattr(sim_results[finest], attribute), dtype=float)
        if np.all(np.isnan(reference_cut)):
            continue
        theta = np.asarray(sim_results[finest].theta_deg, dtype=float)
        out[plane] = {}
        for name, model in models.items():
            model_cut = interpolate_cut(theta, model.theta_deg, getattr(model, attribute))
            if np.all(np.isnan(model_cut)):
                continue
            per_level = []
            for result in sim_results:
                cut = interpolate_cut(theta, np.asarray(result.theta_deg, dtype=float), getattr(result, attribute))
                per_level.append(pattern_error(theta, model_cut, cut, level_db=PATTERN_WINDOW_DB).rms_db)
            best = pattern_error(theta, model_cut, reference_cut, level_db=PATTERN_WINDOW_DB)
            entry = best.to_dict()
            if len(ladder) > 1:
                found = grid_convergence(np.array(per_level), cells_per_wavelength=ladder, formal_order=FORMAL_ORDER)
                entry["uncertainty_db"] = [e.uncertainty if np.isfinite(e.uncertainty) else None for e in found]
                entry["estimates"] = [e.to_dict() for e in found]
            else:
                entry["uncertainty_db"] = [None] * len(entry["rms_db"])
                entry["estimates"] = single_rung_estimates(np.array(per_level))
            out[plane][name] = entry
    return out


def single_rung_estimates(values):
    """Estimates [nf] of a one-rung "ladder" (values [1, nf]): status "single", no uncertainty."""
    return [{"status": "single", "values": [float(v) for v in column if np.isfinite(v)], "uncertainty": None,
             "uncertainty_kind": "none", "flags": []} for column in np.atleast_2d(values).T]


def figure_estimates(estimates, values, key, nf):
    """The estimates [nf] of FDTD figure ``key`` (one-rung ones built from ``values``); None
    entries when the figure has no ladder values at all."""
    if key in estimates:
        return estimates[key]
    if key in values:
        return single_rung_estimates(np.array(values[key], dtype=float))
    return [None] * nf


def non_ladder_uncertainty(fdtd, tolerances, nf):
    """Metric -> [nf] uncertainty from outside the ladder: the power-balance term (directivity
    and gains) and the grid fit's size residual, root-sum-square (``uncertainty_parts``)."""
    parts = fdtd.get("uncertainty_parts") or {}
    power = parts.get("power_balance_db") or [0.0] * nf
    geometry = parts.get("geometry_residual") or {}
    out = {}
    for metric in tolerances:
        key = METRICS[metric].key
        power_term = [p or 0.0 for p in power] if key in POWER_BALANCE_FIGURES else [0.0] * nf
        residual = [g or 0.0 for g in geometry.get(key, [0.0] * nf)]
        out[metric] = [float(np.hypot(p, g)) for p, g in zip(power_term, residual)]
    return out


def check_tolerances(case, fdtd, dims):
    """Comparison metric -> tolerance, for the case's checks that FDTD can judge."""
    tolerances = {}
    for check, tolerance in case.checks.items():
        for metric in CHECK_METRICS.get(check, ()):
            if metric == "directivity_db" and dims == 2:
                metric = "directivity_2d_db"
            if metric == "realized_gain_db" and dims == 2:
                continue  # no 2D realized gain to compare against the analytic 2D directivity
            key = METRICS[metric].key
            if key in fdtd and any(v is not None for v in fdtd[key]):
                tolerances[metric] = float(tolerance)
    return tolerances


def _check_row(check, i, value, limit, judged):
    return {"check": check, "frequency_index": i, "value": value, "uncertainty": judged["uncertainty"],
            "uncertainty_confident": judged["confident"], "ladder": judged["ladder"],
            "uncertainty_reason": judged["reason"], "limit": limit, "verdict": judged["verdict"]}


def extra_checks(case, model_checked, patterns, fdtd, nf, s11_estimates=None):
    """Checks outside the model-vs-FDTD figure table: pattern RMS and the FDTD return loss.

    Both are judged by :func:`hornproof.compare.numerics.verdict.judge` from their ladder
    estimates: the RMS against its tolerance, S11 against its limit (value + u ≤ limit to
    agree); ``s11_estimates`` [nf] are the ``s11_db`` estimates (None: no ladder)."""
    rows = []
    tolerance = case.checks.get("pattern_rms_db")
    if tolerance is not None:
        for plane, by_model in patterns.items():
            entry = by_model.get(model_checked)
            if entry is None:
                continue
            estimates = entry.get("estimates") or [None] * nf
            for i in range(nf):
                rms = entry["rms_db"][i]
                rows.append(_check_row(f"pattern_rms_{plane}", i, rms, tolerance, judge(rms, tolerance, estimates[i])))
    limit = case.checks.get("s11_db")
    if limit is not None:
        s11 = fdtd.get("s11_db") or [None] * nf
        s11_estimates = s11_estimates or [None] * nf
        for i in range(nf):
            rows.append(_check_row("s11_db", i, s11[i], -abs(limit),
                                   judge(s11[i], -abs(limit), s11_estimates[i], limit=True)))
    return rows


def add_overall_verdict(comparison):
    """Fill ``failed_checks``, ``unresolved_checks`` and ``overall`` from every checked row."""
    metric_rows = [(m["metric"], row["verdict"]) for m in comparison["metrics"] for row in m["per_frequency"]]
    rows = metric_rows + [(row["check"], row["verdict"]) for row in comparison["extra_checks"]]
    failed = [name for name, judged in rows if judged == "disagrees"]
    unresolved = [name for name, judged in rows if judged == "unresolved"]
    comparison["failed_checks"] = sorted(set(failed))
    comparison["unresolved_checks"] = sorted(set(unresolved))
    comparison["unresolved_reasons"] = unresolved_reasons(comparison)
    comparison["overall"] = ("disagrees" if failed else "unresolved" if unresolved else
                             "agrees" if (comparison["metrics"] or comparison["extra_checks"]) else "no checks")


def unresolved_reasons(comparison):
    """{check: sorted distinct reasons} of every unresolved row (why no confident uncertainty,
    or that it was confident but too large), numbers such as the observed order left out."""
    rows = [(m["metric"], row) for m in comparison["metrics"] for row in m["per_frequency"]]
    rows += [(row["check"], row) for row in comparison["extra_checks"]]
    out = {}
    for name, row in rows:
        if row["verdict"] == "unresolved":
            reason = (row.get("uncertainty_reason") if not row.get("uncertainty_confident")
                      else "confident uncertainty, too large to decide") or "no uncertainty"
            out.setdefault(name, set()).add(re.sub(r" -?\d+\.\d+", "", reason))  # orders stay in the rows
    return {name: sorted(reasons) for name, reasons in sorted(out.items())}


def fdtd_model_block(case, sim_results, ladder, geometry=None):
    """The ``models.fdtd`` block (finest grid, with per-figure uncertainty) and the ladder's
    convergence (uncertainty, estimates, values; see :func:`.ladder.ladder_convergence`).

    ``geometry`` ({figure: [nf]}, from :func:`.grid_plan.geometry_residual`) is combined with
    each figure's grid-convergence uncertainty; both parts stay visible under
    ``uncertainty_parts``."""
    nf = len(case.frequencies)
    level_figures = [fdtd_figures(r) for r in sim_results]
    finest = int(np.argmax(ladder))
    fdtd = dict(level_figures[finest])
    uncertainty, estimates, values = ladder_convergence(ladder, level_figures, nf)
    # the finest grid's power-balance error (numerics.power_balance) and the grid fit's size
    # residual (grid_plan.geometry_residual) join the ladder's uncertainty, root-sum-square
    uncertainty, fdtd["uncertainty_parts"] = with_power_balance(uncertainty, fdtd.get("power_balance_error"))
    geometry = geometry or {}
    fdtd["uncertainty_parts"]["geometry_residual"] = geometry
    fdtd["uncertainty_parts"]["combination"] += "; then root-sum-square with the geometry residual of the fitted grid"
    uncertainty = {key: combine_uncertainty(values, geometry.get(key)) for key, values in uncertainty.items()}
    key = directivity_key(case.fdtd.dims)
    if key in uncertainty:
        # the schema's name for the directivity uncertainty (dB), beside the per-figure keys
        uncertainty["directivity_db"] = uncertainty[key]
    fdtd["uncertainty"] = uncertainty
    fdtd["wall_thickness_modelled_mm"] = sim_results[finest].run.get("wall_thickness_modelled_m", np.nan) * 1e3
    return fdtd, (uncertainty, estimates, values)


def comparison(case, summary_models, models, sim_results, ladder, convergence):
    """The ``comparison`` block: figure verdicts, pattern errors, extra checks, overall verdict."""
    uncertainty, estimates, values = convergence
    nf = len(case.frequencies)
    dims = int(case.fdtd.dims)
    key = directivity_key(dims)
    fdtd = summary_models["fdtd"]
    tolerances = check_tolerances(case, fdtd, dims)
    metric_uncertainty = {metric: [np.nan if v is None else v for v in uncertainty.get(METRICS[metric].key, [None] * nf)]
                          for metric in tolerances}
    # like with like: where FDTD and the checked model name different first sidelobes, FDTD is
    # read at the model's sidelobe angle (sidelobe_match; the rows say so)
    matched = matched_sidelobes(models, sim_results, ladder, case.check_model, FORMAL_ORDER)
    compared = {**summary_models, "fdtd": dict(fdtd)}
    for metric, rows in matched["values"].items():
        if metric in tolerances:
            compared["fdtd"][metric] = [rows.get(i, value) for i, value in enumerate(fdtd[metric])]
            metric_uncertainty[metric] = [matched["uncertainty"][metric].get(i, value)
                                          for i, value in enumerate(metric_uncertainty[metric])]
    ladder_block = {"figure": key, "unit": "dB" if dims == 2 else "dBi", "cells_per_wavelength": ladder,
                    "values": values.get(key), "estimates": estimates.get(key, []), "all_figures": estimates}
    metric_estimates = {metric: list(figure_estimates(estimates, values, METRICS[metric].key, nf))
                        for metric in tolerances}
    for metric, rows in matched.get("estimates", {}).items():
        for i, estimate in rows.items():
            if metric in metric_estimates:
                metric_estimates[metric][i] = estimate  # the ladder of the level actually compared
    block = comparison_block(case.frequencies, compared, tolerances, metric_uncertainty,
                             model_checked=case.check_model, convergence=ladder_block,
                             fdtd_estimates=metric_estimates,
                             fdtd_extra_uncertainties=non_ladder_uncertainty(fdtd, tolerances, nf))
    add_feature_notes(block, matched["notes"])
    patterns = pattern_errors(models, sim_results, ladder)
    block["pattern_error"] = {"window_db": PATTERN_WINDOW_DB, "planes": patterns}
    block["extra_checks"] = extra_checks(case, block["model_checked"], patterns, fdtd, nf,
                                         figure_estimates(estimates, values, "s11_db", nf))
    add_overall_verdict(block)
    return block


def evaluate_case(case, *, force=False, ladder=None, progress=None, goal=None, log=say):
    """Both analytic models, the FDTD ladder and the comparison of ``case``; writes nothing.

    The computing half of :func:`verify_case` (which adds the result folder); a sweep point is
    this evaluation of the point's horn, so the two give the same figures and uncertainties.

    Returns
    -------
    (dict, dict, list, list, tuple, list)
        The ``hornproof.result/1`` summary (JSON-ready), the analytic ``ModelResult``s, the
        ``SimResult`` of every rung, the ladder (cells per wavelength, as fitted), the ladder's
        convergence (uncertainty, estimates, values) and the grid fits.
    """
    started = time.monotonic()
    fits = fitted_ladder(case, [float(c) for c in (ladder or case.fdtd.cells_per_wavelength)])
    ladder = [fit.cells_per_wavelength for fit in fits]
    summary, models = predict_case(case)
    sim_results = run_fdtd_ladder(case, ladder, force=force, progress=progress, log=log)
    goal = goal or case_goal(case)
    stop_reason = None
    if goal is not None:
        fits, sim_results, stop_reason = refine(
            case, summary["models"], fits, sim_results, goal,
            lambda rungs: run_fdtd_ladder(case, rungs, force=force, progress=progress, log=log), log)
        log(f"hornproof: {stop_reason}")
        ladder = [fit.cells_per_wavelength for fit in fits]
    # feed figures (phase centres, 45° cut, beamwidths, efficiencies) into every model and rung
    # before the ladder's convergence, so the FDTD values get their uncertainty like the rest
    add_feed_figures(case, summary["models"], sim_results, summary.get("aperture_equivalent", "huygens"))
    summary["models"]["fdtd"], convergence = fdtd_model_block(case, sim_results, ladder,
                                                              geometry_residual(case, fits))
    add_range_and_shop(case, summary, sim_results, ladder)  # wall loss, finite range, tolerances: only if the case asks
    summary["comparison"] = comparison(case, summary["models"], models, sim_results, ladder, convergence)
    feed = feed_block(case, summary, summary.get("aperture_equivalent", "huygens"))
    if feed is not None:
        summary["feed"] = feed
    summary["solver"] = solver_block(case, sim_results, ladder, time.monotonic() - started)
    summary["solver"]["nominal_cells_per_wavelength"] = [fit.nominal_cells_per_wavelength for fit in fits]
    summary["solver"]["grid_fit"] = [fit.to_dict() for fit in fits]
    dense = getattr(sim_results[int(np.argmax(ladder))], "dense_band", None)
    if dense is not None:
        summary["solver"]["dense_band"] = {
            "points": len(dense["frequencies_hz"]), "read_on": "guide axis line, finest grid",
            "max_band_check_abs": float(np.max(dense["band_check_abs"]))}
    if goal is not None:
        summary["solver"]["refinement"] = {"target_uncertainty_db": goal.target_db,
                                           "budget_seconds": goal.budget_seconds, "stopped": stop_reason}
    summary["warnings"] = list(summary.get("warnings", [])) + solver_warnings(sim_results, ladder)
    return jsonable(summary), models, sim_results, ladder, convergence, fits


def verify_case(case, out_dir=None, *, force=False, ladder=None, progress=None, goal=None):
    """Run the main job on ``case`` and write its result folder.

    Parameters
    ----------
    case : compare.case.casefile.Case
    out_dir : path, optional
        Result folder (default ``results/<case>/<hash12>``); replaced atomically when done.
    force : bool
        Run even if the resource estimate exceeds free memory.
    ladder : list of float, optional
        Cells per wavelength, overriding the case's ladder.
    progress : callable, optional
        Passed to every ``sim.run.simulate`` call (default: a ``ProgressReporter`` that prints
        on a terminal only).
    goal : jobs.refine.RefinementGoal, optional
        Add finer rungs until the checked figures are decided (default: the case's
        ``fdtd.target_uncertainty_db``, if any; else the ladder as given).

    Returns
    -------
    dict
        The ``hornproof.result/1`` summary (also written as ``result.json``).
    """
    started = time.monotonic()
    out_dir = Path(out_dir) if out_dir is not None else default_out_dir(case)
    summary, models, sim_results, ladder, convergence, _ = evaluate_case(
        case, force=force, ladder=ladder, progress=progress, goal=goal)
    image = None
    try:
        image = draw_model_image(case, max(ladder), Path(out_dir))
        if is_writer():
            feed_fields = aperture_cut_fields(case, summary.get("aperture_equivalent", "huygens"))
            publish(out_dir, case, summary, models, sim_results, ladder, convergence, image, feed_fields)
    finally:
        if image is not None:
            Path(image).unlink(missing_ok=True)  # moved into the folder when published
        summary["solver"]["seconds"] = time.monotonic() - started
    return summary


def publish(out_dir, case, summary, models, sim_results, ladder, convergence, image=None, feed_fields=None):
    """Write every output into a staging folder, then swap it into place (``publish_folder``)."""
    # lazy: the report builder loads its templates and matplotlib (slow) only when a folder is written
    from ..report.html import build_report
    from ..report.range_shop_plots import write_tolerance_plot
    from ..report.verify_plots import write_verify_plots

    def write(staging):
        write_result_files(staging, case, summary, sim_results, ladder)
        write_csv_tables(staging, summary, sim_results[int(np.argmax(ladder))], models, feed_fields)
        write_verify_plots(staging, case, summary, models, sim_results, ladder, convergence)
        write_tolerance_plot(staging, summary)
        move_model_image(image, staging)
        build_report(staging)

    publish_folder(out_dir, write, kind="verify")
