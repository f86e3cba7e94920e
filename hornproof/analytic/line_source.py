"""A rectangular horn aperture as the product of two line sources, and its radiation.

The TE10 aperture field of a rectangular horn is separable,
E_y(x, y) = e_h(x)·e_e(y): the H-plane line source e_h (cosine taper cos(πx/A) across the
width A, along x) times the E-plane line source e_e (uniform across the height B, along y),
each carrying the phase of its own flare. The radiation integral is then the product
F(k_x, k_y) = I_h(k_x)·I_e(k_y) with k_x = k sinθ cosφ, k_y = k sinθ sinφ and
I(κ) = ∫ e(x) exp(jκx) dx. The aperture models (``closed_form``, ``exact_phase``) differ only
in how they evaluate I and ∫|e|²; this module turns those into directivity.

Directivity, aperture (Kirchhoff) approximation, radiated power = aperture power:

    D(θ, φ) = (4π/λ²) · P(θ, φ) · |I_h(k_x) I_e(k_y)|² / (∫|e_h|² dx · ∫|e_e|² dy)

with the element factor P of the aperture equivalent (C. A. Balanis, *Antenna Theory*,
3rd ed., §12.5 and Table 12.1; S. Silver, *Microwave Antenna Theory and Design*, §5.11):

* ``"huygens"`` (default) — electric and magnetic currents of a plane wave (free-space
  equivalent, Huygens source): E_θ ∝ (1 + cosθ)/2 · sinφ, E_φ ∝ (1 + cosθ)/2 · cosφ, so
  P = ((1 + cosθ)/2)².
* ``"e-field"`` — magnetic current 2M = −2n×E only (aperture in an infinite ground plane):
  E_θ ∝ sinφ, E_φ ∝ cosθ cosφ, so P = sin²φ + cos²θ cos²φ. In the E-plane (φ = 90°) P = 1,
  in the H-plane (φ = 0) P = cos²θ: the E-plane cuts of the two equivalents differ by
  ((1 + cosθ)/2)², the H-plane cuts by ((1 + cosθ)/(2 cosθ))².

Both are 1 at boresight, so boresight directivity does not depend on the equivalent.

Angles beyond 90° (rear hemisphere): the aperture model is not meaningful there (it ignores
the outside of the horn and the rim diffraction that makes the real back lobe). The same
formula is evaluated all the same, so that a −180…180° cut has values: for the Huygens
source this is its cardioid rear radiation, falling to zero at 180°; for the e-field
equivalent it is the mirror image of the front (the image of the ground-plane problem), with
no physical meaning. Pattern metrics look only at the front hemisphere by default.

Two-dimensional model (a sectoral horn's flared plane, infinite and uniform in the other
direction, as in a 2D full-wave run): per unit length, relative to an isotropic line source,

    D₂(θ) = k · P₁(θ) · |I(k sinθ)|² / ∫|e|² dx = (2π/λ)·P₁·|∫e e^{jκx}dx|² / ∫|e|² dx,

P₁ the principal-plane element factor of the same equivalent (Huygens ((1 + cosθ)/2)²;
e-field cos²θ in the H-plane, 1 in the E-plane). A uniform aperture of width w gives the
known 2D maximum D₂ = k w.
"""

from dataclasses import dataclass

import numpy as np

from .. import units

EQUIVALENTS = ("huygens", "e-field")
TAPERS = ("cosine", "uniform")


def check_equivalent(equivalent):
    """Validate the aperture-equivalent name; ValueError naming ``equivalent`` otherwise."""
    if equivalent not in EQUIVALENTS:
        raise ValueError(f"equivalent must be one of {', '.join(EQUIVALENTS)}, got {equivalent!r}")
    return equivalent


def check_frequency(frequency, name="frequency"):
    """Frequencies as a float array; ValueError naming the parameter unless all positive finite."""
    f = np.asarray(frequency, dtype=float)
    if f.size == 0 or not np.all(np.isfinite(f)) or np.any(f <= 0):
        raise ValueError(f"{name} must be positive finite frequencies in Hz, got {frequency!r}")
    return f


