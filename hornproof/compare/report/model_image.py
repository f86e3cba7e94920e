"""``model.png``: the modelled metal of a horn in its axial cuts, with the PML, the near-to-far
surface and the feed source marked.

Draws the material map gathered by :func:`hornproof.sim.metal_map.metal_cuts` (Meep's own
dielectric array, so the staircase is shown as modelled) with matplotlib's object API (no
pyplot, no global state) and writes it through :func:`hornproof.atomic.atomic_path`.
"""

import numpy as np
from matplotlib.figure import Figure
from matplotlib.patches import Patch, Rectangle

from ...atomic import atomic_path


def metal_levels(permittivity):
    """Grey level per voxel: 1 metal (every Yee point metal), 0.5 wall edge, 0 vacuum.

    Meep's ``get_array`` averages the Yee-point materials of each voxel: a voxel with some
    metal points reads neither 1 nor < 0; those are drawn half-dark.
    """
    eps = np.asarray(permittivity, dtype=float)
    return np.where(eps < 0, 1.0, np.where(np.abs(eps - 1.0) > 1e-6, 0.5, 0.0))


def _draw_cut(ax, layout, cut):
    """One cut: the metal map in mm, the inner PML edge, the near-to-far box, the source sheet."""
    mm = layout.unit_length * 1e3
    z0 = layout.cell_center_z - layout.cell_size[-1] / 2
    extent = [z0 * mm, (z0 + layout.cell_size[-1]) * mm, -cut.width / 2 * mm, cut.width / 2 * mm]
    ax.imshow(metal_levels(cut.permittivity), origin="lower", extent=extent, cmap="Greys", aspect="equal",
              interpolation="nearest")
    inner_low, inner_high = (z0 + layout.pml_back) * mm, (z0 + layout.cell_size[-1] - layout.pml) * mm
    half = cut.width / 2 * mm - layout.pml * mm
    ax.add_patch(Rectangle((inner_low, -half), inner_high - inner_low, 2 * half, fill=False,
                           edgecolor="tab:red", lw=0.7, ls="--", label="inner edge of the PML"))
    box_half = cut.box_half * mm
    ax.add_patch(Rectangle((layout.box_z[0] * mm, -box_half), (layout.box_z[1] - layout.box_z[0]) * mm,
                           2 * box_half, fill=False, edgecolor="tab:blue", lw=0.8,
                           label="near-to-far / flux surface"))
    guide = cut.guide_width * mm
    ax.vlines(layout.source_z * mm, -guide / 2, guide / 2, color="tab:orange", lw=1.5, label="feed source sheet")
    ax.set_title(f"{cut.name}\nwall modelled {layout.wall_thickness_m * 1e3:.3g} mm, "
                 f"{layout.resolution:g} cells/λ at f_max", fontsize=9)
    ax.set_xlabel("z (mm)")
    ax.set_ylabel("transverse (mm)")


def model_image(layout, cuts, path):
    """Write a PNG of the modelled metal in ``cuts`` (from ``metal_cuts``) to ``path``.

    Parameters
    ----------
    layout : hornproof.sim.layout.Layout
        The cell layout the cuts were taken from (lengths in Meep units; shown in mm).
    cuts : sequence of hornproof.sim.metal_map.MetalCut
        One or two axial cuts (one panel each).
    path : str or os.PathLike
        Output PNG; written atomically. Returns ``path``.
    """
    single = len(cuts) == 1
    fig = Figure(figsize=(5 * len(cuts), 6.5 if single else 6))
    axes = fig.subplots(1, len(cuts), squeeze=False)[0]
    for ax, cut in zip(axes, cuts):
        _draw_cut(ax, layout, cut)
    handles, _ = axes[-1].get_legend_handles_labels()
    handles = [Patch(facecolor="black", label="PEC wall (every Yee point metal)"),
               Patch(facecolor="0.55", label="wall edge (some Yee points metal)")] + handles
    fig.legend(handles=handles, loc="lower center", ncol=2 if single else 3, fontsize=8, frameon=False)
    fig.suptitle("Modelled horn\n(the feed guide runs on into the PML behind the source)", fontsize=10)
    fig.tight_layout(rect=(0, 0.13 if single else 0.08, 1, 0.93))
    with atomic_path(path) as temporary:
        fig.savefig(temporary, format="png", dpi=120)
    return path
