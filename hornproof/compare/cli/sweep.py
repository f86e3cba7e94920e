"""``hornproof sweep CASE``: model error against one horn parameter
(:mod:`hornproof.compare.jobs.sweep`) and its table."""

from pathlib import Path

from ..case.casefile import load_case
from ..jobs.messages import is_writer, say
from ..jobs.sweep import run_sweep
from ..report.format import MISSING_VALUE
from ..output.folders import check_output_folder, claimed_output_folder, under_result_root
from ..output.ownership import write_marker
from ..output.terminal import emit_result, safety_lines
from .arguments import cells_per_wavelength_list


#: what a sweep writes into its folder (listed in its ownership marker before the run, so a
#: killed sweep's folder is still recognised as its own)
SWEEP_ENTRIES = ("points", "sweep.json", "report.html") + tuple(
    f"{name}.{ext}" for name in ("directivity_vs_parameter", "error_vs_parameter") for ext in ("png", "svg"))


def setup_arguments(parser):
    parser.add_argument("case", help="case file with a [sweep] table")
    parser.add_argument("--out", metavar="DIR", help="output folder (default: results/<case>-sweep)")
    parser.add_argument("--dims", type=int, choices=(2, 3), help="override the sweep's model dimension")
    parser.add_argument("--cells-per-wavelength", type=cells_per_wavelength_list, metavar="N[,N2,...]",
                        help="grids run at every swept value (default: the sweep's cells per wavelength "
                             "x 1, 1.4, 2; three or more give a grid-convergence uncertainty, two a "
                             "conservative one, one none)")
    parser.add_argument("--analytic-only", action="store_true", help="skip FDTD (both analytic models only)")
    parser.add_argument("--json", action="store_true")
    parser.add_argument("--force", action="store_true")


def format_sweep(document):
    """People's view of a sweep: one row per swept value, breakdowns and peaks."""
    p = document["parameter"]
    lines = [f"{document['case']}: {document['title']}",
             f"  {document['figure']['label']} at {document['frequency_ghz']:.3g} GHz vs {p['label']} ({p['unit']}), "
             f"{p['held_fixed']} fixed; tolerance {document['tolerance']:g} dB",
             f"  {p['unit']:>8} {'S wl':>6} {'T wl':>6} {'closed':>8} {'exact':>8} {'FDTD':>8} {'+-':>6} "
             f"{'phase err':>9} {'aperture err':>12}"]

    def f(v, w=8, d=2):
        return MISSING_VALUE.rjust(w) if v is None else f"{v:{w}.{d}f}"

    fdtd = document["models"]["fdtd"] or [None] * len(p["values"])
    fdtd_uncertainty = document["fdtd_uncertainty"] or [None] * len(p["values"])
    aperture_error = document["errors"]["aperture_model"] or [None] * len(p["values"])
    for i, value in enumerate(p["values"]):
        lines.append(f"  {value:8.3g} {document['phase_error_h_wl'][i]:6.3f} {document['phase_error_e_wl'][i]:6.3f} "
                     f"{f(document['models']['closed_form'][i])} {f(document['models']['exact_phase'][i])} "
                     f"{f(fdtd[i])} {f(fdtd_uncertainty[i], 6)} {f(document['errors']['phase_approximation'][i], 9)} "
                     f"{f(aperture_error[i], 12)}")
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


def run(args):
    case = load_case(args.case)
    option = "--out" if args.out is not None else "the default sweep folder"
    out_dir = check_output_folder(Path(args.out) if args.out is not None else Path("results") / f"{case.name}-sweep",
                                  option, kind="sweep", create_parents=args.out is None or under_result_root(args.out))
    writer = is_writer()
    with claimed_output_folder(out_dir, option, "sweep", hold=writer, tell=say):
        if writer:  # marked before the first point is cached, so a killed sweep can resume here
            out_dir.mkdir(exist_ok=True)
            write_marker(out_dir, "sweep", extra_entries=SWEEP_ENTRIES)
        document = run_sweep(case, out_dir, dims=args.dims, ladder=args.cells_per_wavelength,
                             analytic_only=args.analytic_only, force=args.force)
        if writer:
            write_marker(out_dir, "sweep", extra_entries=SWEEP_ENTRIES)
    if is_writer():
        emit_result(args.json, document, format_sweep(document), f"report: {out_dir / 'report.html'}")
    return 0
