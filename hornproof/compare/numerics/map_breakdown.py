"""Where a model error crosses its tolerance along one axis of a two-parameter map.

A breakdown is given as an *interval*, not one number: with an error e and its numerical
uncertainty u at each sample, the error has certainly crossed the tolerance where
|e| − u > tol and may have crossed it where |e| + u > tol. The breakdown lies between the first
value where |e| + u exceeds the tolerance (the earliest it can be) and the first where |e| − u
does (the latest). Between samples the margin is interpolated linearly (common practice).
An analytic error (no numerical uncertainty) gives a zero-width interval.
"""

import numpy as np

__all__ = ["BELOW_RANGE", "first_crossing", "breakdown_interval"]

#: the crossing lies at or before the first usable sample
BELOW_RANGE = "below range"


def first_crossing(values, margin):
    """The first value where ``margin`` becomes positive, scanning ``values`` upwards.

    Parameters
    ----------
    values : array_like, shape [n]
        Parameter values, distinct (any order; sorted here).
    margin : array_like, shape [n]
        A quantity that is positive past the breakdown (e.g. |e| − u − tol); NaN samples are
        skipped.

    Returns
    -------
    float, str or None
        The zero of the margin between the last sample with margin ≤ 0 and the first with
        margin > 0 (linear interpolation); :data:`BELOW_RANGE` when the first usable sample is
        already positive; None when no sample is positive (or none is usable).
    """
    x = np.asarray(values, dtype=float)
    m = np.asarray(margin, dtype=float)
    if x.shape != m.shape or x.ndim != 1:
        raise ValueError(f"margin: shape {m.shape} must match values shape {x.shape}")
    keep = np.isfinite(x) & np.isfinite(m)
    x, m = x[keep], m[keep]
    order = np.argsort(x)
    x, m = x[order], m[order]
    above = np.nonzero(m > 0)[0]
    if above.size == 0:
        return None
    k = int(above[0])
    if k == 0:
        return BELOW_RANGE
    x0, x1, m0, m1 = x[k - 1], x[k], m[k - 1], m[k]
    return float(x0 + (x1 - x0) * (0.0 - m0) / (m1 - m0))


def breakdown_interval(values, errors, uncertainties, tolerance):
    """``(earliest, latest)`` breakdown of an error along ``values`` (see the module docstring).

    Parameters
    ----------
    values : array_like, shape [n]
    errors : array_like, shape [n]
        Model error at each value (figure units); NaN samples (failed points) are skipped.
    uncertainties : array_like or float
        Numerical uncertainty of each error, ≥ 0 (0 for an analytic error); NaN skipped.
    tolerance : float
        Accepted |error|, ≥ 0.

    Returns
    -------
    tuple
        Each end as :func:`first_crossing` returns it.
    """
    e = np.asarray(errors, dtype=float)
    u = np.broadcast_to(np.asarray(uncertainties, dtype=float), e.shape)
    tolerance = float(tolerance)
    if not np.isfinite(tolerance) or tolerance < 0:
        raise ValueError(f"tolerance: must be finite and non-negative, got {tolerance}")
    if np.any(u[np.isfinite(u)] < 0):
        raise ValueError("uncertainties: must be non-negative")
    return (first_crossing(values, np.abs(e) + u - tolerance),
            first_crossing(values, np.abs(e) - u - tolerance))
