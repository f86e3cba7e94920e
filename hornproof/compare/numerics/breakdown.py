"""Where a model error crosses its tolerance along a sweep, and where a model peaks — as
intervals that carry the numerical uncertainty of every point.

A sweep samples an error e(x) (model − reference, figure units) at swept values x. Each sample
has two numbers from :mod:`.confidence`: the *confident* uncertainty u (may support "the model
holds here") and the *disagreement bound* b ≥ u (may support "the model is past its tolerance
here"); either may be unknown (NaN): a divergent ladder has neither. With tolerance t:

* the model **surely holds** at a sample when |e| + u ≤ t,
* it is **surely past** the tolerance when |e| − b > t,
* otherwise that sample cannot tell (unresolved).

The breakdown value is where |e| first exceeds t scanning from the smallest swept value. It lies
in the interval from the *earliest* value where it could (the first crossing of |e| + u = t)
to the *latest* (the first crossing of |e| − b = t). Between two samples the margins are
interpolated linearly (common practice for a threshold read off a sampled curve); next to a
sample that cannot give a margin (unknown u or b) the interval reaches that sample and no
further in, which is the most the samples support. Both edges and the nominal crossing
(|e| = t, no uncertainty) are reported; an interval whose latest edge is not found inside the
sweep is *unresolved* and says why.
"""

import math

import numpy as np

#: what a breakdown interval's ``status`` may be
BREAKDOWN_STATUSES = ("holds throughout", "breaks", "past tolerance from the start", "unresolved")


def _array(values):
    return np.array([np.nan if v is None else v for v in np.atleast_1d(values)], dtype=float)


def first_crossing(x, margin):
    """First ``x`` where ``margin`` turns positive, scanning ``x`` upwards.

    Parameters
    ----------
    x : array_like, shape [n]
        Swept values, ascending.
    margin : array_like, shape [n]
        Margin at each sample, no NaN: +inf means "may be positive here, level unknown",
        -inf "not known to be positive here".

    Returns
    -------
    float, str or None
        The crossing, linearly interpolated between the last sample with margin ≤ 0 and the
        first with margin > 0; without a level on one side, the sample before an unknown
        (+inf) margin, or the positive sample after an unknown (−inf) one;
        ``"below range"`` when the first sample is already positive; None when no sample is.
    """
    x, margin = _array(x), _array(margin)
    positive = np.nonzero(margin > 0)[0]
    if positive.size == 0:
        return None
    i = int(positive[0])
    if i == 0:
        return "below range"
    m0, m1 = margin[i - 1], margin[i]
    if not math.isfinite(m1):  # may be past from the next sample on: clear only up to x[i-1]
        return float(x[i - 1])
    if not math.isfinite(m0):  # no level before: surely past at x[i], not known earlier
        return float(x[i])
    return float(x[i - 1] + (0.0 - m0) * (x[i] - x[i - 1]) / (m1 - m0))


def breakdown_interval(values, errors, confident, bounds, tolerance):
    """Breakdown interval of one model error along a sweep (module docstring).

    Parameters
    ----------
    values : array_like, shape [n]
        Swept values (any order; distinct).
    errors : array_like, shape [n]
        Model error at each value, figure units; NaN samples (no result) are skipped.
    confident : array_like or float, shape [n]
        Confident uncertainty u ≥ 0 of each error (NaN: none; 0 for analytic differences).
    bounds : array_like or float, shape [n]
        Disagreement bound b ≥ 0 of each error (NaN: none).
    tolerance : float
        Accepted |error| t ≥ 0.

    Returns
    -------
    dict
        ``nominal`` (|e| = t crossing), ``earliest`` (|e| + u = t), ``latest`` (|e| − b = t):
        each a float, ``"below range"`` or None (not inside the sweep); ``status`` (one of
        :data:`BREAKDOWN_STATUSES`); ``reason`` (words, why unresolved); ``holds``, ``past``:
        lists of the swept values where the model surely holds / is surely past tolerance;
        ``back_within``: [first, last] runs of consecutive swept values beyond the breakdown
        where the model surely holds again (an error that changes sign comes back through the
        tolerance band).
    """
    x, e = _array(values), _array(errors)
    u = np.broadcast_to(_array(confident), e.shape) if np.ndim(confident) else np.full(e.shape, float(confident))
    b = np.broadcast_to(_array(bounds), e.shape) if np.ndim(bounds) else np.full(e.shape, float(bounds))
    tolerance = float(tolerance)
    if not math.isfinite(tolerance) or tolerance < 0:
        raise ValueError(f"tolerance: must be finite and non-negative, got {tolerance}")
    if x.shape != e.shape:
        raise ValueError(f"errors: shape {e.shape} must match values shape {x.shape}")
    keep = np.isfinite(x) & np.isfinite(e)
    x, e, u, b = x[keep], e[keep], u[keep], b[keep]
    order = np.argsort(x)
    x, e, u, b = x[order], e[order], u[order], b[order]
    if np.unique(x).size != x.size:
        raise ValueError("values: must be distinct")
    b = np.where(np.isfinite(u) & ~(b >= u), u, b)  # a confident uncertainty is also a bound
    could = np.where(np.isfinite(u), np.abs(e) + u - tolerance, np.inf)
    sure = np.where(np.isfinite(b), np.abs(e) - b - tolerance, -np.inf)
    out = {"nominal": first_crossing(x, np.abs(e) - tolerance), "earliest": first_crossing(x, could),
           "latest": first_crossing(x, sure),
           "holds": [float(v) for v, m in zip(x, could) if m <= 0],
           "past": [float(v) for v, m in zip(x, sure) if m > 0],
           "unknown": [float(v) for v, m1, m2 in zip(x, could, sure) if not m1 <= 0 and not m2 > 0]}
    out["back_within"] = _runs(x, could <= 0, out["latest"])
    if x.size == 0:
        out.update(status="unresolved", reason="no usable point")
    elif out["latest"] == "below range":
        out.update(status="past tolerance from the start", reason="")
    elif out["earliest"] is None:
        out.update(status="holds throughout", reason="")
    elif out["latest"] is not None:
        out.update(status="breaks", reason="")
    else:
        out.update(status="unresolved",
                   reason="no later point is surely past the tolerance" + (
                       f" (cannot tell at {', '.join(f'{v:g}' for v in out['unknown'])})" if out["unknown"] else ""))
    return out


