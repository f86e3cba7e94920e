"""Exact path-length aperture model of a rectangular horn, by vectorised quadrature.

Same aperture as ``closed_form`` (TE10 cosine in x, uniform in y, separable), but the phase
in each plane is the exact extra path from that plane's apex to the flat aperture,

    φ_h(x) = k (√(R_h² + x²) − R_h),   φ_e(y) = k (√(R_e² + y²) − R_e),

R the axial apex distance (geometry.py), instead of its quadratic approximation
k x²/(2R). The phase is evaluated as k x²/(√(R² + x²) + R), free of cancellation. The phase is
kept separable per plane (as in the closed form); the true path of a pyramidal horn with
distinct apexes is not exactly separable, which this model does not attempt.

Optionally (``amplitude_factor=True``, default off) the amplitude of the cylindrical wave
spreading from the apex, (R/√(R² + x²))^{1/2}, is applied across the flat aperture; ∫|e|²
then includes it too.

Quadrature: Gauss–Legendre on [−w/2, w/2] with the node count chosen from the largest
phase variation across the half-aperture, Ω = |κ|·w/2 + k·(w/2)²/ρ + π/2 (ρ the slant length,
π/2 for the cosine taper), as N = ⌈Ω/2 + 6 Ω^{1/3} + 12⌉; measured here: an oscillation
exp(jΩt) on [−1, 1] needs N ≈ Ω/2 + 5.5 Ω^{1/3} + 4 nodes for 1e-13, and the tests check
that doubling N changes nothing beyond 1e-11.

There is no separate "slant" option here: the path is physical, fixed by the geometry. A
horn specified by slant lengths is converted to its true (axial) geometry with
``design.horn_from_slant_lengths``.
"""

from functools import lru_cache

import numpy as np

from .. import units
from . import line_source

__all__ = [
    "node_count",
    "line_integral",
    "h_plane_integral",
    "e_plane_integral",
    "line_power",
    "directivity",
    "principal_plane_cuts",
    "pattern",
    "directivity_2d",
    "flared_plane_cut_2d",
]

PHASE_LAWS = ("exact", "quadratic")
_CHUNK = 1 << 20  # matrix elements per block of the quadrature (8 MB of phases)


@lru_cache(maxsize=64)
def _gauss_legendre(n):
    t, w = np.polynomial.legendre.leggauss(n)
    t.setflags(write=False)
    w.setflags(write=False)
    return t, w


def node_count(width, apex, max_kappa, max_wavenumber, taper="uniform"):
    """Gauss–Legendre nodes that integrate one plane to ~1e-13 (see module notes)."""
    h = 0.5 * width
    slant = np.hypot(apex, h) if np.isfinite(apex) else np.inf
    omega = abs(max_kappa) * h + (max_wavenumber * h * h / slant if np.isfinite(slant) else 0.0)
    if taper == "cosine":
        omega += 0.5 * np.pi
    return int(np.ceil(omega / 2 + 6 * np.cbrt(omega) + 12))


def _phase_path(x, apex, phase_law):
    """Extra path (m) from the apex to the aperture point x: exact or quadratic."""
    if not np.isfinite(apex):
        return np.zeros_like(x)
    if phase_law == "exact":
        return x * x / (np.sqrt(apex * apex + x * x) + apex)
    if phase_law == "quadratic":
        return x * x / (2.0 * apex)
    raise ValueError(f"phase_law must be one of {', '.join(PHASE_LAWS)}, got {phase_law!r}")


def _amplitude(x, width, apex, taper, amplitude_factor):
    amp = line_source.taper_values(x, width, taper)
    if amplitude_factor and np.isfinite(apex):
        amp = amp * np.sqrt(apex / np.sqrt(apex * apex + x * x))
    return amp


