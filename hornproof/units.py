"""Physical constants and the one table of edge units (mm, GHz, dB, degrees).

Inside hornproof everything is SI (metres, hertz, radians, linear ratios); these helpers
convert only at the edges: case files, command line, reports. A length in metres is shown in
millimetres as ``length / MM``, a frequency in hertz in gigahertz as ``frequency / GHZ``.
"""

import numpy as np
from scipy import constants

#: speed of light in vacuum, m/s (SI, exact; ``scipy.constants.c``)
SPEED_OF_LIGHT = float(constants.c)
#: characteristic impedance of vacuum, ohm (CODATA, as ``scipy.constants`` carries it)
FREE_SPACE_IMPEDANCE = float(constants.physical_constants["characteristic impedance of vacuum"][0])

#: one millimetre, in metres
MM = 1e-3
#: one gigahertz, in hertz
GHZ = 1e9


def to_mm(length):
    """Millimetres from metres (``length * 1e3``: the product every output has always used)."""
    return np.asarray(length, dtype=float) * 1e3 if np.ndim(length) else float(length) * 1e3


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
