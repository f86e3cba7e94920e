"""``hornproof verify CASE``: the main job (:mod:`hornproof.compare.jobs.verify`) and its
table of verdicts."""

from pathlib import Path

from ..case.casefile import load_case
from ..jobs.messages import is_writer, say
from ...errors import InputError
from ..jobs.refine import RefinementGoal
from ..jobs.verify import default_out_dir, verify_case
from ..report.format import MISSING_VALUE
from ..output.folders import check_output_folder
from ..output.terminal import emit_result, safety_lines
from .arguments import add_fdtd_run_arguments
from .predict import horn_3d_lines


def setup_arguments(parser):
    add_fdtd_run_arguments(parser, cells_metavar="N1,N2,N3",
                           cells_help="convergence ladder, overrides the case's own (e.g. 16,20,24)",
                           out_help="output folder (default: results/<case>/<hash>)")
    parser.add_argument("--target-uncertainty", type=float, metavar="DB",
                        help="add finer rungs until every checked dB figure's uncertainty is at most DB "
                             "and no checked figure is unresolved (default: the case's "
                             "fdtd.target_uncertainty_db, else the ladder as given)")
    parser.add_argument("--budget", type=float, metavar="SECONDS",
                        help="with refinement: stop before a rung that would take the whole ladder past "
                             "SECONDS (estimated from the rungs run so far)")


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
    lines += horn_3d_lines(summary)  # a 2D case: the 3D horn's aperture models in dBi
    lines.append(f"  overall: {comparison['overall']}")
    if comparison.get("unresolved_checks"):
        lines.append("  unresolved: the numerical uncertainty exceeds the tolerance; use finer cells "
                     "(--cells-per-wavelength) to decide")
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
    for warning in case.warnings:
        say(f"hornproof: warning: {warning}")
    out_dir = check_output_folder(Path(args.out) if args.out else default_out_dir(case),
                                  "--out" if args.out else "the default result folder")
    goal = refinement_goal(case, args)
    summary = verify_case(case, out_dir, force=args.force, goal=goal)
    if is_writer():
        emit_result(args.json, summary, format_verdicts(summary), f"report: {out_dir / 'report.html'}")
    return 1 if summary["comparison"]["failed_checks"] else 0