def line_integral(kappa, width, apex, wavenumber, taper="uniform", *, amplitude_factor=False,
                  phase_law="exact", nodes=None):
    """Aperture integral of one plane with the exact path, ∫ e(x) exp(jκx) dx, by quadrature.

    Parameters
    ----------
    kappa : array_like
        Transverse wavenumber, rad/m; broadcast with ``wavenumber``.
    width : float
        Aperture size in this plane, m.
    apex : float
        Axial apex distance, m (``inf``: unflared plane).
    wavenumber : array_like
        k = 2π/λ, rad/m.
    taper : {"uniform", "cosine"}
    amplitude_factor : bool
        Apply the cylindrical-wave amplitude (R/√(R² + x²))^{1/2}.
    phase_law : {"exact", "quadratic"}
        ``"quadratic"`` uses k x²/(2R): the closed form's field, for checking the quadrature.
    nodes : int, optional
        Gauss–Legendre node count; default from :func:`node_count`.

    Returns
    -------
    ndarray, complex, m
    """
    kappa, k = np.broadcast_arrays(np.asarray(kappa, dtype=float), np.asarray(wavenumber, dtype=float))
    shape = kappa.shape
    if nodes is None:
        nodes = node_count(width, apex, np.max(np.abs(kappa), initial=0.0), np.max(k, initial=0.0), taper)
    t, w = _gauss_legendre(int(nodes))
    x = 0.5 * width * t
    weights = 0.5 * width * w * _amplitude(x, width, apex, taper, amplitude_factor)
    path = _phase_path(x, apex, phase_law)
    kap = kappa.ravel()
    kk = k.ravel()
    out = np.empty(kap.size, dtype=complex)
    rows = max(1, _CHUNK // x.size)
    # exp(jφ) as cos φ + j sin φ of a real matrix: about 5× faster than a complex exp here
    if kk.size and np.all(kk == kk[0]):
        # one frequency: the exp(−jk·path) factor is common to every row
        weighted = weights * np.exp(-1j * kk[0] * path)
        for start in range(0, kap.size, rows):
            sl = slice(start, start + rows)
            phase = np.multiply.outer(kap[sl], x)
            out[sl] = np.cos(phase) @ weighted + 1j * (np.sin(phase) @ weighted)
    else:
        for start in range(0, kap.size, rows):
            sl = slice(start, start + rows)
            phase = np.multiply.outer(kap[sl], x) - np.multiply.outer(kk[sl], path)
            out[sl] = np.cos(phase) @ weights + 1j * (np.sin(phase) @ weights)
    out = out.reshape(shape)
    return out[()] if out.ndim == 0 else out


def h_plane_integral(kx, aperture_a, apex_h, wavenumber, **options):
    """I_h(k_x) with the exact path (cosine taper); options as :func:`line_integral`."""
    return line_integral(kx, aperture_a, apex_h, wavenumber, "cosine", **options)


def e_plane_integral(ky, aperture_b, apex_e, wavenumber, **options):
    """I_e(k_y) with the exact path (uniform); options as :func:`line_integral`."""
    return line_integral(ky, aperture_b, apex_e, wavenumber, "uniform", **options)


def line_power(width, apex, wavenumber, taper="uniform", *, amplitude_factor=False):
    """∫|e|² across the plane, m: the taper's (w/2 or w) unless the amplitude factor applies."""
    if not (amplitude_factor and np.isfinite(apex)):
        return np.full(np.shape(wavenumber), line_source.taper_power(width, taper))
    t, w = _gauss_legendre(96)
    x = 0.5 * width * t
    value = float(np.sum(0.5 * width * w * _amplitude(x, width, apex, taper, True) ** 2))
    return np.full(np.shape(wavenumber), value)


class _Model:
    """The plane integral and power with fixed options, in the form ``line_source`` expects."""

    def __init__(self, amplitude_factor=False, phase_law="exact", nodes=None):
        if phase_law not in PHASE_LAWS:
            raise ValueError(f"phase_law must be one of {', '.join(PHASE_LAWS)}, got {phase_law!r}")
        self.options = dict(amplitude_factor=bool(amplitude_factor), phase_law=phase_law, nodes=nodes)

    def integral(self, kappa, line, wavenumber):
        return line_integral(kappa, line.width, line.apex, wavenumber, line.taper, **self.options)

    def power(self, line, wavenumber):
        return line_power(line.width, line.apex, wavenumber, line.taper,
                          amplitude_factor=self.options["amplitude_factor"])


def directivity(horn, frequency, *, amplitude_factor=False, phase_law="exact", nodes=None):
    """Boresight directivity (linear) of ``horn`` over ``frequency`` (Hz), exact path."""
    m = _Model(amplitude_factor, phase_law, nodes)
    return line_source.directivity(m.integral, m.power, line_source.horn_line_sources(horn), frequency)


def principal_plane_cuts(horn, frequency, theta_deg, *, equivalent="huygens", amplitude_factor=False,
                         phase_law="exact", nodes=None):
    """(H-plane, E-plane) directivity cuts (linear), shape frequency.shape + theta.shape."""
    m = _Model(amplitude_factor, phase_law, nodes)
    return line_source.principal_plane_cuts(m.integral, m.power, line_source.horn_line_sources(horn), frequency,
                                    theta_deg, equivalent)


def pattern(horn, frequency, theta_deg, phi_deg, *, equivalent="huygens", amplitude_factor=False,
            phase_law="exact", nodes=None, components=False):
    """Full directivity pattern D(θ, φ) (linear) at one frequency; θ, φ in degrees, broadcast."""
    m = _Model(amplitude_factor, phase_law, nodes)
    return line_source.pattern(m.integral, m.power, line_source.horn_line_sources(horn), frequency, theta_deg, phi_deg,
                       equivalent, components)


def directivity_2d(horn, frequency, *, amplitude_factor=False, phase_law="exact", nodes=None):
    """2D directivity D₂ (linear) of a sectoral horn's flared plane, exact path."""
    m = _Model(amplitude_factor, phase_law, nodes)
    _, line = line_source.flared_line_source(horn)
    return line_source.directivity_2d(m.integral, m.power, line, frequency)


def flared_plane_cut_2d(horn, frequency, theta_deg, *, equivalent="huygens", amplitude_factor=False,
                        phase_law="exact", nodes=None):
    """2D directivity cut (linear) of a sectoral horn's flared plane; returns (plane, D₂)."""
    m = _Model(amplitude_factor, phase_law, nodes)
    plane, line = line_source.flared_line_source(horn)
    return plane, line_source.cut_2d(m.integral, m.power, line, plane, frequency, theta_deg, equivalent)


def edge_path(width, apex, frequency):
    """Exact extra path at the aperture edge, √(R² + (w/2)²) − R, in wavelengths."""
    wl = units.wavelength(frequency)
    if not np.isfinite(apex):
        return np.zeros_like(wl)
    h = 0.5 * width
    return h * h / (np.hypot(apex, h) + apex) / wl
