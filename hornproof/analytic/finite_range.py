"""Gain a measurement at a finite distance R would see: the aperture models at a field point.

A gain-reference horn is measured at a range R, not in the far zone. What a receiving probe on
the axis at R infers through the Friis relation is the *range gain*

    G_R = 4π R² S(R) / P_in,

S(R) the on-axis power density at R and P_in the power the aperture radiates (no wall or
mismatch loss: this is the range directivity; wall loss is subtracted as for the far field).
As R → ∞, G_R → the far-field directivity.

Two models, as in the far field:

* Closed form (quadratic phase): with the Fresnel approximation of the path to the field
  point, r ≈ R + (x² + y²)/(2R), the field point adds a phase k x²/(2R) to the aperture's
  k x²/(2ρ), so the far-field formula holds with each apex distance ρ replaced by the
  effective length ρR/(ρ + R) (an unflared plane gets R). This is the standard
  effective-length substitution for horns measured at finite range (T. S. Chu and
  R. A. Semplak, "Gain of electromagnetic horns", Bell System Technical Journal 44 (1965)
  527–537; from memory).
* Exact path: the aperture field of the exact-phase model (exact path from each apex to the
  aperture plane) radiating to the field point (0, 0, R) along the exact distance
  r = √(R² + x² + y²), with the 1/r spreading and the Huygens obliquity (1 + R/r)/2:

      E(R) = (j k / 2π) ∫∫ E_a(x, y) e^{−jkr} / r · (1 + R/r)/2 dx dy,
      G_R = 4π R² |E(R)|² / ∫∫ |E_a|² dx dy.

  The 1/(kr)² terms of the free-space Green's function are left out (R ≫ λ), and so is any
  field outside the aperture, as in the far-field aperture models. The integral is not
  separable (r couples x and y) and is done by 2D Gauss–Legendre quadrature.

Far-field distance criteria (stated beside any range gain): 2D²/λ with D the largest aperture
side, and with D the aperture diagonal (IEEE Std 149-1979, *Test Procedures for Antennas*,
§2.3, and C. A. Balanis, *Antenna Theory*, §2.2.4: at R = 2D²/λ the path difference from the
aperture edge is λ/16, a phase error of π/8; from memory); the reactive near-field boundary
0.62√(D³/λ) (Balanis §2.2.4, from memory).
"""

import numpy as np

from .. import units
from . import closed_form
from .line_source import check_frequency

__all__ = ["effective_length", "closed_form_range_gain", "exact_path_range_gain",
           "far_field_distances"]


