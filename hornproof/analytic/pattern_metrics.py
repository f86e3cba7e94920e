"""Beam metrics on sampled pattern cuts: half-power beamwidth, first null, first sidelobe level.

Shared by the analytic models and the full-wave side, so written for measured-like data:
the cut is an array whose last axis is θ (degrees, any grid, sorted here if it is not), any
leading axes (frequency, …) are looped over, NaN and +inf samples are dropped, −inf (exact nulls of an
analytic pattern) is replaced by a floor 400 dB below the peak. Values may be directivity in
dBi or any dB scale: only differences matter.

Definitions (per cut):

* **Peak**: the largest sample within ``max_angle_deg`` of boresight (so a rear lobe, e.g. the
  mirror image of the e-field equivalent, is never taken for the main beam); its angle and
  level refined by a parabola through the three samples around it, in dB (or, with
  ``peak_fit_db``, by a least-squares parabola over the top of the beam, for noisy data).
* **Half-power beamwidth** (``hpbw_deg``): walking outward from the peak, the first crossing
  of half the peak power (peak − 3.0103 dB, ``HALF_POWER_DB``: the "−3 dB" points) on each
  side, placed between the two samples that bracket it by a 3-point quadratic in dB (linear in
  dB if that fails); the width is right − left. Uses the whole cut (wide beams may cross
  beyond 90°); NaN if either side never crosses.
* **First null** (each side): the first local minimum beyond the half-power crossing whose
  prominence (depth below the lower of the two neighbouring maxima, as in
  ``scipy.signal.find_peaks``) is at least ``null_prominence_db`` (default ``NULL_PROMINENCE_DB`` = 1 dB), so that
  ripple from noise on the flank of the main lobe is not taken for a null. Its angle is refined
  from the nearby samples: a parabola in *linear power* for a shallow (filled) null, the root
  of the signed amplitude for a deep one (see ``_refine_min_linear``). Searched only within ``max_angle_deg`` of boresight (default 90°: the
  front hemisphere). ``first_null_deg`` is the mean distance of the two nulls from the peak,
  i.e. half their separation; if only one side has a null, that side's distance. Per side:
  ``first_null_left_deg`` / ``first_null_right_deg`` (signed angles).
* **Sidelobe level** (``sll_db``, dB relative to the peak, ≤ 0): beyond the first null on each
  side (and within ``max_angle_deg``), the highest local maximum (``sidelobe="highest"``,
  default) or the first one (``sidelobe="first"``), with the same minimum prominence; refined
  by a parabola in dB. ``sll_db`` is the higher of the two sides (NaN if neither side has one).

Results are NaN where a quantity does not exist (no null: a large phase error can fill the
nulls in; all-NaN cut; too few samples).
"""

import numpy as np
from scipy.signal import find_peaks

__all__ = ["cut_metrics", "half_power_beamwidth", "first_null", "sidelobe_level", "METRIC_KEYS"]

METRIC_KEYS = (
    "peak_deg", "peak_db", "hpbw_deg", "first_null_deg", "first_null_left_deg",
    "first_null_right_deg", "sll_db", "sll_left_db", "sll_right_db",
)

_FLOOR_BELOW_PEAK_DB = 400.0
#: least depth (dB) of a dip to count as a null, and of a lobe to count as a sidelobe.
#: hornproof's choice, not a published rule. No threshold separates every case: a filled
#: first null can leave a 1.3 dB dip before a real sidelobe (a short pyramidal horn's E-plane,
#: T ≈ 0.18) or a shallow dip on a shoulder that the aperture models draw without one (a long
#: H-plane horn in 2D FDTD, S ≈ 0.12). 1 dB keeps the sidelobe; cases whose nulls are filled
#: should not check the first null (see cases/README.md).
NULL_PROMINENCE_DB = 1.0

#: half power in dB, −10 log10 2 ≈ −3.0103 dB
HALF_POWER_DB = -10.0 * np.log10(2.0)


