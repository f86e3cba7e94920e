"""``hornproof simulate CASE``: the FDTD model alone, one grid."""

import os
from pathlib import Path

import numpy as np

from ...errors import InputError
from ..case.casefile import load_case
from ..output.folders import check_output_folder, publish_folder
from ..output.json_document import jsonable
from ..output.summary import base_summary
from ..output.terminal import emit_result, safety_lines


def simulate_case(case, cells_per_wavelength, out_dir, *, force=False, image=False):
    """Run one FDTD model of ``case`` and write fields.h5, s11.s1p, result.json (and model.png)."""
    from ...sim.run import simulate
    from ..jobs.verify import (_fdtd_figures, _is_master, _model_image, _progress_reporter, _say, _write_outputs,
                         resource_line, solver_block, solver_warnings)

    _say(f"hornproof: FDTD {case.fdtd.dims}D model at {cells_per_wavelength:g} cells per wavelength")
    _say(f"hornproof:   {resource_line(case, cells_per_wavelength)}")
    result = simulate(case.horn, case.frequencies, case.fdtd, cells_per_wavelength, force=force,
                      progress=_progress_reporter(case, cells_per_wavelength))
    summary = base_summary(case)
    fdtd = _fdtd_figures(result)
    fdtd["uncertainty"] = {}
    fdtd["wall_thickness_modelled_mm"] = result.run.get("wall_thickness_modelled_m", np.nan) * 1e3
    summary["models"]["fdtd"] = fdtd
    summary["solver"] = solver_block(case, [result], [cells_per_wavelength], result.run.get("seconds_total"))
    summary["warnings"] = list(summary.get("warnings", [])) + solver_warnings([result], [cells_per_wavelength])
    for warning in result.run.get("warnings", []) or []:
        _say(f"hornproof: warning: {warning}")
    summary = jsonable(summary)
    image = _model_image(case, cells_per_wavelength, Path(out_dir)) if image else None  # all ranks
    try:
        if _is_master():
            def write(staging):
                _write_outputs(staging, case, summary, [result], [cells_per_wavelength])
                if image is not None and image.is_file():
                    os.replace(image, staging / "model.png")

            publish_folder(out_dir, write)
    finally:
        if image is not None:
            Path(image).unlink(missing_ok=True)
    return summary


def format_fdtd(summary):
    fd = summary["models"]["fdtd"]
    two_d = summary["dims"] == 2
    dkey = "directivity_2d_db" if two_d else "directivity_dbi"
    gkey = "realized_gain_2d_db" if two_d else "realized_gain_dbi"
    lines = [f"{summary['case']}: FDTD ({summary['dims']}D, {summary['solver']['finest_cells_per_wavelength']:g} "
             f"cells per wavelength, walls modelled {summary['solver']['wall_thickness_modelled_mm'][0]:.2f} mm)",
             f"  {'f GHz':>7} {('D2 dB' if two_d else 'D dBi'):>8} {'realized':>9} {'S11 dB':>7} {'VSWR':>6} "
             f"{'HPBW-H':>7} {'HPBW-E':>7} {'P bal %':>8}"]

    def f(v, w, d=2):
        return "-".rjust(w) if v is None else f"{v:{w}.{d}f}"

    for i, freq in enumerate(summary["frequencies_ghz"]):
        pb = (fd.get("power_balance_error") or [None] * len(summary["frequencies_ghz"]))[i]
        lines.append(f"  {freq:7.3f} {f(fd[dkey][i], 8)} {f((fd.get(gkey) or [None] * 99)[i], 9)} "
                     f"{f(fd['s11_db'][i], 7, 1)} {f(fd['vswr'][i], 6)} {f(fd['hpbw_h_deg'][i], 7, 1)} "
                     f"{f(fd['hpbw_e_deg'][i], 7, 1)} {f(None if pb is None else pb * 100, 8, 2)}")
    lines.append(f"  run time {summary['solver']['seconds']:.1f} s")
    lines.append(safety_lines())
    return "\n".join(lines)


def simulate_command(args):
    case = load_case(args.case)
    if args.cells_per_wavelength and len(args.cells_per_wavelength) > 1:
        raise InputError("--cells-per-wavelength: simulate runs one grid; give one value "
                         "(verify runs a ladder)")
    cpw = float(args.cells_per_wavelength[0]) if args.cells_per_wavelength else float(max(case.fdtd.cells_per_wavelength))
    out_dir = Path(args.out) if args.out else Path("results") / case.name / case.sha256[:12] / f"fdtd-{cpw:g}"
    out_dir = check_output_folder(out_dir, "--out" if args.out else "the default result folder")
    summary = simulate_case(case, cpw, out_dir, force=args.force, image=args.image)
    from ..jobs.verify import _is_master

    if _is_master():
        emit_result(args.json, summary, format_fdtd(summary), f"results: {out_dir}")
    return 0
