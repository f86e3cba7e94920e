"""The files of an FDTD job's result folder: fields.h5, s11.s1p, result.json and model.png.

``verify`` and ``simulate`` write these into a staging folder (``output.folders.publish_folder``);
the model image is drawn by every MPI rank (Meep's arrays are collective) beside the target
folder first, then moved in by the writer.
"""

import os

import numpy as np

from ...atomic import write_text_atomic
from ...sim.model import model_image
from ..output.fields_h5 import write_fields_h5
from ..output.summary import dumps
from ..output.touchstone import write_s1p


def write_result_files(folder, case, summary, sim_results, ladder):
    """Write fields.h5 and s11.s1p of the finest grid, and result.json, into ``folder``."""
    finest = sim_results[int(np.argmax(ladder))]
    write_fields_h5(folder / "fields.h5", finest, case_sha256=case.sha256, case_name=case.name)
    s11 = np.asarray(finest.extra["s11_real"]) + 1j * np.asarray(finest.extra["s11_imag"])
    write_s1p(folder / "s11.s1p", case.frequencies, s11, case_name=case.name,
              solver_version=str(finest.run.get("meep_version", "")))
    write_text_atomic(folder / "result.json", dumps(summary))


def draw_model_image(case, cells_per_wavelength, out_dir):
    """model.png of the grid at ``cells_per_wavelength``, drawn beside ``out_dir`` (a hidden
    name) for :func:`move_model_image` to move in. Every MPI rank must call it."""
    out_dir.parent.mkdir(parents=True, exist_ok=True)
    path = out_dir.parent / f".{out_dir.name}.model.png"
    model_image(case.horn, case.fdtd, cells_per_wavelength, path, frequencies=case.frequencies)
    return path


def move_model_image(image, staging):
    """Move a drawn model image into the staging folder as model.png (if it was drawn)."""
    if image is not None and image.is_file():
        os.replace(image, staging / "model.png")
