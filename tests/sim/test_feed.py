"""TE10 feed: launching the mode and splitting forward / backward waves (S11).

Outside facts used:
* transmission-line equations: V(z) = A e^{+iβz} + B e^{−iβz} for one mode (any text on
  guided waves, e.g. D. M. Pozar, *Microwave Engineering*, 4th ed., §2.1 / §3.3);
* TE10: β = √(k² − (π/a)²) (Pozar §3.3, exact for a hollow PEC guide);
* a short circuit reflects everything with Γ = −1 at its plane; a matched line reflects nothing
  (facts of the trade; Pozar §2.3).
"""

import numpy as np
import pytest

from hornproof.sim.feed import fit_travelling_waves, vswr
from hornproof.sim.settings import FdtdSettings

WR90 = (22.86e-3, 10.16e-3)  # EIA RS-261 / IEC 60153-2 WR-90, 0.900 x 0.400 in (from memory)
BAND = np.array([8.5e9, 10.0e9, 11.5e9])


def test_fit_recovers_two_waves_and_beta():
    # synthetic standing wave on a line: the fit must return the amplitudes put in
    z = np.linspace(-1.0, -0.3, 15)
    beta = 4.2
    forward, backward = 0.9 * np.exp(0.3j), 0.25 * np.exp(-1.1j)
    v = forward * np.exp(1j * beta * z) + backward * np.exp(-1j * beta * z)
    f, b, fitted_beta, residual = fit_travelling_waves(v, z, 2 * np.pi / beta)
    assert fitted_beta == pytest.approx(beta, rel=1e-9)
    assert f == pytest.approx(forward, abs=1e-9)
    assert b == pytest.approx(backward, abs=1e-9)
    assert residual < 1e-9


def test_vswr_of_known_reflections():
    # VSWR = (1 + |Γ|) / (1 − |Γ|): |Γ| = 1/3 gives 2 exactly (Pozar §2.3)
    assert vswr(np.array([1 / 3]))[0] == pytest.approx(2.0)
    assert np.isinf(vswr(np.array([1.0]))[0])


@pytest.mark.fullwave
def test_matched_guide_reflects_nothing():
    from hornproof.sim.guide_check import simulate_guide

    result = simulate_guide(*WR90, BAND, FdtdSettings(), 10, termination="matched")
    # a straight guide running into the PML: what comes back is the PML's own reflection of
    # the guided mode. −40 dB is our bound (common practice for an adequate PML; measured
    # here ≈ −60 dB at 10 cells per wavelength)
    assert np.all(20 * np.log10(np.abs(result["s11"])) < -40.0)


@pytest.mark.fullwave
def test_shorted_guide_reflects_minus_one_at_the_short():
    from hornproof.sim.guide_check import simulate_guide

    result = simulate_guide(*WR90, BAND, FdtdSettings(), 10, termination="short")
    s11 = result["s11"]
    # |Γ| = 1 for a lossless short; 1 % allows for the fit (residual ~1e-3)
    assert np.all(np.abs(np.abs(s11) - 1.0) < 0.01)
    # Γ = −1 at the plane of the short (z = 0, on a grid plane): phase 180° within 3°
    phase = np.degrees(np.angle(-s11))
    assert np.all(np.abs(phase) < 3.0)


@pytest.mark.fullwave
def test_guide_wavelength_is_te10():
    from hornproof.sim.guide_check import simulate_guide

    result = simulate_guide(*WR90, BAND, FdtdSettings(), 10, termination="matched")
    layout = result["layout"]
    # TE10 of the modelled guide width (a rounded to whole cells): β = 2π √(f² − (1/2a)²) in
    # Meep units (c = 1). Yee-grid dispersion at 10 cells per wavelength is of order 1 %
    # (A. Taflove, S. Hagness, *Computational Electrodynamics*, 3rd ed., ch. 4, from memory);
    # tolerance 2.5 %. A guide whose walls load the grid wrongly gave β > k here (up to +50 %).
    f = layout.meep_frequency(BAND)
    beta = 2 * np.pi * np.sqrt(f**2 - (1 / (2 * layout.guide_a)) ** 2)
    assert result["beta"] == pytest.approx(beta, rel=0.025)
    assert np.all(result["beta"] < 2 * np.pi * f)  # slower than light would be unphysical
