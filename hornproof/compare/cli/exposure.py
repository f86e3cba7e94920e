"""``hornproof exposure CASE --power-w P``: the on-axis distance beyond which each exposure
reference level holds (:mod:`hornproof.compare.jobs.exposure`), printed with its caution."""

import math
import textwrap

from ...errors import InputError
from ..case.casefile import load_case
from ..jobs.exposure import exposure_summary
from ..output.terminal import emit_result


def setup_arguments(parser):
    parser.add_argument("case", help="case file (.toml)")
    parser.add_argument("--power-w", type=float, required=True, metavar="P",
                        help="power delivered to the horn, W (average power for the time-averaged levels)")
    parser.add_argument("--gain-dbi", type=float, metavar="G",
                        help="use this gain instead of the aperture models' (e.g. a measured gain)")
    parser.add_argument("--json", action="store_true", help="print the hornproof.exposure/1 document on stdout")


def _m(value):
    if value is None:
        return "   n/a"
    return f"{value:6.2f}" if value < 1000 else f"{value:6.0f}"


def format_table(doc):
    lines = [f"{doc['case']}: {doc['title']}",
             f"  {doc['power_w']:g} W into the horn; gain: {doc['gain_source']}",
             f"  aperture surface bound 4P/A = {doc['aperture_surface_bound_w_per_m2']:.3g} W/m2",
             "  distance on the axis (m) beyond which the estimated power density is at or below each "
             "reference level (conservative; in brackets the aperture-model estimate):"]
    for row in doc["frequencies"]:
        lines.append(f"  {row['frequency_ghz']:.3f} GHz, gain {row['gain_dbi']:.2f} dBi, 2D^2/lambda "
                     f"{row['far_field_2d2_over_lambda_m']:.2f} m:")
        for limit in row["limits"]:
            level = limit["level_w_per_m2"]
            model = limit["aperture_model_distance_m"]
            lines.append(f"    {limit['label']:<45} {('%.3g' % level) if level else 'n/a':>6} W/m2  "
                         f"{_m(limit['distance_m'])} m" + (f"  [{model:.2f} m]" if model else ""))
    lines.append("  sources: " + "; ".join(sorted({limit["source"] for row in doc["frequencies"]
                                                   for limit in row["limits"]})))
    lines.append(textwrap.fill("Not covered: " + doc["not_covered"], width=96, initial_indent="  ",
                               subsequent_indent="  "))
    lines.append(textwrap.fill(doc["caution"], width=96, initial_indent="  ", subsequent_indent="  "))
    return "\n".join(lines)


def run(args):
    if not (math.isfinite(args.power_w) and args.power_w > 0):
        raise InputError(f"--power-w: {args.power_w:g} W must be a positive finite power")
    if args.power_w > 1e7:
        raise InputError(f"--power-w: {args.power_w:g} W is more than 10 MW: not a horn's transmitter")
    if args.gain_dbi is not None and not (math.isfinite(args.gain_dbi) and -10 <= args.gain_dbi <= 60):
        raise InputError(f"--gain-dbi: {args.gain_dbi:g} dBi is outside [-10, 60] dBi")
    case = load_case(args.case)
    doc = exposure_summary(case, args.power_w, args.gain_dbi)
    emit_result(args.json, doc, format_table(doc))
    return 0