def _parabola_vertex(x, y):
    """Vertex (x, y) of the parabola through three points; the middle point if degenerate."""
    x0, x1, x2 = x
    y0, y1, y2 = y
    denom = (x0 - x1) * (x0 - x2) * (x1 - x2)
    a = (x2 * (y1 - y0) + x1 * (y0 - y2) + x0 * (y2 - y1)) / denom
    b = (x2 * x2 * (y0 - y1) + x1 * x1 * (y2 - y0) + x0 * x0 * (y1 - y2)) / denom
    if a == 0 or not np.isfinite(a):
        return x1, y1
    xv = -b / (2 * a)
    c = y1 - a * x1 * x1 - b * x1
    xv = min(max(xv, min(x0, x2)), max(x0, x2))
    return xv, a * xv * xv + b * xv + c


def _refine_max_db(theta, p, i):
    if 0 < i < len(p) - 1:
        return _parabola_vertex(theta[i - 1:i + 2], p[i - 1:i + 2])
    return theta[i], p[i]


def _refine_min_linear(theta, p, i):
    """Angle of the minimum at sample i.

    A shallow minimum (less than 6 dB below the larger neighbour) is placed at the vertex of
    the parabola through the three samples in linear power, exact for a filled null of power
    c((θ − z)² + ε²). A deep one is treated as a zero, near which the *signed* amplitude is
    smooth while the power is poorly fitted by a parabola on a coarse grid (a 12 λ uniform line
    source on a 1° grid: 0.2° error). The zero lies between sample i and one neighbour; the side
    is the one whose sign hypothesis (negative amplitude before the zero) gives the smaller
    least-squares residual of a quadratic through the five samples i − 2 … i + 2, and the zero
    is the root, in that bracket, of the cubic through the four signed samples around it. For
    a filled null this places the null within about the filling width ε of its minimum.
    """
    n = len(p)
    if not 0 < i < n - 1:
        return theta[i]
    x3 = theta[i - 1:i + 2]
    ref = np.max(p[max(i - 2, 0):i + 3])
    power3 = 10.0 ** ((p[i - 1:i + 2] - ref) / 10.0)
    xv, _ = _parabola_vertex(x3, power3)
    if power3[1] > 0.25 * max(power3[0], power3[2]):  # shallower than 6 dB
        return xv
    lo, hi = max(i - 2, 0), min(i + 3, n)
    xs = theta[lo:hi] - theta[i]
    amp = 10.0 ** ((p[lo:hi] - ref) / 20.0)
    best = None
    for j in (i - 1, i):  # zero between samples j and j + 1
        signed = np.where(np.arange(lo, hi) <= j, -amp, amp)
        if xs.size >= 4:
            residual = np.linalg.lstsq(np.vander(xs, 3), signed, rcond=None)[1]
            residual = float(residual[0]) if residual.size else 0.0
        else:
            residual = 0.0
        if best is None or residual < best[0]:
            best = (residual, j, signed)
    _, j, signed = best
    a, b = theta[j] - theta[i], theta[j + 1] - theta[i]
    deg = min(xs.size - 1, 3)
    pick = np.argsort(np.abs(xs - 0.5 * (a + b)), kind="stable")[:deg + 1]
    roots = np.roots(np.polyfit(xs[pick], signed[pick], deg))
    good = [r.real for r in roots if abs(r.imag) < 1e-9 * (1 + abs(r.real)) and a - 1e-12 <= r.real <= b + 1e-12]
    if good:
        return theta[i] + min(good, key=lambda r: abs(r - 0.5 * (a + b)))
    return xv


