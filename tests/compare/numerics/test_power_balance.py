"""The power-balance term of the FDTD uncertainty: u_P = 10 log10(1 + |ε|) dB, combined with
the ladder's uncertainty by root-sum-square (hornproof's stated choice,
hornproof/compare/numerics/power_balance.py)."""

import math

import numpy as np
import pytest

from hornproof.compare.numerics.power_balance import (power_balance_uncertainty_db, root_sum_square,
                                                      with_power_balance)


def test_power_balance_term_in_db():
    # 10 log10(1.02) = 0.0860 dB (arithmetic); the sign of ε does not matter
    assert power_balance_uncertainty_db([0.02, -0.02, 0.0]) == pytest.approx([0.08600, 0.08600, 0.0], abs=1e-5)
    assert math.isnan(power_balance_uncertainty_db([None])[0])


def test_root_sum_square():
    # 3-4-5 triangle
    assert root_sum_square([0.3, 3.0], [0.4, 4.0]) == pytest.approx([0.5, 5.0])
    assert math.isnan(root_sum_square([None], [1.0])[0])


def test_directivity_and_gains_get_the_term_other_figures_do_not():
    ladder = {"directivity_dbi": [0.10, None], "gain_dbi": [0.10, 0.20], "realized_gain_dbi": [0.0, 0.0],
              "hpbw_h_deg": [0.5, 0.5], "s11_db": [0.3, 0.3]}
    combined, parts = with_power_balance(ladder, [0.05, -0.01])
    u_p = 10 * np.log10([1.05, 1.01])
    assert combined["directivity_dbi"][0] == pytest.approx(math.hypot(0.10, u_p[0]))
    assert combined["directivity_dbi"][1] is None  # no ladder estimate: the term alone is not claimed
    assert combined["gain_dbi"] == pytest.approx([math.hypot(0.10, u_p[0]), math.hypot(0.20, u_p[1])])
    assert combined["realized_gain_dbi"] == pytest.approx(list(u_p))
    assert combined["hpbw_h_deg"] == ladder["hpbw_h_deg"] and combined["s11_db"] == ladder["s11_db"]
    # the ladder's own numbers stay visible, untouched
    assert parts["ladder"] == ladder and parts["power_balance_db"] == pytest.approx(list(u_p))
    assert all(c >= l for c, l in zip(combined["gain_dbi"], ladder["gain_dbi"]))


def test_2d_keys_get_the_term():
    ladder = {"directivity_2d_db": [0.1], "gain_2d_db": [0.1], "realized_gain_2d_db": [0.1]}
    combined, _ = with_power_balance(ladder, [0.03])
    for key in ladder:
        assert combined[key][0] == pytest.approx(math.hypot(0.1, 10 * math.log10(1.03)))


def test_without_a_power_balance_figure_nothing_changes():
    ladder = {"directivity_dbi": [0.1, 0.2]}
    combined, parts = with_power_balance(ladder, None)
    assert combined == ladder and parts["power_balance_db"] is None
