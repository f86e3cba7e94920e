"""Efficiencies of a focus-fed paraboloid from its feed's (θ, φ) far field, and the edge taper.

The feed's co- and cross-polar far fields g_co(θ, φ), g_x(θ, φ) (Ludwig's third definition,
e^{+jωt}, phase about the feed's focal point, any common scale) are integrated over the
reflector's subtended half-angle θ₀. Geometric optics: the ray leaving the focus at θ reaches
the aperture plane at ρ = 2f tan(θ/2) after the path 2f/(1 + cosθ) + ..., so the aperture field
is g_co/r with r = f sec²(θ/2), and ∫E_a dA = 2f ∫∫ g_co tan(θ/2) dθ dφ. With the feed's
directivity normalised to ∮|g|² dΩ = 4π, the aperture efficiency is

    η_ap = cot²(θ₀/2) / (4π²) · |∫₀^{2π} ∫₀^{θ₀} g_co tan(θ/2) dθ dφ|²,

which for a rotationally symmetric feed of gain G(θ) is Stutzman & Thiele's
η_ap = cot²(θ₀/2) |∫₀^{θ₀} √G tan(θ/2) dθ|². It factors exactly as

* spillover  η_s  = ∫_{θ<θ₀} (|g_co|² + |g_x|²) dΩ / ∮ (|g_co|² + |g_x|²) dΩ,
* polarisation η_pol = ∫_{θ<θ₀} |g_co|² dΩ / ∫_{θ<θ₀} (|g_co|² + |g_x|²) dΩ,
* phase      η_ph = |∫∫ g_co tan(θ/2) dθ dφ|² / (∫∫ |g_co| tan(θ/2) dθ dφ)²,
* taper (illumination) η_t = cot²(θ₀/2) (∫∫ |g_co| tan(θ/2) dθ dφ)² / (π ∫_{θ<θ₀} |g_co|² dΩ),

η_ap = η_s η_pol η_ph η_t; each is ≤ 1 (Cauchy–Schwarz for η_t, with equality for the ideal
feed |g| ∝ sec²(θ/2) inside θ₀). Subtended half-angle and focal ratio:
f/D = 1 / (4 tan(θ₀/2)).

References
----------
W. L. Stutzman and G. A. Thiele, *Antenna Theory and Design*, 2nd ed., Wiley 1998, ch. 7
(reflector antennas: aperture efficiency, spillover, taper, cosⁿ feeds; section numbers from
memory). S. Silver, *Microwave Antenna Theory and Design* (1949), §12 (the cos²θ feed).
P.-S. Kildal, "Factorization of the feed efficiency of paraboloids and Cassegrain antennas",
IEEE Trans. Antennas Propag. AP-33 (1985) 903–908 (the factorisation into sub-efficiencies).

Notes
-----
The integrals are trapezoidal on the given grid. φ may cover [0°, 360°) uniformly (periodic) or
one quadrant [0°, 90°] inclusive (``quadrant=True``): a horn symmetric about both principal
planes has |g| and the co-polar phase even about φ = 0° and 90°, so the quadrant integral times
4 is the whole. The phase efficiency depends on where the feed sits: :func:`best_focus` finds the
axial feed position that maximises |∫∫ g_co tan(θ/2)| (the reflector's own phase centre).
Pure numpy.
"""

import numpy as np

__all__ = ["half_angle_from_f_over_d", "f_over_d_from_half_angle", "reflector_efficiencies",
           "best_focus", "edge_taper_db", "space_attenuation_db"]


def half_angle_from_f_over_d(f_over_d):
    """Subtended half-angle θ₀ (rad) of a paraboloid of focal ratio f/D: tan(θ₀/2) = 1/(4 f/D)."""
    f_over_d = np.asarray(f_over_d, dtype=float)
    if np.any(~(f_over_d > 0)):
        raise ValueError(f"f_over_d must be positive, got {f_over_d!r}")
    return 2 * np.arctan(1 / (4 * f_over_d))


