"""Wall loss: TE10 conductor attenuation, its integral along the flare, roughness, materials.

Outside values, each with its source:

* WR-90 (22.86 × 10.16 mm) in copper at 10 GHz loses about 0.11 dB/m in the TE10 mode
  (common practice; the usual handbook figure, from memory; Pozar's TE10 formula gives
  0.108 dB/m with σ = 5.8e7 S/m).
* The same attenuation written in cutoff ratios, α = R_s / (η0 b √(1 − (f_c/f)²)) ·
  (1 + (2b/a)(f_c/f)²) (C. A. Balanis, *Advanced Engineering Electromagnetics*, ch. 8,
  rectangular waveguide conductor loss; from memory): an independent form of the same result.
* Skin depth of copper at 10 GHz ≈ 0.66 µm (common practice, from memory).
* Parallel-plate (TEM) guide of spacing d: α = R_s / (η0 d) (Pozar, *Microwave Engineering*,
  §2.7 / §3.2, parallel-plate guide; from memory): the limit of a wide slice.
* Hammerstad–Jensen roughness factor 1 + (2/π) arctan(1.4 (Δ/δ)²) (Hammerstad and Jensen,
  1980, from memory): 1 when smooth, 2 when very rough.
* Resistivities at 20 °C, *CRC Handbook of Chemistry and Physics*, "Electrical resistivity of
  pure metals" (from memory): copper 1.678e-8, aluminium 2.65e-8, silver 1.587e-8 Ω·m.
"""

import numpy as np
import pytest

from hornproof.analytic.geometry import HornGeometry
from hornproof.analytic.materials import CONDUCTIVITY_S_PER_M, wall_material
from hornproof.analytic.roughness import hammerstad_jensen_factor, skin_depth, surface_resistance
from hornproof.analytic.wall_loss import NEPER_TO_DB, flare_attenuation, horn_wall_loss, te10_attenuation
from hornproof.units import FREE_SPACE_IMPEDANCE, SPEED_OF_LIGHT

A90, B90 = 22.86e-3, 10.16e-3
COPPER = 5.8e7  # S/m, the round value most handbook examples use (common practice)


def test_wr90_copper_at_10_ghz_is_about_0_11_db_per_metre():
    # common practice / from memory: ≈ 0.11 dB/m; Pozar's formula with 5.8e7 S/m: 0.108
    db_per_m = te10_attenuation(10e9, A90, B90, COPPER) * NEPER_TO_DB
    assert db_per_m == pytest.approx(0.108, abs=0.003)
    assert 0.10 < db_per_m < 0.12


@pytest.mark.parametrize("f", [7.5e9, 10e9, 12.4e9, 18e9])
def test_attenuation_equals_the_cutoff_ratio_form(f):
    # Balanis' form in cutoff ratios (from memory): same quantity, written differently
    fc = SPEED_OF_LIGHT / (2 * A90)
    ratio = (fc / f) ** 2
    rs = surface_resistance(f, COPPER)
    expected = rs / (FREE_SPACE_IMPEDANCE * B90 * np.sqrt(1 - ratio)) * (1 + 2 * B90 / A90 * ratio)
    assert te10_attenuation(f, A90, B90, COPPER) == pytest.approx(expected, rel=1e-12)


def test_attenuation_is_nan_below_cutoff_and_grows_towards_it():
    fc = SPEED_OF_LIGHT / (2 * A90)
    assert np.isnan(te10_attenuation(0.99 * fc, A90, B90, COPPER))
    near, far = te10_attenuation([1.01 * fc, 1.5 * fc], A90, B90, COPPER)
    assert near > 5 * far


def test_skin_depth_of_copper_at_10_ghz():
    # common practice, from memory: about 0.66 µm
    assert skin_depth(10e9, COPPER) == pytest.approx(0.66e-6, rel=0.02)
    assert surface_resistance(10e9, COPPER) == pytest.approx(1 / (COPPER * skin_depth(10e9, COPPER)), rel=1e-12)


