"""Gain and realized gain from directivity, and the power-balance check of a run.

Definitions (IEEE Std 145-2013, *IEEE Standard for Definitions of Terms for Antennas*):

* gain G = e_rad D, with e_rad the radiation efficiency (radiated / accepted power);
* realized gain G_r = G (1 − |Γ|²), the gain reduced by the impedance-mismatch loss at the
  antenna's input, Γ its reflection coefficient (here S11 of the feed guide's TE10 mode).

Hence G ≤ D and G_r ≤ G by construction. Notes on this project's use:

* The walls are modelled as perfect conductors and nothing else in the model absorbs power,
  so the radiation efficiency is exactly 1 (``PEC_RADIATION_EFFICIENCY``) until wall loss is
  modelled. The FDTD run's power balance (radiated vs incident − reflected) is *not* used as
  an efficiency: on a lossless model its departure from zero is numerical error (grid,
  near-to-far surface, mode fit), which may have either sign. It stays a reported quality
  figure and enters the numerical uncertainty of directivity and gain
  (:mod:`hornproof.compare.numerics.power_balance`).

Arrays in, arrays out; linear ratios (not dB).
"""

import numpy as np

__all__ = ["PEC_RADIATION_EFFICIENCY", "gain", "realized_gain", "power_balance_error"]

#: radiation efficiency of a model with perfectly conducting walls and no lossy material:
#: exactly 1 (no power is dissipated anywhere); replace when wall loss is modelled
PEC_RADIATION_EFFICIENCY = 1.0


def gain(directivity, radiation_efficiency=PEC_RADIATION_EFFICIENCY):
    """Gain G = e_rad D (IEEE Std 145-2013, "gain" and "radiation efficiency").

    Parameters
    ----------
    directivity : array_like
        Directivity D, linear (not dB), ≥ 0.
    radiation_efficiency : array_like
        e_rad in [0, 1]; 1 for lossless (PEC) walls.
    """
    efficiency = np.asarray(radiation_efficiency, dtype=float)
    if np.any(~np.isfinite(efficiency)) or np.any(efficiency < 0) or np.any(efficiency > 1):
        raise ValueError(f"radiation_efficiency must lie in [0, 1], got {radiation_efficiency!r}")
    return np.asarray(directivity, dtype=float) * efficiency


def realized_gain(gain_linear, s11):
    """Realized gain G (1 − |S11|²) (IEEE Std 145-2013, "realized gain").

    Parameters
    ----------
    gain_linear : array_like
        Gain G, linear.
    s11 : array_like
        Reflection coefficient at the antenna's input (complex or magnitude).

    Returns
    -------
    ndarray
        Realized gain, linear; NaN where |S11| > 1, which no passive antenna has (in an FDTD
        result it means the mode fit at the feed failed, and no realized gain is claimed).
    """
    gamma2 = np.abs(np.asarray(s11)) ** 2
    mismatch = np.where(gamma2 <= 1.0, 1.0 - gamma2, np.nan)
    return np.asarray(gain_linear, dtype=float) * mismatch


def power_balance_error(radiated, incident, reflected):
    """Relative power-balance error (P_rad − (P_inc − P_refl)) / (P_inc − P_refl).

    Zero on an exact lossless model (conservation of energy: what the guide carries towards
    the horn is radiated). Any consistent power unit.
    """
    accepted = np.asarray(incident, dtype=float) - np.asarray(reflected, dtype=float)
    return (np.asarray(radiated, dtype=float) - accepted) / accepted
