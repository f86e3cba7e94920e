"""Gain reduction from phase error: closed form (function of S or T) and exact path."""

import numpy as np
import pytest

from hornproof.analytic import closed_form as cf
from hornproof.analytic import gain_reduction as gr
from hornproof.analytic.geometry import HornGeometry
from hornproof.units import SPEED_OF_LIGHT

F0 = 10e9
LAMBDA0 = SPEED_OF_LIGHT / F0


def test_no_phase_error_costs_nothing():
    assert gr.h_plane_reduction_db(0.0) == 0.0 and gr.e_plane_reduction_db(0.0) == 0.0
    assert gr.exact_reduction_db("h", 0.3, np.inf, LAMBDA0) == pytest.approx(0.0, abs=1e-13)


def test_reductions_split_the_closed_form_directivity(wr90):
    # internal: D = (4π/λ²)·A·B·(8/π²)·η_h(S)·η_e(T) for any horn in the closed form
    a, b = wr90
    f = np.linspace(8e9, 12e9, 9)
    lam = SPEED_OF_LIGHT / f
    horn = HornGeometry("pyramidal", a, b, 0.15, 0.11, 0.22)
    d = 4 * np.pi / lam**2 * horn.aperture_a * horn.aperture_b * 8 / np.pi**2 \
        * gr.h_plane_efficiency(horn.phase_error_h(f)) * gr.e_plane_efficiency(horn.phase_error_e(f))
    np.testing.assert_allclose(d, cf.directivity(horn, f), rtol=1e-12)


def test_reductions_at_the_rule_phase_errors():
    # pinned values of this closed form (not an outside reference): S = 3/8 costs 1.007 dB,
    # T = 1/4 costs 0.967 dB; with the 8/π² taper the rules give 0.514 efficiency, Balanis's ≈51 %
    assert gr.h_plane_reduction_db(3 / 8) == pytest.approx(1.0074, abs=1e-4)
    assert gr.e_plane_reduction_db(1 / 4) == pytest.approx(0.9674, abs=1e-4)
    total = 8 / np.pi**2 * gr.h_plane_efficiency(3 / 8) * gr.e_plane_efficiency(1 / 4)
    assert total == pytest.approx(0.51, abs=0.01)


def test_h_plane_reduction_grows_with_phase_error():
    s = np.linspace(0, 1.0, 101)
    assert np.all(np.diff(gr.h_plane_reduction_db(s)) > 0)


def test_exact_reduction_tends_to_classical_for_long_horns():
    # A fixed at 20 λ, S = 0.3: exact → classical as the size (hence R/A) grows
    diffs = [abs(gr.exact_reduction_from_phase_error_db("h", 0.3, w) - gr.h_plane_reduction_db(0.3))
             for w in (5.0, 20.0, 80.0)]
    assert diffs[0] > diffs[1] > diffs[2] and diffs[2] < 1e-3


def test_slant_convention_needs_a_possible_horn():
    # slant length D²/(8λT) must exceed D/2: T < D/(4λ)
    with pytest.raises(ValueError, match="phase_error"):
        gr.apex_for_phase_error(2.0, 5.0, 1.0, "slant")
    assert gr.apex_for_phase_error(1.0, 5.0, 1.0, "slant") == pytest.approx(np.sqrt(3.125**2 - 2.5**2))
    with pytest.raises(ValueError, match="phase_error_h"):
        gr.h_plane_efficiency(-0.1)
    with pytest.raises(ValueError, match="plane"):
        gr.exact_efficiency("x", 1.0, 1.0, 1.0)
