"""Far-field directions, radiation intensity, polarisation and directivity from far E and H.

Power convention: Meep's flux is Re ∮ (E* × H) · n dA with no factor ½ (DFT amplitudes). The
far-field Poynting vector is formed the same way, S = Re(E* × H), so directivity
D = 4π r² S_r / P_rad (3D) or D₂ = 2π r S_r / P′ (2D, per unit length) is a ratio of like
quantities. Mixing conventions halves (or doubles) D.

Both far-field routes (:mod:`hornproof.sim.surface`) give E and H in the same form, so this
module serves either. Pure numpy.
"""

import numpy as np


def radiation_intensity(e, h, directions, distance, dims=3):
    """U = r² Re(E* × H)·r̂ (3D) or U′ = r Re(E* × H)·r̂ (2D), same convention as Meep's flux.

    ``directions`` [npoints, 3] unit vectors; ``e``, ``h`` [nf, npoints, 3].
    """
    poynting = np.real(np.cross(np.conj(e), h))
    radial = np.einsum("fpk,pk->fp", poynting, np.asarray(directions, dtype=float))
    return radial * (distance**2 if dims == 3 else distance)


def polarisation_split(e, co_vectors, cross_vectors):
    """Fractions of |E|² in the co- and cross-polar unit vectors (Ludwig's third definition).

    Reference: A. C. Ludwig, "The definition of cross polarization", IEEE Trans. Antennas
    Propag. 21 (1973) 116–119 (definition 3). ``co_vectors``, ``cross_vectors`` [npoints, 3].
    """
    co = np.abs(np.einsum("fpk,pk->fp", e, co_vectors)) ** 2
    cross = np.abs(np.einsum("fpk,pk->fp", e, cross_vectors)) ** 2
    total = co + cross
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(total > 0, co / total, 0.0), np.where(total > 0, cross / total, 0.0)


def cut_directions(theta_deg, plane):
    """Unit directions and Ludwig-3 co/cross vectors (E along y) on a principal-plane cut.

    ``plane`` "h" (xz, φ = 0) or "e" (yz, φ = 90°); θ from the z axis, negative on the −x / −y
    side. Returns (directions, co, cross), each [nθ, 3] in (x, y, z).
    """
    th = np.radians(np.asarray(theta_deg, dtype=float))
    zeros = np.zeros_like(th)
    if plane == "h":
        directions = np.stack([np.sin(th), zeros, np.cos(th)], axis=1)
        # φ = 0: co = φ̂ = ŷ, cross = θ̂
        co = np.tile([0.0, 1.0, 0.0], (th.size, 1))
        cross = np.stack([np.cos(th), zeros, -np.sin(th)], axis=1)
    elif plane == "e":
        directions = np.stack([zeros, np.sin(th), np.cos(th)], axis=1)
        # φ = 90°: co = θ̂ (in the yz plane), cross = −φ̂ = x̂
        co = np.stack([zeros, np.cos(th), -np.sin(th)], axis=1)
        cross = np.tile([1.0, 0.0, 0.0], (th.size, 1))
    else:
        raise ValueError(f"plane must be 'h' or 'e', got {plane!r}")
    return directions, co, cross


def sphere_directions(theta_deg, phi_deg):
    """Unit directions [nθ·nφ, 3] and Ludwig-3 co/cross vectors for E along y."""
    th, ph = np.meshgrid(np.radians(theta_deg), np.radians(phi_deg), indexing="ij")
    th, ph = th.ravel(), ph.ravel()
    directions = np.stack([np.sin(th) * np.cos(ph), np.sin(th) * np.sin(ph), np.cos(th)], axis=1)
    theta_hat = np.stack([np.cos(th) * np.cos(ph), np.cos(th) * np.sin(ph), -np.sin(th)], axis=1)
    phi_hat = np.stack([-np.sin(ph), np.cos(ph), np.zeros_like(ph)], axis=1)
    co = np.sin(ph)[:, None] * theta_hat + np.cos(ph)[:, None] * phi_hat
    cross = np.cos(ph)[:, None] * theta_hat - np.sin(ph)[:, None] * phi_hat
    return directions, co, cross


def sphere_power(intensity, theta_deg, phi_deg):
    """∮ U dΩ by the trapezoidal rule on a (θ, φ) grid; ``intensity`` [nf, nθ, nφ].

    φ must cover [0, 360) uniformly (periodic); θ must run from 0 to 180 degrees.
    """
    th = np.radians(np.asarray(theta_deg, dtype=float))
    dphi = 2 * np.pi / len(phi_deg)
    over_phi = intensity.sum(axis=2) * dphi
    return np.trapz(over_phi * np.sin(th)[None, :], th, axis=1)


def directivity(intensity, radiated_power, dims=3):
    """D = 4π U / P (3D) or D₂ = 2π U′ / P′ (2D); ``radiated_power`` [nf]."""
    full_angle = 4 * np.pi if dims == 3 else 2 * np.pi
    power = np.asarray(radiated_power, dtype=float)
    return full_angle * intensity / power.reshape((-1,) + (1,) * (np.ndim(intensity) - 1))

