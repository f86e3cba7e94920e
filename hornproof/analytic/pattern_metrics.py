"""Beam metrics on sampled pattern cuts: half-power beamwidth, main lobe, first null, first sidelobe.

Shared by the analytic models and the full-wave side, so written for measured-like data and
so that both sides name the *same* feature: the cut is an array whose last axis is θ (degrees,
any grid, sorted here if it is not), any leading axes (frequency, …) are looped over, NaN and
+inf samples are dropped, −inf (exact nulls of an analytic pattern) is replaced by a floor
400 dB below the peak. Values may be directivity in dBi or any dB scale: only differences
matter.

Terms of the trade (IEEE Std 145-2013, *Definitions of Terms for Antennas*; quoted from memory,
the wording of the standard may differ slightly):

* *radiation lobe*: "a portion of the radiation pattern bounded by regions of relatively weak
  radiation intensity";
* *major lobe* (*main lobe*): "the radiation lobe containing the direction of maximum
  radiation";
* *minor lobe*: "any radiation lobe except a major lobe";
* *side lobe*: "a radiation lobe in any direction other than that of the major lobe"
  (the *first side lobe* is the one next to the major lobe);
* *null*: a direction of zero, or in practice of a deep minimum of, radiation intensity
  between two lobes.

The standard says "relatively weak" without a number; hornproof makes it a number (below).

Definitions (per cut and side, walking outward from the peak):

* **Peak**: the largest sample within ``max_angle_deg`` of boresight (so a rear lobe, e.g. the
  mirror image of the e-field equivalent, is never taken for the main beam); its angle and
  level refined by a parabola through the three samples around it, in dB (or, with
  ``peak_fit_db``, by a least-squares parabola over the top of the beam, for noisy data).
* **Half-power beamwidth** (``hpbw_deg``): walking outward from the peak, the first crossing
  of half the peak power (peak − 3.0103 dB, ``HALF_POWER_DB``: the "−3 dB" points) on each
  side, placed between the two samples that bracket it by a 3-point quadratic in dB (linear in
  dB if that fails); the width is right − left. Uses the whole cut (wide beams may cross
  beyond 90°); NaN if either side never crosses.
* **Main lobe edge**: the first local minimum of the cut beyond the half-power crossing,
  within ``max_angle_deg`` of boresight. Dips shallower than ``ripple_db`` (default
  ``RIPPLE_DB`` = 0.25 dB) are sampling or numerical ripple and are walked over. The edge is a
  **null** when its *prominence* — its depth below the lower of the two maxima beside it
  (the maximum reached on each side before the pattern falls below the dip again, as in
  ``scipy.signal.find_peaks``) — is at least ``null_prominence_db`` (default
  ``NULL_PROMINENCE_DB`` = 3 dB); otherwise it is a **shoulder**: the dip does not separate
  two lobes, the main lobe and the next merge, and no null bounds the main lobe there. A
  filled null can also leave no dip at all, only a plateau: where, before the first dip, the
  pattern falls by less than ``ripple_db`` over a quarter of the half-power beamwidth
  (``PLATEAU_FRACTION``) and then falls again by at least ``null_prominence_db``, the edge is a
  shoulder too, read at the flattest sample of the plateau. If neither a dip nor a plateau lies
  within ``max_angle_deg``, the edge is **none within ±90°** (with the actual
  ``max_angle_deg``).
* **First null** (``first_null_deg``): the angle of a main-lobe edge that is a null, refined
  from the nearby samples: a parabola in *linear power* for a shallow (filled) null, the root of
  the signed amplitude for a deep one (see ``refine_min_linear``). ``first_null_deg`` is the
  mean distance of the nulls of the two sides from the peak (one side's distance if only that
  side has one); NaN when the cut's main lobe edge is a shoulder (a far-off dip beyond a
  shoulder is not the first null of the pattern). Per side: ``first_null_left_deg`` /
  ``first_null_right_deg`` (signed angles).
* **First sidelobe** (``first_sidelobe_deg``, ``sll_db``): beyond a null, the largest local
  maximum of the next lobe outward — the samples up to the next null (next dip of at least
  ``null_prominence_db``) or ``max_angle_deg``; beyond a shoulder, the largest local maximum
  before the next dip (the bump that makes the shoulder), or the plateau's flattest sample.
  A maximum is refined by a parabola in dB.
  ``sll_db`` (dB relative to the peak, ≤ 0) is the higher of the two sides whose edge is of
  the cut's kind, ``first_sidelobe_deg`` its distance from the peak; per side
  ``sll_left_db`` / ``sll_right_db`` and signed ``first_sidelobe_left_deg`` /
  ``first_sidelobe_right_deg``. With ``sidelobe="highest"`` the level is the highest local
  maximum beyond the edge instead (the peak sidelobe level).
* **Main lobe edge flag** (``main_lobe_edge``, one string per cut): ``"shoulder"`` if either
  side's edge is a shoulder, else ``"null"`` if either side has a null, else
  ``"none within ±90°"`` (with the actual ``max_angle_deg``); None for an all-NaN cut.

Comparing two cuts (FDTD against an aperture model) feature by feature:
:func:`same_sidelobe_feature` says whether both name the same first sidelobe, and
:func:`level_at_angle` reads one cut at the other's sidelobe angle, so that a shoulder on one
side is compared with the other side's sidelobe *at the same angle*, not with a far-off dip.

Results are NaN where a quantity does not exist (all-NaN cut; too few samples).
"""

