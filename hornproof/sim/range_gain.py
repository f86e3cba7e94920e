"""FDTD range gain: what a probe on the horn's axis at distance R would infer (3D models).

G_R = 4π R² S_z(R) / P_rad (the Friis relation read backwards: a receiving probe at R sees the
power density S(R); P_rad the power the horn radiates, here the box flux, as for directivity).
S = Re(E* × H) in Meep's flux convention (no factor ½; :mod:`.pattern`), E and H at the field
point from the equivalent currents on the near-to-far surface with the full free-space Green's
function: the numpy route (:mod:`.point_transform`) for the "fast" far-field method, Meep's own
``get_farfield`` (which evaluates at any point, near or far) for the "meep" method. R is
measured from the aperture plane along the axis.
"""

import numpy as np

from ..units import db10
from .point_transform import point_fields
from .surface import current_sheets, far_fields


def axial_points(layout, distances_m):
    """Meep-cell coordinates [nR, 3] of the on-axis points ``distances_m`` (m) beyond the aperture."""
    z = layout.flare_length - layout.cell_center_z + np.asarray(distances_m, dtype=float) / layout.unit_length
    return np.stack([np.zeros_like(z), np.zeros_like(z), z], axis=1)


def range_gain_dbi(sim, monitors, layout, meep_frequencies, radiated_power, distances_m):
    """Range gain in dBi, [nf, nR], of a 3D model at ``distances_m`` (m) on the axis."""
    if layout.dims != 3:
        raise ValueError("range gain: 3D models only")
    points = axial_points(layout, distances_m)
    nf = len(meep_frequencies)
    if isinstance(monitors, list):  # the "fast" route: Yee-grid current sheets
        e, h = point_fields(current_sheets(sim, monitors, nf, 3), points, meep_frequencies)
    else:
        import meep as mp

        e, h = far_fields(sim, monitors, [mp.Vector3(*p) for p in points], nf)
    s_z = np.real(np.cross(np.conj(e), h))[..., 2]  # [nf, nR]
    r = np.asarray(distances_m, dtype=float) / layout.unit_length
    return db10(4 * np.pi * r[None, :] ** 2 * s_z / np.asarray(radiated_power, dtype=float)[:, None])
