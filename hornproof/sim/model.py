"""A picture of the modelled horn (``model_image``): the metal of the Meep model in its axial cuts.

The cell layout is in :mod:`hornproof.sim.layout`, the walls and mirror planes in
:mod:`hornproof.sim.walls`. Meep and matplotlib are imported inside ``model_image`` (slow to
import, and only this picture needs matplotlib).
"""

import numpy as np

from ..units import SPEED_OF_LIGHT
from .layout import boundary_layers, plan_layout
from .walls import horn_geometry


def model_image(horn, settings, cells_per_wavelength, path, frequencies=None):
    """Write a PNG of the modelled metal in the two axial cuts (xz and yz; one cut in 2D).

    ``frequencies`` (Hz) sets the band used for the layout; by default the TE10 band of the
    guide, 1.25 to 1.9 times cutoff. Only the MPI master writes the file. Returns ``path``.
    """
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    import meep as mp

    if frequencies is None:
        f_c = SPEED_OF_LIGHT / (2 * horn.guide_a)
        frequencies = np.array([1.25 * f_c, 1.9 * f_c])
    layout = plan_layout(horn, frequencies, settings, cells_per_wavelength)
    sim = mp.Simulation(cell_size=mp.Vector3(*layout.cell_size), resolution=layout.resolution,
                        geometry=horn_geometry(layout), boundary_layers=boundary_layers(layout),
                        eps_averaging=False, dimensions=layout.dims)
    sim.init_sim()
    mm = layout.unit_length * 1e3
    cuts = []
    if layout.dims == 3:
        for name, size in (("H-plane cut (xz, y = 0)", mp.Vector3(layout.cell_size[0], 0, layout.cell_size[2])),
                           ("E-plane cut (yz, x = 0)", mp.Vector3(0, layout.cell_size[1], layout.cell_size[2]))):
            eps = sim.get_array(center=mp.Vector3(), size=size, component=mp.Dielectric)
            cuts.append((name, np.squeeze(eps), layout.cell_size[0 if "xz" in name else 1]))
    else:
        eps = sim.get_array(center=mp.Vector3(), size=mp.Vector3(*layout.cell_size), component=mp.Dielectric)
        cuts.append(("flared plane (2D model)", eps, layout.cell_size[0]))
    if mp.am_master():
        fig, axes = plt.subplots(1, len(cuts), figsize=(5 * len(cuts), 6.5 if len(cuts) == 1 else 6), squeeze=False)
        z0 = layout.cell_center_z - layout.cell_size[-1] / 2
        for ax, (name, eps, width) in zip(axes[0], cuts):
            # get_array averages the Yee-point materials of each voxel: a voxel with some
            # metal points reads neither 1 nor < 0; draw those half-dark (wall edges)
            metal = np.where(eps < 0, 1.0, np.where(np.abs(eps - 1.0) > 1e-6, 0.5, 0.0))
            extent = [z0 * mm, (z0 + layout.cell_size[-1]) * mm, -width / 2 * mm, width / 2 * mm]
            ax.imshow(metal, origin="lower", extent=extent, cmap="Greys", aspect="equal", interpolation="nearest")
            from matplotlib.patches import Patch, Rectangle

            inner_low, inner_high = (z0 + layout.pml_back) * mm, (z0 + layout.cell_size[-1] - layout.pml) * mm
            half = width / 2 * mm - layout.pml * mm
            ax.add_patch(Rectangle((inner_low, -half), inner_high - inner_low, 2 * half, fill=False,
                                   edgecolor="tab:red", lw=0.7, ls="--", label="inner edge of the PML"))
            box_half = layout.box_half[0 if "xz" in name or layout.dims == 2 else 1] * mm
            ax.add_patch(Rectangle((layout.box_z[0] * mm, -box_half), (layout.box_z[1] - layout.box_z[0]) * mm,
                                   2 * box_half, fill=False, edgecolor="tab:blue", lw=0.8,
                                   label="near-to-far / flux surface"))
            guide = (layout.guide_a if ("xz" in name or layout.transverse == "h") else layout.guide_b) * mm
            ax.vlines(layout.source_z * mm, -guide / 2, guide / 2, color="tab:orange", lw=1.5,
                      label="feed source sheet")
            handles, _ = ax.get_legend_handles_labels()
            handles = [Patch(facecolor="black", label="PEC wall (every Yee point metal)"),
                       Patch(facecolor="0.55", label="wall edge (some Yee points metal)")] + handles
            ax.set_title(f"{name}\nwall modelled {layout.wall_thickness_m * 1e3:.3g} mm, "
                         f"{layout.resolution:g} cells/λ at f_max", fontsize=9)
            ax.set_xlabel("z (mm)")
            ax.set_ylabel("transverse (mm)")
        fig.legend(handles=handles, loc="lower center", ncol=3 if len(cuts) > 1 else 2, fontsize=8, frameon=False)
        fig.suptitle("Modelled horn\n(the feed guide runs on into the PML behind the source)", fontsize=10)
        fig.tight_layout(rect=(0, 0.08 if len(cuts) > 1 else 0.13, 1, 0.93))
        fig.savefig(path, dpi=120)
        plt.close(fig)
    return path
