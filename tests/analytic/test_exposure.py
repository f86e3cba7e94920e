"""Exposure estimate on the axis: power density, reference levels, distances.

Outside values, each with its source:

* Far-field power density S = P G / (4π R²) (any antenna text; FCC OET Bulletin 65 (1997),
  far-field equation, from memory).
* Maximum power density at the surface of an aperture antenna 4P/A (OET Bulletin 65 (1997),
  aperture antennas, from memory).
* ICNIRP (2020) Table 5, whole-body reference levels (from memory): general public f_M/200 W/m²
  for 400 MHz–2 GHz and 10 W/m² for 2–300 GHz; occupational f_M/40 and 50 W/m².
* IEEE C95.1-2019 whole-body ERLs (from memory): unrestricted = ICNIRP general public,
  restricted = ICNIRP occupational, in these bands.
"""

import numpy as np
import pytest

from hornproof.analytic.exposure import (REFERENCE_LEVELS, aperture_surface_bound, axial_power_density,
                                         compliance_distance, far_field_power_density)

LEVELS = {level.key: level for level in REFERENCE_LEVELS}


def test_far_field_power_density_by_hand():
    # 10 W into G = 100 at 1 m: 1000 / (4π) = 79.577 W/m²
    assert far_field_power_density(10.0, 100.0, 1.0) == pytest.approx(79.5775, rel=1e-5)


@pytest.mark.parametrize("key, at_1ghz, at_10ghz", [
    ("icnirp2020_general_public", 5.0, 10.0), ("icnirp2020_occupational", 25.0, 50.0),
    ("ieee_c95_1_2019_unrestricted", 5.0, 10.0), ("ieee_c95_1_2019_restricted", 25.0, 50.0)])
def test_reference_levels_as_tabulated(key, at_1ghz, at_10ghz):
    level = LEVELS[key]
    np.testing.assert_allclose(level.levels([1e9, 10e9]), [at_1ghz, at_10ghz])
    assert np.isnan(level.levels(100e6)) and np.isnan(level.levels(400e9))
    assert "from memory" in level.source


def test_distance_is_where_the_estimate_meets_the_level():
    power, gain, area = 20.0, 10 ** 2.0, 0.09 * 0.07
    level = 10.0
    r = compliance_distance(power, gain, area, level)
    assert far_field_power_density(power, gain, r) == pytest.approx(level, rel=1e-12)
    assert axial_power_density(power, gain, area, 1.01 * r) < level < axial_power_density(power, gain, area, 0.99 * r)


def test_a_small_power_needs_no_distance_by_the_surface_bound():
    area = 0.09 * 0.07
    power = 0.5 * 10.0 * area / 4  # 4P/A = half the level
    assert aperture_surface_bound(power, area) == pytest.approx(5.0)
    assert compliance_distance(power, 100.0, area, 10.0) == 0.0
    assert np.isnan(compliance_distance(1.0, 100.0, area, np.nan))
