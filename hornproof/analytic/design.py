"""Optimum horns: the aperture that maximises directivity at a fixed flare length, and a
realizable pyramidal horn for a target gain.

(a) :func:`optimum_aperture` / :func:`optimum_horn` — for a given feed guide and axial flare
    length, the aperture (A for the H-plane, B for the E-plane, both for a pyramidal horn)
    that maximises boresight directivity, with the closed-form or the exact-phase model. The
    model is separable, so each plane is optimised on its own. Note that holding the *flare
    length* fixed is not the same as holding the *apex distance* fixed: the apex distance
    R = L·D/(D − d) shrinks as the aperture D grows, so the optimum phase error at fixed flare
    length is smaller than the classical 0.3965 / 0.2624 (which hold at fixed apex distance,
    see :func:`optimum_phase_errors`), and it depends on d/D.
(b) :func:`design_for_gain` — the classical pyramidal design: the peak phase errors are fixed
    (S = 3/8, T = 1/4 from the rules A = √(3λρ_h), B = √(2λρ_e); or the exact optima), so each
    plane's aperture is a function of its apex distance; realizability requires equal axial
    flare lengths in both planes, L_h = R_h(1 − a/A) = R_e(1 − b/B). Here the common flare
    length L is the unknown: for each L the apex distance of each plane is found (brentq),
    and L is then solved (brentq) so that the model's directivity equals the target.
    (Balanis, *Antenna Theory*, 3rd ed., §13.4.3, solves the same realizability condition for
    χ = ρ_e/λ with a fixed 51 % efficiency; here the model's own directivity is used, so the
    returned horn meets the target in that model exactly.)
:func:`horn_from_slant_lengths` builds the true (axial) geometry of a horn specified by slant
lengths, as many texts specify them.
"""

from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from scipy.optimize import brentq, minimize_scalar

from ..units import GHZ, to_mm
from .. import units
from . import closed_form
from . import exact_phase
from .gain_reduction import e_plane_efficiency, h_plane_efficiency
from .geometry import HornGeometry, apex_distance
from .waveguide import te10_cutoff_frequency

__all__ = [
    "HornDesign",
    "PHASE_ERROR_RULES",
    "optimum_phase_errors",
    "optimum_aperture",
    "optimum_horn",
    "design_for_gain",
    "horn_from_slant_lengths",
]

MODELS = ("closed_form", "exact_phase")
#: (S, T) of the rules of thumb A = √(3λρ_h), B = √(2λρ_e) (common practice)
PHASE_ERROR_RULES = (3.0 / 8.0, 1.0 / 4.0)
_TAPER = {"h": "cosine", "e": "uniform"}


@dataclass(frozen=True)
class HornDesign:
    """A designed horn and what the model predicts for it at the design frequency.

    ``directivity_dbi`` boresight directivity; ``aperture_efficiency`` D λ²/(4πAB);
    ``phase_error_h_wl``/``phase_error_e_wl`` the quadratic peak phase errors S, T in the
    convention ``phase_reference``; ``model`` the model used.
    """

    horn: HornGeometry
    frequency: float
    directivity_dbi: float
    aperture_efficiency: float
    phase_error_h_wl: float
    phase_error_e_wl: float
    phase_reference: str
    model: str


def _check_model(model):
    if model not in MODELS:
        raise ValueError(f"model must be one of {', '.join(MODELS)}, got {model!r}")


def _check_scalar_frequency(frequency):
    f = float(frequency)
    if not (np.isfinite(f) and f > 0):
        raise ValueError(f"frequency must be a positive finite frequency in Hz, got {frequency!r}")
    return f


def _check_length(value, name):
    v = float(value)
    if not (np.isfinite(v) and v > 0):
        raise ValueError(f"{name} must be a positive finite length in metres, got {value!r}")
    return v


def _plane_factor(plane, size, apex, wavelength, model):
    """|I(0)|² / ∫|e|² of one plane, m: D = (4π/λ²)·factor_h·factor_e."""
    k = 2 * np.pi / wavelength
    mod = closed_form if model == "closed_form" else exact_phase
    taper = _TAPER[plane]
    return float(np.abs(mod.line_integral(0.0, size, apex, k, taper)) ** 2 / mod.line_power(size, apex, k, taper))


