"""RF exposure on a horn's axis: power density, the distance where a reference level holds.

An *estimate*, not a compliance assessment: the formulas are the simple conservative ones used
for a first look, the reference levels are quoted from memory, and local regulations and
licensed RF practice govern.

Power density on the axis (common formulas for aperture antennas; FCC OET Bulletin 65,
Edition 97-01 (1997), "Evaluating compliance with FCC guidelines for human exposure to
radiofrequency electromagnetic fields", §2, equations for the far field and for the surface
of an aperture antenna; from memory):

* far field: S = P G / (4π R²) (any antenna text; G the numeric gain). OET 65 notes that this
  over-predicts in the near field on the axis, so it is kept there as the conservative figure;
* the aperture surface bound: S ≤ 4 P / A_phys (OET 65's maximum power density at the surface of
  an aperture antenna, A_phys the physical aperture area). On the axis the estimate is the
  smaller of the two.

The distance beyond which a reference level S_lim holds on the axis is then
R = √(P G / (4π S_lim)), or 0 when even the surface bound 4P/A is below S_lim.

Reference levels (whole-body, time-averaged incident power density, W/m²; f_M the frequency in
MHz; quoted from memory — check them against the documents before any use):

* ICNIRP (2020), "Guidelines for limiting exposure to electromagnetic fields (100 kHz to
  300 GHz)", Health Physics 118(5) 483–524, Table 5 (reference levels for exposure averaged
  over 30 min and the whole body): occupational f_M/40 for 400 MHz–2 GHz and 50 W/m² for
  2–300 GHz; general public f_M/200 for 400 MHz–2 GHz and 10 W/m² for 2–300 GHz.
* IEEE Std C95.1-2019, exposure reference levels (ERLs) for whole-body exposure, persons in
  unrestricted environments (Table 7) and restricted environments (Table 8) — table numbers
  and values from memory, check them: the same values as ICNIRP's for these bands,
  unrestricted f_M/200 and 10 W/m², restricted f_M/40 and 50 W/m².

Outside 400 MHz – 300 GHz no level is given here (NaN): the tables change form there.
Local (6-min, small-area) levels, which are higher above 6 GHz, and peak limits for pulsed
transmitters are not covered.
"""

from dataclasses import dataclass

import numpy as np

__all__ = ["ReferenceLevel", "REFERENCE_LEVELS", "far_field_power_density", "aperture_surface_bound",
           "axial_power_density", "compliance_distance"]


@dataclass(frozen=True)
class ReferenceLevel:
    """One set of whole-body power-density reference levels.

    ``source`` cites the document and table; ``levels(f)`` gives W/m² (NaN outside 400 MHz–300 GHz).
    """

    key: str
    label: str
    source: str
    low_band_divisor: float  # S = f_MHz / divisor, 400 MHz – 2 GHz
    high_band_level: float  # W/m², 2 – 300 GHz

    def levels(self, frequency):
        f = np.asarray(frequency, dtype=float)
        f_mhz = f / 1e6
        out = np.where(f_mhz < 2000.0, f_mhz / self.low_band_divisor, self.high_band_level)
        return np.where((f_mhz >= 400.0) & (f_mhz <= 300e3), out, np.nan)


REFERENCE_LEVELS = (
    ReferenceLevel("icnirp2020_general_public", "ICNIRP 2020, general public",
                   "ICNIRP (2020) Health Phys. 118:483, Table 5, whole body, 30-min average (from memory)",
                   200.0, 10.0),
    ReferenceLevel("icnirp2020_occupational", "ICNIRP 2020, occupational",
                   "ICNIRP (2020) Health Phys. 118:483, Table 5, whole body, 30-min average (from memory)",
                   40.0, 50.0),
    ReferenceLevel("ieee_c95_1_2019_unrestricted", "IEEE C95.1-2019, unrestricted environments",
                   "IEEE Std C95.1-2019, whole-body exposure reference levels, unrestricted "
                   "environments (Table 7, from memory)", 200.0, 10.0),
    ReferenceLevel("ieee_c95_1_2019_restricted", "IEEE C95.1-2019, restricted environments",
                   "IEEE Std C95.1-2019, whole-body exposure reference levels, restricted "
                   "environments (Table 8, from memory)", 40.0, 50.0),
)


def far_field_power_density(power, gain, distance):
    """S = P G / (4π R²), W/m² (P in W, G linear, R in m)."""
    return np.asarray(power, dtype=float) * np.asarray(gain, dtype=float) / (
        4 * np.pi * np.asarray(distance, dtype=float) ** 2)


def aperture_surface_bound(power, aperture_area):
    """Maximum power density at an aperture antenna's surface, 4P/A, W/m² (OET 65, from memory)."""
    return 4.0 * np.asarray(power, dtype=float) / float(aperture_area)


def axial_power_density(power, gain, aperture_area, distance):
    """On-axis estimate min(P G/(4πR²), 4P/A), W/m² (module notes)."""
    return np.minimum(far_field_power_density(power, gain, distance), aperture_surface_bound(power, aperture_area))


def compliance_distance(power, gain, aperture_area, level):
    """Distance (m) on the axis beyond which the estimate is at or below ``level`` (W/m²).

    0 when the aperture surface bound 4P/A is already at or below the level; NaN when no level
    is defined. Broadcasts.
    """
    power = np.asarray(power, dtype=float)
    level = np.asarray(level, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        far = np.sqrt(power * np.asarray(gain, dtype=float) / (4 * np.pi * level))
        inside = aperture_surface_bound(power, aperture_area) <= level
    return np.where(np.isnan(level), np.nan, np.where(inside, 0.0, far))