import numpy as np
from scipy.signal import find_peaks

from .cut_sampling import crossing, fit_peak, refine_max_db, refine_min_linear

__all__ = ["cut_metrics", "half_power_beamwidth", "first_null", "sidelobe_level", "plane_features",
           "level_at_angle", "same_sidelobe_feature", "edge_flag_none", "METRIC_KEYS",
           "NULL_PROMINENCE_DB", "RIPPLE_DB", "HALF_POWER_DB"]

METRIC_KEYS = (
    "peak_deg", "peak_db", "hpbw_deg", "first_null_deg", "first_null_left_deg",
    "first_null_right_deg", "sll_db", "sll_left_db", "sll_right_db", "first_sidelobe_deg",
    "first_sidelobe_left_deg", "first_sidelobe_right_deg",
)

_FLOOR_BELOW_PEAK_DB = 400.0

#: least prominence (dB) of a dip to count as a null that separates two lobes: the dip must
#: fall at least half power (3 dB) below the lower of the two maxima beside it. Half power is
#: the trade's own boundary of a lobe (the half-power beamwidth); a dip that does not reach
#: half the power of the weaker neighbouring maximum leaves both maxima inside one lobe's
#: half-power region, so the pattern shows one merged lobe with a shoulder. hornproof's
#: choice, argued from that convention; IEEE Std 145 only says "relatively weak".
NULL_PROMINENCE_DB = 3.0

#: dips shallower than this (dB) are ripple (sampling, far-field transform noise) and are
#: walked over: a shoulder must show at least this much of a dip. hornproof's choice; noisy
#: measured-like data need a larger value (``ripple_db``) or smoothing.
RIPPLE_DB = 0.25

#: a stretch of this fraction of the half-power beamwidth over which the pattern falls by less
#: than ``RIPPLE_DB``, followed by a further fall of at least ``NULL_PROMINENCE_DB``, is a
#: shoulder without a dip (a filled null that leaves a plateau). A quarter beamwidth is about a
#: quarter of the spacing of an aperture's lobes (λ/L in sin θ against a half-power width of
#: 0.89–1.19 λ/L, Silver 1949, Table 6.1): a main-lobe flank or a null's approach falls by
#: several dB over it. hornproof's choice.
PLATEAU_FRACTION = 0.25

#: half power in dB, −10 log10 2 ≈ −3.0103 dB
HALF_POWER_DB = -10.0 * np.log10(2.0)


