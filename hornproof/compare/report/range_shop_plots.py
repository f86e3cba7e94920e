"""The tolerance study's figure (``tolerance.png``/``.svg``) from result.json's ``tolerance`` block.

One row per figure (directivity, beamwidths): left, the nominal value over the band with the
Monte Carlo 2.5–97.5 % band and the delta-method ±2σ bars; right, the linear sensitivities per
mm at the band centre. matplotlib's object API (:mod:`.figure_style`).
"""

from pathlib import Path

import numpy as np
from matplotlib.figure import Figure

from .figure_style import GRID_COLOUR, MODEL_COLOURS, TOLERANCE_COLOUR, save_figure


def write_tolerance_plot(folder, result):
    """Draw ``tolerance.png`` (and .svg) into ``folder``; returns the paths, or None without a
    tolerance block."""
    block = result.get("tolerance")
    if not block:
        return None
    f = np.asarray(result["frequencies_ghz"], dtype=float)
    centre = int(np.argmin(np.abs(f - np.sqrt(f.min() * f.max()))))
    figures = block["figures"]
    colour = MODEL_COLOURS.get(block["model"], "#34418f")
    fig = Figure(figsize=(9.0, 2.6 * len(figures)), dpi=110, facecolor="white")
    for row, (name, figure) in enumerate(figures.items()):
        left = fig.add_subplot(len(figures), 2, 2 * row + 1)
        right = fig.add_subplot(len(figures), 2, 2 * row + 2)
        for ax in (left, right):
            ax.grid(True, color=GRID_COLOUR, linewidth=0.8)
            ax.set_axisbelow(True)
        nominal = np.asarray(figure["nominal"], dtype=float)
        left.fill_between(f, np.asarray(figure["monte_carlo_p2_5"], dtype=float),
                          np.asarray(figure["monte_carlo_p97_5"], dtype=float), color=colour, alpha=0.25,
                          label="Monte Carlo 2.5–97.5 %")
        left.errorbar(f, nominal, yerr=2 * np.asarray(figure["delta_method_std"], dtype=float), color=colour,
                      marker="o", capsize=3, linewidth=1.2, label="nominal, delta-method ±2σ")
        left.set_xlabel("Frequency (GHz)")
        left.set_ylabel(f"{figure['label']} ({figure['unit']})")
        left.legend(fontsize=7, loc="best")
        dims = list(figure["sensitivity_per_mm"])
        slopes = [figure["sensitivity_per_mm"][d][centre] for d in dims]
        right.bar(dims, slopes, color=TOLERANCE_COLOUR)
        right.axhline(0.0, color="black", linewidth=0.6)
        unit = "dB" if figure["unit"] == "dBi" else figure["unit"]  # a change of dBi is dB
        right.set_ylabel(f"{unit} per mm at {f[centre]:.3g} GHz")
    fig.tight_layout()
    return save_figure(fig, Path(folder) / "tolerance")
