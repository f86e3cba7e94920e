"""The FDTD model of a case alone, on one grid, with its result folder."""

from pathlib import Path

import numpy as np

from ...sim import run as fdtd_run
from ..output.folders import publish_folder
from ..output.json_document import jsonable
from ..output.summary import base_summary
from .grid_plan import fitted_ladder
from .ladder import fdtd_figures, progress_reporter, resource_line, solver_block, solver_warnings
from .messages import is_writer, say
from .result_folder import draw_model_image, move_model_image, write_result_files


def default_simulate_folder(case, cells_per_wavelength):
    """``results/<case>/<hash12>-fdtd-<N>``: where ``simulate`` writes without ``--out`` (beside,
    not inside, verify's ``results/<case>/<hash12>``, so neither command's folder holds the other's)."""
    return Path("results") / case.name / f"{case.sha256[:12]}-fdtd-{cells_per_wavelength:g}"


def simulate_case(case, cells_per_wavelength, out_dir, *, force=False, image=False):
    """Run one FDTD model of ``case`` and write fields.h5, s11.s1p, result.json (and model.png).

    The grid is fitted near ``cells_per_wavelength`` (:mod:`.grid_plan`) so that the model's
    sizes match the horn's. Returns the ``hornproof.result/1`` summary with the ``fdtd`` model only.
    """
    (fit,) = fitted_ladder(case, [cells_per_wavelength])
    cells_per_wavelength = fit.cells_per_wavelength
    say(f"hornproof: FDTD {case.fdtd.dims}D model at {cells_per_wavelength:.2f} cells per wavelength")
    say(f"hornproof:   {resource_line(case, cells_per_wavelength)}")
    result = fdtd_run.simulate(case.horn, case.frequencies, case.fdtd, cells_per_wavelength, force=force,
                               progress=progress_reporter(case, cells_per_wavelength))
    summary = base_summary(case)
    fdtd = fdtd_figures(result)
    fdtd["uncertainty"] = {}
    fdtd["wall_thickness_modelled_mm"] = result.run.get("wall_thickness_modelled_m", np.nan) * 1e3
    summary["models"]["fdtd"] = fdtd
    summary["solver"] = solver_block(case, [result], [cells_per_wavelength], result.run.get("seconds_total"))
    summary["solver"]["nominal_cells_per_wavelength"] = [fit.nominal_cells_per_wavelength]
    summary["solver"]["grid_fit"] = [fit.to_dict()]
    summary["warnings"] = list(summary.get("warnings", [])) + solver_warnings([result], [cells_per_wavelength])
    for warning in result.run.get("warnings", []) or []:
        say(f"hornproof: warning: {warning}")
    summary = jsonable(summary)
    image = draw_model_image(case, cells_per_wavelength, Path(out_dir)) if image else None  # all ranks
    try:
        if is_writer():
            def write(staging):
                write_result_files(staging, case, summary, [result], [cells_per_wavelength])
                move_model_image(image, staging)

            publish_folder(out_dir, write, kind="simulate")
    finally:
        if image is not None:
            Path(image).unlink(missing_ok=True)
    return summary