@lru_cache(maxsize=1)
def optimum_phase_errors():
    """(S, T) maximising the closed-form directivity at a *fixed apex distance*, wavelengths.

    At fixed R the plane directivity is ∝ √S·η_h(S) (H) and √T·η_e(T) (E); their maxima
    are S ≈ 0.3965 and T ≈ 0.2624 (S. J. Orfanidis, *Electromagnetic Waves and Antennas*,
    horn chapter: σ_a ≈ 1.2593, σ_b ≈ 1.0246, S = σ²/4). Computed here, not tabulated.
    """
    opts = {"xatol": 1e-12}
    s = minimize_scalar(lambda x: -np.sqrt(x) * h_plane_efficiency(x), bounds=(0.05, 1.0), method="bounded", options=opts).x
    t = minimize_scalar(lambda x: -np.sqrt(x) * e_plane_efficiency(x), bounds=(0.05, 1.0), method="bounded", options=opts).x
    return float(s), float(t)


def optimum_aperture(plane, guide_size, flare_length, frequency, *, model="closed_form"):
    """Aperture size (m) maximising boresight directivity at a fixed axial flare length.

    Parameters
    ----------
    plane : {"h", "e"}
        "h": the width A (cosine taper) over a guide width a; "e": the height B over b.
    guide_size : float
        Guide width a or height b, m.
    flare_length : float
        Axial length throat to aperture, m.
    frequency : float
        Hz.
    model : {"closed_form", "exact_phase"}

    Notes
    -----
    A coarse scan over sizes up to a peak phase error of 3 wavelengths, then a bounded
    scalar search (``scipy.optimize.minimize_scalar``) around the best sample.
    """
    if plane not in _TAPER:
        raise ValueError(f"plane must be 'h' or 'e', got {plane!r}")
    _check_model(model)
    d = _check_length(guide_size, "guide_size")
    length = _check_length(flare_length, "flare_length")
    wl = float(units.wavelength(_check_scalar_frequency(frequency)))

    def negative(size):
        return -_plane_factor(plane, size, apex_distance(d, size, length), wl, model)

    upper = 0.5 * (d + np.sqrt(d * d + 4 * 8 * wl * length * 3.0))  # S = D(D − d)/(8λL) = 3
    sizes = np.linspace(d * (1 + 1e-9), upper, 301)
    values = np.array([negative(s) for s in sizes])
    i = int(np.argmin(values))
    lo, hi = sizes[max(i - 1, 0)], sizes[min(i + 1, sizes.size - 1)]
    res = minimize_scalar(negative, bounds=(lo, hi), method="bounded", options={"xatol": 1e-9 * upper})
    return float(res.x)


def _design(horn, frequency, model, phase_reference="axial"):
    wl = float(units.wavelength(frequency))
    if model == "closed_form":
        d = float(closed_form.directivity(horn, frequency, phase_reference=phase_reference))
    else:
        d = float(exact_phase.directivity(horn, frequency))
    ref = (horn.apex_h, horn.apex_e) if phase_reference == "axial" else (horn.slant_h, horn.slant_e)
    s = horn.aperture_a**2 / (8 * wl * ref[0]) if np.isfinite(ref[0]) else 0.0
    t = horn.aperture_b**2 / (8 * wl * ref[1]) if np.isfinite(ref[1]) else 0.0
    return HornDesign(horn=horn, frequency=float(frequency), directivity_dbi=float(10 * np.log10(d)),
                      aperture_efficiency=d * wl**2 / (4 * np.pi * horn.aperture_a * horn.aperture_b),
                      phase_error_h_wl=float(s), phase_error_e_wl=float(t), phase_reference=phase_reference,
                      model=model)


def optimum_horn(kind, guide_a, guide_b, flare_length, frequency, *, model="closed_form", wall_thickness=1.0e-3):
    """The horn of ``kind`` with the directivity-maximising aperture(s) at a fixed flare length.

    Returns a :class:`HornDesign` (quadratic phase errors in the axial convention).
    """
    _check_model(model)
    a = _check_length(guide_a, "guide_a")
    b = _check_length(guide_b, "guide_b")
    f = _check_scalar_frequency(frequency)
    big_a = optimum_aperture("h", a, flare_length, f, model=model) if kind in ("h-sectoral", "pyramidal") else a
    big_b = optimum_aperture("e", b, flare_length, f, model=model) if kind in ("e-sectoral", "pyramidal") else b
    horn = HornGeometry(kind, a, b, big_a, big_b, float(flare_length), wall_thickness)
    return _design(horn, f, model)


