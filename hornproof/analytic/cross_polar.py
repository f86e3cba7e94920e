"""Co- and cross-polar components by Ludwig's third definition, and two reference sources.

For a horn whose principal polarisation is along y (TE10, as everywhere in hornproof), Ludwig's
third definition takes as reference the field of a Huygens source polarised along y:

    co = sinφ θ̂ + cosφ φ̂,   cross = cosφ θ̂ − sinφ φ̂,

so E_co = sinφ E_θ + cosφ E_φ and E_cross = cosφ E_θ − sinφ E_φ. In the principal planes
(φ = 0°, 90°) a symmetric horn radiates no cross-polar field at all; the 45° (diagonal) plane
is where it shows.

References
----------
A. C. Ludwig, "The definition of cross polarization", IEEE Trans. Antennas Propag. AP-21
(1973) 116–119 (definition 3). The two sources below are textbook fields (C. A. Balanis,
*Antenna Theory*, 3rd ed., ch. 4 for the short dipole and §12.5 for the Huygens element;
chapter numbers from memory).

Notes
-----
The aperture models' two equivalents differ here: the Huygens equivalent (electric and
magnetic currents of a plane wave, ``line_source.EQUIVALENTS``) has element factor
(1 + cosθ)/2 · (sinφ θ̂ + cosφ φ̂), exactly Ludwig-3 co-polar, so its cross-polar field is zero
everywhere; the E-field (magnetic-current, ground-plane) equivalent has sinφ θ̂ + cosθ cosφ φ̂,
whose cross-polar part is sinφ cosφ (1 − cosθ) times the aperture integral. A cross-polar level
from an aperture model therefore says which equivalent it used. Pure numpy.
"""

import numpy as np

from .phase_centre import main_lobe_window


def ludwig3(e_theta, e_phi, phi_rad):
    """(co, cross) components of (E_θ, E_φ) at azimuth φ (rad), reference polarisation y."""
    s, c = np.sin(phi_rad), np.cos(phi_rad)
    return s * e_theta + c * e_phi, c * e_theta - s * e_phi


def huygens_source(theta_rad, phi_rad):
    """(E_θ, E_φ) of a y-polarised Huygens source (balanced electric and magnetic currents).

    Element factor (1 + cosθ)/2 (sinφ θ̂ + cosφ φ̂), directivity 3 at boresight:
    D = 3 ((1 + cosθ)/2)².
    """
    theta_rad, phi_rad = np.broadcast_arrays(np.asarray(theta_rad, float), np.asarray(phi_rad, float))
    amp = np.sqrt(3.0) * 0.5 * (1 + np.cos(theta_rad))
    return amp * np.sin(phi_rad), amp * np.cos(phi_rad)


def short_dipole(theta_rad, phi_rad):
    """(E_θ, E_φ) of a short electric dipole along y: D = 1.5 (1 − (r̂·ŷ)²) = |E_θ|² + |E_φ|².

    E ∝ the part of ŷ transverse to r̂: E_θ = θ̂·ŷ = cosθ sinφ, E_φ = φ̂·ŷ = cosφ.
    """
    theta_rad, phi_rad = np.broadcast_arrays(np.asarray(theta_rad, float), np.asarray(phi_rad, float))
    amp = np.sqrt(1.5)
    return amp * np.cos(theta_rad) * np.sin(phi_rad), amp * np.cos(phi_rad) * np.ones_like(theta_rad)


def peak_cross_polar(theta_deg, co, cross, *, max_angle_deg=90.0, main_lobe_db=None):
    """Peak cross-polar level relative to the co-polar peak, and its angle, on one cut.

    Parameters
    ----------
    theta_deg : array_like [nθ]
        Cut angles, degrees (signed).
    co, cross : array_like [..., nθ]
        Co- and cross-polar fields (complex or real amplitudes on a common scale).
    max_angle_deg : float
        Only |θ| ≤ this counts (default 90°: the front hemisphere).
    main_lobe_db : float, optional
        If given (negative), only the co-polar main lobe down to this level below its peak
        counts (``phase_centre.main_lobe_window``): where a feed actually illuminates.

    Returns
    -------
    (level_db, angle_deg) : arrays [...]
        ``level_db`` = max |cross|² / max |co|² in dB (−inf when the cross-polar field is exactly
        zero), ``angle_deg`` where the cross-polar peak is (NaN when it is zero or all NaN).
    """
    theta = np.asarray(theta_deg, dtype=float)
    front = np.abs(theta) <= max_angle_deg
    p_co_all = np.abs(np.asarray(co)) ** 2
    p_x_all = np.abs(np.asarray(cross)) ** 2
    lead = p_co_all.shape[:-1]
    p_co_all = p_co_all.reshape(-1, theta.size)
    p_x_all = p_x_all.reshape(-1, theta.size)
    level = np.full(p_co_all.shape[0], np.nan)
    angle = np.full(p_co_all.shape[0], np.nan)
    for i in range(p_co_all.shape[0]):
        keep = front.copy()
        if main_lobe_db is not None:
            with np.errstate(divide="ignore"):
                lobe = main_lobe_window(theta, 10 * np.log10(p_co_all[i]), main_lobe_db, max_angle_deg)
            keep = np.zeros_like(front)
            keep[lobe] = True
        p_co, p_x = p_co_all[i, keep], p_x_all[i, keep]
        if not (np.any(np.isfinite(p_co)) and np.any(np.isfinite(p_x))):
            continue
        peak_co = np.nanmax(p_co)
        j = int(np.nanargmax(p_x))
        if p_x[j] <= 0:
            level[i] = -np.inf
            continue
        level[i] = 10 * np.log10(p_x[j] / peak_co)
        angle[i] = theta[keep][j]
    return level.reshape(lead), angle.reshape(lead)
