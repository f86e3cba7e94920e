"""``hornproof verify CASE``: the main job (:mod:`hornproof.compare.jobs.verify`) and its
table of verdicts."""

import argparse
from pathlib import Path

from ..case.casefile import load_case
from ..jobs.messages import is_writer, say
from ...errors import InputError
from ..jobs.refine import RefinementGoal
from ..jobs.verify import default_out_dir, verify_case
from ..numerics.figures import METRICS
from ..report.feed_section import feed_lines
from ..report.format import MISSING_VALUE
from ..output.folders import check_output_folder, claimed_output_folder, under_result_root
from ..output.terminal import emit_result, safety_lines
from .arguments import add_fdtd_run_arguments, distance_list
from .predict import horn_3d_lines
from .range_shop_lines import range_shop_lines


#: exit status of ``verify``: every check agrees (or none was asked)
EXIT_AGREES = 0
#: a check disagrees (wins over unresolved)
EXIT_DISAGREES = 1
#: no check disagrees but at least one is unresolved (no confident uncertainty, or one larger
#: than the tolerance); 2 and 3 stay the user-facing errors of ``hornproof.errors``
EXIT_UNRESOLVED = 4

EXIT_STATUS_HELP = f"""\
exit status: {EXIT_AGREES} every check agrees · {EXIT_DISAGREES} a check disagrees (wins over unresolved) ·
2 bad input · 3 the run failed · {EXIT_UNRESOLVED} no check disagrees but one is unresolved: its
uncertainty is not confident (fewer than three rungs, a divergent or oscillatory ladder) or
larger than the tolerance. The "ladder" column says which."""


def setup_arguments(parser):
    parser.epilog = EXIT_STATUS_HELP
    parser.formatter_class = argparse.RawDescriptionHelpFormatter
    add_fdtd_run_arguments(parser, cells_metavar="N1,N2,N3",
                           cells_help="convergence ladder, overrides the case's own (e.g. 16,20,24)",
                           out_help="output folder (default: results/<case>/<hash>)")
    parser.add_argument("--target-uncertainty", type=float, metavar="DB",
                        help="add finer rungs until every checked dB figure's uncertainty is at most DB "
                             "and no checked figure is unresolved, at most 3 rungs (default: the case's "
                             "fdtd.target_uncertainty_db, else the ladder as given)")
    parser.add_argument("--range-m", type=distance_list, metavar="R[,R2,...]",
                        help="also predict the gain a probe on the axis at these distances (m) would "
                             "measure (replaces the case's [range] distances)")
    parser.add_argument("--budget", type=float, metavar="SECONDS",
                        help="with refinement: stop before a rung that would take the whole ladder past "
                             "SECONDS (estimated from the rungs run so far)")


def exit_status(comparison):
    """Exit status of a verify run from its ``comparison`` block: 1 if any check disagrees, else 4
    if any is unresolved, else 0."""
    if comparison.get("failed_checks"):
        return EXIT_DISAGREES
    if comparison.get("unresolved_checks"):
        return EXIT_UNRESOLVED
    return EXIT_AGREES


def _number(value, width=8, digits=2, confident=True):
    """A table cell: the number (a trailing ``?`` when its uncertainty is not confident), or the
    missing-value word."""
    if value is None:
        return MISSING_VALUE.rjust(width)
    text = f"{value:.{digits}f}" + ("" if confident else "?")
    return text.rjust(width)


def check_label(name):
    """Trade words for a check or metric name (``directivity_db`` -> "Directivity")."""
    if name in METRICS:
        return METRICS[name].label
    return {"s11_db": "S11", "pattern_rms_h_plane": "Pattern RMS, H-plane",
            "pattern_rms_e_plane": "Pattern RMS, E-plane"}.get(name, name.replace("_", " "))


