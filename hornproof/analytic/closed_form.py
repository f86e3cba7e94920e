"""Quadratic-phase (Fresnel-integral) aperture model of a rectangular horn.

Aperture field (TE10 cosine in x, uniform in y, quadratic phase from the flare apexes):

    E_y(x, y) = cos(πx/A) · exp(−jk (x²/(2R_h) + y²/(2R_e))),   |x| ≤ A/2, |y| ≤ B/2,

R_h, R_e the axial apex distances (geometry.py). The aperture integrals are separable and in
closed form (complete the square; Fresnel integrals):

    I_e(k_y) = ∫ exp(−jβ_e y² + j k_y y) dy                      (uniform, β_e = k/(2R_e))
    I_h(k_x) = ½ [J(k_x + π/A) + J(k_x − π/A)],  J(κ) = ∫ exp(−jβ_h x² + jκx) dx

(C. A. Balanis, *Antenna Theory: Analysis and Design*, 3rd ed., Wiley 2005, §13.2–13.4:
the E-plane sectoral, H-plane sectoral and pyramidal horn; the same result is classically
credited to Schelkunoff). Directivity and patterns follow from ``line_source``: boresight
D = (4π/λ²)|∫E dA|²/∫|E|² dA, cuts in the principal planes, the full (θ, φ) pattern, and the
2D counterpart of a sectoral horn's flared plane.

``phase_reference``: ``"axial"`` (default) puts the axial apex distance in the phase law, as
the geometry and Balanis do; ``"slant"`` puts the slant length (apex to aperture edge) there
instead, which is how the classical formula reads for horns sized by slant length (the phase
error then is T = B²/(8λρ_e) with ρ_e the slant length). The exact-phase model
(``exact_phase``) shows how far each is from the true path. Against the IEEE AP-S 1992 abstract
"Pyramidal horn gain calculation with improved accuracy" (doi:10.1109/APS.1992.221722: for
A or B = 5λ and S or T = 1λ the exact gain is lower by more than 0.7 dB), the slant convention
matches in the H-plane (−2.2 dB at S = 1) and in the E-plane away from its gain trough near
T ≈ 0.9; the axial convention never makes the H-plane exact gain lower, but at exactly
B = 5λ, T = 1 it is the one giving −1.4 dB (slant: +0.9 dB), because T = 1 sits just past
that trough. Pinned in tests/analytic/test_exact_phase.py.
"""

import numpy as np

from .. import units
from . import line_source
from .fresnel import fresnel, quadratic_phase_integral

__all__ = [
    "line_integral",
    "h_plane_integral",
    "e_plane_integral",
    "line_power",
    "boresight_directivity",
    "directivity",
    "principal_plane_cuts",
    "pattern",
    "directivity_2d",
    "flared_plane_cut_2d",
]


def _beta(apex, wavenumber):
    """Quadratic phase coefficient k/(2R), rad/m² (0 for R = inf)."""
    apex = np.asarray(apex, dtype=float)
    with np.errstate(divide="ignore"):
        return np.where(np.isfinite(apex), np.asarray(wavenumber, dtype=float) / (2.0 * apex), 0.0)


def line_integral(kappa, width, apex, wavenumber, taper="uniform"):
    """Aperture integral of one plane, ∫ taper(x) exp(−jk x²/(2R)) exp(jκx) dx, closed form.

    Parameters
    ----------
    kappa : array_like
        Transverse wavenumber, rad/m (k sinθ cosφ for the H-plane, k sinθ sinφ for the E-plane).
    width : float
        Aperture size in this plane (A or B), m.
    apex : float
        Apex distance in the phase law, m (``inf``: no phase error).
    wavenumber : array_like
        Free-space wavenumber k = 2π/λ, rad/m; broadcast with ``kappa``.
    taper : {"uniform", "cosine"}
        Uniform (E-plane) or cos(πx/width) (TE10 H-plane).

    Returns
    -------
    ndarray, complex, m
    """
    beta = _beta(apex, wavenumber)
    h = 0.5 * width
    kappa = np.asarray(kappa, dtype=float)
    if taper == "uniform":
        return quadratic_phase_integral(kappa, h, beta)
    if taper == "cosine":
        shift = np.pi / width
        return 0.5 * (quadratic_phase_integral(kappa + shift, h, beta)
                      + quadratic_phase_integral(kappa - shift, h, beta))
    raise ValueError(f"taper must be 'uniform' or 'cosine', got {taper!r}")


def h_plane_integral(kx, aperture_a, apex_h, wavenumber):
    """I_h(k_x) = ∫ cos(πx/A) exp(−jk x²/(2R_h)) exp(jk_x x) dx over |x| ≤ A/2 (m)."""
    return line_integral(kx, aperture_a, apex_h, wavenumber, "cosine")


def e_plane_integral(ky, aperture_b, apex_e, wavenumber):
    """I_e(k_y) = ∫ exp(−jk y²/(2R_e)) exp(jk_y y) dy over |y| ≤ B/2 (m)."""
    return line_integral(ky, aperture_b, apex_e, wavenumber, "uniform")


def line_power(width, apex, wavenumber, taper="uniform"):
    """∫|e|² across the plane (phase does not change it): width/2 (cosine) or width, m."""
    return np.full(np.shape(wavenumber), line_source.taper_power(width, taper))


