"""Conductor loss of a horn's walls: the TE10 attenuation of the feed guide and of the flare.

Feed guide: the TE10 conductor attenuation of a rectangular guide with walls of surface
resistance R_s (D. M. Pozar, *Microwave Engineering*, 4th ed., §3.3, "TE10 mode of a
rectangular waveguide", attenuation due to conductor loss; equation from memory):

    α_c = R_s (2 b π² + a³ k²) / (a³ b β k η0)   Np/m (field),

β the TE10 propagation constant, k = ω/c. The term 2bπ² is the loss on the two narrow side
walls (x = ±a/2), a³k² = π²a + β²a³ the loss on the two broad walls (y = ±b/2). The power
attenuation in dB is 20 log10(e) · α_c ≈ 8.686 α_c per metre.

Flare (the approximation): each axial slice dz of the flare is treated as a short piece of
rectangular guide of the local width a(z) and height b(z) (linear from the guide's a, b to the
aperture's A, B), carrying the TE10 mode with that guide's β(z), and the attenuation is
integrated along z (Gauss–Legendre). A wall that flares by its half-angle ψ has 1/cos ψ more
area per dz than a parallel wall, so its term is multiplied by 1/cos ψ. What this leaves out:
the field in a flare is a cylindrical (sectoral) or near-spherical wave, not a guide mode; the
slice picture holds where the walls are close to parallel and the slice is well above its own
cutoff. It fails near a local cutoff (α grows without bound there; the throat guide is above
cutoff by the case's band check, and the flare only widens) and says nothing of higher modes a
wide, abrupt flare excites. Once a slice is many wavelengths wide, the side-wall term is small
and the loss tends to that of a parallel-plate guide, R_s/(η0 b) per metre. The number reported
as the approximation's uncertainty is the difference between the loss with and without the
1/cos ψ factor: a scale of how much the wall geometry matters, not a bound.

Roughness multiplies α by the Hammerstad–Jensen factor (``roughness``).

Gain then follows from directivity (IEEE Std 145-2013: G = e_rad D): the radiation efficiency
is the fraction of the power entering the flare (after the feed guide) that is not dissipated,
e_rad = 10^(−L/10) with L the loss in dB; wall loss of the feed guide counts too when the case
gives its length.
"""

from dataclasses import dataclass, field

import numpy as np

from ..units import FREE_SPACE_IMPEDANCE, SPEED_OF_LIGHT
from .roughness import hammerstad_jensen_factor, surface_resistance
from .waveguide import te10_cutoff_frequency

__all__ = ["NEPER_TO_DB", "te10_attenuation", "flare_attenuation", "WallLoss", "horn_wall_loss"]

#: dB per neper of field attenuation, 20 log10(e) (exact)
NEPER_TO_DB = 20.0 / np.log(10.0)
#: Gauss–Legendre nodes along the flare (the integrand is smooth: 32 is exact to ~1e-12 here)
FLARE_NODES = 32


def te10_attenuation(frequency, guide_a, guide_b, conductivity, *, side_factor=1.0, broad_factor=1.0):
    """TE10 conductor attenuation α_c of a rectangular guide, Np/m (Pozar §3.3; module notes).

    Parameters
    ----------
    frequency : array_like
        Hz.
    guide_a, guide_b : array_like
        Inner width a (H-plane) and height b (E-plane), m; broadcast with ``frequency``.
    conductivity : float
        Wall conductivity σ, S/m.
    side_factor, broad_factor : array_like
        Multipliers of the side-wall and broad-wall terms (1/cos ψ for a flared wall).

    Returns
    -------
    ndarray
        α_c in Np/m (field attenuation); NaN at or below the TE10 cutoff.
    """
    f = np.asarray(frequency, dtype=float)
    a = np.asarray(guide_a, dtype=float)
    b = np.asarray(guide_b, dtype=float)
    k = 2 * np.pi * f / SPEED_OF_LIGHT
    ratio = 1.0 - (te10_cutoff_frequency(a) / f) ** 2
    with np.errstate(invalid="ignore", divide="ignore"):
        beta = np.where(ratio > 0, k * np.sqrt(np.abs(ratio)), np.nan)
        rs = surface_resistance(f, conductivity)
        side = 2.0 * b * np.pi**2 * np.asarray(side_factor, dtype=float)
        broad = a**3 * k**2 * np.asarray(broad_factor, dtype=float)
        return rs * (side + broad) / (a**3 * b * beta * k * FREE_SPACE_IMPEDANCE)


