"""Tests of verdicts and the error split, on cases worked by hand.

The verdict rule is hornproof's (module docstring of hornproof.compare.numerics.verdict), in the spirit
of ASME V&V 20-2009: a comparison error is judged together with its numerical uncertainty.
"""

import numpy as np
import pytest

from hornproof.compare.numerics.verdict import (error_split, overall_verdict,
                                       verdict, verdicts)


@pytest.mark.parametrize(
    "difference, tolerance, uncertainty, expected",
    [
        (0.3, 0.5, 0.1, "agrees"),        # inside tolerance
        (0.55, 0.5, 0.1, "agrees"),       # beyond t but within t + u, u < t
        (0.7, 0.5, 0.1, "disagrees"),     # |d| − u = 0.6 > 0.5
        (-0.7, 0.5, 0.1, "disagrees"),    # the sign does not matter
        (0.3, 0.5, 0.8, "unresolved"),    # u > t: cannot claim agreement
        (1.4, 0.5, 0.8, "disagrees"),     # |d| − u = 0.6 > 0.5 even so
        (1.2, 0.5, 0.8, "unresolved"),    # |d| − u = 0.4 ≤ 0.5
        (0.5, 0.5, 0.0, "agrees"),        # the boundary counts as agreement
        (float("nan"), 0.5, 0.1, "missing"),
        (0.1, 0.5, float("nan"), "unresolved"),  # unknown uncertainty is not zero
    ],
)
def test_verdict_table(difference, tolerance, uncertainty, expected):
    assert verdict(difference, tolerance, uncertainty) == expected


def test_difference_smaller_than_uncertainty_never_disagrees():
    # The house rule, checked over a grid of cases: |d| < u never gives "disagrees".
    rng = np.random.default_rng(1)
    for _ in range(2000):
        u = rng.uniform(0, 3)
        d = rng.uniform(-u, u)
        t = rng.uniform(0, 2)
        assert verdict(d, t, u) != "disagrees"


def test_verdicts_vector_and_overall():
    v = verdicts([0.1, 0.9, np.nan], 0.5, [0.1, 0.1, 0.1])
    assert v == ["agrees", "disagrees", "missing"]
    assert overall_verdict(v) == "disagrees"
    assert overall_verdict(["agrees", "unresolved"]) == "unresolved"
    assert overall_verdict(["agrees", "missing"]) == "agrees"
    assert overall_verdict(["missing"]) == "unresolved"
    with pytest.raises(ValueError, match="tolerance"):
        verdict(0.1, -1.0)
    with pytest.raises(ValueError, match="uncertainty"):
        verdict(0.1, 1.0, -0.2)


def test_error_split_sums_to_total():
    # By definition: (cf − ep) + (ep − fdtd) = cf − fdtd.
    cf = np.array([20.0, 21.0, np.nan])
    ep = np.array([19.6, 20.2, 20.9])
    fd = np.array([19.1, 20.5, 21.0])
    split = error_split(cf, ep, fd)
    np.testing.assert_allclose(split["phase_approximation_error"], [0.4, 0.8, np.nan])
    np.testing.assert_allclose(split["aperture_model_error"], [0.5, -0.3, -0.1])
    np.testing.assert_allclose(split["total_error"],
                               split["phase_approximation_error"] + split["aperture_model_error"])
    with pytest.raises(ValueError, match="closed_form"):
        error_split([1.0], [1.0, 2.0], [1.0])


def test_comparison_block_by_hand():
    # Two frequencies; tolerance 0.5 dB; FDTD uncertainty 0.1 and 0.8 dB.
    # f1: cf − fdtd = 16.2 − 15.8 = 0.4 -> agrees; f2: 17.0 − 16.4 = 0.6, u = 0.8 > t -> unresolved.
    from hornproof.compare.numerics.verdict import comparison_block
    models = {"closed_form": {"directivity_dbi": [16.2, 17.0]},
              "exact_phase": {"directivity_dbi": [16.0, 16.7]},
              "fdtd": {"directivity_dbi": [15.8, 16.4]}}
    block = comparison_block([10e9, 11e9], models, {"directivity_db": 0.5},
                             {"directivity_db": [0.1, 0.8]})
    rows = block["metrics"][0]["per_frequency"]
    assert [r["verdict"] for r in rows] == ["agrees", "unresolved"]
    assert rows[0]["frequency_ghz"] == pytest.approx(10.0)
    assert rows[0]["phase_approximation_error"] == pytest.approx(0.2)
    assert rows[0]["aperture_model_error"] == pytest.approx(0.2)
    assert rows[1]["total_error"] == pytest.approx(0.6)
    assert block["overall"] == "unresolved"
    # Unknown uncertainty (none given) is never read as zero.
    block = comparison_block([10e9, 11e9], models, {"directivity_db": 0.5})
    assert block["overall"] == "unresolved"
    with pytest.raises(ValueError, match="tolerances"):
        comparison_block([10e9], models, {"gain_typo": 0.5})


def test_json_nulls_are_accepted():
    # Lists read back from result.json carry None for NaN: treated as unknown, not an error.
    assert verdicts([0.1, None], 0.5, [None, 0.1]) == ["unresolved", "missing"]
