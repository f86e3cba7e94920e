"""Physical constants and the one table of edge units (mm, GHz, dB, degrees).

Inside hornproof everything is SI (metres, hertz, radians, linear ratios); these helpers
convert only at the edges: case files, command line, reports.
"""

import numpy as np

#: speed of light in vacuum, m/s (SI, exact)
SPEED_OF_LIGHT = 299_792_458.0
#: impedance of free space, ohm (CODATA 2018)
FREE_SPACE_IMPEDANCE = 376.730313668

MM = 1e-3
GHZ = 1e9


def wavelength(frequency):
    """Free-space wavelength (m) at ``frequency`` (Hz)."""
    return SPEED_OF_LIGHT / np.asarray(frequency, dtype=float)


def db10(ratio):
    """Power ratio to decibels; zero maps to -inf without a warning."""
    ratio = np.asarray(ratio, dtype=float)
    with np.errstate(divide="ignore"):
        return 10.0 * np.log10(ratio)


def db20(amplitude):
    """Amplitude (magnitude) to decibels."""
    amplitude = np.abs(np.asarray(amplitude))
    with np.errstate(divide="ignore"):
        return 20.0 * np.log10(amplitude)


def from_db10(decibels):
    return 10.0 ** (np.asarray(decibels, dtype=float) / 10.0)
