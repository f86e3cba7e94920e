"""``hornproof map CASE``: model error over two horn parameters (:mod:`hornproof.compare.jobs.map`)
and its table for people. The cost of every FDTD point and of the whole map is printed before
anything runs; beyond ``--budget-hours`` the map is refused unless ``--force``."""

import argparse

from ..case.casefile import load_case
from ..jobs.map import run_map
from ..jobs.map_estimate import DEFAULT_BUDGET_HOURS
from ..jobs.messages import is_writer, say
from ..output.folders import resumable_output_folder
from ..output.terminal import emit_result, safety_lines
from ..report.format import MISSING_VALUE, breakdown_words, crossing_text


def budget_hours(text):
    """A positive number of hours (``--budget-hours``)."""
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a number of hours, got {text!r}") from None
    if not value > 0 or value != value or value == float("inf"):
        raise argparse.ArgumentTypeError(f"must be a positive finite number of hours, got {text!r}")
    return value


def setup_arguments(parser):
    parser.add_argument("case", help="case file with a [map] table")
    parser.add_argument("--out", metavar="DIR", help="output folder (default: results/<case>-map)")
    parser.add_argument("--analytic-only", action="store_true",
                        help="draw the analytic map alone (no FDTD, no estimate)")
    parser.add_argument("--budget-hours", type=budget_hours, default=DEFAULT_BUDGET_HOURS, metavar="H",
                        help=f"refuse a map estimated to take longer than this (default {DEFAULT_BUDGET_HOURS:g})")
    parser.add_argument("--force", action="store_true",
                        help="run beyond the budget and the memory check")
    parser.add_argument("--json", action="store_true", help="print map.json on standard output")


def format_map(document):
    """People's view of a map: one row per FDTD point, then the breakdown intervals."""
    x, y = document["x"], document["y"]
    lines = [f"{document['case']}: {document['title']}",
             f"  {document['figure']['label']} at {document['frequency_ghz']:.3g} GHz over {x['label']} ({x['unit']}) "
             f"x {y['label']} ({y['unit']}); {document['model']}; tolerance {document['tolerance']:g} dB",
             f"  {'x':>8} {'y':>8} {'closed':>8} {'exact':>8} {'FDTD':>8} {'+-':>6} {'phase err':>9} "
             f"{'aperture err':>12} {'total err':>9}  ladder, status"]

    def f(v, w=8):
        return MISSING_VALUE.rjust(w) if v is None else f"{v:{w}.2f}"

    for p in document["points"]:
        lines.append(f"  {p['x']:8.3g} {p['y']:8.3g} {f(p['closed_form'])} {f(p['exact_phase'])} {f(p.get('fdtd'))} "
                     f"{f(p.get('uncertainty'), 6)} {f(p['phase_approximation_error'], 9)} "
                     f"{f(p.get('aperture_model_error'), 12)} {f(p.get('total_error'), 9)}  "
                     f"{p.get('convergence_status') or MISSING_VALUE}, {p['status']}"
                     + (f" ({p['reason']})" if p.get("reason") else ""))
    for kind in ("aperture_model", "total"):
        for row in document["breakdown"].get(kind) or []:
            where = breakdown_words(row, x["unit"])
            lines.append(f"  breakdown of the {kind.replace('_', ' ')} error at {y['label'].lower()} "
                         f"{row['y']:g} {y['unit']}: {where}")
    phase = document["breakdown"]["phase_approximation"]
    for row in (phase[0], phase[-1]) if phase else ():
        lines.append(f"  breakdown of the phase approximation (analytic) at {y['label'].lower()} "
                     f"{row['y']:.3g} {y['unit']}: {crossing_text(row['at'], x['unit'])}")
    lines.append(safety_lines())
    return "\n".join(lines)


#: what a map writes into its folder (listed in its ownership marker before the run, so a killed
#: map's folder is still recognised as its own)
MAP_ENTRIES = ("points", "map.json", "report.html") + tuple(
    f"map_{kind}_error.{ext}" for kind in ("phase_approximation", "aperture_model", "total") for ext in ("png", "svg"))


def run(args):
    case = load_case(args.case)
    with resumable_output_folder(args.out, "--out", "map", MAP_ENTRIES, default=f"results/{case.name}-map",
                                 writer=is_writer(), tell=say) as out_dir:
        document = run_map(case, out_dir, analytic_only=args.analytic_only, force=args.force,
                           budget_hours=args.budget_hours)
    if is_writer():
        emit_result(args.json, document, format_map(document), f"report: {out_dir / 'report.html'}")
    return 0
