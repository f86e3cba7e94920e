"""Beamwidth of a sampled cut at any level below its peak (−10 dB for feeds, or a user's level).

Walking outward from the peak on each side, the first sample below ``peak + level_db`` and the
one before it bracket the crossing, placed by linear interpolation in dB; the beamwidth is
right − left. NaN when either side never falls that far. The same walk as the half-power
beamwidth of :mod:`hornproof.analytic.pattern_metrics` (IEEE Std 145-2013 "beamwidth" at a
stated level), kept apart because feeds quote levels other than −3 dB. Pure numpy.
"""

import numpy as np


def beamwidth_at_level(theta_deg, cut_db, level_db, *, max_angle_deg=90.0):
    """Beamwidth (degrees) at ``level_db`` (negative) below the peak, per leading index of ``cut_db``.

    ``theta_deg`` [nθ] rising; ``cut_db`` [..., nθ]; the peak is the largest sample within
    ``max_angle_deg`` of boresight. Returns an array [...].
    """
    if not level_db < 0:
        raise ValueError(f"level_db must be negative (dB below the peak), got {level_db!r}")
    theta = np.asarray(theta_deg, dtype=float)
    if np.any(np.diff(theta) <= 0):
        raise ValueError("theta_deg must rise")
    cut = np.asarray(cut_db, dtype=float)
    flat = cut.reshape(-1, theta.size)
    out = np.full(flat.shape[0], np.nan)
    for row_index, row in enumerate(flat):
        front = np.where(np.isfinite(row) & (np.abs(theta) <= max_angle_deg), row, -np.inf)
        if not np.any(np.isfinite(front)):
            continue
        peak = int(np.argmax(front))
        floor = front[peak] + level_db
        edges = []
        for step in (-1, 1):
            i = peak
            while 0 <= i + step < theta.size and row[i + step] >= floor:
                i += step
            j = i + step
            if not 0 <= j < theta.size or not np.isfinite(row[j]):
                break
            t = (row[i] - floor) / (row[i] - row[j])
            edges.append(theta[i] + t * (theta[j] - theta[i]))
        if len(edges) == 2:
            out[row_index] = edges[1] - edges[0]
    return out.reshape(cut.shape[:-1])