@dataclass(frozen=True)
class LineSource:
    """One plane of the aperture.

    Parameters
    ----------
    width : float
        Aperture size in this plane (A or B), m.
    apex : float
        Distance from the phase centre (apex) to the aperture used by the phase law, m;
        ``inf`` for an unflared plane (no phase error).
    taper : {"cosine", "uniform"}
        Amplitude across the plane: cos(πx/w) (TE10 H-plane) or uniform (E-plane).
    """

    width: float
    apex: float
    taper: str

    def __post_init__(self):
        if self.taper not in TAPERS:
            raise ValueError(f"taper must be one of {', '.join(TAPERS)}, got {self.taper!r}")
        if not (np.isfinite(self.width) and self.width > 0):
            raise ValueError(f"width must be a positive finite length, got {self.width!r}")
        if not self.apex > 0:
            raise ValueError(f"apex must be a positive length (inf for no flare), got {self.apex!r}")


def horn_line_sources(horn, phase_reference="axial"):
    """The (H-plane, E-plane) line sources of a horn.

    ``phase_reference`` chooses the distance R in the phase law of each flared plane:
    ``"axial"`` (default, geometry.py's convention) the axial apex distance; ``"slant"`` the
    slant length from apex to aperture edge, as in texts that size horns by slant length.
    """
    if phase_reference == "axial":
        apex_h, apex_e = horn.apex_h, horn.apex_e
    elif phase_reference == "slant":
        apex_h, apex_e = horn.slant_h, horn.slant_e
    else:
        raise ValueError(f"phase_reference must be 'axial' or 'slant', got {phase_reference!r}")
    return (LineSource(horn.aperture_a, float(apex_h), "cosine"),
            LineSource(horn.aperture_b, float(apex_e), "uniform"))


def flared_line_source(horn, phase_reference="axial"):
    """(plane, LineSource) of a sectoral horn's flared plane, for the 2D model.

    ``plane`` is ``"h"`` for an H-plane sectoral horn and ``"e"`` for an E-plane one.
    ValueError naming ``dims`` for a pyramidal horn (it has no 2D counterpart).
    """
    h_line, e_line = horn_line_sources(horn, phase_reference)
    if horn.kind == "h-sectoral":
        return "h", h_line
    if horn.kind == "e-sectoral":
        return "e", e_line
    raise ValueError("dims: the 2D model exists only for sectoral horns (h-sectoral, e-sectoral), "
                     f"not {horn.kind!r}")


# --- aperture tapers ----------------------------------------------------------------------
def taper_values(x, width, taper):
    """Amplitude of the taper at x (|x| ≤ width/2)."""
    x = np.asarray(x, dtype=float)
    if taper == "cosine":
        return np.cos(np.pi * x / width)
    return np.ones_like(x)


def taper_power(width, taper):
    """∫|taper|² dx over the aperture: width/2 (cosine) or width (uniform), m."""
    return 0.5 * width if taper == "cosine" else float(width)


def taper_efficiency(taper):
    """Aperture (taper) efficiency |∫e|² / (w ∫|e|²) with no phase error: 8/π² or 1 (exact)."""
    return 8.0 / np.pi**2 if taper == "cosine" else 1.0


# --- element factors ----------------------------------------------------------------------
def principal_plane_factor(theta, plane, equivalent):
    """Amplitude element factor in a principal plane (θ in rad; plane ``"h"`` or ``"e"``)."""
    theta = np.asarray(theta, dtype=float)
    if equivalent == "huygens":
        return 0.5 * (1.0 + np.cos(theta))
    if plane == "h":
        return np.cos(theta)
    return np.ones_like(theta)


def element_factor_components(theta, phi, equivalent):
    """(f_θ, f_φ) of the aperture equivalent (θ, φ in rad); D ∝ (|f_θ|² + |f_φ|²)·|F|²."""
    theta = np.asarray(theta, dtype=float)
    phi = np.asarray(phi, dtype=float)
    if equivalent == "huygens":
        ob = 0.5 * (1.0 + np.cos(theta))
        return ob * np.sin(phi), ob * np.cos(phi)
    return np.sin(phi) * np.ones_like(theta), np.cos(theta) * np.cos(phi)


