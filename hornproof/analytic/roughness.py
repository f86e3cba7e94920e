"""Surface roughness: the factor by which a rough conductor's loss exceeds a smooth one's.

Hammerstad–Jensen model (E. O. Hammerstad and Ø. Jensen, "Accurate models for microstrip
computer-aided design", IEEE MTT-S International Microwave Symposium Digest, 1980,
pp. 407–409; formula from memory, as widely reproduced):

    K = 1 + (2/π) · arctan(1.4 · (Δ/δ)²),

Δ the RMS surface roughness and δ the skin depth. K runs from 1 (smooth, Δ ≪ δ) to 2
(Δ ≫ δ): the model saturates at doubling the loss, which is known to under-predict for very
rough surfaces at high frequency (later models, e.g. Huray's, go further). It multiplies the
conductor attenuation computed for a smooth wall.
"""

import numpy as np

from ..units import FREE_SPACE_IMPEDANCE, SPEED_OF_LIGHT

__all__ = ["skin_depth", "surface_resistance", "hammerstad_jensen_factor"]

#: vacuum permeability μ0, H/m (μ0 = η0 / c with the constants hornproof uses)
MU_0 = FREE_SPACE_IMPEDANCE / SPEED_OF_LIGHT


def skin_depth(frequency, conductivity):
    """Skin depth δ = √(2 / (ω μ0 σ)), m (good conductor, μ_r = 1; any electromagnetics text)."""
    omega = 2 * np.pi * np.asarray(frequency, dtype=float)
    return np.sqrt(2.0 / (omega * MU_0 * np.asarray(conductivity, dtype=float)))


def surface_resistance(frequency, conductivity):
    """Surface resistance R_s = √(ω μ0 / (2σ)) = 1/(σ δ), ohm (Pozar, *Microwave Engineering*,
    §1.7, good conductors)."""
    omega = 2 * np.pi * np.asarray(frequency, dtype=float)
    return np.sqrt(omega * MU_0 / (2.0 * np.asarray(conductivity, dtype=float)))


def hammerstad_jensen_factor(frequency, conductivity, roughness_rms):
    """Loss factor K ≥ 1 of a rough wall, Hammerstad–Jensen (module notes); 1 for Δ = 0."""
    delta = skin_depth(frequency, conductivity)
    ratio = np.asarray(roughness_rms, dtype=float) / delta
    return 1.0 + (2.0 / np.pi) * np.arctan(1.4 * ratio**2)
