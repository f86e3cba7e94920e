"""``hornproof sweep CASE``: model error against one horn parameter
(:mod:`hornproof.compare.jobs.sweep`) and its table."""


from ..case.casefile import load_case
from ..jobs.messages import is_writer, say
from ..jobs.sweep import run_sweep
from ..report.format import MISSING_VALUE, breakdown_words, step_decimals
from ..output.folders import resumable_output_folder
from ..output.terminal import emit_result, safety_lines
from .arguments import cells_per_wavelength_list


#: the three model errors, as the terminal names them
ERROR_WORDS = {"phase_approximation": "phase approximation (closed form vs exact phase)",
               "aperture_model": "aperture model (exact phase vs FDTD)",
               "total": "closed form vs FDTD (total)"}

#: the three models, as the terminal names them
MODEL_WORDS = {"closed_form": "closed form", "exact_phase": "exact phase", "fdtd": "FDTD"}

#: what a sweep writes into its folder (listed in its ownership marker before the run, so a
#: killed sweep's folder is still recognised as its own)
SWEEP_ENTRIES = ("points", "sweep.json", "report.html") + tuple(
    f"{name}.{ext}" for name in ("directivity_vs_parameter", "error_vs_parameter", "aperture_error_3d_vs_2d") for ext in ("png", "svg"))


def setup_arguments(parser):
    parser.add_argument("case", help="case file with a [sweep] table")
    parser.add_argument("--out", metavar="DIR", help="output folder (default: results/<case>-sweep)")
    parser.add_argument("--dims", type=int, choices=(2, 3),
                        help="run only this model: 3 (the real horn) or 2 (the principal-plane first look "
                             "of a sectoral horn); default: the sweep's dims (3 unless it says otherwise)")
    parser.add_argument("--cells-per-wavelength", type=cells_per_wavelength_list, metavar="N[,N2,...]",
                        help="nominal ladder of every point, fitted to each point's horn (default: the "
                             "sweep's cells_per_wavelength, else each point's default ladder; three or "
                             "more rungs can give a confident uncertainty, fewer never do)")
    parser.add_argument("--analytic-only", action="store_true", help="skip FDTD (both analytic models only)")
    parser.add_argument("--json", action="store_true", help="print sweep.json on standard output")
    parser.add_argument("--force", action="store_true",
                        help="run every point even if its estimate exceeds free memory")


def format_sweep(document):
    """People's view of a sweep: one row per swept value, breakdown intervals and optima."""
    p = document["parameter"]
    unit = p["unit"]
    lines = [f"{document['case']}: {document['title']}",
             f"  {document['label']}",
             f"  {document['figure']['label']} at {document['frequency_ghz']:.3g} GHz vs {p['label']} ({unit}), "
             f"{p['held_fixed']} fixed; tolerance {document['tolerance']:g} dB",
             f"  {unit:>8} {'S wl':>6} {'T wl':>6} {'closed':>8} {'exact':>8} {'FDTD':>8} {'+-':>7} "
             f"{'ladder':>12} {'phase err':>9} {'aperture err':>12} {'total err':>9}"]

    def f(v, w=8, d=2):
        return MISSING_VALUE.rjust(w) if v is None else f"{v:{w}.{d}f}"

    n = len(p["values"])
    fdtd = document["models"]["fdtd"] or [None] * n
    shown = document.get("fdtd_uncertainty") or [None] * n
    confident = document.get("fdtd_confident_uncertainty") or [None] * n
    ladders = document.get("fdtd_ladder") or [""] * n
    errors = {k: document["errors"].get(k) or [None] * n for k in ("phase_approximation", "aperture_model", "total")}
    for i, value in enumerate(p["values"]):
        mark = "" if shown[i] is None or confident[i] is not None else "?"
        lines.append(f"  {value:8.3g} {document['phase_error_h_wl'][i]:6.3f} {document['phase_error_e_wl'][i]:6.3f} "
                     f"{f(document['models']['closed_form'][i])} {f(document['models']['exact_phase'][i])} "
                     f"{f(fdtd[i])} {f(shown[i], 6)}{mark or ' '} {ladders[i] or '':>12} "
                     f"{f(errors['phase_approximation'][i], 9)} {f(errors['aperture_model'][i], 12)} "
                     f"{f(errors['total'][i], 9)}")
    if any(s is not None and c is None for s, c in zip(shown, confident)):
        lines.append("  '?': the ladder gives no confident uncertainty (it may still bound a disagreement)")
    decimals = step_decimals(p["values"], unit)
    for key, interval in document["breakdown"].items():
        lines.append(f"  {ERROR_WORDS[key]}: {breakdown_words(interval, unit, decimals)}")
    for failed in document.get("failed_points") or []:
        lines.append(f"  FDTD failed at {failed['value']:g} {unit} ({failed.get('dims', '')}D): {failed['reason']}")
    for name, best in (document.get("optimum") or {}).items():
        if not best:
            continue
        spread = best.get("range") or [best["value"], best["value"]]
        where = (f"{best['value']:.3g} {unit}" if name != "fdtd" else
                 f"{best['value']:.3g} {unit} (could be anywhere in {spread[0]:.3g}..{spread[1]:.3g}"
                 + ("" if best.get("bounded", True) else "; some points have no bound on their uncertainty") + ")")
        lines.append(f"  {MODEL_WORDS[name]} peaks at {where}, S = {best['phase_error_h_wl']:.3f}, "
                     f"T = {best['phase_error_e_wl']:.3f} wavelengths"
                     + ("" if best["interior"] else " — at the edge of the sweep"))
    principal, parted = document.get("principal_plane"), document.get("parting")
    if principal:
        lines.append(f"  beside it: {principal['label']}")
        for key, interval in principal["breakdown"].items():
            lines.append(f"    2D {ERROR_WORDS[key]}: {breakdown_words(interval, unit, decimals)}")
    if parted:
        largest = parted.get("largest") or {}
        lines.append(f"  3D and 2D aperture-model errors part: {breakdown_words(parted['interval'], unit, decimals)}"
                     .replace("breaks", "differ beyond the tolerance").replace("holds over", "agree over"))
        if largest:
            lines.append(f"    largest difference {largest['difference']:+.2f} dB at {largest['value']:.3g} {unit}")
    lines.append(safety_lines())
    return "\n".join(lines)


def run(args):
    case = load_case(args.case)
    with resumable_output_folder(args.out, "--out", "sweep", SWEEP_ENTRIES, default=f"results/{case.name}-sweep",
                                 writer=is_writer(), tell=say) as out_dir:
        document = run_sweep(case, out_dir, dims=args.dims, ladder=args.cells_per_wavelength,
                             analytic_only=args.analytic_only, force=args.force)
    if is_writer():
        emit_result(args.json, document, format_sweep(document), f"report: {out_dir / 'report.html'}")
    return 0