def _crossing(theta, p, i_from, level, step):
    """First crossing below ``level`` walking from index i_from by step (±1); NaN if none.

    The crossing lies between samples j (≥ level) and j + step (< level). It is placed by the
    quadratic (in dB) through j − step, j, j + step when that has a root in the bracket — exact
    for a Gaussian beam, and it removes the curvature error of a coarse grid — otherwise by
    linear interpolation in dB.
    """
    j = i_from
    n = len(p)
    while 0 <= j + step < n:
        if p[j + step] < level:
            a, b = p[j], p[j + step]
            frac = (a - level) / (a - b) if a != b else 0.0
            linear = theta[j] + frac * (theta[j + step] - theta[j])
            k = j - step
            if 0 <= k < n:
                x = theta[[k, j, j + step]]
                coef = np.polyfit(x - theta[j], p[[k, j, j + step]] - level, 2)
                roots = np.roots(coef) if coef[0] != 0 else np.roots(coef[1:])
                lo, hi = sorted((0.0, theta[j + step] - theta[j]))
                good = [r.real + theta[j] for r in np.atleast_1d(roots)
                        if abs(r.imag) < 1e-12 and lo <= r.real <= hi]
                if len(good) == 1:
                    return float(good[0]), j + step
            return linear, j + step
        j += step
    return np.nan, None


def _fit_peak(theta, p, i, fit_db):
    """Least-squares parabola (dB) through the contiguous samples within ``fit_db`` of the
    largest one: averages noise on the peak level. Falls back to the 3-point vertex."""
    top = p[i] - fit_db
    lo, hi = i, i
    while lo - 1 >= 0 and p[lo - 1] >= top:
        lo -= 1
    while hi + 1 < len(p) and p[hi + 1] >= top:
        hi += 1
    if hi - lo + 1 < 4:
        return _refine_max_db(theta, p, i)
    x = theta[lo:hi + 1] - theta[i]
    c2, c1, c0 = np.polyfit(x, p[lo:hi + 1], 2)
    if c2 >= 0:
        return _refine_max_db(theta, p, i)
    xv = min(max(-c1 / (2 * c2), x[0]), x[-1])
    return theta[i] + xv, c0 + c1 * xv + c2 * xv * xv


def _one_cut(theta, p, max_angle_deg, null_prominence_db, sidelobe, peak_fit_db):
    out = dict.fromkeys(METRIC_KEYS, np.nan)
    ok = np.isfinite(theta) & ~np.isnan(p) & ~np.isposinf(p)
    theta, p = theta[ok], p[ok]
    if theta.size < 3 or not np.any(np.isfinite(p)):
        return out
    order = np.argsort(theta, kind="stable")
    theta, p = theta[order], p[order]
    front = np.abs(theta) <= max_angle_deg
    if not np.any(front & np.isfinite(p)):
        front = np.ones_like(front)
    peak_i = int(np.argmax(np.where(front & np.isfinite(p), p, -np.inf)))
    floor = p[peak_i] - _FLOOR_BELOW_PEAK_DB
    p = np.maximum(np.where(np.isneginf(p), floor, p), floor)
    if peak_fit_db is None:
        peak_deg, peak_db = _refine_max_db(theta, p, peak_i)
    else:
        peak_deg, peak_db = _fit_peak(theta, p, peak_i, peak_fit_db)
    out["peak_deg"], out["peak_db"] = peak_deg, peak_db

    level = peak_db + HALF_POWER_DB
    left, i_left = _crossing(theta, p, peak_i, level, -1)
    right, i_right = _crossing(theta, p, peak_i, level, +1)
    out["hpbw_deg"] = right - left

    window = np.abs(theta) <= max_angle_deg
    valleys, _ = find_peaks(-p, prominence=null_prominence_db)
    hills, _ = find_peaks(p, prominence=null_prominence_db)
    valleys = valleys[window[valleys]]
    hills = hills[window[hills]]

    sides = {}
    for name, start, step in (("left", i_left, -1), ("right", i_right, +1)):
        if start is None:
            continue
        cand = valleys[valleys >= start] if step > 0 else valleys[valleys <= start][::-1]
        if cand.size == 0:
            continue
        null_i = int(cand[0])
        null_deg = _refine_min_linear(theta, p, null_i)
        out[f"first_null_{name}_deg"] = null_deg
        sides[name] = abs(null_deg - peak_deg)
        lobes = hills[hills > null_i] if step > 0 else hills[hills < null_i][::-1]
        if lobes.size == 0:
            continue
        lobe_i = int(lobes[0]) if sidelobe == "first" else int(lobes[np.argmax(p[lobes])])
        _, lobe_db = _refine_max_db(theta, p, lobe_i)
        out[f"sll_{name}_db"] = lobe_db - peak_db
    if sides:
        out["first_null_deg"] = float(np.mean(list(sides.values())))
    sll = [out["sll_left_db"], out["sll_right_db"]]
    if np.any(np.isfinite(sll)):
        out["sll_db"] = float(np.nanmax(sll))
    return out


