"""Gain reduction from the flare's phase error, per plane.

The directivity of the separable aperture is (4π/λ²)·A·B·η_taper·η_h·η_e, with η_taper the
cosine taper's 8/π² and η_h, η_e the *phase efficiencies*: the plane's aperture-integral
efficiency |∫e dx|² / (w ∫|e|² dx) with the phase error, divided by the same without it. The
reduction in dB is −10 log10 η (positive: what the phase error costs).

Closed form (quadratic phase): η depends only on the peak phase error — S = A²/(8λR_h) in the
H-plane, T = B²/(8λR_e) in the E-plane (wavelengths) — through
    η_h(S) = |∫₋₁¹ cos(πt/2) e^{−j2πSt²} dt|² / (4/π)²,
    η_e(T) = |∫₋₁¹ e^{−j2πTt²} dt|² / 2²,
evaluated with Fresnel integrals (Balanis, *Antenna Theory*, 3rd ed., §13.2–13.4; the gain
reduction factors are classically Schelkunoff's).

Exact path: η depends on the aperture in wavelengths as well (the true phase
k(√(R² + x²) − R) is not a function of S alone); it is computed from the aperture size, the
axial apex distance and the wavelength, or from S or T and the size with a stated convention
(``phase_reference="axial"``: the given phase error uses the axial apex distance, as in
geometry.py; ``"slant"``: it uses the slant length, as in texts that size horns by slant
length).
"""

import numpy as np

from . import exact_phase
from .fresnel import quadratic_phase_integral
from .line_source import taper_efficiency

__all__ = [
    "h_plane_efficiency",
    "e_plane_efficiency",
    "h_plane_reduction_db",
    "e_plane_reduction_db",
    "apex_for_phase_error",
    "exact_efficiency",
    "exact_reduction_db",
    "exact_reduction_from_phase_error_db",
]


def _check_phase_error(value, name):
    value = np.asarray(value, dtype=float)
    if np.any(~np.isfinite(value)) or np.any(value < 0):
        raise ValueError(f"{name} must be a finite peak phase error ≥ 0 in wavelengths, got {value!r}")
    return value


def h_plane_efficiency(phase_error_h):
    """H-plane phase efficiency η_h(S) of the cosine-tapered aperture (quadratic phase).

    Parameters
    ----------
    phase_error_h : array_like
        Peak phase error S = A²/(8λR_h), wavelengths.
    """
    s = _check_phase_error(phase_error_h, "phase_error_h")
    beta = 2 * np.pi * s  # phase 2πS t² over t ∈ [−1, 1]
    g = 0.5 * (quadratic_phase_integral(0.5 * np.pi, 1.0, beta) + quadratic_phase_integral(-0.5 * np.pi, 1.0, beta))
    return np.abs(g) ** 2 / (4 / np.pi) ** 2


def e_plane_efficiency(phase_error_e):
    """E-plane phase efficiency η_e(T) of the uniform aperture (quadratic phase).

    Parameters
    ----------
    phase_error_e : array_like
        Peak phase error T = B²/(8λR_e), wavelengths.
    """
    t = _check_phase_error(phase_error_e, "phase_error_e")
    return np.abs(quadratic_phase_integral(0.0, 1.0, 2 * np.pi * t)) ** 2 / 4.0


def h_plane_reduction_db(phase_error_h):
    """H-plane gain reduction −10 log10 η_h(S), dB (≥ 0)."""
    return 0.0 - 10 * np.log10(h_plane_efficiency(phase_error_h))


def e_plane_reduction_db(phase_error_e):
    """E-plane gain reduction −10 log10 η_e(T), dB (≥ 0)."""
    return 0.0 - 10 * np.log10(e_plane_efficiency(phase_error_e))


def apex_for_phase_error(phase_error, aperture, wavelength, phase_reference="axial"):
    """Axial apex distance (m) that gives ``phase_error`` = D²/(8λρ) across ``aperture``.

    ``phase_reference="axial"``: ρ is the axial distance itself. ``"slant"``: ρ is the slant
    length, so the axial distance is √(ρ² − (D/2)²); ValueError if ρ ≤ D/2 (no such horn).
    """
    p = _check_phase_error(phase_error, "phase_error")
    if np.any(p <= 0):
        raise ValueError("phase_error must be positive for a flared plane")
    rho = aperture**2 / (8.0 * wavelength * p)
    if phase_reference == "axial":
        return rho
    if phase_reference == "slant":
        if np.any(rho <= aperture / 2):
            raise ValueError(f"phase_error: a slant length D²/(8λT) must exceed D/2, i.e. T < D/(4λ) = "
                             f"{aperture / (4 * wavelength):.4g} for this aperture")
        return np.sqrt(rho**2 - (aperture / 2) ** 2)
    raise ValueError(f"phase_reference must be 'axial' or 'slant', got {phase_reference!r}")


def exact_efficiency(plane, aperture, apex, wavelength, *, amplitude_factor=False):
    """Phase efficiency of one plane with the exact path (and optional amplitude factor).

    Parameters
    ----------
    plane : {"h", "e"}
        "h": cosine-tapered width A; "e": uniform height B.
    aperture : float
        A or B, m.
    apex : float
        Axial apex distance, m (inf: 1 exactly).
    wavelength : array_like
        m.
    amplitude_factor : bool
        Include the cylindrical-wave amplitude (R/√(R²+x²))^{1/2}; η is then relative to the
        taper alone, so it contains the amplitude change too.
    """
    taper = {"h": "cosine", "e": "uniform"}.get(plane)
    if taper is None:
        raise ValueError(f"plane must be 'h' or 'e', got {plane!r}")
    k = 2 * np.pi / np.asarray(wavelength, dtype=float)
    i0 = exact_phase.line_integral(np.zeros_like(k), aperture, apex, k, taper, amplitude_factor=amplitude_factor)
    power = exact_phase.line_power(aperture, apex, k, taper, amplitude_factor=amplitude_factor)
    return np.abs(i0) ** 2 / (aperture * power) / taper_efficiency(taper)


def exact_reduction_db(plane, aperture, apex, wavelength, *, amplitude_factor=False):
    """Gain reduction (dB, positive = loss) of one plane with the exact path."""
    return 0.0 - 10 * np.log10(exact_efficiency(plane, aperture, apex, wavelength, amplitude_factor=amplitude_factor))


def exact_reduction_from_phase_error_db(plane, phase_error, aperture_wavelengths, *, phase_reference="axial",
                                        amplitude_factor=False):
    """Exact-path gain reduction (dB) for a quoted phase error S or T and size D/λ.

    The horn is the one whose classical phase error, in the ``phase_reference`` convention,
    is ``phase_error``; its true (axial) apex distance follows from
    :func:`apex_for_phase_error`. Compare with :func:`h_plane_reduction_db` /
    :func:`e_plane_reduction_db` of the same phase error for the classical value.
    """
    apex = apex_for_phase_error(phase_error, float(aperture_wavelengths), 1.0, phase_reference)
    return exact_reduction_db(plane, float(aperture_wavelengths), float(apex), 1.0, amplitude_factor=amplitude_factor)