def _aperture_of_apex(apex, phase_error, wl, phase_reference):
    """Aperture size D whose classical phase error D²/(8λρ) is ``phase_error`` at axial apex R."""
    c = 8 * wl * phase_error
    if phase_reference == "axial":
        return np.sqrt(c * apex)
    # slant: D² = c·√(R² + D²/4)  ->  D² = c(c/8 + √(c²/64 + R²))
    return np.sqrt(c * (c / 8 + np.sqrt(c * c / 64 + apex * apex)))


def _plane_for_flare_length(length, guide, phase_error, wl, phase_reference):
    """(aperture, axial apex) of one plane with the given phase error and flare length."""
    c = 8 * wl * phase_error
    # apex at which the aperture equals the guide (zero flare length)
    if phase_reference == "axial":
        r_lo = guide * guide / c
    else:
        rho = guide * guide / c
        r_lo = np.sqrt(max(rho * rho - guide * guide / 4, 0.0))

    def excess(apex):
        return apex * (1 - guide / _aperture_of_apex(apex, phase_error, wl, phase_reference)) - length

    r_hi = r_lo + 2 * length + guide
    while excess(r_hi) < 0:
        r_hi *= 2
    apex = brentq(excess, r_lo, r_hi, xtol=1e-14 * r_hi, rtol=1e-14, maxiter=200)
    return _aperture_of_apex(apex, phase_error, wl, phase_reference), apex


def design_for_gain(gain_dbi, frequency, guide_a, guide_b, *, phase_errors="rule", phase_reference="axial",
                    model="closed_form", wall_thickness=1.0e-3):
    """A realizable pyramidal horn with boresight directivity ``gain_dbi`` at ``frequency``.

    Parameters
    ----------
    gain_dbi : float
        Target boresight directivity (lossless horn: gain = directivity), dBi.
    frequency : float
        Design frequency, Hz; must be above the guide's TE10 cutoff.
    guide_a, guide_b : float
        Feed guide width and height, m.
    phase_errors : {"rule", "optimum"} or (S, T)
        Peak phase errors in wavelengths: "rule" (3/8, 1/4), the classical rules of thumb;
        "optimum" the closed form's exact maxima at fixed apex distance (≈ 0.3965, 0.2624);
        or explicit values.
    phase_reference : {"axial", "slant"}
        Whether S, T are defined with the axial apex distances (geometry.py) or the slant
        lengths (as in Balanis's design procedure, which uses ρ_e, ρ_h).
    model : {"closed_form", "exact_phase"}
        Model whose directivity must equal the target. The closed form is evaluated with the
        same ``phase_reference``, so S and T are exactly what it sees.

    Returns
    -------
    HornDesign
        ``horn`` is a pyramidal :class:`HornGeometry` with equal flare lengths by
        construction.

    Raises
    ------
    ValueError
        Naming the parameter: ``frequency`` below cutoff, ``phase_errors`` not positive,
        ``gain_dbi`` below what the smallest horn with these phase errors gives on this guide
        (A → a, B → b) or beyond a flare length of 10⁶ λ.
    """
    _check_model(model)
    if phase_reference not in ("axial", "slant"):
        raise ValueError(f"phase_reference must be 'axial' or 'slant', got {phase_reference!r}")
    a = _check_length(guide_a, "guide_a")
    b = _check_length(guide_b, "guide_b")
    if b > a:
        raise ValueError("guide_b: guide height b must not exceed width a (TE10 with E along the short side)")
    f = _check_scalar_frequency(frequency)
    cutoff = float(te10_cutoff_frequency(a))
    if f <= cutoff:
        raise ValueError(f"frequency: {f / GHZ:.4g} GHz is at or below the guide's TE10 cutoff {cutoff / GHZ:.4g} GHz")
    target_db = float(gain_dbi)
    if not np.isfinite(target_db):
        raise ValueError(f"gain_dbi must be a finite gain in dBi, got {gain_dbi!r}")
    if isinstance(phase_errors, str):
        if phase_errors == "rule":
            s, t = PHASE_ERROR_RULES
        elif phase_errors == "optimum":
            s, t = optimum_phase_errors()
        else:
            raise ValueError(f"phase_errors must be 'rule', 'optimum' or (S, T), got {phase_errors!r}")
    else:
        s, t = (float(v) for v in phase_errors)
        if not (s > 0 and t > 0 and np.isfinite(s) and np.isfinite(t)):
            raise ValueError(f"phase_errors must be positive (S, T) in wavelengths, got {phase_errors!r}")
    wl = float(units.wavelength(f))

    def horn_at(length):
        big_a, _ = _plane_for_flare_length(length, a, s, wl, phase_reference)
        big_b, _ = _plane_for_flare_length(length, b, t, wl, phase_reference)
        return HornGeometry("pyramidal", a, b, float(big_a), float(big_b), float(length), wall_thickness)

    def directivity_db(length):
        return _design(horn_at(length), f, model, phase_reference).directivity_dbi

    # the shortest flare that still makes a horn (HornGeometry refuses half-angles of 80° or more)
    l_lo = 1e-4 * wl
    while True:
        try:
            d_lo = directivity_db(l_lo)
            break
        except ValueError:
            l_lo *= 1.5
            if l_lo > 100 * wl:
                raise ValueError(f"phase_errors: S = {s:.3g}, T = {t:.3g} give no realizable horn on this guide")
    if target_db <= d_lo:
        raise ValueError(f"gain_dbi: {target_db:.2f} dBi is not above {d_lo:.2f} dBi, the directivity of the "
                         f"smallest horn on this guide with phase errors S = {s:.3g}, T = {t:.3g} at "
                         f"{f / GHZ:.4g} GHz")
    l_hi = wl
    while directivity_db(l_hi) < target_db:
        l_hi *= 2
        if l_hi > 1e6 * wl:
            raise ValueError(f"gain_dbi: {target_db:.2f} dBi needs a flare longer than 10^6 wavelengths")
    length = brentq(lambda x: directivity_db(x) - target_db, l_lo, l_hi, xtol=1e-12 * l_hi, rtol=1e-13, maxiter=200)
    return _design(horn_at(length), f, model, phase_reference)


