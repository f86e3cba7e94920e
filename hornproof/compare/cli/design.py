"""``hornproof design …``: optimum horn sizing with the analytic models.

Two questions an engineer asks before drawing a horn:

* ``design gain`` — which realizable pyramidal horn (equal flare lengths in both planes)
  reaches a target gain at a frequency, with a given feed guide?
* ``design flare`` — for a given axial flare length, which aperture maximises directivity?

``--write-case FILE`` writes the designed horn as a format-1 case file (refusing to overwrite)
so it can go straight to ``verify``.
"""

import json
import math
import sys
from pathlib import Path

import numpy as np

from ...analytic import design
from ...analytic.model_limits import model_limit_warnings
from ...analytic.predict import predict
from ...analytic.waveguide import EIA_WAVEGUIDES, te10_cutoff_frequency, waveguide_size
from ...atomic import write_text_atomic
from ...errors import InputError
from ...units import GHZ, MM, SPEED_OF_LIGHT
from ..case.plausibility import Quantities, judge, judge_value
from ..case.values import CaseProblem
from ..output.folders import check_new_file
from ..output.json_document import jsonable
from ..output.summary import SAFETY_NOTE
from ..output.terminal import emit, safety_lines


def setup_arguments(parser):
    sub = parser.add_subparsers(dest="design_kind", metavar="QUESTION")
    common = []
    g = sub.add_parser("gain", help="realizable pyramidal horn for a target gain")
    g.add_argument("--gain-dbi", type=float, required=True, help="target boresight gain, dBi")
    common.append(g)
    f = sub.add_parser("flare", help="aperture of maximum directivity at a fixed flare length")
    f.add_argument("--type", dest="horn_type", choices=("h-sectoral", "e-sectoral", "pyramidal"), required=True)
    f.add_argument("--flare-length-mm", type=float, required=True, help="axial length, throat to aperture, mm")
    common.append(f)
    for p in common:
        p.add_argument("--frequency-ghz", type=float, required=True, help="design frequency, GHz")
        p.add_argument("--waveguide", help="EIA guide, e.g. WR-90")
        p.add_argument("--waveguide-a-mm", type=float, help="guide width a, mm (instead of --waveguide)")
        p.add_argument("--waveguide-b-mm", type=float, help="guide height b, mm (instead of --waveguide)")
        p.add_argument("--model", choices=("closed_form", "exact_phase"), default="closed_form",
                       help="model whose directivity is optimised or matched (default closed_form)")
        p.add_argument("--wall-mm", type=float, default=1.0, help="wall thickness for --write-case, mm")
        p.add_argument("--write-case", metavar="FILE", help="write the designed horn as a case file")
        p.add_argument("--json", action="store_true", help="print the hornproof.design/1 summary on stdout")
    g.add_argument("--phase-errors", default="rule",
                   help="'rule' (S = 3/8, T = 1/4), 'optimum' (0.3965, 0.2624) or 'S,T' in wavelengths")


def _guide(args):
    if args.waveguide and (args.waveguide_a_mm or args.waveguide_b_mm):
        raise InputError("--waveguide: give an EIA name or --waveguide-a-mm/--waveguide-b-mm, not both")
    if args.waveguide:
        try:
            return waveguide_size(args.waveguide)
        except KeyError:
            raise InputError(f"--waveguide: unknown EIA size {args.waveguide!r} (known: {', '.join(EIA_WAVEGUIDES)})")
    if args.waveguide_a_mm is None or args.waveguide_b_mm is None:
        raise InputError("--waveguide: give an EIA name or both --waveguide-a-mm and --waveguide-b-mm")
    if not (args.waveguide_a_mm > 0 and args.waveguide_b_mm > 0):
        raise InputError("--waveguide-a-mm: guide sizes must be positive")
    return args.waveguide_a_mm * MM, args.waveguide_b_mm * MM


def _phase_errors(text):
    if text in ("rule", "optimum"):
        return text
    try:
        s, t = (float(v) for v in text.split(","))
    except ValueError:
        raise InputError(f"--phase-errors: expected 'rule', 'optimum' or 'S,T', got {text!r}")
    return (s, t)


