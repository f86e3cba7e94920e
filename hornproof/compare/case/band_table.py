"""The ``[band]`` table of a case file: the analysis frequencies, and whether the feed carries them.

A band is either ``f_min_ghz`` + ``f_max_ghz`` + ``points`` (evenly spaced) or an explicit
``frequencies_ghz`` list. A band reaching down to the feed guide's TE10 cutoff is refused; one
near cutoff, or reaching a higher guide mode, draws a warning.
"""

import numpy as np

from ...analytic.waveguide import (
    te01_cutoff_frequency,
    te10_cutoff_frequency,
    te20_cutoff_frequency,
)
from ...limits import MAX_BAND_POINTS, NEAR_CUTOFF_FRACTION
from ...units import GHZ, MM
from .values import CaseProblem, check_keys, read_integer, read_number_list, read_positive

BAND_KEYS = ("f_min_ghz", "f_max_ghz", "points", "frequencies_ghz")


def read_band(table, prefix):
    """Validated band: {"list": [GHz...]} or {"f_min", "f_max", "points"} in GHz."""
    check_keys(table, BAND_KEYS, prefix)
    if "frequencies_ghz" in table:
        return _read_frequency_list(table, prefix)
    if "f_min_ghz" not in table and "f_max_ghz" not in table:
        raise CaseProblem(f"{prefix}.f_min_ghz", "missing required key: give f_min_ghz, "
                                                 "f_max_ghz and points, or frequencies_ghz = [...]")
    f_min = read_positive(table, "f_min_ghz", prefix, unit="GHz")
    f_max = read_positive(table, "f_max_ghz", prefix, unit="GHz")
    if f_min > f_max:
        raise CaseProblem(f"{prefix}.f_min_ghz", f"f_min_ghz = {f_min:g} is above "
                                                 f"f_max_ghz = {f_max:g}")
    if "points" in table:
        points = read_band_points(table["points"], f"{prefix}.points", f_min, f_max)
    elif f_min == f_max:
        points = 1
    else:
        raise CaseProblem(f"{prefix}.points", "missing required key (number of frequencies "
                                              "from f_min_ghz to f_max_ghz)")
    return {"f_min": f_min, "f_max": f_max, "points": points, "points_key": f"{prefix}.points",
            "key_min": f"{prefix}.f_min_ghz", "key_max": f"{prefix}.f_max_ghz"}


def _read_frequency_list(table, prefix):
    """A band given as ``frequencies_ghz = [...]``: positive, strictly increasing, GHz."""
    clash = [key for key in ("f_min_ghz", "f_max_ghz", "points") if key in table]
    if clash:
        raise CaseProblem(f"{prefix}.{clash[0]}", "give either frequencies_ghz or "
                                                  "f_min_ghz + f_max_ghz + points, not both")
    dotted = f"{prefix}.frequencies_ghz"
    values = read_number_list(table["frequencies_ghz"], dotted)
    if len(values) > MAX_BAND_POINTS:
        raise CaseProblem(dotted, f"holds {len(values)} frequencies; at most {MAX_BAND_POINTS}")
    for value in values:
        if value <= 0:
            raise CaseProblem(dotted, f"frequencies must be positive (GHz), got {value:g}")
    if any(later <= earlier for earlier, later in zip(values, values[1:])):
        raise CaseProblem(dotted, "frequencies must be strictly increasing")
    return {"list": values, "key_min": dotted, "key_max": dotted}


def read_band_points(value, dotted, f_min, f_max):
    """Number of evenly spaced frequencies from ``f_min`` to ``f_max`` (GHz)."""
    points = read_integer(value, dotted)
    if points < 1:
        raise CaseProblem(dotted, f"must be at least 1, got {points}")
    if points > MAX_BAND_POINTS:
        raise CaseProblem(dotted, f"must be at most {MAX_BAND_POINTS}, got {points}")
    if points == 1 and f_min != f_max:
        raise CaseProblem(dotted, "one point needs f_min_ghz equal to f_max_ghz "
                                  "(or list the frequency in frequencies_ghz)")
    if points > 1 and f_min == f_max:
        raise CaseProblem(dotted, f"f_min_ghz equals f_max_ghz, so points must be 1, "
                                  f"got {points}")
    return points


def band_frequencies(band):
    """Frequencies of a validated band, Hz."""
    with np.errstate(over="ignore"):  # 1e308 GHz is inf Hz: the plausibility table refuses it
        if "list" in band:
            return np.array(band["list"], dtype=float) * GHZ
        return np.linspace(band["f_min"], band["f_max"], band["points"]) * GHZ


def check_band_against_guide(band, horn):
    """Refuse a band whose lowest frequency does not propagate in the feed guide (TE10)."""
    frequencies = band_frequencies(band)
    cutoff = float(te10_cutoff_frequency(horn.guide_a))
    lowest = float(frequencies.min())
    if lowest <= cutoff:
        raise CaseProblem(band["key_min"], f"{lowest / GHZ:g} GHz is at or below the TE10 "
                                           f"cutoff {cutoff / GHZ:.4g} GHz of the feed guide "
                                           f"(a = {horn.guide_a / MM:g} mm): nothing propagates")


def guide_warnings(band, frequencies, horn):
    """(key, reason) warnings: a band edge near TE10 cutoff, or above TE20 / TE01 cutoff."""
    warnings = []
    cutoff = float(te10_cutoff_frequency(horn.guide_a))
    lowest, highest = float(frequencies.min()), float(frequencies.max())
    if lowest < cutoff * (1 + NEAR_CUTOFF_FRACTION):
        warnings.append((band["key_min"], f"{lowest / GHZ:g} GHz is within "
                                          f"{NEAR_CUTOFF_FRACTION:.0%} of the TE10 cutoff "
                                          f"{cutoff / GHZ:.4g} GHz: the feed is strongly "
                                          f"dispersive there and hard to match"))
    for mode, limit, size in (("TE20", float(te20_cutoff_frequency(horn.guide_a)),
                               f"a = {horn.guide_a / MM:g} mm"),
                              ("TE01", float(te01_cutoff_frequency(horn.guide_b)),
                               f"b = {horn.guide_b / MM:g} mm")):
        if highest > limit:
            warnings.append((band["key_max"], f"above {limit / GHZ:.4g} GHz the {mode} mode can "
                                              f"propagate in the feed guide ({size}); the "
                                              f"models assume a pure TE10 feed"))
    return warnings
