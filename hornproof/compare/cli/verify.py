"""``hornproof verify CASE``: the main job (:mod:`hornproof.compare.jobs.verify`) and its
table of verdicts."""

from pathlib import Path

from ..case.casefile import load_case
from ..jobs.messages import is_writer, say
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


def run(args):
    case = load_case(args.case)
    if args.cells_per_wavelength:
        case = case.with_cells(args.cells_per_wavelength)
    for warning in case.warnings:
        say(f"hornproof: warning: {warning}")
    out_dir = check_output_folder(Path(args.out) if args.out else default_out_dir(case),
                                  "--out" if args.out else "the default result folder")
    summary = verify_case(case, out_dir, force=args.force)
    if is_writer():
        emit_result(args.json, summary, format_verdicts(summary), f"report: {out_dir / 'report.html'}")
    return 1 if summary["comparison"]["failed_checks"] else 0