def _integral(kappa, line, wavenumber):
    return line_integral(kappa, line.width, line.apex, wavenumber, line.taper)


def _power(line, wavenumber):
    return line_power(line.width, line.apex, wavenumber, line.taper)


def boresight_directivity(aperture_a, aperture_b, apex_h, apex_e, wavelength):
    """Boresight directivity (linear) of the quadratic-phase aperture, vectorised.

    Parameters
    ----------
    aperture_a, aperture_b : array_like
        Aperture width A (H-plane) and height B (E-plane), m.
    apex_h, apex_e : array_like
        Apex distances in the phase law (axial, or slant for ``phase_reference="slant"``), m;
        ``inf`` for an unflared plane.
    wavelength : array_like
        Free-space wavelength, m. All inputs broadcast.

    Returns
    -------
    ndarray
        D = (4π/λ²)·|I_h(0)|²·|I_e(0)|² / (A B / 2), with
        |I_h(0)|² = (λR_h/2)·{[C(u) − C(v)]² + [S(u) − S(v)]²},
        u, v = (1/√2)(√(λR_h)/A ± A/√(λR_h)), and
        |I_e(0)|² = 2λR_e·[C²(q) + S²(q)], q = B/√(2λR_e);
        the no-flare limits are (2A/π)² and B².

    References
    ----------
    C. A. Balanis, *Antenna Theory*, 3rd ed., §13.2–13.4 (E-plane sectoral, H-plane sectoral,
    pyramidal directivity; the u, v, q arguments are Balanis's with ρ1, ρ2 → R_e, R_h).
    """
    a, b, rh, re, wl = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in
                                            (aperture_a, aperture_b, apex_h, apex_e, wavelength)))
    # H-plane
    with np.errstate(divide="ignore", invalid="ignore"):
        flat_h = ~np.isfinite(rh) | (np.pi * a**2 / (4 * wl * rh) < 1e-10)  # edge phase 2πS
        rh_ = np.where(flat_h, 1.0, rh)
        root = np.sqrt(wl * rh_)
        u = (root / a + a / root) / np.sqrt(2.0)
        v = (root / a - a / root) / np.sqrt(2.0)
        cu, su = fresnel(u)
        cv, sv = fresnel(v)
        ih2 = np.where(flat_h, (2 * a / np.pi) ** 2, 0.5 * wl * rh_ * ((cu - cv) ** 2 + (su - sv) ** 2))
        # E-plane
        flat_e = ~np.isfinite(re) | (np.pi * b**2 / (4 * wl * re) < 1e-10)
        re_ = np.where(flat_e, 1.0, re)
        q = b / np.sqrt(2 * wl * re_)
        cq, sq = fresnel(q)
        ie2 = np.where(flat_e, b**2, 2 * wl * re_ * (cq**2 + sq**2))
    d = 4 * np.pi / wl**2 * ih2 * ie2 / (0.5 * a * b)
    return d[()] if d.ndim == 0 else d


def directivity(horn, frequency, *, phase_reference="axial"):
    """Boresight directivity (linear) of ``horn`` at ``frequency`` (Hz, array), closed form."""
    f = line_source.check_frequency(frequency)
    h_line, e_line = line_source.horn_line_sources(horn, phase_reference)
    return boresight_directivity(horn.aperture_a, horn.aperture_b, h_line.apex, e_line.apex,
                                 units.wavelength(f))


def principal_plane_cuts(horn, frequency, theta_deg, *, equivalent="huygens", phase_reference="axial"):
    """(H-plane, E-plane) directivity cuts, linear, shape frequency.shape + theta.shape.

    H-plane φ = 0, E-plane φ = 90°; θ in degrees, negative on the −x / −y side. Beyond 90°
    the same formula is evaluated (see ``line_source`` for what that means).
    """
    lines = line_source.horn_line_sources(horn, phase_reference)
    return line_source.principal_plane_cuts(_integral, _power, lines, frequency, theta_deg, equivalent)


def pattern(horn, frequency, theta_deg, phi_deg, *, equivalent="huygens", phase_reference="axial",
            components=False):
    """Full directivity pattern D(θ, φ) (linear) at one frequency; θ, φ in degrees, broadcast.

    ``components=True`` returns the complex (e_θ, e_φ) with D = |e_θ|² + |e_φ|².
    """
    lines = line_source.horn_line_sources(horn, phase_reference)
    return line_source.pattern(_integral, _power, lines, frequency, theta_deg, phi_deg, equivalent, components)


def directivity_2d(horn, frequency, *, phase_reference="axial"):
    """2D directivity D₂ = 2π|∫e dx|²/(λ∫|e|²dx) of a sectoral horn's flared plane (linear)."""
    _, line = line_source.flared_line_source(horn, phase_reference)
    return line_source.directivity_2d(_integral, _power, line, frequency)


def flared_plane_cut_2d(horn, frequency, theta_deg, *, equivalent="huygens", phase_reference="axial"):
    """2D directivity cut (linear) of a sectoral horn's flared plane; returns (plane, D₂)."""
    plane, line = line_source.flared_line_source(horn, phase_reference)
    return plane, line_source.cut_2d(_integral, _power, line, plane, frequency, theta_deg, equivalent)
