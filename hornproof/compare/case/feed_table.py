"""The optional ``[feed]`` table of a case file: the horn as a reflector feed.

Keys (all optional; without the table the feed figures that need no reflector are still made):

* ``half_angle_deg`` — half-angle the reflector rim subtends at the focus, degrees (0, 90]; or
* ``f_over_d`` — the focal ratio of a focus-fed paraboloid (> 0.125, i.e. θ₀ < 127°; at most
  one of the two; f/D = 1/(4 tan(θ₀/2)));
* ``beamwidth_level_db`` — a further beamwidth level besides −10 dB, dB below the peak
  (negative, −40 … −0.5);
* ``phase_centre_level_db`` — the main-lobe window of the phase-centre fit, dB below the peak
  (negative, −30 … −1; default −10).
"""

from dataclasses import dataclass

import numpy as np

from ...analytic.phase_centre import PHASE_CENTRE_LEVEL_DB
from ...analytic.reflector_efficiency import f_over_d_from_half_angle, half_angle_from_f_over_d
from .values import CaseProblem, check_keys, read_bounded

FEED_KEYS = ("half_angle_deg", "f_over_d", "beamwidth_level_db", "phase_centre_level_db")

#: the beamwidth level reported for every horn, dB below the peak
STANDARD_BEAMWIDTH_LEVEL_DB = -10.0


@dataclass(frozen=True)
class FeedSpec:
    """What the feed figures are computed for (SI inside: the half-angle in radians).

    ``half_angle_rad`` and ``f_over_d`` are None when no reflector is named.
    """

    half_angle_rad: float = None
    f_over_d: float = None
    beamwidth_level_db: float = None
    phase_centre_level_db: float = PHASE_CENTRE_LEVEL_DB

    @property
    def has_reflector(self):
        return self.half_angle_rad is not None

    def to_dict(self):
        """JSON-ready, edge units."""
        return {"half_angle_deg": None if self.half_angle_rad is None else float(np.degrees(self.half_angle_rad)),
                "f_over_d": self.f_over_d, "beamwidth_level_db": self.beamwidth_level_db,
                "phase_centre_level_db": self.phase_centre_level_db}


def read_feed(table):
    """The ``FeedSpec`` of a ``[feed]`` table (an empty table or none: no reflector)."""
    check_keys(table, FEED_KEYS, "feed")
    if "half_angle_deg" in table and "f_over_d" in table:
        raise CaseProblem("feed.f_over_d", "give half_angle_deg or f_over_d, not both")
    half_angle = f_over_d = None
    if "half_angle_deg" in table:
        half_angle = np.radians(read_bounded(table, "half_angle_deg", "feed", None, 0.0, 90.0, unit="degrees"))
        f_over_d = float(f_over_d_from_half_angle(half_angle))
    elif "f_over_d" in table:
        f_over_d = read_bounded(table, "f_over_d", "feed", None, 0.125, 100.0, unit="focal length over diameter")
        half_angle = float(half_angle_from_f_over_d(f_over_d))
    level = read_bounded(table, "beamwidth_level_db", "feed", None, -40.0, -0.5, unit="dB below the peak",
                         low_inclusive=True)
    window = read_bounded(table, "phase_centre_level_db", "feed", PHASE_CENTRE_LEVEL_DB, -30.0, -1.0,
                          unit="dB below the peak", low_inclusive=True)
    return FeedSpec(half_angle_rad=None if half_angle is None else float(half_angle),
                    f_over_d=None if f_over_d is None else float(f_over_d),
                    beamwidth_level_db=level, phase_centre_level_db=float(window))
