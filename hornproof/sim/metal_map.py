"""Where Meep puts metal: the material map of a horn model in its axial cuts.

Meep is asked for the material it actually assigned (``get_array`` of the dielectric), so the
map shows the staircase and the wall edges as modelled, not as intended. The drawing lives in
:mod:`hornproof.compare.report.model_image`; this module only gathers the arrays.
"""

from dataclasses import dataclass

import numpy as np

from ..units import SPEED_OF_LIGHT
from .layout import boundary_layers, plan_layout
from .walls import horn_geometry


@dataclass(frozen=True)
class MetalCut:
    """One axial cut of the modelled cell (lengths in Meep units, see :mod:`hornproof.sim.layout`).

    ``permittivity`` is Meep's dielectric map over the cut ([transverse, z]; metal reads < 0,
    a voxel with only some metal Yee points reads neither 1 nor < 0); ``width`` the transverse
    size of the cell, ``box_half`` the transverse half size of the near-to-far box and
    ``guide_width`` the feed guide's inner width in this cut.
    """

    name: str
    permittivity: np.ndarray
    width: float
    box_half: float
    guide_width: float


def metal_cuts(horn, settings, cells_per_wavelength, frequencies=None):
    """Lay out ``horn`` as :func:`hornproof.sim.run.simulate` would and read back its metal.

    ``frequencies`` (Hz) sets the band used for the layout; by default the TE10 band of the
    guide, 1.25 to 1.9 times cutoff. Collective under MPI: every rank must call it (every rank
    gets the whole arrays). Returns ``(layout, cuts)``: the :class:`~hornproof.sim.layout.Layout`
    and a list of :class:`MetalCut` (xz and yz in 3D, the flared plane in 2D).
    """
    import meep as mp  # lazy: the rest of hornproof imports without Meep

    if frequencies is None:
        f_c = SPEED_OF_LIGHT / (2 * horn.guide_a)
        frequencies = np.array([1.25 * f_c, 1.9 * f_c])
    layout = plan_layout(horn, frequencies, settings, cells_per_wavelength)
    sim = mp.Simulation(cell_size=mp.Vector3(*layout.cell_size), resolution=layout.resolution,
                        geometry=horn_geometry(layout), boundary_layers=boundary_layers(layout),
                        eps_averaging=False, dimensions=layout.dims)
    sim.init_sim()
    if layout.dims == 2:
        eps = sim.get_array(center=mp.Vector3(), size=mp.Vector3(*layout.cell_size), component=mp.Dielectric)
        guide = layout.guide_a if layout.transverse == "h" else layout.guide_b
        return layout, [MetalCut("flared plane (2D model)", eps, layout.cell_size[0], layout.box_half[0], guide)]
    cuts = []
    planes = (("H-plane cut (xz, y = 0)", 0, layout.guide_a), ("E-plane cut (yz, x = 0)", 1, layout.guide_b))
    for name, axis, guide in planes:
        size = [0.0, 0.0, layout.cell_size[2]]
        size[axis] = layout.cell_size[axis]
        eps = sim.get_array(center=mp.Vector3(), size=mp.Vector3(*size), component=mp.Dielectric)
        cuts.append(MetalCut(name, np.squeeze(eps), layout.cell_size[axis], layout.box_half[axis], guide))
    return layout, cuts
