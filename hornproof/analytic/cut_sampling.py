"""Reading a sampled pattern cut between its samples: peak and null refinement, level crossings.

Helpers of :mod:`hornproof.analytic.pattern_metrics`: a maximum is refined by a parabola
through three dB samples (common practice for sampled patterns), a minimum on the linear power
scale, and a level crossing (e.g. the half-power point) by linear interpolation in dB between
the two samples that bracket it. Angles in degrees, patterns in dB, arrays in, numbers out.
"""

import numpy as np

def parabola_vertex(x, y):
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


def refine_max_db(theta, p, i):
    if 0 < i < len(p) - 1:
        return parabola_vertex(theta[i - 1:i + 2], p[i - 1:i + 2])
    return theta[i], p[i]


def refine_min_linear(theta, p, i):
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
    xv, _ = parabola_vertex(x3, power3)
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


def crossing(theta, p, i_from, level, step):
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


def fit_peak(theta, p, i, fit_db):
    """Least-squares parabola (dB) through the contiguous samples within ``fit_db`` of the
    largest one: averages noise on the peak level. Falls back to the 3-point vertex."""
    top = p[i] - fit_db
    lo, hi = i, i
    while lo - 1 >= 0 and p[lo - 1] >= top:
        lo -= 1
    while hi + 1 < len(p) and p[hi + 1] >= top:
        hi += 1
    if hi - lo + 1 < 4:
        return refine_max_db(theta, p, i)
    x = theta[lo:hi + 1] - theta[i]
    c2, c1, c0 = np.polyfit(x, p[lo:hi + 1], 2)
    if c2 >= 0:
        return refine_max_db(theta, p, i)
    xv = min(max(-c1 / (2 * c2), x[0]), x[-1])
    return theta[i] + xv, c0 + c1 * xv + c2 * xv * xv