def format_verdicts(summary):
    """People's view of a verify run: one line per checked metric and frequency, each with its
    FDTD uncertainty (``?`` = not confident) and its ladder's health."""
    comparison = summary["comparison"]
    lines = [f"{summary['case']}: {summary.get('title') or ''}",
             f"  checked model: {comparison['model_checked']} against FDTD "
             f"(grids {', '.join(f'{c:.2f}' for c in summary['solver']['cells_per_wavelength'])} cells per wavelength)",
             f"  {'metric':<30} {'f GHz':>7} {'closed':>8} {'exact':>8} {'FDTD':>8} {'+-':>7} {'diff':>7} {'tol':>6}"
             f"  {'ladder':<18} verdict"]
    for metric in comparison["metrics"]:
        for row in metric["per_frequency"]:
            lines.append(f"  {metric['label'] + ' (' + metric['unit'] + ')':<30} {row['frequency_ghz']:7.3f} "
                         f"{_number(row['closed_form'])} {_number(row['exact_phase'])} {_number(row['fdtd'])} "
                         f"{_number(row['fdtd_uncertainty'], 7, confident=row.get('uncertainty_confident', True))} "
                         f"{_number(row['difference'], 7)} {metric['tolerance']:6.2f}  "
                         f"{row.get('ladder') or '':<18} {row['verdict']}")
    freqs = summary["frequencies_ghz"]
    for row in comparison.get("extra_checks", []):
        label = check_label(row["check"]) + (" (dB, limit)" if row["check"] == "s11_db" else " (dB)")
        lines.append(f"  {label:<30} {freqs[row['frequency_index']]:7.3f} {'':>8} {'':>8} "
                     f"{_number(row['value'])} {_number(row['uncertainty'], 7, confident=row.get('uncertainty_confident', True))} "
                     f"{'':>7} {row['limit']:6.2f}  {row.get('ladder') or '':<18} {row['verdict']}")
    lines += horn_3d_lines(summary)  # a 2D case: the 3D horn's aperture models in dBi
    lines += feed_lines(summary)  # phase centres, 45° cross-polar peak, beamwidths, efficiencies
    lines += range_shop_lines(summary)  # wall loss, finite-range gain, tolerances (if asked)
    lines.append(f"  overall: {comparison['overall']}")
    reasons = comparison.get("unresolved_reasons") or {}
    if comparison.get("unresolved_checks"):
        lines.append("  unresolved (exit status 4 unless a check disagrees): no confident uncertainty, or one "
                     "larger than the tolerance; a '?' after an uncertainty marks one that is not confident")
        for name in comparison["unresolved_checks"]:
            lines.append(f"    {check_label(name)}: {'; '.join(reasons.get(name, [])) or 'see the table'}")
        lines.append("  to decide: finer rungs (--target-uncertainty DB adds them within --budget SECONDS), "
                     "or your own ladder (--cells-per-wavelength N1,N2,N3)")
    lines.append(safety_lines())
    return "\n".join(lines)


def refinement_goal(case, args):
    """The refinement goal from --target-uncertainty / --budget and the case; None: no refinement."""
    target = args.target_uncertainty if args.target_uncertainty is not None else case.fdtd.target_uncertainty_db
    if args.target_uncertainty is not None and not 0 < args.target_uncertainty <= 10:
        raise InputError(f"--target-uncertainty: {args.target_uncertainty:g} dB is outside (0, 10] dB")
    if args.budget is not None and not args.budget > 0:
        raise InputError(f"--budget: {args.budget:g} s must be positive")
    if target is None:
        if args.budget is not None:
            raise InputError("--budget: give --target-uncertainty too (or fdtd.target_uncertainty_db in the case)")
        return None
    return RefinementGoal(float(target), args.budget)


def run(args):
    case = load_case(args.case)
    if args.cells_per_wavelength:
        case = case.with_cells(args.cells_per_wavelength)
    if args.range_m:
        case = case.with_range(args.range_m)
    for warning in case.warnings:
        say(f"hornproof: warning: {warning}")
    option = "--out" if args.out is not None else "the default result folder"
    out_dir = check_output_folder(Path(args.out) if args.out is not None else default_out_dir(case), option,
                                  kind="verify", create_parents=args.out is None or under_result_root(args.out))
    goal = refinement_goal(case, args)
    with claimed_output_folder(out_dir, option, "verify", hold=is_writer(), tell=say):
        summary = verify_case(case, out_dir, force=args.force, goal=goal)
    if is_writer():
        emit_result(args.json, summary, format_verdicts(summary), f"report: {out_dir / 'report.html'}")
    return exit_status(summary["comparison"])
