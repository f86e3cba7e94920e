"""model.png drawn from a material map (synthetic map written here, no Meep needed).

What is checked: the grey levels (metal, wall edge, vacuum) follow the sign convention of
Meep's dielectric arrays (metal reads < 0, vacuum 1, a part-metal voxel in between), and the
image is a complete PNG written atomically (no temporary file left beside it).
"""

import numpy as np

from hornproof.analytic.geometry import HornGeometry
from hornproof.compare.report.model_image import metal_levels, model_image
from hornproof.sim.metal_map import MetalCut
from hornproof.sim.layout import plan_layout
from hornproof.sim.settings import FdtdSettings

WR90 = (22.86e-3, 10.16e-3)  # EIA RS-261 / IEC 60153-2 WR-90, 0.900 x 0.400 in (from memory)
SMALL = HornGeometry("pyramidal", *WR90, 45e-3, 35e-3, 40e-3, 1e-3)


def test_metal_levels():
    assert metal_levels([[-1e20, 1.0, 0.4, 1.0 + 1e-9]]).tolist() == [[1.0, 0.0, 0.5, 0.0]]


def test_model_image_writes_a_png(tmp_path):
    layout = plan_layout(SMALL, np.array([9e9, 11e9]), FdtdSettings(), 8)
    n_x, n_z = (int(round(s * layout.resolution)) for s in (layout.cell_size[0], layout.cell_size[-1]))
    eps = np.ones((n_x, n_z))
    eps[:3] = -1e20  # a synthetic wall along one side
    cuts = [MetalCut("H-plane cut (xz, y = 0)", eps, layout.cell_size[0], layout.box_half[0], layout.guide_a)]
    path = model_image(layout, cuts, tmp_path / "model.png")
    data = (tmp_path / "model.png").read_bytes()
    assert path == tmp_path / "model.png" and data[:8] == b"\x89PNG\r\n\x1a\n" and len(data) > 1000
    assert [p.name for p in tmp_path.iterdir()] == ["model.png"]
