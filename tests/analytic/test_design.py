"""Optimum horns at fixed flare length, and the target-gain pyramidal design."""

import numpy as np
import pytest

from hornproof.analytic import closed_form as cf
from hornproof.analytic import design as dz
from hornproof.analytic import exact_phase as ep
from hornproof.units import SPEED_OF_LIGHT

F0 = 10.5e9
LAMBDA0 = SPEED_OF_LIGHT / F0


def test_optimum_phase_errors_match_orfanidis():
    # S. J. Orfanidis, Electromagnetic Waves and Antennas, horn chapter (published):
    # σ_a ≈ 1.2593, σ_b ≈ 1.0246, S = σ²/4
    s, t = dz.optimum_phase_errors()
    assert 2 * np.sqrt(s) == pytest.approx(1.2593, abs=1e-4)
    assert 2 * np.sqrt(t) == pytest.approx(1.0246, abs=1e-4)


@pytest.mark.parametrize("model", ["closed_form", "exact_phase"])
def test_optimum_aperture_is_a_maximum(wr90, model):
    a, b = wr90
    length = 0.16
    for plane, guide, kind in (("h", a, "h-sectoral"), ("e", b, "e-sectoral")):
        best = dz.optimum_aperture(plane, guide, length, F0, model=model)
        design = dz.optimum_horn(kind, a, b, length, F0, model=model)
        size = design.horn.aperture_a if plane == "h" else design.horn.aperture_b
        assert size == pytest.approx(best, rel=1e-12)
        mod = cf if model == "closed_form" else ep
        d0 = mod.directivity(design.horn, F0)
        for factor in (0.98, 1.02):
            other = dz.optimum_horn(kind, a, b, length, F0, model=model).horn
            other = type(other)(kind, a, b, other.aperture_a * (factor if plane == "h" else 1),
                                other.aperture_b * (factor if plane == "e" else 1), length)
            assert mod.directivity(other, F0) < d0


def test_fixed_length_optimum_phase_error_is_below_the_fixed_apex_one(wr90):
    # holding the flare length (not the apex distance) fixed moves the optimum to smaller S, T;
    # for a guide that is small against the aperture the two coincide
    a, b = wr90
    s_apex, t_apex = dz.optimum_phase_errors()
    d = dz.optimum_horn("pyramidal", a, b, 0.16, F0)
    assert 0.3 < d.phase_error_h_wl < s_apex and 0.2 < d.phase_error_e_wl < t_apex
    tiny = dz.optimum_horn("pyramidal", 1e-4 * LAMBDA0, 0.5e-4 * LAMBDA0, 400 * LAMBDA0, F0)
    assert tiny.phase_error_h_wl == pytest.approx(s_apex, abs=2e-3)
    assert tiny.phase_error_e_wl == pytest.approx(t_apex, abs=2e-3)


@pytest.mark.parametrize("phase_errors", ["rule", "optimum", (0.3, 0.2)])
@pytest.mark.parametrize("reference", ["axial", "slant"])
@pytest.mark.parametrize("model", ["closed_form", "exact_phase"])
def test_design_for_gain_meets_the_target_and_is_realizable(wr90, phase_errors, reference, model):
    a, b = wr90
    d = dz.design_for_gain(22.6, 11e9, a, b, phase_errors=phase_errors, phase_reference=reference, model=model)
    horn = d.horn
    assert horn.kind == "pyramidal"
    assert d.directivity_dbi == pytest.approx(22.6, abs=1e-6)
    # realizability: the axial throat-to-aperture lengths of the two planes are equal
    length_h = horn.apex_h * (1 - a / horn.aperture_a)
    length_e = horn.apex_e * (1 - b / horn.aperture_b)
    assert length_h == pytest.approx(horn.flare_length, rel=1e-9)
    assert length_e == pytest.approx(horn.flare_length, rel=1e-9)
    expected = {"rule": dz.PHASE_ERROR_RULES, "optimum": dz.optimum_phase_errors()}.get(phase_errors, phase_errors)
    assert d.phase_error_h_wl == pytest.approx(expected[0], rel=1e-9)
    assert d.phase_error_e_wl == pytest.approx(expected[1], rel=1e-9)
    # prediction reproduced independently of the designer
    if model == "exact_phase":
        again = ep.directivity(horn, 11e9)
    else:
        again = cf.directivity(horn, 11e9, phase_reference=reference)
    assert 10 * np.log10(again) == pytest.approx(22.6, abs=1e-6)


def test_rule_design_efficiency_is_about_half(wr90):
    # Balanis ch. 13 (optimum pyramidal horn ≈ 51 %, published); common practice ≈ 0.5
    a, b = wr90
    d = dz.design_for_gain(22.6, 11e9, a, b)
    assert d.aperture_efficiency == pytest.approx(0.51, abs=0.01)


def test_impossible_designs_name_the_parameter(wr90):
    a, b = wr90
    with pytest.raises(ValueError, match="gain_dbi"):
        dz.design_for_gain(2.0, 11e9, a, b)
    with pytest.raises(ValueError, match="gain_dbi"):
        dz.design_for_gain(150.0, 11e9, a, b)
    with pytest.raises(ValueError, match="frequency"):
        dz.design_for_gain(20.0, 5e9, a, b)
    with pytest.raises(ValueError, match="guide_b"):
        dz.design_for_gain(20.0, 11e9, b, a)
    with pytest.raises(ValueError, match="phase_errors"):
        dz.design_for_gain(20.0, 11e9, a, b, phase_errors=(0.3, -1))
    with pytest.raises(ValueError, match="model"):
        dz.design_for_gain(20.0, 11e9, a, b, model="fdtd")


def test_horn_from_slant_lengths_round_trip(wr90):
    a, b = wr90
    d = dz.design_for_gain(20.0, 10e9, a, b, phase_reference="slant")
    h = d.horn
    again = dz.horn_from_slant_lengths("pyramidal", a, b, h.aperture_a, h.aperture_b,
                                       slant_h=h.slant_h, slant_e=h.slant_e)
    assert again.flare_length == pytest.approx(h.flare_length, rel=1e-9)
    with pytest.raises(ValueError, match="slant_h"):
        dz.horn_from_slant_lengths("pyramidal", a, b, h.aperture_a, h.aperture_b,
                                   slant_h=1.1 * h.slant_h, slant_e=h.slant_e)
    with pytest.raises(ValueError, match="slant_e"):
        dz.horn_from_slant_lengths("e-sectoral", a, b, a, 0.05, slant_e=0.02)