def edge_flag_none(max_angle_deg=90.0):
    """The main-lobe edge flag of a cut with no dip within ``max_angle_deg``."""
    return f"none within ±{max_angle_deg:g}°"


def _lobe_maximum(theta, p, hills, first, last):
    """Largest hill (index into the cut) strictly between sample indices first and last, or None."""
    lo, hi = sorted((first, last))
    inside = hills[(hills > lo) & (hills < hi)]
    if inside.size == 0:
        return None
    return int(inside[np.argmax(p[inside])])


def _plateau(theta, p, start, stop, step, width_deg, ripple_db, null_prominence_db):
    """A shoulder without a dip between sample indices start and stop (exclusive), walking by
    step: the first sample from which the pattern falls by less than ``ripple_db`` over
    ``width_deg`` and afterwards, before ``stop``, by at least ``null_prominence_db``. Returns
    the index of the flattest sample of that stretch (least |dp/dθ|), or None."""
    indices = list(range(start, stop, step))
    for n, j in enumerate(indices):
        span = [k for k in indices[n + 1:] if abs(theta[k] - theta[j]) >= width_deg]
        if not span:
            return None
        k = span[0]
        if p[j] - p[k] >= ripple_db:
            continue
        rest = indices[n + 1:]
        if p[j] - np.min(p[rest]) < null_prominence_db:
            return None
        flat = [m for m in indices[n:] if 0 < m < len(p) - 1 and (theta[m] - theta[k]) * step <= 0]
        slope = [abs((p[m + 1] - p[m - 1]) / (theta[m + 1] - theta[m - 1])) for m in flat]
        return flat[int(np.argmin(slope))] if flat else j
    return None


def _side(theta, p, start, step, valleys, prominence, hills, window_end, null_prominence_db, ripple_db,
          plateau_deg, sidelobe):
    """Main-lobe edge and first sidelobe on one side: (kind, edge index or None, lobe index or None)."""
    ahead = valleys[valleys >= start] if step > 0 else valleys[valleys <= start][::-1]
    ahead = ahead[(ahead - window_end) * step <= 0]
    stop = int(ahead[0]) if ahead.size else window_end + step
    if np.isfinite(plateau_deg):
        flat = _plateau(theta, p, start, stop, step, plateau_deg, ripple_db, null_prominence_db)
        if flat is not None:
            return "shoulder", None, flat
    if ahead.size == 0:
        return "none", None, None
    edge = int(ahead[0])
    kind = "null" if prominence[edge] >= null_prominence_db else "shoulder"
    if sidelobe == "highest":
        return kind, edge, _lobe_maximum(theta, p, hills, edge, window_end + step)
    if kind == "null":
        further = [int(v) for v in ahead[1:] if prominence[v] >= null_prominence_db]
    else:
        further = [int(v) for v in ahead[1:]]
    stop = further[0] if further else window_end + step
    return kind, edge, _lobe_maximum(theta, p, hills, edge, stop)


