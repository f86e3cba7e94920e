"""``hornproof predict CASE``: both analytic models of a case, instantly."""

import numpy as np

from ...analytic.predict import predict
from ..case.casefile import load_case
from ..output.summary import base_summary
from ..output.terminal import emit_result, safety_lines


def predict_case(case, equivalent="huygens"):
    """Summary dict with the ``closed_form`` and ``exact_phase`` models of ``case``."""
    summary = base_summary(case)
    models = predict(case.horn, case.frequencies, equivalent=equivalent, dims=case.fdtd.dims)
    summary["models"] = {name: model.figures() for name, model in models.items()}
    summary["aperture_equivalent"] = equivalent
    return summary, models


def _fmt(value, width=7, digits=2):
    if value is None or (isinstance(value, float) and not np.isfinite(value)):
        return "-".rjust(width)
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
    dkey = "directivity_2d_db" if two_d else "directivity_dbi"
    dunit = "D2 dB" if two_d else "D dBi"
    cf, ex = summary["models"]["closed_form"], summary["models"]["exact_phase"]
    header = (f"  {'f GHz':>7} {'S wl':>6} {'T wl':>6} {dunit + ' cf':>10} {dunit + ' ex':>10} {'diff dB':>8}"
              f" {'HPBW-H cf':>9} {'ex':>6} {'HPBW-E cf':>9} {'ex':>6} {'SLL-H cf':>8} {'SLL-E cf':>8}")
    lines.append(header)
    s_list = g["phase_error_h_wl_per_frequency"]
    t_list = g["phase_error_e_wl_per_frequency"]
    for i, f in enumerate(summary["frequencies_ghz"]):
        dc, de = cf[dkey][i], ex[dkey][i]
        diff = None if dc is None or de is None else dc - de
        lines.append(
            f"  {f:7.3f} {s_list[i]:6.3f} {t_list[i]:6.3f} {_fmt(dc, 10)} {_fmt(de, 10)} {_fmt(diff, 8)}"
            f" {_fmt(cf['hpbw_h_deg'][i], 9, 1)} {_fmt(ex['hpbw_h_deg'][i], 6, 1)}"
            f" {_fmt(cf['hpbw_e_deg'][i], 9, 1)} {_fmt(ex['hpbw_e_deg'][i], 6, 1)}"
            f" {_fmt(cf['sll_h_db'][i], 8, 1)} {_fmt(cf['sll_e_db'][i], 8, 1)}")
    lines += ["", "  cf = closed form (quadratic phase, Fresnel integrals); ex = exact path length from the apex;",
              "  diff = closed form minus exact phase (the phase-approximation error).",
              safety_lines()]
    for w in summary.get("warnings", []):
        lines.append(f"  warning: {w}")
    return "\n".join(lines)


def predict_command(args):
    case = load_case(args.case)
    summary, _ = predict_case(case, equivalent=args.equivalent)
    emit_result(args.json, summary, format_table(summary))
    return 0
