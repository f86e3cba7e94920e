"""``hornproof simulate CASE``: the FDTD model alone, one grid."""

from pathlib import Path

from ...errors import InputError
from ..case.casefile import load_case
from ..jobs.messages import is_writer, say
from ..jobs.simulate import default_simulate_folder, simulate_case
from ..numerics.figures import directivity_key
from ..report.format import MISSING_VALUE
from ..output.folders import check_output_folder, claimed_output_folder, under_result_root
from ..output.terminal import emit_result, safety_lines
from .arguments import add_fdtd_run_arguments


def setup_arguments(parser):
    add_fdtd_run_arguments(parser, cells_metavar="N",
                           cells_help="grid density at f_max, one value (default: the finest of the case's ladder)",
                           out_help="output folder (default: results/<case>/<hash>-fdtd-<N>)")
    parser.add_argument("--image", action="store_true", help="also write model.png (two cuts through the axis)")


def format_fdtd(summary):
    """People's view of one FDTD run: one row per frequency."""
    fdtd = summary["models"]["fdtd"]
    two_d = summary["dims"] == 2
    key = directivity_key(summary["dims"])
    gain_key = "realized_gain_2d_db" if two_d else "realized_gain_dbi"
    lines = [f"{summary['case']}: FDTD ({summary['dims']}D, {summary['solver']['finest_cells_per_wavelength']:g} "
             f"cells per wavelength, walls modelled {summary['solver']['wall_thickness_modelled_mm'][0]:.2f} mm)",
             f"  {'f GHz':>7} {('D2 dB' if two_d else 'D dBi'):>8} {'realized':>9} {'S11 dB':>7} {'VSWR':>6} "
             f"{'HPBW-H':>7} {'HPBW-E':>7} {'P bal %':>8}"]

    def f(v, w, d=2):
        return MISSING_VALUE.rjust(w) if v is None else f"{v:{w}.{d}f}"

    for i, freq in enumerate(summary["frequencies_ghz"]):
        balance = (fdtd.get("power_balance_error") or [None] * len(summary["frequencies_ghz"]))[i]
        lines.append(f"  {freq:7.3f} {f(fdtd[key][i], 8)} {f((fdtd.get(gain_key) or [None] * 99)[i], 9)} "
                     f"{f(fdtd['s11_db'][i], 7, 1)} {f(fdtd['vswr'][i], 6)} {f(fdtd['hpbw_h_deg'][i], 7, 1)} "
                     f"{f(fdtd['hpbw_e_deg'][i], 7, 1)} {f(None if balance is None else balance * 100, 8, 2)}")
    lines.append(f"  run time {summary['solver']['seconds']:.1f} s")
    lines.append(safety_lines())
    return "\n".join(lines)


def run(args):
    case = load_case(args.case)
    for warning in case.warnings:
        say(f"hornproof: warning: {warning}")
    if args.cells_per_wavelength and len(args.cells_per_wavelength) > 1:
        raise InputError("--cells-per-wavelength: simulate runs one grid; give one value "
                         "(verify runs a ladder)")
    cells_per_wavelength = (float(args.cells_per_wavelength[0]) if args.cells_per_wavelength
                            else float(max(case.fdtd.cells_per_wavelength)))
    out_dir = Path(args.out) if args.out is not None else default_simulate_folder(case, cells_per_wavelength)
    option = "--out" if args.out is not None else "the default result folder"
    out_dir = check_output_folder(out_dir, option, kind="simulate",
                                  create_parents=args.out is None or under_result_root(args.out))
    with claimed_output_folder(out_dir, option, "simulate", hold=is_writer(), tell=say):
        summary = simulate_case(case, cells_per_wavelength, out_dir, force=args.force, image=args.image)
    if is_writer():
        emit_result(args.json, summary, format_fdtd(summary), f"results: {out_dir}")
    return 0
