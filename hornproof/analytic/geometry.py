"""Geometry of a rectangular horn: apex distances, flare angles, peak phase errors.

Conventions (used everywhere in hornproof):

* The horn axis is z. The throat (end of the feed guide) is at z = 0, the aperture plane at
  z = ``flare_length``. The H-plane is the xz plane (guide width ``a`` and aperture width
  ``A`` along x); the E-plane is the yz plane (TE10 electric field along y; guide height ``b``,
  aperture height ``B``).
* Apex distances are **axial**: from the (virtual) apex of the flare in that plane to the
  aperture plane, along z. Slant lengths run from the apex to the aperture edge.
* Peak phase error in wavelengths uses the quadratic approximation of the path length:
  S = A² / (8 λ R_h) (H-plane), T = B² / (8 λ R_e) (E-plane) with R the axial apex distance
  (C. A. Balanis, *Antenna Theory*, 3rd ed., ch. 13, where ρ1, ρ2 are axial). The exact extra
  path at the edge, √(R² + (A/2)²) − R, is also given.

All lengths SI (metres). A plane without flare has an infinite apex distance and zero phase error.
"""

from dataclasses import dataclass

import numpy as np

from ..units import GHZ, to_mm, wavelength

HORN_TYPES = ("h-sectoral", "e-sectoral", "pyramidal")


@dataclass(frozen=True)
class HornGeometry:
    """A rectangular horn fed by a TE10 guide, all lengths in metres.

    Parameters
    ----------
    kind : {"h-sectoral", "e-sectoral", "pyramidal"}
    guide_a, guide_b : float
        Inner width (H-plane) and height (E-plane) of the feed guide, m.
    aperture_a, aperture_b : float
        Aperture width A (H-plane) and height B (E-plane), m. For an H-plane sectoral horn
        ``aperture_b == guide_b``; for an E-plane sectoral horn ``aperture_a == guide_a``.
    flare_length : float
        Axial length from throat to aperture, m (the same in both planes, so a pyramidal
        horn defined this way is always realizable: both flares start and end together).
    wall_thickness : float
        Metal wall thickness, m (the full-wave model may thicken it; see ``sim``).
    """

    kind: str
    guide_a: float
    guide_b: float
    aperture_a: float
    aperture_b: float
    flare_length: float
    wall_thickness: float = 1.0e-3

    def __post_init__(self):
        problems = validate_geometry(self)
        if problems:
            raise ValueError(problems[0][1])

    # --- derived sizes -------------------------------------------------------------------
    @property
    def flares_h(self):
        return self.aperture_a > self.guide_a

    @property
    def flares_e(self):
        return self.aperture_b > self.guide_b

    @property
    def apex_h(self):
        """Axial distance R_h from the H-plane apex to the aperture, m (inf if no flare)."""
        return apex_distance(self.guide_a, self.aperture_a, self.flare_length)

    @property
    def apex_e(self):
        """Axial distance R_e from the E-plane apex to the aperture, m (inf if no flare)."""
        return apex_distance(self.guide_b, self.aperture_b, self.flare_length)

    @property
    def slant_h(self):
        """Slant length from the H-plane apex to the aperture edge, m (inf if no flare)."""
        return float(np.hypot(self.apex_h, self.aperture_a / 2)) if self.flares_h else np.inf

    @property
    def slant_e(self):
        return float(np.hypot(self.apex_e, self.aperture_b / 2)) if self.flares_e else np.inf

    @property
    def flare_half_angle_h(self):
        """H-plane flare half-angle, rad."""
        return flare_half_angle(self.guide_a, self.aperture_a, self.flare_length)

    @property
    def flare_half_angle_e(self):
        """E-plane flare half-angle, rad."""
        return flare_half_angle(self.guide_b, self.aperture_b, self.flare_length)

    def phase_error_h(self, frequency):
        """Quadratic peak phase error S = A²/(8 λ R_h) in wavelengths (array over frequency)."""
        return peak_phase_error(self.aperture_a, self.apex_h, wavelength(frequency))

    def phase_error_e(self, frequency):
        """Quadratic peak phase error T = B²/(8 λ R_e) in wavelengths."""
        return peak_phase_error(self.aperture_b, self.apex_e, wavelength(frequency))

    def exact_edge_path_h(self, frequency):
        """Exact extra path at the H-plane aperture edge, √(R²+(A/2)²) − R, in wavelengths."""
        return exact_edge_path(self.aperture_a, self.apex_h, wavelength(frequency))

    def exact_edge_path_e(self, frequency):
        return exact_edge_path(self.aperture_b, self.apex_e, wavelength(frequency))

    def summary(self, frequency):
        """The ``geometry`` block of ``result.json`` (edge units: mm, degrees, wavelengths).

        Phase errors are given at ``frequency`` (Hz, scalar: usually the band centre).
        """

        def mm(x):
            return None if not np.isfinite(x) else round(to_mm(float(x)), 6)

        return {
            "type": self.kind,
            "guide_a_mm": mm(self.guide_a),
            "guide_b_mm": mm(self.guide_b),
            "aperture_a_mm": mm(self.aperture_a),
            "aperture_b_mm": mm(self.aperture_b),
            "flare_length_mm": mm(self.flare_length),
            "wall_mm": mm(self.wall_thickness),
            "apex_h_mm": mm(self.apex_h),
            "apex_e_mm": mm(self.apex_e),
            "slant_h_mm": mm(self.slant_h),
            "slant_e_mm": mm(self.slant_e),
            "flare_half_angle_h_deg": float(np.degrees(self.flare_half_angle_h)),
            "flare_half_angle_e_deg": float(np.degrees(self.flare_half_angle_e)),
            "phase_error_h_wl": float(self.phase_error_h(frequency)),
            "phase_error_e_wl": float(self.phase_error_e(frequency)),
            "phase_reference_ghz": float(frequency) / GHZ,
        }