def flare_attenuation(horn, frequency, conductivity, *, slant=True, nodes=FLARE_NODES):
    """∫ α_c(z) dz over the flare (nepers, field), slice by slice as local guides.

    ``slant``: multiply each flared wall's term by 1/cos ψ of its flare half-angle.
    Shape of ``frequency``.
    """
    f = np.asarray(frequency, dtype=float)
    t, w = np.polynomial.legendre.leggauss(nodes)
    s = 0.5 * (t + 1.0)  # 0 … 1 along the flare
    a = horn.guide_a + (horn.aperture_a - horn.guide_a) * s
    b = horn.guide_b + (horn.aperture_b - horn.guide_b) * s
    side = 1.0 / np.cos(horn.flare_half_angle_h) if slant else 1.0
    broad = 1.0 / np.cos(horn.flare_half_angle_e) if slant else 1.0
    alpha = te10_attenuation(f[..., None], a, b, conductivity, side_factor=side, broad_factor=broad)
    return 0.5 * horn.flare_length * np.sum(alpha * w, axis=-1)


@dataclass(frozen=True)
class WallLoss:
    """Wall loss of one horn over the band (arrays aligned with ``frequencies``; dB are power).

    Attributes
    ----------
    frequencies : ndarray, Hz
    feed_db_per_m : ndarray
        Attenuation of the feed guide, dB/m (roughness included).
    feed_db : ndarray
        Loss of the feed guide over ``feed_length``, dB.
    flare_db : ndarray
        Loss of the flare, dB (with the 1/cos ψ wall-area factor, roughness included).
    flare_db_parallel : ndarray
        The same without the 1/cos ψ factor.
    total_db : ndarray
        feed_db + flare_db.
    approximation_db : ndarray
        |flare_db − flare_db_parallel|: the scale of the slice approximation (module notes).
    roughness_factor : ndarray
        Hammerstad–Jensen factor applied (1 for a smooth wall).
    radiation_efficiency : ndarray
        10^(−total_db/10).
    feed_length : float, m
    """

    frequencies: np.ndarray
    feed_db_per_m: np.ndarray
    feed_db: np.ndarray
    flare_db: np.ndarray
    flare_db_parallel: np.ndarray
    total_db: np.ndarray
    approximation_db: np.ndarray
    roughness_factor: np.ndarray
    radiation_efficiency: np.ndarray
    feed_length: float
    notes: tuple = field(default=())


def horn_wall_loss(horn, frequency, material, *, feed_length=0.0):
    """Conductor loss of the feed guide (length ``feed_length``, m) and the flare of ``horn``.

    Parameters
    ----------
    horn : HornGeometry
    frequency : array_like, Hz
    material : materials.WallMaterial
    feed_length : float
        Length of feed guide in front of the throat to include, m (0: the flare alone).

    Returns
    -------
    WallLoss
    """
    f = np.atleast_1d(np.asarray(frequency, dtype=float))
    if not (np.isfinite(feed_length) and feed_length >= 0):
        raise ValueError(f"feed_length must be a non-negative length in m, got {feed_length!r}")
    rough = hammerstad_jensen_factor(f, material.conductivity, material.roughness_rms)
    feed_np = te10_attenuation(f, horn.guide_a, horn.guide_b, material.conductivity) * rough
    flare = flare_attenuation(horn, f, material.conductivity, slant=True) * rough * NEPER_TO_DB
    parallel = flare_attenuation(horn, f, material.conductivity, slant=False) * rough * NEPER_TO_DB
    feed_db_per_m = feed_np * NEPER_TO_DB
    feed_db = feed_db_per_m * feed_length
    total = feed_db + flare
    return WallLoss(frequencies=f, feed_db_per_m=feed_db_per_m, feed_db=feed_db, flare_db=flare,
                    flare_db_parallel=parallel, total_db=total,
                    approximation_db=np.abs(flare - parallel), roughness_factor=rough,
                    radiation_efficiency=10.0 ** (-total / 10.0), feed_length=float(feed_length))