def _plausible_guide(args, guide_a, guide_b):
    """The guide must carry TE10 at the design frequency (the table's cutoff row) with E along
    its short side, like a case file's guide."""
    if not (math.isfinite(guide_a) and math.isfinite(guide_b)):
        raise InputError("--waveguide-a-mm: guide sizes must be finite")
    if guide_b > guide_a:
        raise InputError(f"--waveguide-b-mm: guide height b = {guide_b / MM:g} mm exceeds width "
                         f"a = {guide_a / MM:g} mm (TE10 needs E along the short side)")
    with np.errstate(over="ignore", divide="ignore"):
        ratio = args.frequency_ghz * GHZ / float(te10_cutoff_frequency(guide_a))
    try:
        judge_value("band above TE10 cutoff", ratio)
    except CaseProblem as problem:
        raise InputError(f"--frequency-ghz: {problem.reason}") from None


def _judge_designed_horn(result, writing_case):
    """The plausibility table over the designed horn (aperture and length in wavelengths, wall).
    The design itself is instant and is shown even beyond the table (with a warning); a case
    file is not written for it (the loader would refuse it)."""
    quantities = Quantities(horn=result.horn, frequencies=np.array([result.frequency]), fdtd={}, checks={})
    try:
        warnings = judge(quantities)
    except CaseProblem as problem:
        if writing_case:
            raise InputError(f"--write-case: the designed horn is beyond hornproof's plausibility limits, "
                             f"so its case file would be refused: {problem.key}: {problem.reason}") from None
        warnings = [(problem.key, f"beyond hornproof's limits, a case file would be refused: {problem.reason}")]
    for key, reason in warnings:
        print(f"hornproof: warning: the designed horn: {key}: {reason}", file=sys.stderr)


def _plausible_options(args):
    """The plausibility table (:mod:`..case.plausibility`) applied to the options that mean
    what case keys mean, in order (the frequency first: the length is judged in wavelengths);
    refusals raise, warnings are returned."""
    warnings = []

    def judged(option, row, value):
        try:
            reason = judge_value(row, value)
        except CaseProblem as problem:
            raise InputError(f"{option}: {problem.reason}") from None
        if reason:
            warnings.append(f"{option}: {reason}")

    judged("--frequency-ghz", "lowest frequency", args.frequency_ghz)
    judged("--wall-mm", "wall thickness", args.wall_mm)
    if getattr(args, "flare_length_mm", None) is not None:
        wavelength = SPEED_OF_LIGHT / (args.frequency_ghz * GHZ)
        judged("--flare-length-mm", "flare length", args.flare_length_mm * MM / wavelength)
    return warnings


def _design(args):
    a, b = _guide(args)
    if not args.frequency_ghz > 0:
        raise InputError("--frequency-ghz: must be positive")
    for warning in _plausible_options(args):
        print(f"hornproof: warning: {warning}", file=sys.stderr)
    _plausible_guide(args, a, b)
    frequency = args.frequency_ghz * GHZ
    try:
        if args.design_kind == "gain":
            return design.design_for_gain(args.gain_dbi, frequency, a, b, phase_errors=_phase_errors(args.phase_errors),
                                          model=args.model, wall_thickness=args.wall_mm * MM)
        if not args.flare_length_mm > 0:
            raise InputError("--flare-length-mm: must be positive")
        return design.optimum_horn(args.horn_type, a, b, args.flare_length_mm * MM, frequency, model=args.model,
                                   wall_thickness=args.wall_mm * MM)
    except ValueError as error:
        raise InputError(f"design {args.design_kind}: {error}")