def f_over_d_from_half_angle(half_angle_rad):
    """Focal ratio f/D of a paraboloid that subtends the half-angle θ₀ (rad) from its focus."""
    return 1 / (4 * np.tan(0.5 * np.asarray(half_angle_rad, dtype=float)))


def space_attenuation_db(half_angle_rad):
    """Extra spreading loss at the rim relative to the vertex, 20 log10((1 + cosθ₀)/2) dB.

    The rim is f sec²(θ₀/2) from the focus, the vertex f: the ratio of the field amplitudes is
    cos²(θ₀/2) = (1 + cosθ₀)/2 (Stutzman & Thiele, ch. 7).
    """
    return 20 * np.log10(0.5 * (1 + np.cos(np.asarray(half_angle_rad, dtype=float))))


def edge_taper_db(theta_deg, cut_db, half_angle_deg):
    """Feed pattern level at ±θ₀ relative to boresight, dB (the mean of the two sides, linear
    interpolation in dB). ``cut_db`` [..., nθ] on signed ``theta_deg``; returns [...]."""
    theta = np.asarray(theta_deg, dtype=float)
    cut = np.asarray(cut_db, dtype=float)
    order = np.argsort(theta)
    theta, cut = theta[order], cut[..., order]
    flat = cut.reshape(-1, theta.size)
    out = np.empty(flat.shape[0])
    for i, row in enumerate(flat):
        boresight = np.interp(0.0, theta, row)
        sides = [np.interp(s * half_angle_deg, theta, row) for s in (-1, 1)]
        out[i] = np.mean(sides) - boresight
    return out.reshape(cut.shape[:-1])


def _phi_weights(phi_deg, quadrant):
    phi = np.radians(np.asarray(phi_deg, dtype=float))
    if quadrant:
        if not (np.isclose(phi[0], 0) and np.isclose(phi[-1], np.pi / 2)):
            raise ValueError("phi_deg: a quadrant grid must run from 0 to 90 degrees inclusive")
        w = np.empty_like(phi)
        d = np.diff(phi)
        w[0], w[-1] = d[0] / 2, d[-1] / 2
        w[1:-1] = 0.5 * (d[:-1] + d[1:])
        return 4 * w
    step = np.diff(phi)
    if phi.size < 2 or not np.allclose(step, 2 * np.pi / phi.size):
        raise ValueError("phi_deg: a full grid must cover [0, 360) degrees uniformly")
    return np.full(phi.size, 2 * np.pi / phi.size)


def _theta_weights(theta_rad, upper):
    """Trapezoid weights on θ samples for ∫₀^{upper} dθ (the last interval cut at ``upper``)."""
    th = np.asarray(theta_rad, dtype=float)
    w = np.zeros_like(th)
    for j in range(th.size - 1):
        a, b = th[j], th[j + 1]
        if a >= upper:
            break
        if b <= upper:
            w[j] += 0.5 * (b - a)
            w[j + 1] += 0.5 * (b - a)
        else:  # partial interval: linear interpolation to ``upper``
            t = (upper - a) / (b - a)
            length = upper - a
            w[j] += length * (1 - 0.5 * t)
            w[j + 1] += length * 0.5 * t
    return w


def _checked(theta_deg, phi_deg, co, cross):
    theta = np.radians(np.asarray(theta_deg, dtype=float))
    if theta.ndim != 1 or theta[0] != 0 or not np.isclose(theta[-1], np.pi) or np.any(np.diff(theta) <= 0):
        raise ValueError("theta_deg must rise from 0 to 180 degrees")
    co = np.asarray(co, dtype=complex)
    cross = np.zeros_like(co) if cross is None else np.asarray(cross, dtype=complex)
    shape = (theta.size, np.size(phi_deg))
    if co.shape[-2:] != shape or cross.shape != co.shape:
        raise ValueError(f"co and cross must end in shape (theta, phi) = {shape}, got {co.shape}, {cross.shape}")
    return theta, co, cross


def _aperture_integral(theta, phi_w, co, half_angle, magnitude=False):
    w_t = _theta_weights(theta, half_angle) * np.tan(0.5 * np.minimum(theta, half_angle))
    values = np.abs(co) if magnitude else co
    return np.einsum("...tp,t,p->...", values, w_t, phi_w)


