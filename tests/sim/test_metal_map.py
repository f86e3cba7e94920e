"""The material map Meep builds for a small pyramidal horn (fullwave: Meep assembles the cell).

What is checked: one cut per principal plane in 3D; the horn axis is free of metal along the
whole cell (the guide and the flare are open); the feed guide's wall sits where the layout
puts it (just outside the modelled inner half-width, within the modelled wall thickness).
"""

import numpy as np
import pytest

from hornproof.analytic.geometry import HornGeometry
from hornproof.sim.settings import FdtdSettings

WR90 = (22.86e-3, 10.16e-3)  # EIA RS-261 / IEC 60153-2 WR-90, 0.900 x 0.400 in (from memory)
SMALL = HornGeometry("pyramidal", *WR90, 45e-3, 35e-3, 40e-3, 1e-3)


@pytest.mark.fullwave
def test_metal_cuts_show_the_walls_where_the_layout_puts_them():
    from hornproof.sim.metal_map import metal_cuts

    layout, cuts = metal_cuts(SMALL, FdtdSettings(), 8, frequencies=np.array([9e9, 11e9]))
    assert [cut.name[:7] for cut in cuts] == ["H-plane", "E-plane"]
    for cut, inner in zip(cuts, (layout.guide_a, layout.guide_b)):
        eps = cut.permittivity
        n_transverse, n_z = eps.shape
        transverse = (np.arange(n_transverse) + 0.5) / n_transverse * cut.width - cut.width / 2
        z = layout.cell_center_z - layout.cell_size[-1] / 2 + (np.arange(n_z) + 0.5) / n_z * layout.cell_size[-1]
        axis_row = eps[int(np.argmin(np.abs(transverse)))]
        assert np.all(axis_row > 0), cut.name  # no metal on the axis
        column = eps[:, int(np.argmin(np.abs(z - layout.source_z / 2)))]  # across the feed guide
        wall = np.abs(np.abs(transverse) - (inner / 2 + layout.wall / 2)) < 0.25 * layout.wall
        assert np.all(column[wall] < 0), cut.name
        assert cut.guide_width == pytest.approx(inner)
