"""Breakdown intervals and optimum ranges along a sweep (hornproof.compare.numerics.breakdown).

The rules are hornproof's own (the module docstring): a model surely holds where
|e| + u ≤ t and is surely past where |e| − b > t, with linear interpolation of the margins
between swept values (common practice for a threshold read off a sampled curve). The values
below are worked by hand from those rules.
"""

import math

import numpy as np
import pytest

from hornproof.compare.numerics.breakdown import (analytic_breakdown, breakdown_interval, first_crossing,
                                                  optimum_interval)

NAN = math.nan


def test_first_crossing_interpolates_linearly():
    # margin −0.2 at 10, +0.2 at 20: crosses at 15 (by hand)
    assert first_crossing([0, 10, 20], [-0.5, -0.2, 0.2]) == pytest.approx(15.0)
    assert first_crossing([0, 10], [0.1, 0.2]) == "below range"
    assert first_crossing([0, 10], [-0.1, 0.0]) is None


def test_analytic_error_gives_a_point_interval():
    x = np.linspace(0, 40, 5)  # |e| = 0.01 x: crosses t = 0.3 at 30
    out = analytic_breakdown(x, -0.01 * x, 0.3)
    assert out["status"] == "breaks"
    assert out["earliest"] == pytest.approx(30.0) and out["latest"] == pytest.approx(30.0)
    assert out["nominal"] == pytest.approx(30.0)


def test_uncertainty_widens_the_interval_on_both_sides():
    # e = 0.1, 0.2, 0.4, 0.6 at x = 10, 20, 30, 40; u = b = 0.1; t = 0.3
    # could: |e| + u − t = −0.1, 0.0, 0.2, 0.4 -> first > 0 at 30, crossing 20 + 10·0/0.2 = 20
    # sure:  |e| − b − t = −0.3, −0.2, 0.0, 0.2 -> first > 0 at 40, crossing 30 + 10·0/0.2 = 30
    # nominal: |e| − t = −0.2, −0.1, 0.1, 0.3 -> 25
    out = breakdown_interval([10, 20, 30, 40], [0.1, 0.2, 0.4, 0.6], 0.1, 0.1, 0.3)
    assert out["status"] == "breaks"
    assert out["earliest"] == pytest.approx(20.0)
    assert out["latest"] == pytest.approx(30.0)
    assert out["nominal"] == pytest.approx(25.0)
    assert out["earliest"] <= out["nominal"] <= out["latest"]


def test_a_point_without_confident_uncertainty_cannot_hold_or_narrow():
    # the second point has no confident u but a bound: it may break there (earliest = 10, the last
    # sample known to hold), and it is surely past (0.9 − 0.2 > 0.3): latest interpolated
    # between sure margins −0.3 (10) and 0.4 (20): 10 + 10·0.3/0.7
    out = breakdown_interval([10, 20], [0.1, 0.9], [0.1, NAN], [0.1, 0.2], 0.3)
    assert out["earliest"] == pytest.approx(10.0)
    assert out["latest"] == pytest.approx(10 + 10 * 0.3 / 0.7)
    assert out["status"] == "breaks"


def test_divergent_points_leave_the_breakdown_unresolved():
    # no confident u and no bound after the first point: may break from 10 on, never sure
    out = breakdown_interval([10, 20, 30], [0.0, 2.0, 3.0], [0.05, NAN, NAN], [0.05, NAN, NAN], 0.3)
    assert out["status"] == "unresolved"
    assert out["earliest"] == pytest.approx(10.0) and out["latest"] is None
    assert "20" in out["reason"] and "30" in out["reason"]


def test_holds_throughout_and_past_from_the_start():
    assert breakdown_interval([1, 2], [0.1, 0.1], 0.05, 0.05, 0.3)["status"] == "holds throughout"
    assert breakdown_interval([1, 2], [1.0, 1.0], 0.05, 0.05, 0.3)["status"] == "past tolerance from the start"
    # a model whose error is not confidently known anywhere never "holds throughout"
    assert breakdown_interval([1, 2], [0.1, 0.1], NAN, NAN, 0.3)["status"] == "unresolved"