def _one_cut(theta, p, max_angle_deg, null_prominence_db, ripple_db, sidelobe, peak_fit_db):
    out = dict.fromkeys(METRIC_KEYS, np.nan)
    out["main_lobe_edge"] = None
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
        peak_deg, peak_db = refine_max_db(theta, p, peak_i)
    else:
        peak_deg, peak_db = fit_peak(theta, p, peak_i, peak_fit_db)
    out["peak_deg"], out["peak_db"] = peak_deg, peak_db

    level = peak_db + HALF_POWER_DB
    left, i_left = crossing(theta, p, peak_i, level, -1)
    right, i_right = crossing(theta, p, peak_i, level, +1)
    out["hpbw_deg"] = right - left

    inside = np.flatnonzero(np.abs(theta) <= max_angle_deg)
    valleys, found = find_peaks(-p, prominence=ripple_db)
    prominence = dict(zip(valleys.tolist(), found["prominences"]))
    hills, _ = find_peaks(p, prominence=ripple_db)
    valleys = valleys[np.abs(theta[valleys]) <= max_angle_deg]
    hills = hills[np.abs(theta[hills]) <= max_angle_deg]

    kinds = {}
    for name, start, step, window_end in (("left", i_left, -1, inside[0]), ("right", i_right, +1, inside[-1])):
        if start is None:
            continue
        kind, edge, lobe = _side(theta, p, start, step, valleys, prominence, hills, window_end,
                                 null_prominence_db, ripple_db, out["hpbw_deg"] * PLATEAU_FRACTION, sidelobe)
        kinds[name] = kind
        if kind == "null":
            out[f"first_null_{name}_deg"] = refine_min_linear(theta, p, edge)
        if lobe is not None:
            lobe_deg, lobe_db = refine_max_db(theta, p, lobe) if lobe in hills else (theta[lobe], p[lobe])
            out[f"sll_{name}_db"] = lobe_db - peak_db
            out[f"first_sidelobe_{name}_deg"] = lobe_deg
    found_kinds = set(kinds.values())
    flag = ("shoulder" if "shoulder" in found_kinds else "null" if "null" in found_kinds
            else edge_flag_none(max_angle_deg))
    out["main_lobe_edge"] = flag
    if flag == "null":
        nulls = [abs(out[f"first_null_{name}_deg"] - peak_deg) for name, kind in kinds.items() if kind == "null"]
        out["first_null_deg"] = float(np.mean(nulls))
    if flag in ("null", "shoulder"):
        lobes = [(out[f"sll_{name}_db"], abs(out[f"first_sidelobe_{name}_deg"] - peak_deg))
                 for name, kind in kinds.items() if kind == flag and np.isfinite(out[f"sll_{name}_db"])]
        if lobes:
            out["sll_db"], out["first_sidelobe_deg"] = max(lobes)
    return out


