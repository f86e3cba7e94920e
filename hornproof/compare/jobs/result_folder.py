"""The files of an FDTD job's result folder: fields.h5, s11.s1p, result.json and model.png.

``verify`` and ``simulate`` write these into a staging folder (``output.folders.publish_folder``);
the model image is drawn by every MPI rank (Meep's arrays are collective) beside the target
folder first, then moved in by the writer.
"""

import os

import numpy as np

from ...analytic.waveguide import te10_wave_impedance
from ..output.fields_h5 import write_fields_h5
from ..output.result_json import write_result_json
from ..output.touchstone import write_s1p
from .messages import is_writer


def write_result_files(folder, case, summary, sim_results, ladder):
    """Write fields.h5 and s11.s1p of the finest grid and result.json into ``folder``. s11.s1p holds the dense band (``sim.feed.DENSE_BAND_POINTS`` frequencies of the
    same run) when the run has one, else the band frequencies."""
    finest = sim_results[int(np.argmax(ladder))]
    write_fields_h5(folder / "fields.h5", finest, case_sha256=case.sha256, case_name=case.name,
                    flare_length_m=float(case.horn.flare_length))
    dense = getattr(finest, "dense_band", None)
    if dense is not None:
        frequencies, s11 = dense["frequencies_hz"], dense["s11"]
        comments = [f"dense band: {len(frequencies)} frequencies from the same run's guide monitor"]
    else:
        frequencies = case.frequencies
        s11 = np.asarray(finest.extra["s11_real"]) + 1j * np.asarray(finest.extra["s11_imag"])
        comments = []
    write_s1p(folder / "s11.s1p", frequencies, s11, case_name=case.name,
              solver_version=str(finest.run.get("meep_version", "")), comments=comments,
              wave_impedances=te10_wave_impedance(frequencies, case.horn.guide_a))
    write_result_json(folder / "result.json", summary)


def draw_model_image(case, cells_per_wavelength, out_dir):
    """model.png of the grid at ``cells_per_wavelength``, drawn beside ``out_dir`` (a hidden
    name) for :func:`move_model_image` to move in. Every MPI rank must call it."""
    # lazy: Meep and matplotlib load only when an image is drawn
    from ...sim.metal_map import metal_cuts
    from ..report.model_image import model_image

    out_dir.parent.mkdir(parents=True, exist_ok=True)
    path = out_dir.parent / f".{out_dir.name}.model-{os.getpid()}.png"  # one name per run
    layout, cuts = metal_cuts(case.horn, case.fdtd, cells_per_wavelength, frequencies=case.frequencies)
    if is_writer():
        model_image(layout, cuts, path)
    return path


def move_model_image(image, staging):
    """Move a drawn model image into the staging folder as model.png (if it was drawn)."""
    if image is not None and image.is_file():
        os.replace(image, staging / "model.png")
