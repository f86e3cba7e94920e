"""The constants and edge units of hornproof.units against their published values."""

import numpy as np
import pytest

from hornproof import units


def test_speed_of_light_is_the_si_defining_value():
    # SI Brochure (BIPM, 9th ed. 2019), the defining constant c = 299 792 458 m/s
    assert units.SPEED_OF_LIGHT == 299_792_458.0


def test_free_space_impedance_is_codata():
    # CODATA 2018: characteristic impedance of vacuum Z0 = 376.730 313 668(57) ohm
    assert units.FREE_SPACE_IMPEDANCE == pytest.approx(376.730313668, rel=2e-10)
    # and Z0 = mu0 c (SI relation); mu0 from CODATA 2018: 1.256 637 062 12(19) e-6 N/A^2
    assert units.FREE_SPACE_IMPEDANCE == pytest.approx(1.25663706212e-6 * 299_792_458.0, rel=2e-10)


def test_edge_units_and_decibels():
    assert units.to_mm(0.0254) == pytest.approx(25.4)
    np.testing.assert_allclose(units.to_mm(np.array([1.0, 2e-3])), [1000.0, 2.0])
    assert 25.4 * units.MM == pytest.approx(0.0254)  # one inch (exact by definition)
    assert 10.5 * units.GHZ == 10.5e9
    assert units.wavelength(10 * units.GHZ) == pytest.approx(29.9792458 * units.MM)
    np.testing.assert_allclose(units.db10([100.0, 0.5]), [20.0, -3.0103], atol=1e-4)
    np.testing.assert_allclose(units.db20([10.0, -0.1]), [20.0, -20.0])
    assert units.db10(0.0) == -np.inf
