"""Phase centre of a far-field cut: the point on the axis that makes the phase flattest.

A source displaced by ``d`` along the axis (towards the observer) from the phase reference
radiates, in the e^{+jωt} convention used by the aperture models (far field ∝ e^{−jkr}/r),

    g(θ) = g₀(θ) · e^{+jkd cosθ},

so the phase of a cut measured about the reference is ψ(θ) = ψ₀(θ) + k d cosθ. The phase
centre is the ``d`` that makes ψ(θ) − k d cosθ flattest over the main lobe: the least-squares
fit of ψ(θ) ≈ a + b cosθ (b = k d) over the contiguous samples around the peak whose level is
within ``level_db`` (default −10 dB) of it, unweighted. What is left of the phase after the fit
is the *phase ripple*, reported as its RMS and its largest magnitude (degrees): the phase centre
means something only where that ripple is small.

References
----------
E. I. Muehldorf, "The phase center of horn antennas", IEEE Trans. Antennas Propag. AP-18
(1970) 753–760 (the phase centre of a horn as a function of its phase error; the definition
as the centre of curvature of the far-field phase front over the main beam). The least-squares
form over a stated beam level is common practice in feed design (no one source).

Notes
-----
Fields from Meep use e^{−iωt}: conjugate them before calling (``sim.postprocess`` does).
The fit is linear in (a, b), so it is exact for a point source (``g₀`` of constant phase) and
gives ``d = 0`` for an aperture with no phase error (a real, even aperture distribution has a
real far field, of constant phase within the main lobe). Pure numpy.
"""

import numpy as np

#: default main-lobe window of the fit, dB below the peak of the cut
PHASE_CENTRE_LEVEL_DB = -10.0


def main_lobe_window(theta_deg, level_db_values, level_db=PHASE_CENTRE_LEVEL_DB, max_angle_deg=90.0):
    """Indices of the contiguous samples around the peak within ``level_db`` of it.

    ``level_db_values`` [nθ] in dB (any offset), NaN allowed (a NaN ends the window). The peak
    is the largest sample within ``max_angle_deg`` of boresight. Returns an index array (empty
    for an all-NaN cut).
    """
    theta = np.asarray(theta_deg, dtype=float)
    p = np.asarray(level_db_values, dtype=float)
    front = np.where(np.isfinite(p) & (np.abs(theta) <= max_angle_deg), p, -np.inf)
    if not np.any(np.isfinite(front)):
        return np.array([], dtype=int)
    peak = int(np.argmax(front))
    floor = front[peak] + level_db
    lo = peak
    while lo - 1 >= 0 and front[lo - 1] >= floor:
        lo -= 1
    hi = peak
    while hi + 1 < theta.size and front[hi + 1] >= floor:
        hi += 1
    return np.arange(lo, hi + 1)


def unwrapped_phase(field, start):
    """Phase (rad) of ``field`` [n], unwrapped outward from index ``start`` in both directions
    (``np.unwrap`` keeps the first sample, so both halves share the start value)."""
    phase = np.angle(np.asarray(field, dtype=complex))
    out = np.empty_like(phase)
    out[start:] = np.unwrap(phase[start:])
    out[:start + 1] = np.unwrap(phase[:start + 1][::-1])[::-1]
    return out


def fit_phase_centre(theta_deg, field, wavenumber, *, level_db=PHASE_CENTRE_LEVEL_DB, max_angle_deg=90.0):
    """Least-squares phase centre of one cut.

    Parameters
    ----------
    theta_deg : array_like [nθ]
        Cut angles, degrees from boresight (signed; both sides of the cut are used).
    field : array_like, complex [nθ]
        Co-polar far field about the phase reference, e^{+jωt} convention.
    wavenumber : float
        k = 2π/λ, rad/m.
    level_db : float
        Window: samples within this many dB of the peak (negative, default −10 dB).
    max_angle_deg : float
        The peak is looked for within this angle of boresight.

    Returns
    -------
    dict
        ``displacement_m`` (d: positive towards the observer, i.e. in front of the reference),
        ``ripple_rms_deg``, ``ripple_peak_deg`` (phase left after the fit), ``window_deg``
        (half-width of the window actually used, the mean of its two sides), ``samples``.
        NaN values when fewer than three samples lie in the window.
    """
    if not level_db < 0:
        raise ValueError(f"level_db must be negative (dB below the peak), got {level_db!r}")
    if not (np.isfinite(wavenumber) and wavenumber > 0):
        raise ValueError(f"wavenumber must be positive, got {wavenumber!r}")
    theta = np.asarray(theta_deg, dtype=float)
    g = np.asarray(field, dtype=complex)
    if g.shape != theta.shape:
        raise ValueError(f"field must have the shape of theta_deg {theta.shape}, got {g.shape}")
    with np.errstate(divide="ignore"):
        level = 20 * np.log10(np.abs(g))
    window = main_lobe_window(theta, level, level_db, max_angle_deg)
    nan = {"displacement_m": np.nan, "ripple_rms_deg": np.nan, "ripple_peak_deg": np.nan,
           "window_deg": np.nan, "samples": int(window.size)}
    if window.size < 3:
        return nan
    th = np.radians(theta[window])
    peak = int(np.argmax(level[window]))
    psi = unwrapped_phase(g[window], peak)
    design = np.stack([np.ones_like(th), np.cos(th)], axis=1)
    if np.ptp(np.cos(th)) <= 0:
        return nan
    coeffs, *_ = np.linalg.lstsq(design, psi, rcond=None)
    residual = psi - design @ coeffs
    return {"displacement_m": float(coeffs[1] / wavenumber),
            "ripple_rms_deg": float(np.degrees(np.sqrt(np.mean(residual**2)))),
            "ripple_peak_deg": float(np.degrees(np.max(np.abs(residual)))),
            "window_deg": float(0.5 * (abs(theta[window[0]]) + abs(theta[window[-1]]))),
            "samples": int(window.size)}


def phase_centres(theta_deg, fields, wavenumbers, **options):
    """:func:`fit_phase_centre` per frequency: ``fields`` [nf, nθ], ``wavenumbers`` [nf].

    Returns a dict of arrays [nf] with the keys of :func:`fit_phase_centre`.
    """
    fields = np.atleast_2d(np.asarray(fields, dtype=complex))
    k = np.broadcast_to(np.asarray(wavenumbers, dtype=float), (fields.shape[0],))
    rows = [fit_phase_centre(theta_deg, row, kk, **options) for row, kk in zip(fields, k)]
    return {key: np.array([r[key] for r in rows], dtype=float) for key in rows[0]}


def shift_reference(fields, theta_deg, wavenumbers, displacement_m):
    """Fields about a reference moved by ``displacement_m`` along the axis (towards the observer).

    g′(θ) = g(θ) e^{−jk d cosθ}: a source at the new reference then shows no k d cosθ term.
    ``fields`` [..., nθ]; ``wavenumbers`` broadcast against the leading axes.
    """
    th = np.radians(np.asarray(theta_deg, dtype=float))
    k = np.asarray(wavenumbers, dtype=float)[..., None]
    return np.asarray(fields, dtype=complex) * np.exp(-1j * k * displacement_m * np.cos(th))