def cut_metrics(theta_deg, pattern_db, *, max_angle_deg=90.0, null_prominence_db=NULL_PROMINENCE_DB, sidelobe="highest",
                peak_fit_db=None):
    """All beam metrics of sampled cuts.

    Parameters
    ----------
    theta_deg : array_like, shape [nθ]
        Cut angles, degrees from boresight.
    pattern_db : array_like, shape [..., nθ]
        Pattern in dB (directivity in dBi, normalised dB, ...); NaN allowed.
    max_angle_deg : float
        Nulls and sidelobes are searched only where |θ| ≤ this (default 90°).
    null_prominence_db : float
        Minimum prominence (dB) of a minimum to count as a null, and of a maximum to count as
        a sidelobe (default 1 dB).
    sidelobe : {"highest", "first"}
        Which local maximum beyond the first null is the sidelobe.
    peak_fit_db : float, optional
        For noisy cuts: estimate the peak by a least-squares parabola (in dB) through the
        contiguous samples within this many dB of the largest sample, instead of the 3-point
        vertex (the largest noisy sample overestimates the peak, which narrows the beamwidth
        and lowers relative sidelobes). Default None: the 3-point vertex (exact data).

    Returns
    -------
    dict of ndarray, each of shape [...]
        Keys ``METRIC_KEYS``: ``peak_deg``, ``peak_db``, ``hpbw_deg``, ``first_null_deg``,
        ``first_null_left_deg``, ``first_null_right_deg``, ``sll_db``, ``sll_left_db``,
        ``sll_right_db`` (angles in degrees, levels in dB; see the module notes).
    """
    if sidelobe not in ("highest", "first"):
        raise ValueError(f"sidelobe must be 'highest' or 'first', got {sidelobe!r}")
    if peak_fit_db is not None and not peak_fit_db > 0:
        raise ValueError(f"peak_fit_db must be positive, got {peak_fit_db!r}")
    if not null_prominence_db > 0:
        raise ValueError(f"null_prominence_db must be positive, got {null_prominence_db!r}")
    theta = np.asarray(theta_deg, dtype=float)
    p = np.asarray(pattern_db, dtype=float)
    if theta.ndim != 1 or p.shape[-1:] != theta.shape:
        raise ValueError(f"pattern_db must have θ (length {theta.shape}) as its last axis, got shape {p.shape}")
    lead = p.shape[:-1]
    flat = p.reshape(-1, theta.size)
    results = {key: np.full(flat.shape[0], np.nan) for key in METRIC_KEYS}
    for row in range(flat.shape[0]):
        one = _one_cut(theta, flat[row], max_angle_deg, null_prominence_db, sidelobe, peak_fit_db)
        for key in METRIC_KEYS:
            results[key][row] = one[key]
    return {key: value.reshape(lead) for key, value in results.items()}


def half_power_beamwidth(theta_deg, pattern_db, **options):
    """Half-power (−3.0103 dB) beamwidth, degrees, shape [...]; see :func:`cut_metrics`."""
    return cut_metrics(theta_deg, pattern_db, **options)["hpbw_deg"]


def first_null(theta_deg, pattern_db, *, per_side=False, **options):
    """First-null angle from the peak, degrees (mean of the two sides; see the module notes).

    With ``per_side=True`` returns (left, right) signed null angles instead.
    """
    m = cut_metrics(theta_deg, pattern_db, **options)
    if per_side:
        return m["first_null_left_deg"], m["first_null_right_deg"]
    return m["first_null_deg"]


def sidelobe_level(theta_deg, pattern_db, **options):
    """Sidelobe level relative to the peak, dB (≤ 0), the higher of the two sides."""
    return cut_metrics(theta_deg, pattern_db, **options)["sll_db"]
