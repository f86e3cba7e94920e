"""Beam figures of a sampled pattern cut: half-power beamwidth, first null, first sidelobe.

A local fallback used by ``sim.run`` only while ``hornproof.analytic.pattern_metrics`` is not
available; both read a cut in dB over θ in degrees (−180…180) with the beam at θ = 0.
Definitions are the trade's (IEEE Std 145, terms "half-power beamwidth", "side lobe"):
HPBW is the full angle between the −3 dB points either side of the beam peak; the first null
is the first local minimum moving out from boresight; the sidelobe level is the highest local
maximum beyond the first null, relative to the beam peak.
"""

import numpy as np


def _one_side(theta, level):
    """Figures on θ ≥ 0 of a cut normalised to 0 dB at boresight: (half-power, null, sidelobe)."""
    half_power = np.nan
    below = np.nonzero(level <= -3.0103)[0]
    if below.size:
        i = below[0]
        if i > 0:
            t0, t1, l0, l1 = theta[i - 1], theta[i], level[i - 1], level[i]
            half_power = t0 + (-3.0103 - l0) * (t1 - t0) / (l1 - l0)
    null = np.nan
    sidelobe = np.nan
    for i in range(1, level.size - 1):
        if level[i] <= level[i - 1] and level[i] < level[i + 1] and level[i] < -3.0103:
            null = theta[i]
            rest = level[i + 1:]
            if rest.size:
                sidelobe = float(np.max(rest))
            break
    return half_power, null, sidelobe


def cut_figures(theta_deg, cut_db):
    """(hpbw_deg, first_null_deg, sidelobe_db) of one cut; NaN where not found.

    The null angle is the mean of the two sides; the sidelobe level the higher of the two.
    """
    theta = np.asarray(theta_deg, dtype=float)
    cut = np.asarray(cut_db, dtype=float)
    if not np.all(np.isfinite(cut)):
        return np.nan, np.nan, np.nan
    boresight = int(np.argmin(np.abs(theta)))
    level = cut - cut[boresight]
    plus = _one_side(theta[boresight:], level[boresight:])
    minus = _one_side(-theta[boresight::-1], level[boresight::-1])
    hpbw = plus[0] + minus[0]
    null = 0.5 * (plus[1] + minus[1])
    sidelobe = np.nanmax([plus[2], minus[2]]) if np.isfinite([plus[2], minus[2]]).any() else np.nan
    return float(hpbw), float(null), float(sidelobe)
