"""Fresnel integrals in the trade's convention, and the quadratic-phase line integral.

Convention (Abramowitz & Stegun 7.3.1-2, Balanis, Silver):

    C(x) = ∫₀ˣ cos(π t²/2) dt,    S(x) = ∫₀ˣ sin(π t²/2) dt,

both tending to 1/2 as x → ∞ and odd in x. Time dependence exp(+jωt) throughout hornproof,
so a path delay appears as exp(−jk·path) and the complex helper is

    E(x) = ∫₀ˣ exp(−jπ t²/2) dt = C(x) − j S(x).

``scipy.special.fresnel`` uses the same π t²/2 argument but returns the pair in the order
(S, C); :func:`fresnel` returns (C, S).

The aperture models need ∫ exp(−jβx² + jκx) dx over a finite interval. Written as a
difference of Fresnel integrals it involves two large phases that cancel (for long horns and
wide angles both the completed-square phase κ²/(4β) and π t²/2 are huge), which costs digits.
:func:`quadratic_phase_integral` instead writes each endpoint contribution through the
Faddeeva function w(z) = exp(−z²) erfc(−jz) (``scipy.special.wofz``), in which the large
phase factor has been taken out analytically; the only phases left are the endpoint phases
κx − βx², which are of the order of the aperture size in radians.
"""

import numpy as np
import scipy.special as _special

__all__ = [
    "fresnel",
    "fresnel_c",
    "fresnel_s",
    "fresnel_e",
    "fresnel_tail",
    "fresnel_tail_envelope",
    "quadratic_phase_integral",
]

#: below this quadratic phase at the interval edge (β h², rad) the phase is treated as zero:
#: the neglected term is then < 1e-10 relative, and the Fresnel form would lose about as much
#: to cancellation (error ~ 1e-16 / √(β h²)).
SMALL_EDGE_PHASE = 1e-10


def fresnel(x):
    """Fresnel integrals (C(x), S(x)) in the π t²/2 convention.

    Parameters
    ----------
    x : array_like
        Real argument.

    Returns
    -------
    C, S : ndarray
        ∫₀ˣ cos(π t²/2) dt and ∫₀ˣ sin(π t²/2) dt.

    Notes
    -----
    Wraps ``scipy.special.fresnel``, which returns (S, C) — the order is swapped here.

    References
    ----------
    M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions*, 7.3.1–7.3.2 and
    Table 7.7.
    """
    s, c = _special.fresnel(np.asarray(x, dtype=float))
    return c, s


def fresnel_c(x):
    """Fresnel cosine integral C(x) = ∫₀ˣ cos(π t²/2) dt."""
    return fresnel(x)[0]


def fresnel_s(x):
    """Fresnel sine integral S(x) = ∫₀ˣ sin(π t²/2) dt."""
    return fresnel(x)[1]


def fresnel_e(x):
    """Complex Fresnel integral E(x) = ∫₀ˣ exp(−jπ t²/2) dt = C(x) − j S(x).

    The sign of the imaginary part follows the exp(+jωt) convention (a delay is exp(−jkr)).
    """
    c, s = fresnel(x)
    return c - 1j * s


def fresnel_tail_envelope(x):
    """G(x) = exp(+jπx²/2) ∫ₓ^∞ exp(−jπ t²/2) dt for x ≥ 0 (slowly varying, |G| ≤ 1/√2).

    Computed from the Faddeeva function: with a = jπ/2,
    ∫ₓ^∞ exp(−a t²) dt = (√π / 2√a) erfc(√a x) = ((1 − j)/2) exp(−a x²) w(j √a x),
    so G(x) = ((1 − j)/2) w(√(π/2) x e^{j3π/4}). The argument lies in the upper half plane for
    x ≥ 0, where w is bounded and ``scipy.special.wofz`` is accurate to ~1e-13 relative.
    G(0) = (1 − j)/2; G(x) ~ −j/(π x) as x → ∞.
    """
    x = np.asarray(x, dtype=float)
    return 0.5 * (1 - 1j) * _special.wofz(np.sqrt(np.pi / 2) * x * np.exp(0.75j * np.pi))