def best_focus(theta_deg, phi_deg, co, wavenumber, half_angle_rad, *, quadrant=False, span_m=None):
    """Axial feed displacement d (m, towards the reflector positive) that maximises the phase
    efficiency, i.e. |∫∫ g_co e^{−jkd cosθ} tan(θ/2) dθ dφ| over θ < θ₀.

    ``co`` [nθ, nφ] about the current reference; searched over ±``span_m`` (default two
    wavelengths) on a grid of λ/200, then refined by a parabola. Returns d.
    """
    theta, co, _ = _checked(theta_deg, phi_deg, co, None)
    phi_w = _phi_weights(phi_deg, quadrant)
    wavelength = 2 * np.pi / wavenumber
    span = 2 * wavelength if span_m is None else float(span_m)
    trial = np.arange(-span, span + wavelength / 400, wavelength / 200)
    shift = np.exp(-1j * wavenumber * np.multiply.outer(trial, np.cos(theta)))  # [nd, nθ]
    values = np.abs(_aperture_integral(theta, phi_w, shift[:, :, None] * co[None], half_angle_rad))
    j = int(np.argmax(values))
    if 0 < j < trial.size - 1:
        y0, y1, y2 = values[j - 1:j + 2]
        denom = y0 - 2 * y1 + y2
        if denom < 0:
            return float(trial[j] + 0.5 * (y0 - y2) / denom * (trial[1] - trial[0]))
    return float(trial[j])


def reflector_efficiencies(theta_deg, phi_deg, co, cross, half_angle_rad, *, quadrant=False):
    """Spillover, polarisation, phase and taper efficiencies and their product (module notes).

    Parameters
    ----------
    theta_deg : array_like [nθ]
        0 … 180 degrees, rising.
    phi_deg : array_like [nφ]
        [0, 360) uniform, or [0, 90] with ``quadrant=True``.
    co, cross : array_like, complex [..., nθ, nφ]
        Ludwig-3 co- and cross-polar far field of the feed, phase about the focus (cross may be
        None: no cross-polar field).
    half_angle_rad : float
        θ₀, the half-angle the reflector subtends at the focus (0 < θ₀ < π).

    Returns
    -------
    dict of arrays [...]
        ``spillover``, ``polarisation``, ``phase``, ``taper``, ``aperture`` (the product, computed
        directly from its own formula), all linear ratios.
    """
    if not 0 < half_angle_rad < np.pi:
        raise ValueError(f"half_angle_rad must lie in (0, π), got {half_angle_rad!r}")
    theta, co, cross = _checked(theta_deg, phi_deg, co, cross)
    phi_w = _phi_weights(phi_deg, quadrant)
    solid = np.sin(theta)
    total_w = _theta_weights(theta, np.pi) * solid
    inside_w = _theta_weights(theta, half_angle_rad) * solid
    p_co, p_x = np.abs(co) ** 2, np.abs(cross) ** 2
    everything = np.einsum("...tp,t,p->...", p_co + p_x, total_w, phi_w)
    inside = np.einsum("...tp,t,p->...", p_co + p_x, inside_w, phi_w)
    inside_co = np.einsum("...tp,t,p->...", p_co, inside_w, phi_w)
    scale = 4 * np.pi / everything  # directivity normalisation: ∮ D dΩ = 4π
    integral = _aperture_integral(theta, phi_w, co, half_angle_rad)
    magnitude = _aperture_integral(theta, phi_w, co, half_angle_rad, magnitude=True)
    cot2 = 1 / np.tan(0.5 * half_angle_rad) ** 2
    with np.errstate(invalid="ignore", divide="ignore"):
        return {
            "spillover": inside / everything,
            "polarisation": inside_co / inside,
            "phase": np.abs(integral) ** 2 / magnitude**2,
            "taper": cot2 * magnitude**2 / (np.pi * inside_co),
            "aperture": cot2 / (4 * np.pi**2) * np.abs(integral) ** 2 * scale,
        }
