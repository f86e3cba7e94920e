"""Gain, realized gain and power balance against their definitions.

IEEE Std 145-2013 (IEEE Standard for Definitions of Terms for Antennas): gain = radiation
efficiency × directivity; realized gain = gain reduced by the mismatch loss, G (1 − |Γ|²).
Conservation of energy on a lossless model: radiated = incident − reflected.
"""

import numpy as np
import pytest

from hornproof.sim.gain import PEC_RADIATION_EFFICIENCY, gain, power_balance_error, realized_gain


def test_realized_gain_is_gain_plus_mismatch_loss_in_db():
    # IEEE Std 145-2013 "realized gain": G_r = G (1 − |Γ|²), i.e. G_r(dB) = G(dB) + 10 log10(1 − |Γ|²)
    g = np.array([10.0, 31.6, 100.0])
    s11 = np.array([0.1 + 0.2j, -0.5, 0.3j])
    expected_db = 10 * np.log10(g) + 10 * np.log10(1 - np.abs(s11) ** 2)
    assert 10 * np.log10(realized_gain(g, s11)) == pytest.approx(expected_db, abs=1e-12)
    # a matched input loses nothing; |Γ| = 1/√2 (VSWR 5.83) loses exactly half (3.01 dB)
    assert realized_gain(20.0, 0.0) == pytest.approx(20.0, rel=1e-15)
    assert realized_gain(20.0, 2 ** -0.5) == pytest.approx(10.0, rel=1e-12)


def test_gain_never_exceeds_directivity_and_realized_gain_never_exceeds_gain():
    d = np.array([1.5, 40.0, 250.0])  # 1.5: Hertzian dipole (Balanis, Antenna Theory, §4.2)
    g = gain(d)
    assert np.array_equal(g, d)  # PEC walls: radiation efficiency 1, so G = D exactly
    assert PEC_RADIATION_EFFICIENCY == 1.0
    assert np.all(gain(d, 0.9) <= d) and gain(40.0, 0.5) == pytest.approx(20.0)
    assert np.all(realized_gain(g, np.array([0.0, 0.3, 0.99])) <= g)


def test_bad_radiation_efficiency_is_refused():
    for bad in (-0.1, 1.2, np.nan):
        with pytest.raises(ValueError, match="radiation_efficiency"):
            gain(10.0, bad)


def test_reflection_beyond_unity_gives_no_realized_gain():
    # |Γ| > 1 is impossible for a passive antenna: no realized gain is claimed
    out = realized_gain(np.array([10.0, 10.0]), np.array([0.5, 1.01]))
    assert out[0] == pytest.approx(7.5) and np.isnan(out[1])


def test_power_balance_error_is_relative_to_accepted_power():
    # accepted = incident − reflected = 1.0 − 0.04 = 0.96; radiated 0.9792 is 2 % more
    assert power_balance_error(0.9792, 1.0, 0.04) == pytest.approx(0.02, rel=1e-12)
    assert power_balance_error(0.96, 1.0, 0.04) == 0.0
    assert power_balance_error(0.9408, 1.0, 0.04) == pytest.approx(-0.02, rel=1e-12)