def fresnel_tail(x):
    """∫ₓ^∞ exp(−jπ t²/2) dt = (1 − j)/2 − E(x), any real x.

    For x < 0 uses ∫ₓ^∞ = (1 − j) − ∫_{|x|}^∞ (the full integral over the real line is 1 − j).
    """
    x = np.asarray(x, dtype=float)
    ax = np.abs(x)
    tail = np.exp(-0.5j * np.pi * ax**2) * fresnel_tail_envelope(ax)
    return np.where(x >= 0, tail, (1 - 1j) - tail)


def quadratic_phase_integral(kappa, half_width, beta):
    """∫_{−h}^{h} exp(−jβx² + jκx) dx in closed form (Fresnel integrals, completed square).

    Parameters
    ----------
    kappa : array_like
        Linear phase rate κ, rad/m (κ = k sinθ cosφ or k sinθ sinφ in the aperture models,
        shifted by ±π/A for the cosine taper).
    half_width : array_like
        Half the interval, h > 0, m.
    beta : array_like
        Quadratic phase coefficient β ≥ 0, rad/m² (β = k / (2R) for a flare with apex
        distance R). β = 0 (no flare) gives 2h·sinc.

    Returns
    -------
    ndarray, complex
        The integral, broadcast over the inputs.

    Notes
    -----
    With x₀ = κ/(2β), u = √(2β/π)(x − x₀) and s = √(π/(2β)) the integral is
    s·exp(jβx₀²)·[T(u₁) − T(u₂)], T the Fresnel tail ∫_u^∞ exp(−jπt²/2) dt,
    u₁,₂ = √(2β/π)(∓h − x₀) (e.g. Balanis, *Antenna Theory*, 3rd ed., §13.2, where the same
    completed square gives the H-plane arguments u, v). Each tail is written
    T(u) = [u < 0](1 − j) + sgn(u)·exp(−jπu²/2)·G(|u|), and the large phases combine exactly:
    βx₀² − πu²/2 = κx − βx² at the endpoint x. The (1 − j) terms appear only when the
    stationary point x₀ lies inside the interval, where βx₀² ≤ βh² is small.
    For β h² < 1e-10 rad the phase is dropped (relative error < 1e-10).
    """
    kappa = np.asarray(kappa, dtype=float)
    h = np.asarray(half_width, dtype=float)
    beta = np.asarray(beta, dtype=float)
    kappa, h, beta = np.broadcast_arrays(kappa, h, beta)

    flat = beta * h**2 < SMALL_EDGE_PHASE
    b = np.where(flat, 1.0, beta)  # placeholder where the flat branch applies
    scale = np.sqrt(np.pi / (2.0 * b))
    root = np.sqrt(2.0 * b / np.pi)
    x0 = kappa / (2.0 * b)
    u1 = root * (-h - x0)
    u2 = root * (h - x0)
    edge1 = np.exp(1j * (-kappa * h - b * h**2))  # exp(j(κx − βx²)) at x = −h
    edge2 = np.exp(1j * (kappa * h - b * h**2))  # at x = +h
    sgn1 = np.where(u1 >= 0, 1.0, -1.0)
    sgn2 = np.where(u2 >= 0, 1.0, -1.0)
    inside = (u1 < 0) & (u2 >= 0)
    # stationary-phase term; its phase βx0² is only needed (and only small) when inside
    stationary = np.where(inside, (1 - 1j) * np.exp(1j * b * np.where(inside, x0, 0.0) ** 2), 0.0)
    fresnel_form = scale * (
        stationary
        + sgn1 * edge1 * fresnel_tail_envelope(np.abs(u1))
        - sgn2 * edge2 * fresnel_tail_envelope(np.abs(u2))
    )
    no_phase = 2.0 * h * np.sinc(kappa * h / np.pi)
    out = np.where(flat, no_phase, fresnel_form)
    return out[()] if out.ndim == 0 else out