# --- assembly from the plane integrals ----------------------------------------------------
# ``integral(kappa, line, wavenumber)`` -> complex I(κ); ``power(line, wavenumber)`` -> ∫|e|².
# Both broadcast over kappa and wavenumber.


def _wavenumber(frequency):
    return 2.0 * np.pi / units.wavelength(frequency)


def directivity(integral, power, lines, frequency):
    """Boresight directivity (linear) over frequency from the plane integrals at κ = 0."""
    f = check_frequency(frequency)
    k = _wavenumber(f)
    h_line, e_line = lines
    ih = integral(np.zeros_like(k), h_line, k)
    ie = integral(np.zeros_like(k), e_line, k)
    wl = units.wavelength(f)
    return 4 * np.pi / wl**2 * np.abs(ih * ie) ** 2 / (power(h_line, k) * power(e_line, k))


def principal_plane_cuts(integral, power, lines, frequency, theta_deg, equivalent):
    """(H-plane, E-plane) directivity cuts, linear; shape f.shape + θ.shape.

    H-plane: φ = 0 (θ < 0 is the −x side); E-plane: φ = 90° (θ < 0 the −y side).
    """
    check_equivalent(equivalent)
    f = check_frequency(frequency)
    theta = np.radians(np.asarray(theta_deg, dtype=float))
    k = _wavenumber(f)[..., None]
    h_line, e_line = lines
    ih0 = integral(np.zeros_like(k), h_line, k)
    ie0 = integral(np.zeros_like(k), e_line, k)
    norm = 4 * np.pi * (k / (2 * np.pi)) ** 2 / (power(h_line, k) * power(e_line, k))
    kappa = k * np.sin(theta)
    d_h = norm * np.abs(principal_plane_factor(theta, "h", equivalent) * integral(kappa, h_line, k) * ie0) ** 2
    d_e = norm * np.abs(principal_plane_factor(theta, "e", equivalent) * ih0 * integral(kappa, e_line, k)) ** 2
    return d_h, d_e  # a scalar frequency broadcasts to θ's shape


def pattern(integral, power, lines, frequency, theta_deg, phi_deg, equivalent, components=False):
    """Directivity D(θ, φ), linear, at one frequency, θ and φ (degrees) broadcast together.

    With ``components=True`` returns the complex far-field components (e_θ, e_φ), scaled so
    that D = |e_θ|² + |e_φ|² (common phase factors dropped; relative phase kept).
    """
    check_equivalent(equivalent)
    f = check_frequency(frequency)
    if f.ndim != 0:
        raise ValueError("frequency: the full pattern is computed at one frequency at a time")
    theta = np.radians(np.asarray(theta_deg, dtype=float))
    phi = np.radians(np.asarray(phi_deg, dtype=float))
    theta, phi = np.broadcast_arrays(theta, phi)
    k = float(_wavenumber(f))
    h_line, e_line = lines
    st = np.sin(theta)
    field = integral(k * st * np.cos(phi), h_line, k) * integral(k * st * np.sin(phi), e_line, k)
    field = field * np.sqrt(4 * np.pi * (k / (2 * np.pi)) ** 2 / (power(h_line, k) * power(e_line, k)))
    f_theta, f_phi = element_factor_components(theta, phi, equivalent)
    if components:
        return f_theta * field, f_phi * field
    return (f_theta**2 + f_phi**2) * np.abs(field) ** 2


def directivity_2d(integral, power, line, frequency):
    """Boresight 2D directivity D₂ = k |I(0)|² / ∫|e|² (linear, per unit length)."""
    f = check_frequency(frequency)
    k = _wavenumber(f)
    return k * np.abs(integral(np.zeros_like(k), line, k)) ** 2 / power(line, k)


def cut_2d(integral, power, line, plane, frequency, theta_deg, equivalent):
    """2D directivity cut D₂(θ) (linear) of one line source; shape f.shape + θ.shape."""
    check_equivalent(equivalent)
    f = check_frequency(frequency)
    theta = np.radians(np.asarray(theta_deg, dtype=float))
    k = _wavenumber(f)[..., None]
    d = k * np.abs(principal_plane_factor(theta, plane, equivalent)
                   * integral(k * np.sin(theta), line, k)) ** 2 / power(line, k)
    return d
