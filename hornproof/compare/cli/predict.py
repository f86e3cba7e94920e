"""``hornproof predict CASE``: both analytic models of a case, instantly."""

import numpy as np

from ..case.casefile import load_case
from ..jobs.predict import predict_case
from ..numerics.figures import directivity_key
from ..report.format import MISSING_VALUE
from ..output.terminal import emit_result, safety_lines


def _fmt(value, width=7, digits=2):
    if value is None or (isinstance(value, float) and not np.isfinite(value)):
        return MISSING_VALUE.rjust(width)
    return f"{value:{width}.{digits}f}"


def format_table(summary):
    """People's view of a prediction: geometry, then one row per frequency."""
    g = summary["geometry"]
    lines = [f"{summary['case']}: {summary.get('title') or ''}".rstrip(": "),
             f"  {g['type']} horn  guide {g['guide_a_mm']:.3f} x {g['guide_b_mm']:.3f} mm  "
             f"aperture {g['aperture_a_mm']:.2f} x {g['aperture_b_mm']:.2f} mm  "
             f"flare length {g['flare_length_mm']:.2f} mm",
             f"  flare half-angles H {g['flare_half_angle_h_deg']:.2f} deg  E {g['flare_half_angle_e_deg']:.2f} deg"
             f"   apex distances H {_fmt(g['apex_h_mm'], 1, 1).strip()} mm  E {_fmt(g['apex_e_mm'], 1, 1).strip()} mm",
             ""]
    two_d = summary["dims"] == 2
    key = directivity_key(summary["dims"])
    unit = "D2 dB" if two_d else "D dBi"
    closed_form, exact_phase = summary["models"]["closed_form"], summary["models"]["exact_phase"]
    header = (f"  {'f GHz':>7} {'S wl':>6} {'T wl':>6} {unit + ' cf':>10} {unit + ' ex':>10} {'diff dB':>8}"
              f" {'HPBW-H cf':>9} {'ex':>6} {'HPBW-E cf':>9} {'ex':>6} {'SLL-H cf':>8} {'SLL-E cf':>8}")
    lines.append(header)
    phase_error_h = g["phase_error_h_wl_per_frequency"]
    phase_error_e = g["phase_error_e_wl_per_frequency"]
    for i, frequency in enumerate(summary["frequencies_ghz"]):
        closed, exact = closed_form[key][i], exact_phase[key][i]
        difference = None if closed is None or exact is None else closed - exact
        lines.append(
            f"  {frequency:7.3f} {phase_error_h[i]:6.3f} {phase_error_e[i]:6.3f} {_fmt(closed, 10)} {_fmt(exact, 10)}"
            f" {_fmt(difference, 8)}"
            f" {_fmt(closed_form['hpbw_h_deg'][i], 9, 1)} {_fmt(exact_phase['hpbw_h_deg'][i], 6, 1)}"
            f" {_fmt(closed_form['hpbw_e_deg'][i], 9, 1)} {_fmt(exact_phase['hpbw_e_deg'][i], 6, 1)}"
            f" {_fmt(closed_form['sll_h_db'][i], 8, 1)} {_fmt(closed_form['sll_e_db'][i], 8, 1)}")
    lines += ["", "  cf = closed form (quadratic phase, Fresnel integrals); ex = exact path length from the apex;",
              "  diff = closed form minus exact phase (the phase-approximation error)."]
    if two_d:
        lines.append("  D2 = 2D model, dB (a per-unit-length ratio): the 2D directivity of the flared plane alone (not dBi).")
    lines += horn_3d_lines(summary)
    for w in summary.get("warnings", []):  # warnings come before the safety text
        lines.append(f"  warning: {w}")
    lines.append(safety_lines())
    return "\n".join(lines)


def horn_3d_lines(summary):
    """The 3D horn's directivity (dBi) of a 2D case's ``horn_3d`` block, as table lines
    (none for a 3D case)."""
    block = summary.get("horn_3d")
    if not block:
        return []
    closed_form, exact_phase = block["closed_form"], block["exact_phase"]
    lines = ["", "  The 3D horn, dBi (closed-form and exact-phase aperture models), beside the 2D model "
                 "(2D model, dB (a per-unit-length ratio)):",
             f"  {'f GHz':>7} {'D dBi cf':>10} {'D dBi ex':>10} {'diff dB':>8}"]
    for i, frequency in enumerate(summary["frequencies_ghz"]):
        closed, exact = closed_form["directivity_dbi"][i], exact_phase["directivity_dbi"][i]
        difference = None if closed is None or exact is None else closed - exact
        lines.append(f"  {frequency:7.3f} {_fmt(closed, 10)} {_fmt(exact, 10)} {_fmt(difference, 8)}")
    return lines


def setup_arguments(parser):
    parser.add_argument("case", help="case file (.toml)")
    parser.add_argument("--json", action="store_true", help="print the hornproof.result/1 summary on stdout")
    parser.add_argument("--equivalent", choices=("huygens", "e-field"), default="huygens",
                        help="aperture equivalent for the patterns (default: huygens)")


def run(args):
    case = load_case(args.case)
    summary, _ = predict_case(case, equivalent=args.equivalent)
    emit_result(args.json, summary, format_table(summary))
    return 0