def apex_distance(guide_size, aperture_size, flare_length):
    """Axial apex-to-aperture distance R = L · D / (D − d) by similar triangles, m.

    ``d`` guide size, ``D`` aperture size in the same plane, ``L`` axial flare length.
    Infinite when the plane does not flare (D == d).
    """
    if aperture_size <= guide_size:
        return np.inf
    return flare_length * aperture_size / (aperture_size - guide_size)


def flare_half_angle(guide_size, aperture_size, flare_length):
    """Flare half-angle atan((D − d) / (2 L)), rad."""
    return float(np.arctan2(aperture_size - guide_size, 2.0 * flare_length))


def peak_phase_error(aperture_size, apex, wl):
    """Quadratic peak phase error D² / (8 λ R) in wavelengths (0 for an unflared plane)."""
    wl = np.asarray(wl, dtype=float)
    if not np.isfinite(apex):
        return np.zeros_like(wl)
    return aperture_size**2 / (8.0 * wl * apex)


def exact_edge_path(aperture_size, apex, wl):
    """Exact extra path at the aperture edge, √(R² + (D/2)²) − R, in wavelengths."""
    wl = np.asarray(wl, dtype=float)
    if not np.isfinite(apex):
        return np.zeros_like(wl)
    return (np.hypot(apex, aperture_size / 2) - apex) / wl


def validate_geometry(horn):
    """List of (field, reason) problems with a horn; empty when it is buildable.

    Field names are the dataclass fields; the case-file loader maps them to case-file keys.
    """
    problems = []
    if horn.kind not in HORN_TYPES:
        problems.append(("kind", f"horn type must be one of {', '.join(HORN_TYPES)}, got {horn.kind!r}"))
        return problems
    for name in ("guide_a", "guide_b", "aperture_a", "aperture_b", "flare_length", "wall_thickness"):
        value = getattr(horn, name)
        if not isinstance(value, (int, float)) or not np.isfinite(value) or value <= 0:
            problems.append((name, f"{name} must be a positive finite length, got {value!r}"))
    if problems:
        return problems
    if horn.guide_b > horn.guide_a:
        problems.append(("guide_b", "guide height b must not exceed width a (TE10 with E along the short side)"))
    if horn.aperture_a < horn.guide_a * (1 - 1e-9):
        problems.append(("aperture_a", "aperture width A is smaller than the guide width a"))
    if horn.aperture_b < horn.guide_b * (1 - 1e-9):
        problems.append(("aperture_b", "aperture height B is smaller than the guide height b"))
    if horn.kind == "h-sectoral":
        if abs(horn.aperture_b - horn.guide_b) > 1e-9 * horn.guide_b:
            problems.append(("aperture_b", "an H-plane sectoral horn keeps B equal to the guide height b"))
        if not horn.aperture_a > horn.guide_a:
            problems.append(("aperture_a", "an H-plane sectoral horn needs A larger than the guide width a"))
    if horn.kind == "e-sectoral":
        if abs(horn.aperture_a - horn.guide_a) > 1e-9 * horn.guide_a:
            problems.append(("aperture_a", "an E-plane sectoral horn keeps A equal to the guide width a"))
        if not horn.aperture_b > horn.guide_b:
            problems.append(("aperture_b", "an E-plane sectoral horn needs B larger than the guide height b"))
    if horn.kind == "pyramidal":
        if not (horn.aperture_a > horn.guide_a and horn.aperture_b > horn.guide_b):
            problems.append(("aperture_a", "a pyramidal horn flares in both planes: A > a and B > b"))
    if problems:
        return problems
    for plane, guide, aperture in (("aperture_a", horn.guide_a, horn.aperture_a),
                                   ("aperture_b", horn.guide_b, horn.aperture_b)):
        angle = np.degrees(flare_half_angle(guide, aperture, horn.flare_length))
        if angle >= 80.0:
            problems.append((plane, f"flare half-angle {angle:.1f} deg is 80 deg or more: not a horn"))
    return problems