def _runs(x, flags, edge):
    """[first, last] of each run of consecutive samples of ``x`` past ``edge`` where ``flags``."""
    if edge is None:
        return []
    runs, open_run = [], False
    for value, flag in zip(x, flags):
        if flag and (edge == "below range" or value > edge):
            if open_run:
                runs[-1][1] = float(value)
            else:
                runs.append([float(value), float(value)])
            open_run = True
        else:
            open_run = False
    return runs


def analytic_breakdown(values, errors, tolerance):
    """Breakdown of an analytic difference (no numerical uncertainty): the interval is a point."""
    zero = np.zeros(len(values))
    return breakdown_interval(values, errors, zero, zero, tolerance)


def optimum_interval(values, figure, confident, bounds):
    """Where a sampled figure peaks, and the range of swept values that could hold the peak.

    Parameters
    ----------
    values : array_like, shape [n]
        Swept values (distinct).
    figure : array_like, shape [n]
        The figure (e.g. directivity, dB); NaN samples skipped.
    confident : array_like or float, shape [n]
        Confident uncertainty of each sample (NaN: none): reported at the best sample.
    bounds : array_like or float, shape [n]
        Disagreement bound of each sample (NaN: none; a confident uncertainty counts as one).

    Returns
    -------
    dict or None
        ``value`` (the best sample, or the vertex of a parabola through the best three when the
        best is interior and the parabola opens down — common practice), ``figure`` and
        ``uncertainty`` at the best sample, ``interior`` (bool), ``range`` [lo, hi]: every
        swept value not *surely* below another — surely below means its figure + bound stays
        under some other sample's figure − bound, the same test as a disagreement — could be
        the peak; a sample without a bound could always be it, and ``bounded`` is then False.
        None when no sample is usable.
    """
    x, v = _array(values), _array(figure)
    u = _array(confident) if np.ndim(confident) else np.full(v.shape, float(confident))
    b = _array(bounds) if np.ndim(bounds) else np.full(v.shape, float(bounds))
    keep = np.isfinite(x) & np.isfinite(v)
    x, v, u, b = x[keep], v[keep], u[keep], b[keep]
    if x.size == 0:
        return None
    order = np.argsort(x)
    x, v, u, b = x[order], v[order], u[order], b[order]
    b = np.where(np.isfinite(u) & ~(b >= u), u, b)  # a confident uncertainty is also a bound
    i = int(np.argmax(v))
    best = float(x[i])
    if 0 < i < x.size - 1:
        a, c, _ = np.polyfit(x[i - 1:i + 2], v[i - 1:i + 2], 2)
        if a < 0:
            best = float(np.clip(-c / (2 * a), x[i - 1], x[i + 1]))
    lower = v - b
    floor = float(np.max(lower[np.isfinite(lower)])) if np.any(np.isfinite(lower)) else -np.inf
    could = np.where(np.isfinite(b), v + b >= floor, True)
    return {"value": best, "figure": float(v[i]), "uncertainty": float(u[i]) if np.isfinite(u[i]) else None,
            "interior": bool(0 < i < x.size - 1),
            "range": [float(x[could].min()), float(x[could].max())],
            "bounded": bool(np.all(np.isfinite(b[could])))}