def design_summary(result):
    horn = result.horn
    models = predict(horn, [result.frequency])
    summary = {
        "schema": "hornproof.design/1",
        "model": result.model,
        "frequency_ghz": result.frequency / GHZ,
        "geometry": horn.summary(result.frequency),
        "directivity_dbi": result.directivity_dbi,
        "aperture_efficiency": result.aperture_efficiency,
        "phase_error_h_wl": result.phase_error_h_wl,
        "phase_error_e_wl": result.phase_error_e_wl,
        "phase_reference": result.phase_reference,
        "both_models_dbi": {name: float(np.asarray(m.directivity_dbi)[0]) for name, m in models.items()},
        "warnings": model_limit_warnings(horn, result.frequency),
        "safety": SAFETY_NOTE,
    }
    return jsonable(summary)


def case_text(summary, source):
    g = summary["geometry"]
    f = summary["frequency_ghz"]
    return f"""# Written by 'hornproof design {source}' — a starting point, check it before use.
format = 1
title = "{g['type']} horn designed for {f:g} GHz ({summary['model']}: {summary['directivity_dbi']:.2f} dBi)"

[horn]
type = "{g['type']}"
waveguide_a_mm = {g['guide_a_mm']:.4f}
waveguide_b_mm = {g['guide_b_mm']:.4f}
aperture_a_mm = {g['aperture_a_mm']:.4f}
aperture_b_mm = {g['aperture_b_mm']:.4f}
flare_length_mm = {g['flare_length_mm']:.4f}
wall_mm = {g['wall_mm']:.4f}

[band]
f_min_ghz = {f * 0.95:.4f}
f_max_ghz = {f * 1.05:.4f}
points = 3

[fdtd]
dims = 3
# no cells_per_wavelength: verify picks the ladder (six cells across the narrowest opening on
# the coarsest rung, ratio 1.3, each rung fitted to these sizes)

[checks]
directivity_db = 0.5
"""


def _apex(value):
    """An apex distance in mm, or "none (no flare)" for a plane that does not flare."""
    return "none (no flare)" if value is None or value == float("inf") else f"{value:.2f} mm"


def format_design(summary):
    g = summary["geometry"]
    lines = [f"{g['type']} horn for {summary['frequency_ghz']:g} GHz ({summary['model'].replace('_', ' ')} model)",
             f"  guide            {g['guide_a_mm']:.3f} x {g['guide_b_mm']:.3f} mm",
             f"  aperture A x B   {g['aperture_a_mm']:.2f} x {g['aperture_b_mm']:.2f} mm",
             f"  flare length     {g['flare_length_mm']:.2f} mm (axial, both planes)",
             f"  apex distances   H {_apex(g['apex_h_mm'])}   E {_apex(g['apex_e_mm'])}",
             f"  flare half-angle H {g['flare_half_angle_h_deg']:.2f} deg   E {g['flare_half_angle_e_deg']:.2f} deg",
             f"  peak phase error S {summary['phase_error_h_wl']:.3f}   T {summary['phase_error_e_wl']:.3f} wavelengths "
             f"({summary['phase_reference']} convention)",
             f"  directivity      {summary['directivity_dbi']:.2f} dBi, aperture efficiency "
             f"{summary['aperture_efficiency'] * 100:.1f} %",
             f"  both models      closed form {summary['both_models_dbi']['closed_form']:.2f} dBi, "
             f"exact phase {summary['both_models_dbi']['exact_phase']:.2f} dBi"]
    lines += [f"  warning: {warning}" for warning in summary.get("warnings", [])]
    lines.append(safety_lines())
    return "\n".join(lines)


def run(args):
    if not getattr(args, "design_kind", None):
        raise InputError("design: say what to design: 'hornproof design gain …' or 'hornproof design flare …'")
    if args.write_case:
        check_new_file(args.write_case, "--write-case")
    result = _design(args)
    _judge_designed_horn(result, writing_case=bool(args.write_case))
    summary = design_summary(result)
    if args.write_case:
        write_text_atomic(Path(args.write_case), case_text(summary, args.design_kind))
    if args.json:
        emit(json.dumps(summary, indent=1) + "\n")
    else:
        emit(format_design(summary))
        if args.write_case:
            emit(f"  case file written: {args.write_case}")
    return 0
