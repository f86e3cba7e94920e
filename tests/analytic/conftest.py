"""Shared helpers for the analytic tests: an independent quadrature and a few horns."""

import numpy as np
import pytest
from scipy.integrate import quad

from hornproof.analytic.geometry import HornGeometry
from hornproof.analytic.waveguide import waveguide_size


def _complex_quad(func, lo, hi, points=200):
    """∫ func over [lo, hi] with scipy's adaptive quadrature (QUADPACK), real and imaginary parts.

    Independent of hornproof's own Gauss–Legendre machinery. The interval is split into
    ``points`` pieces so the oscillating integrand is resolved.
    """
    edges = np.linspace(lo, hi, points + 1)
    total = 0j
    for a, b in zip(edges[:-1], edges[1:]):
        tol = dict(epsabs=1e-14 * (b - a), epsrel=1e-12, limit=200)
        re = quad(lambda x: func(x).real, a, b, **tol)[0]
        im = quad(lambda x: func(x).imag, a, b, **tol)[0]
        total += re + 1j * im
    return total


@pytest.fixture
def complex_quad():
    """The independent quadrature ∫ func dx (see ``_complex_quad``)."""
    return _complex_quad


@pytest.fixture
def wr90():
    return waveguide_size("WR-90")


@pytest.fixture
def horns(wr90):
    """One horn of each type on WR-90 (invented sizes, typical of X band)."""
    a, b = wr90
    return {
        "h-sectoral": HornGeometry("h-sectoral", a, b, 0.090, b, 0.160),
        "e-sectoral": HornGeometry("e-sectoral", a, b, a, 0.070, 0.160),
        "pyramidal": HornGeometry("pyramidal", a, b, 0.090, 0.070, 0.160),
    }