def horn_from_slant_lengths(kind, guide_a, guide_b, aperture_a, aperture_b, *, slant_h=None, slant_e=None,
                            wall_thickness=1.0e-3, rtol=1e-6):
    """HornGeometry of a horn specified by slant lengths (apex to aperture edge), m.

    The axial apex distance of a plane is √(ρ² − (D/2)²) and its flare length
    R·(D − d)/D. A pyramidal horn needs both slant lengths, and they must give the same flare
    length (within ``rtol``): otherwise the horn is not realizable and ValueError names
    ``slant_h``. A sectoral horn needs only its flared plane's slant length.
    """
    lengths = {}
    for plane, guide, size, slant in (("h", guide_a, aperture_a, slant_h), ("e", guide_b, aperture_b, slant_e)):
        flares = (kind == "pyramidal") or (kind == "h-sectoral" and plane == "h") or (kind == "e-sectoral" and plane == "e")
        if not flares:
            continue
        name = f"slant_{plane}"
        if slant is None:
            raise ValueError(f"{name}: a {kind} horn needs the {plane.upper()}-plane slant length")
        slant = _check_length(slant, name)
        if slant <= size / 2:
            raise ValueError(f"{name}: slant length {slant:.6g} m must exceed half the aperture {size / 2:.6g} m")
        if size <= guide:
            raise ValueError(f"aperture_{'a' if plane == 'h' else 'b'}: must exceed the guide size in a flared plane")
        axial = np.sqrt(slant**2 - (size / 2) ** 2)
        lengths[plane] = axial * (size - guide) / size
    if not lengths:
        raise ValueError(f"kind must be one of h-sectoral, e-sectoral, pyramidal, got {kind!r}")
    if len(lengths) == 2 and abs(lengths["h"] - lengths["e"]) > rtol * max(lengths.values()):
        raise ValueError(f"slant_h: H-plane and E-plane flare lengths differ ({to_mm(lengths['h']):.4f} mm vs "
                         f"{to_mm(lengths['e']):.4f} mm): not a realizable pyramidal horn")
    length = float(np.mean(list(lengths.values())))
    return HornGeometry(kind, float(guide_a), float(guide_b), float(aperture_a), float(aperture_b), length,
                        wall_thickness)