def cut_metrics(theta_deg, pattern_db, *, max_angle_deg=90.0, null_prominence_db=NULL_PROMINENCE_DB,
                ripple_db=RIPPLE_DB, sidelobe="first", peak_fit_db=None):
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
        Least prominence (dB) of a dip to be a null rather than a shoulder (default 3 dB,
        ``NULL_PROMINENCE_DB``; see its note).
    ripple_db : float
        Dips and bumps shallower than this (dB) are ripple and ignored (default 0.25 dB).
    sidelobe : {"first", "highest"}
        ``"first"`` (default): the largest maximum of the lobe next to the main lobe (IEEE
        Std 145's first side lobe). ``"highest"``: the highest maximum beyond the main-lobe
        edge (peak sidelobe level).
    peak_fit_db : float, optional
        For noisy cuts: estimate the peak by a least-squares parabola (in dB) through the
        contiguous samples within this many dB of the largest sample, instead of the 3-point
        vertex (the largest noisy sample overestimates the peak, which narrows the beamwidth
        and lowers relative sidelobes). Default None: the 3-point vertex (exact data).

    Returns
    -------
    dict
        Keys ``METRIC_KEYS`` (float arrays of shape [...]; angles in degrees, levels in dB)
        and ``main_lobe_edge`` (object array of shape [...]: ``"null"``, ``"shoulder"``,
        ``"none within ±90°"``, or None for an all-NaN cut). See the module notes.
    """
    if sidelobe not in ("highest", "first"):
        raise ValueError(f"sidelobe must be 'first' or 'highest', got {sidelobe!r}")
    if peak_fit_db is not None and not peak_fit_db > 0:
        raise ValueError(f"peak_fit_db must be positive, got {peak_fit_db!r}")
    if not null_prominence_db > 0:
        raise ValueError(f"null_prominence_db must be positive, got {null_prominence_db!r}")
    if not 0 < ripple_db <= null_prominence_db:
        raise ValueError(f"ripple_db must be positive and at most null_prominence_db, got {ripple_db!r}")
    theta = np.asarray(theta_deg, dtype=float)
    p = np.asarray(pattern_db, dtype=float)
    if theta.ndim != 1 or p.shape[-1:] != theta.shape:
        raise ValueError(f"pattern_db must have θ (length {theta.shape}) as its last axis, got shape {p.shape}")
    lead = p.shape[:-1]
    flat = p.reshape(-1, theta.size)
    results = {key: np.full(flat.shape[0], np.nan) for key in METRIC_KEYS}
    results["main_lobe_edge"] = np.full(flat.shape[0], None, dtype=object)
    for row in range(flat.shape[0]):
        one = _one_cut(theta, flat[row], max_angle_deg, null_prominence_db, ripple_db, sidelobe, peak_fit_db)
        for key, value in one.items():
            results[key][row] = value
    return {key: value.reshape(lead) for key, value in results.items()}


def plane_features(theta_deg, h_plane_db, e_plane_db, **options):
    """The per-frequency feature figures of both principal planes, for ``ModelResult.extra``.

    Returns a dict of arrays [nf]: ``first_sidelobe_h_deg``, ``first_sidelobe_e_deg`` (distance
    of the first sidelobe, or of the shoulder's bump, from the peak, degrees) and
    ``main_lobe_edge_h``, ``main_lobe_edge_e`` (the flag of :func:`cut_metrics`; None where the
    plane has no cut).
    """
    out = {}
    for plane, cut in (("h", h_plane_db), ("e", e_plane_db)):
        m = cut_metrics(theta_deg, cut, **options)
        out[f"first_sidelobe_{plane}_deg"] = np.atleast_1d(m["first_sidelobe_deg"])
        out[f"main_lobe_edge_{plane}"] = np.atleast_1d(m["main_lobe_edge"])
    return out


def level_at_angle(theta_deg, pattern_db, angle_deg):
    """The cut's level (dB) at ``angle_deg`` (degrees), linear in dB between the two samples
    around it; NaN outside the sampled range or next to a NaN sample. Arrays broadcast over
    ``angle_deg``; ``pattern_db`` is one cut [nθ]."""
    theta = np.asarray(theta_deg, dtype=float)
    p = np.asarray(pattern_db, dtype=float)
    order = np.argsort(theta, kind="stable")
    theta, p = theta[order], p[order]
    angle = np.asarray(angle_deg, dtype=float)
    j = np.clip(np.searchsorted(theta, angle, side="right") - 1, 0, theta.size - 2)
    x0, x1, y0, y1 = theta[j], theta[j + 1], p[j], p[j + 1]
    with np.errstate(invalid="ignore"):
        value = y0 + (angle - x0) / (x1 - x0) * (y1 - y0)
        value = np.where(np.isclose(angle, x0), y0, value)
    inside = np.isfinite(angle) & (angle >= theta[0]) & (angle <= theta[-1])
    return np.where(inside, value, np.nan)


def same_sidelobe_feature(edge_a, sidelobe_a_deg, edge_b, sidelobe_b_deg, hpbw_deg):
    """Whether two cuts' first sidelobes are the same feature of the pattern.

    The same when both main-lobe edges are of the same kind (both nulls, both shoulders) and
    the two sidelobe angles (distances from the peak, degrees) lie within half a beamwidth
    (``hpbw_deg``, of the reference cut) of each other: an aperture's lobes are spaced by
    about one beamwidth (λ/L in sin θ, against a half-power width of 0.89–1.19 λ/L, Silver
    1949, Table 6.1), so features farther apart than half of it are different lobes.
    """
    if edge_a is None or edge_b is None or edge_a != edge_b:
        return False
    if edge_a not in ("null", "shoulder"):
        return True
    gap = abs(float(sidelobe_a_deg) - float(sidelobe_b_deg))
    return bool(np.isfinite(gap) and np.isfinite(hpbw_deg) and gap <= 0.5 * float(hpbw_deg))


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
