"""Fields of the equivalent surface currents at a point at any distance (full Green's function).

The far-zone transform (:mod:`.farfield_transform`) keeps only the 1/r terms, which is right at
r → ∞ but not at a test-range distance of a few aperture sizes. Here every current sample is a
point source and its exact free-space field is summed at the field point, in Meep's e^{−iωt}
convention with ε0 = μ0 = 1 (η = 1, k = ω):

    E = i k ψ [ (1 + i/(kR) − 1/(kR)²) J − (1 + 3i/(kR) − 3/(kR)²)(R̂·J) R̂ ] − (ik − 1/R) ψ R̂ × M
    H = i k ψ [ same dyadic acting on M ] + (ik − 1/R) ψ R̂ × J,      ψ = e^{ikR}/(4πR),

R the vector from the sample to the field point: the electric-dipole field iωμ Ḡ·J with
Ḡ = (I + ∇∇/k²)ψ, its magnetic dual, and H = ∇ × (ψ J) (C. A. Balanis, *Antenna Theory*,
3rd ed., §4.2 "infinitesimal dipole", exact fields, and ch. 12 for the equivalent currents;
from memory). For kR → ∞ the 1/R terms alone remain and this equals the far-zone transform
(tested). Meep's own near2far sums the same point-source fields (its green3d). 3D only.

Used for the FDTD range gain: G_R = 4π R² Re(E* × H)·ẑ / P_rad on the axis, the same power
convention as Meep's flux (no factor ½; :mod:`.pattern`).
"""

import numpy as np

__all__ = ["sheet_positions", "point_fields"]


def sheet_positions(sheet):
    """Sample positions [n, 3] (Meep units) of a 3D ``CurrentSheet``, in its amplitude's order."""
    a0, a1 = sheet.axes
    c0, c1 = sheet.coordinates
    grid0, grid1 = np.meshgrid(c0, c1, indexing="ij")
    positions = np.empty((grid0.size, 3))
    positions[:, a0] = grid0.ravel()
    positions[:, a1] = grid1.ravel()
    positions[:, sheet.normal_axis] = sheet.normal_position
    return positions


def _dyadic(vector, r_hat, kr):
    """[(1 + i/kR − 1/kR²) v − (1 + 3i/kR − 3/kR²)(R̂·v) R̂] for v [n, 3] (complex)."""
    a = 1 + 1j / kr - 1 / kr**2
    b = 1 + 3j / kr - 3 / kr**2
    along = np.sum(r_hat * vector, axis=1)
    return a[:, None] * vector - (b * along)[:, None] * r_hat


def point_fields(sheets, points, meep_frequencies):
    """E and H [nf, np, 3] at ``points`` [np, 3] (Meep units) from 3D current ``sheets``.

    ``meep_frequencies`` [nf] in Meep units (k = 2πf).
    """
    points = np.atleast_2d(np.asarray(points, dtype=float))
    k_all = 2 * np.pi * np.asarray(meep_frequencies, dtype=float)
    nf, npoints = k_all.size, points.shape[0]
    e = np.zeros((nf, npoints, 3), dtype=complex)
    h = np.zeros_like(e)
    for sheet in sheets:
        if len(sheet.axes) != 2:
            raise ValueError("point_fields: 3D current sheets only")
        positions = sheet_positions(sheet)
        amplitude = np.asarray(sheet.amplitude).reshape(nf, -1)  # [nf, n]
        for p, point in enumerate(points):
            separation = point[None, :] - positions
            distance = np.sqrt(np.sum(separation**2, axis=1))
            r_hat = separation / distance[:, None]
            cross = np.cross(r_hat, sheet.direction[None, :])  # R̂ × unit direction
            for f, k in enumerate(k_all):
                kr = k * distance
                psi = np.exp(1j * kr) / (4 * np.pi * distance)
                currents = amplitude[f][:, None] * sheet.direction[None, :]  # [n, 3]
                near = 1j * k * psi[:, None] * _dyadic(currents, r_hat, kr)
                curl = ((1j * k - 1 / distance) * psi * amplitude[f])[:, None] * cross
                if sheet.magnetic:
                    h[f, p] += near.sum(axis=0)
                    e[f, p] -= curl.sum(axis=0)
                else:
                    e[f, p] += near.sum(axis=0)
                    h[f, p] += curl.sum(axis=0)
    return e, h