def test_wide_slice_tends_to_the_parallel_plate_loss():
    # a guide many wavelengths wide: the side walls no longer matter (Pozar, parallel plate)
    f, b = 10e9, 10e-3
    wide = te10_attenuation(f, 3.0, b, COPPER)
    assert wide == pytest.approx(surface_resistance(f, COPPER) / (FREE_SPACE_IMPEDANCE * b), rel=1e-3)


def test_a_barely_flared_horn_loses_what_its_guide_does_over_the_same_length():
    # consistency of the integral: slices all nearly the feed guide
    horn = HornGeometry("pyramidal", A90, B90, A90 * 1.0001, B90 * 1.0001, 0.2)
    per_m = te10_attenuation(10e9, A90, B90, COPPER)
    assert flare_attenuation(horn, np.array([10e9]), COPPER)[0] == pytest.approx(per_m * 0.2, rel=1e-3)


def test_flare_integral_converges_and_the_slant_factor_raises_the_loss():
    horn = HornGeometry("pyramidal", A90, B90, 0.09, 0.07, 0.16)
    f = np.array([9e9, 11e9])
    coarse = flare_attenuation(horn, f, COPPER, nodes=16)
    fine = flare_attenuation(horn, f, COPPER, nodes=64)
    np.testing.assert_allclose(coarse, fine, rtol=1e-7)
    assert np.all(flare_attenuation(horn, f, COPPER, slant=True) > flare_attenuation(horn, f, COPPER, slant=False))


def test_horn_wall_loss_adds_the_feed_guide_and_sets_the_efficiency():
    horn = HornGeometry("pyramidal", A90, B90, 0.09, 0.07, 0.16)
    f = np.array([10e9])
    loss = horn_wall_loss(horn, f, wall_material("copper"), feed_length=0.1)
    per_m = te10_attenuation(f, A90, B90, CONDUCTIVITY_S_PER_M["copper"]) * NEPER_TO_DB
    np.testing.assert_allclose(loss.feed_db, per_m * 0.1, rtol=1e-12)
    np.testing.assert_allclose(loss.total_db, loss.feed_db + loss.flare_db, rtol=1e-12)
    np.testing.assert_allclose(loss.radiation_efficiency, 10 ** (-loss.total_db / 10), rtol=1e-12)
    # worse metal, more loss: brass above copper by √(σ_Cu/σ_brass) (R_s ∝ σ^-1/2)
    brass = horn_wall_loss(horn, f, wall_material("brass"), feed_length=0.1)
    ratio = np.sqrt(CONDUCTIVITY_S_PER_M["copper"] / CONDUCTIVITY_S_PER_M["brass"])
    np.testing.assert_allclose(brass.total_db / loss.total_db, ratio, rtol=1e-12)
    with pytest.raises(ValueError, match="feed_length"):
        horn_wall_loss(horn, f, wall_material("copper"), feed_length=-1.0)


def test_roughness_factor_limits():
    f, sigma = 10e9, COPPER
    delta = skin_depth(f, sigma)
    assert hammerstad_jensen_factor(f, sigma, 0.0) == 1.0
    assert hammerstad_jensen_factor(f, sigma, 100 * delta) == pytest.approx(2.0, abs=1e-4)
    assert hammerstad_jensen_factor(f, sigma, delta) == pytest.approx(1 + 2 / np.pi * np.arctan(1.4), rel=1e-12)


@pytest.mark.parametrize("name, resistivity", [("copper", 1.678e-8), ("aluminium", 2.65e-8),
                                               ("silver", 1.587e-8)])
def test_table_conductivities_agree_with_handbook_resistivities(name, resistivity):
    # CRC Handbook resistivities at 20 °C (from memory); Pozar's table within a few per cent
    assert CONDUCTIVITY_S_PER_M[name] == pytest.approx(1 / resistivity, rel=0.03)


def test_material_names_numbers_and_refusals():
    assert wall_material("Aluminum").name == "aluminium"
    custom = wall_material(2.4e7, roughness_rms=0.8e-6)
    assert custom.name == "custom" and custom.conductivity == 2.4e7 and custom.roughness_rms == 0.8e-6
    for bad in ("unobtainium", True, 1e3, float("nan"), [1]):
        with pytest.raises(ValueError, match="wall_material"):
            wall_material(bad)
