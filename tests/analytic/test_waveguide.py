"""Outside checks of waveguide.py (owned elsewhere; tested here as the models depend on it)."""

import numpy as np
import pytest

from hornproof.analytic import waveguide as wg
from hornproof.units import FREE_SPACE_IMPEDANCE


# TE10 cutoff f_c = c/(2a) (exact); catalogue cutoffs of EIA sizes, from memory (manufacturers'
# tables quote them to 3-4 figures): WR-284 2.078, WR-90 6.557, WR-62 9.488, WR-42 14.051,
# WR-28 21.077 GHz.
@pytest.mark.parametrize("name, fc_ghz", [
    ("WR-284", 2.078), ("WR-90", 6.557), ("WR-62", 9.488), ("WR-42", 14.051), ("WR-28", 21.077),
])
def test_eia_te10_cutoffs(name, fc_ghz):
    a, _ = wg.waveguide_size(name)
    assert wg.te10_cutoff_frequency(a) / 1e9 == pytest.approx(fc_ghz, abs=1.5e-3)


def test_wr90_size_and_name_forms():
    # EIA RS-261: WR-90 is 0.900 × 0.400 in = 22.86 × 10.16 mm (exact from the inch sizes)
    assert wg.waveguide_size("WR-90") == (22.86e-3, 10.16e-3)
    assert wg.waveguide_size("wr90") == wg.waveguide_size("WR-90")


def test_te10_dispersion_exact_relations():
    # β = k√(1 − (f_c/f)²), Z = η0/√(1 − (f_c/f)²): at f = √2 f_c, β = k/√2 and Z = √2 η0 (exact)
    a = 22.86e-3
    f = np.sqrt(2) * wg.te10_cutoff_frequency(a)
    k = 2 * np.pi * f / 299_792_458.0
    assert wg.te10_propagation_constant(f, a) == pytest.approx(k / np.sqrt(2), rel=1e-13)
    assert wg.te10_wave_impedance(f, a) == pytest.approx(np.sqrt(2) * FREE_SPACE_IMPEDANCE, rel=1e-13)
    assert np.isnan(wg.te10_propagation_constant(0.9 * f / np.sqrt(2), a))
    assert wg.te20_cutoff_frequency(a) == pytest.approx(2 * wg.te10_cutoff_frequency(a), rel=1e-15)
