"""The look of hornproof's figures: one colour per model, the grid, the legend, atomic saving.

Shared by every figure of the report (:mod:`.plots`, :mod:`.model_image` draws its own map) and
by the sweep's model plot. matplotlib's object API only (no pyplot, no global state; the Agg
renderer). Each figure is written as ``<path_stem>.png`` and ``<path_stem>.svg`` through
:func:`hornproof.atomic.atomic_path`, so a crash never leaves a half-written image.
"""

import os

import numpy as np
from matplotlib.figure import Figure

from ...atomic import atomic_path

#: One colour per model, used in every figure.
MODEL_COLOURS = {
    "closed_form": "#2a7f62",   # pine green
    "exact_phase": "#c0762f",   # copper
    "fdtd": "#34418f",          # indigo
}
#: Legend labels a reviewer can read without the code.
MODEL_LABELS = {
    "closed_form": "Closed form (quadratic phase, Fresnel integrals)",
    "exact_phase": "Exact-phase aperture integral",
    "fdtd": "FDTD (Meep)",
}
MODEL_LINESTYLES = {"closed_form": "--", "exact_phase": "-.", "fdtd": "-"}
TOLERANCE_COLOUR = "#7a7a7a"
TOTAL_ERROR_COLOUR = "#3b3b3b"  # the total error is no model's: a neutral dark grey
GRID_COLOUR = "#e2e2e2"


def new_figure(width=7.2, height=4.4):
    """A white figure with one axes: light grid under the data, no top/right frame."""
    fig = Figure(figsize=(width, height), dpi=110, facecolor="white")
    ax = fig.add_subplot(1, 1, 1)
    ax.grid(True, color=GRID_COLOUR, linewidth=0.8)
    ax.set_axisbelow(True)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    return fig, ax


def save_figure(fig, path_stem):
    """Write ``fig`` as ``<path_stem>.png`` and ``<path_stem>.svg`` atomically.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
    path_stem : str or os.PathLike
        Output path without extension; its directory must exist.

    Returns
    -------
    tuple of str
        (png_path, svg_path).
    """
    path_stem = os.fspath(path_stem)
    directory = os.path.dirname(os.path.abspath(path_stem))
    if not os.path.isdir(directory):
        raise ValueError(f"path_stem: directory {directory!r} does not exist")
    written = []
    for fmt in ("png", "svg"):
        final = f"{path_stem}.{fmt}"
        metadata = {"Date": None} if fmt == "svg" else None  # reproducible SVG bytes
        with atomic_path(final) as temporary:
            fig.savefig(temporary, format=fmt, bbox_inches="tight", metadata=metadata)
        written.append(final)
    return tuple(written)


def float_array(values, name, shape=None):
    """``values`` as a float array; ``ValueError`` naming ``name`` when its shape is not ``shape``."""
    array = np.asarray(values, dtype=float)
    if shape is not None and array.shape != shape:
        raise ValueError(f"{name}: shape {array.shape} does not match {shape}")
    return array


def lower_first(text):
    """'Directivity' -> 'directivity', but 'H-plane flare' and '2D directivity' stay."""
    if len(text) > 1 and (text[1] in "-_" or text[1].isupper() or text[0].isdigit()):
        return text
    return text[:1].lower() + text[1:]


def set_title(ax, case_title, what):
    """Case title over what the figure shows, left-aligned."""
    ax.set_title(f"{case_title}\n{what}", fontsize=10.5, loc="left")


def legend_below(ax, ncol=2):
    """Legend under the axes, clear of the data (the figure is cropped tight around it)."""
    legend = ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.15), ncol=ncol,
                       fontsize=8.3, frameon=False, handlelength=2.6, columnspacing=1.6)
    return legend


def minus_sign(text):
    """Typographic minus sign for numbers written into labels."""
    return text.replace("-", "\u2212")