def effective_length(apex, distance):
    """Effective apex length ρR/(ρ + R), m: R for an unflared plane (ρ = ∞), ρ for R = ∞."""
    apex = np.asarray(apex, dtype=float)
    distance = np.asarray(distance, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        out = np.where(np.isfinite(apex) & np.isfinite(distance), apex * distance / (apex + distance),
                       np.where(np.isfinite(apex), apex, distance))
    return out[()] if out.ndim == 0 else out


def _check_distance(distance):
    r = np.asarray(distance, dtype=float)
    if r.size == 0 or np.any(np.isnan(r)) or np.any(r <= 0):
        raise ValueError(f"distance must be positive lengths in m (inf for the far field), got {distance!r}")
    return r


def closed_form_range_gain(horn, frequency, distance):
    """Range gain (linear) of the quadratic-phase model, effective-length substitution.

    ``frequency`` (Hz) and ``distance`` (m; ``inf`` gives the far field) broadcast.
    """
    f = check_frequency(frequency)
    r = _check_distance(distance)
    return closed_form.boresight_directivity(horn.aperture_a, horn.aperture_b,
                                             effective_length(horn.apex_h, r),
                                             effective_length(horn.apex_e, r), units.wavelength(f))


def _nodes(width, apex, distance, k):
    """Gauss–Legendre nodes for one aperture side: the phase variation across the half-width
    (aperture phase + field-point path), as ``exact_phase.node_count`` reasons."""
    h = 0.5 * width
    curvature = (1.0 / apex if np.isfinite(apex) else 0.0) + (1.0 / distance if np.isfinite(distance) else 0.0)
    omega = k * h * h * curvature / 2 + np.pi
    return int(np.ceil(omega / 2 + 6 * np.cbrt(omega) + 16))


def _aperture_path(x, apex):
    """Exact extra path from the apex to aperture point x, m (0 when unflared)."""
    if not np.isfinite(apex):
        return np.zeros_like(x)
    return x * x / (np.sqrt(apex * apex + x * x) + apex)


def exact_path_range_gain(horn, frequency, distance, *, phase_law="exact", path="exact", nodes=None):
    """Range gain (linear) of the exact-phase aperture model at on-axis distance R.

    Parameters
    ----------
    horn : HornGeometry
    frequency : array_like
        Hz.
    distance : array_like
        On-axis distance from the aperture plane, m; ``inf`` gives the far-field directivity.
        Broadcast with ``frequency``.
    phase_law : {"exact", "quadratic"}
        Aperture phase from the apexes (``"quadratic"``: the closed form's field, for checks).
    path : {"exact", "fresnel"}
        Path to the field point: exact with 1/r and obliquity, or the Fresnel approximation
        (r ≈ R + ρ²/(2R), 1/r ≈ 1/R, obliquity 1), which must reproduce the effective-length
        substitution of :func:`closed_form_range_gain` when ``phase_law="quadratic"``.
    nodes : (int, int), optional
        Quadrature nodes across A and B (default from the phase variation).

    Returns
    -------
    ndarray
        G_R, linear, shape of the broadcast inputs.
    """
    if phase_law not in ("exact", "quadratic"):
        raise ValueError(f"phase_law must be 'exact' or 'quadratic', got {phase_law!r}")
    if path not in ("exact", "fresnel"):
        raise ValueError(f"path must be 'exact' or 'fresnel', got {path!r}")
    f, r = np.broadcast_arrays(check_frequency(frequency), _check_distance(distance))
    out = np.empty(f.shape)
    for index in np.ndindex(f.shape):
        out[index] = _range_gain_one(horn, float(f[index]), float(r[index]), phase_law, path, nodes)
    return out[()] if out.ndim == 0 else out


def _range_gain_one(horn, frequency, distance, phase_law, path, nodes):
    k = 2 * np.pi * frequency / units.SPEED_OF_LIGHT
    A, B = horn.aperture_a, horn.aperture_b
    rh, re = horn.apex_h, horn.apex_e
    n_a, n_b = nodes or (_nodes(A, rh, distance, k), _nodes(B, re, distance, k))
    ta, wa = np.polynomial.legendre.leggauss(n_a)
    tb, wb = np.polynomial.legendre.leggauss(n_b)
    x, wx = 0.5 * A * ta, 0.5 * A * wa
    y, wy = 0.5 * B * tb, 0.5 * B * wb
    if phase_law == "exact":
        px, py = _aperture_path(x, rh), _aperture_path(y, re)
    else:
        px = x * x / (2 * rh) if np.isfinite(rh) else np.zeros_like(x)
        py = y * y / (2 * re) if np.isfinite(re) else np.zeros_like(y)
    ex = np.cos(np.pi * x / A) * np.exp(-1j * k * px)  # TE10 cosine across A
    ey = np.exp(-1j * k * py)  # uniform across B
    power = np.sum(wx * np.abs(ex) ** 2) * np.sum(wy * np.abs(ey) ** 2)
    if not np.isfinite(distance):  # far field: the separable boresight integral
        field2 = np.abs(np.sum(wx * ex)) ** 2 * np.abs(np.sum(wy * ey)) ** 2
        return 4 * np.pi / units.wavelength(frequency) ** 2 * field2 / power
    rho2 = x[:, None] ** 2 + y[None, :] ** 2
    if path == "exact":
        extra = rho2 / (np.sqrt(distance**2 + rho2) + distance)  # r − R, free of cancellation
        r = distance + extra
        kernel = np.exp(-1j * k * extra) / r * 0.5 * (1.0 + distance / r)
    else:
        kernel = np.exp(-1j * k * rho2 / (2 * distance)) / distance
    field = k / (2 * np.pi) * np.sum((wx * ex)[:, None] * (wy * ey)[None, :] * kernel)
    return 4 * np.pi * distance**2 * np.abs(field) ** 2 / power


def far_field_distances(horn, frequency):
    """Far-field distance criteria of the aperture, m, each an array over ``frequency``.

    Returns
    -------
    dict
        ``"2D^2/lambda (largest side)"``, ``"2D^2/lambda (diagonal)"`` and
        ``"reactive near-field boundary 0.62 sqrt(D^3/lambda)"`` (D the diagonal); sources in
        the module notes.
    """
    wl = units.wavelength(check_frequency(frequency))
    side = max(horn.aperture_a, horn.aperture_b)
    diagonal = float(np.hypot(horn.aperture_a, horn.aperture_b))
    return {"2D^2/lambda (largest side)": 2 * side**2 / wl,
            "2D^2/lambda (diagonal)": 2 * diagonal**2 / wl,
            "reactive near-field boundary 0.62 sqrt(D^3/lambda)": 0.62 * np.sqrt(diagonal**3 / wl)}