def test_optimum_range_holds_every_value_that_could_be_the_peak():
    # v = 10, 11, 11.1, 10.5 ± 0.2: the best is 11.1 (floor 10.9); 11 + 0.2 ≥ 10.9 could be the
    # peak, 10.5 + 0.2 and 10 + 0.2 cannot: range [20, 30]
    out = optimum_interval([10, 20, 30, 40], [10, 11, 11.1, 10.5], [0.2] * 4, [0.2] * 4)
    assert out["range"] == [20.0, 30.0]
    assert out["bounded"] and out["interior"]
    assert 20.0 <= out["value"] <= 40.0
    # without any bound, any sample could be the peak
    loose = optimum_interval([10, 20, 30], [1, 2, 1], [NAN] * 3, [NAN] * 3)
    assert loose["range"] == [10.0, 30.0] and not loose["bounded"]
    # a bound without a confident uncertainty may still exclude a sample: 1 + 0.3 < 2 − 0.3
    bounded = optimum_interval([10, 20, 30], [1, 2, 1.9], [NAN] * 3, [0.3] * 3)
    assert bounded["range"] == [20.0, 30.0] and bounded["uncertainty"] is None
    # a parabola through three samples symmetric about 20 peaks at 20 (exact)
    assert optimum_interval([10, 20, 30], [1, 2, 1], [0.0] * 3, [0.0] * 3)["value"] == pytest.approx(20.0)


def test_latest_edge_interpolates_the_sure_margin_by_hand():
    # Worked by hand: angles 5, 10, 15, 20 deg; |error| 0.1, 0.3, 0.9, 1.5; u = b = 0.1;
    # t 0.5 -> sure margins −0.5, −0.3, +0.3, +0.9; zero between 10 and 15 at 10 + 0.3/0.6·5 = 12.5.
    x = [20.0, 5.0, 15.0, 10.0]          # unsorted on purpose
    e = [-1.5, 0.1, 0.9, -0.3]
    assert breakdown_interval(x, e, 0.1, 0.1, 0.5)["latest"] == pytest.approx(12.5)
    # NaN samples are skipped: the crossing moves to the next usable pair (5 -> 15):
    # margins −0.4, +0.5 -> 5 + 0.4/0.9·10 = 9.444…
    assert analytic_breakdown([5.0, 10.0, 15.0], [0.1, NAN, 1.0], 0.5)["latest"] == pytest.approx(5 + 0.4 / 0.9 * 10)
    # a large uncertainty keeps a large error from counting as surely past
    assert breakdown_interval([5.0, 10.0, 15.0], [0.1, 0.9, 1.2], [0.1, 0.5, 0.8], [0.1, 0.5, 0.8],
                              0.5)["latest"] is None
    with pytest.raises(ValueError, match="values"):
        analytic_breakdown([1.0, 1.0], [0.1, 0.2], 0.5)
    # JSON nulls (None) read as unknown, never as an error
    assert breakdown_interval([1.0, 2.0, 3.0], [0.1, None, 0.9], [0.0, 0.0, None], [0.0, 0.0, None],
                              0.5)["latest"] is None


def test_an_unbounded_best_sample_does_not_open_the_whole_range():
    # best 2.0 has no bound; 1.5 ± 0.1 is surely above 1.0 ± 0.1 (1.1 < 1.4), so 10 is excluded
    out = optimum_interval([10, 20, 30], [1.0, 2.0, 1.5], [NAN] * 3, [0.1, NAN, 0.1])
    assert out["range"] == [20.0, 30.0] and not out["bounded"]


def test_an_error_that_changes_sign_is_seen_coming_back():
    # e = 0, −0.5, 0.1, 0.2, −0.6 (t 0.3, exact): past at 20, surely within again at 30–40
    out = analytic_breakdown([10, 20, 30, 40, 50], [0.0, -0.5, 0.1, 0.2, -0.6], 0.3)
    assert out["status"] == "breaks" and out["back_within"] == [[30.0, 40.0]]
