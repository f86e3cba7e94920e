"""The confident-uncertainty rule and the verdicts it allows, on ladders worked by hand.

The rule is hornproof's own (numerics.confidence.confident_uncertainty), reasoned from
Roache (1997) and Celik et al. (2008): a discretisation-error estimate is credible only from
at least three grids in the asymptotic range — a monotone ladder whose observed order lies in
the accepted range — and then the GCI with safety factor 1.25 applies (Celik et al. 2008,
step 5). Two grids need an assumed order and Fs = 3 (Roache 1997); oscillatory and divergent
ladders give no extrapolation (both papers). Only a confident uncertainty may support
"agrees"; "disagrees" may also rest on a defended bound (Fs = 3 GCI, or the whole spread of an
oscillating ladder, twice the half range Stern et al. 2001 take — from memory).

Every ladder below uses cell sizes h = 1, 2, 4 (refinement ratio 2) so each number is simple
arithmetic on the values given.
"""

import math

import pytest

from hornproof.compare.numerics.confidence import confident_uncertainty, disagreement_bound, ladder_health
from hornproof.compare.numerics.convergence import estimate_ladder
from hornproof.compare.numerics.verdict import comparison_block, judge, limit_verdict

H3 = [1.0, 2.0, 4.0]


def _estimate(values, h=H3):
    return estimate_ladder(h, values, formal_order=1.0).to_dict()


# φ = 10 + 0.1 h: ε21 = 0.1, ε32 = 0.2, p = ln(0.2/0.1)/ln 2 = 1 (in [0.5, 2]);
# GCI = 1.25 · 0.1 / (2 − 1) = 0.125 (Celik et al. 2008, step 5).
MONOTONE = [10.1, 10.2, 10.4]
# ε21 = 0.2, ε32 = 0.1: R = ε21/ε32 = 2 ≥ 1, divergent (Celik et al. 2008, step 5).
DIVERGENT = [10.1, 10.3, 10.4]
# ε21 = 0.2, ε32 = −0.1: R < 0, oscillatory; spread max − min = 0.2.
OSCILLATORY = [10.1, 10.3, 10.2]
# two grids h = 1, 2: assumed order 1, Fs = 3 (Roache 1997): 3 · 0.1 / (2 − 1) = 0.3.
TWO_RUNGS = ([10.1, 10.2], [1.0, 2.0])


def test_monotone_ladder_gives_a_confident_gci():
    value, reason = confident_uncertainty(_estimate(MONOTONE))
    assert value == pytest.approx(0.125, abs=1e-12)
    assert "monotone" in reason and "1.00" in reason
    assert ladder_health(_estimate(MONOTONE)) == "monotone"
    assert estimate_ladder(H3, MONOTONE).confident


@pytest.mark.parametrize("values, h, health, reason", [
    (DIVERGENT, H3, "divergent", "divergent ladder"),
    (TWO_RUNGS[0], TWO_RUNGS[1], "2 rungs", "two rungs"),
    ([10.1], [1.0], "1 rung", "one rung"),
])
def test_unhealthy_ladders_give_no_confident_uncertainty(values, h, health, reason):
    estimate = _estimate(values, h)
    assert confident_uncertainty(estimate) == (None, reason)
    assert ladder_health(estimate) == health
    assert not estimate_ladder(h, values).confident


def test_out_of_range_order_is_confident_only_through_the_conservative_gci():
    # φ = 1 + 0.01 h^5: p = 5 > 2 × formal order (Celik et al. 2008: outside the asymptotic
    # range); with three rungs the Fs = 3 GCI at the formal order (Roache 1997) is the number
    estimate = _estimate([1 + 0.01 * h**5 for h in H3])
    value, reason = confident_uncertainty(estimate)
    assert value == pytest.approx(estimate["uncertainty"]) and "5.00 out of range" in reason
    assert "Fs = 3" in reason and estimate["safety_factor"] == 3.0
    assert ladder_health(estimate) == "monotone, Fs = 3"
    assert disagreement_bound(estimate) == pytest.approx(estimate["uncertainty"])


def test_no_ladder_at_all():
    assert confident_uncertainty(None) == (None, "no ladder")
    assert disagreement_bound(None) is None


@pytest.mark.parametrize("values, h, difference, expected", [
    # monotone, u = 0.125, t = 0.5
    (MONOTONE, H3, 0.3, "agrees"),        # |d| ≤ t
    (MONOTONE, H3, 0.6, "agrees"),        # |d| ≤ t + u = 0.625, u ≤ t
    (MONOTONE, H3, 0.7, "disagrees"),     # |d| − u = 0.575 > 0.5
    # divergent: spread 0.3 ≤ t used to read "agrees"; no bound at all now
    (DIVERGENT, H3, 0.1, "unresolved"),
    (DIVERGENT, H3, 5.0, "unresolved"),
    # oscillatory: never agrees; disagrees beyond its whole spread 0.2
    (OSCILLATORY, H3, 0.1, "unresolved"),
    (OSCILLATORY, H3, 0.6, "unresolved"),  # |d| − 0.2 = 0.4 ≤ 0.5
    (OSCILLATORY, H3, 1.0, "disagrees"),   # |d| − 0.2 = 0.8 > 0.5
    # two rungs: the Fs = 3 GCI 0.3 ≤ t used to read "agrees"
    (TWO_RUNGS[0], TWO_RUNGS[1], 0.1, "unresolved"),
    (TWO_RUNGS[0], TWO_RUNGS[1], 0.75, "unresolved"),  # |d| − 0.3 = 0.45 ≤ 0.5
    (TWO_RUNGS[0], TWO_RUNGS[1], 0.9, "disagrees"),    # |d| − 0.3 = 0.6 > 0.5
    # one rung: nothing to lean on either way
    ([10.1], [1.0], 0.1, "unresolved"),
    ([10.1], [1.0], 9.0, "unresolved"),
])
def test_each_ladder_gives_the_right_verdict(values, h, difference, expected):
    judged = judge(difference, 0.5, _estimate(values, h))
    assert judged["verdict"] == expected
    assert judged["confident"] == (values is MONOTONE)


def test_uncertainty_is_shown_even_when_not_confident():
    judged = judge(0.1, 0.5, _estimate(*TWO_RUNGS))
    assert judged["uncertainty"] == pytest.approx(0.3, abs=1e-12)  # the Fs = 3 GCI, shown
    assert not judged["confident"] and judged["ladder"] == "2 rungs"
    assert judged["reason"] == "two rungs"


def test_an_oscillatory_ladder_shows_its_spread_but_is_not_confident():
    judged = judge(0.1, 0.5, _estimate(OSCILLATORY))
    assert not judged["confident"] and judged["uncertainty"] == pytest.approx(0.2, abs=1e-12)
    assert judged["reason"] == "oscillatory ladder" and judged["verdict"] == "unresolved"
    # an outside term (power balance, grid residual) adds root-sum-square to what is shown
    widened = judge(0.1, 0.5, _estimate(MONOTONE), extra=0.3)
    assert widened["uncertainty"] == pytest.approx(math.hypot(0.125, 0.3), abs=1e-12)


def test_s11_with_a_huge_uncertainty_is_unresolved():
    # S11 (dB) on h = 1, 2, 4: −25, −10, +20 -> ε21 = 15, ε32 = 30, p = 1 (monotone, in range),
    # GCI = 1.25 · 15 / (2 − 1) = 18.75 dB: confident but huge. Limit −15 dB:
    # −25 + 18.75 = −6.25 > −15 (cannot claim the limit is met), −25 − 18.75 < −15 -> unresolved.
    estimate = _estimate([-25.0, -10.0, 20.0])
    judged = judge(-25.0, -15.0, estimate, limit=True)
    assert judged["verdict"] == "unresolved"
    assert judged["uncertainty"] == pytest.approx(18.75)
    # the same value with a small confident uncertainty meets the limit:
    # −25, −24, −22 -> ε21 = 1, ε32 = 2, p = 1, GCI = 1.25 dB; −25 + 1.25 ≤ −15.
    assert judge(-25.0, -15.0, _estimate([-25.0, -24.0, -22.0]), limit=True)["verdict"] == "agrees"
    # two rungs never meet a limit, however far below it
    assert judge(-40.0, -15.0, _estimate([-40.0, -39.0], [1.0, 2.0]), limit=True)["verdict"] == "unresolved"


@pytest.mark.parametrize("value, limit, u, bound, expected", [
    (-20.0, -15.0, 2.0, math.nan, "agrees"),       # −18 ≤ −15
    (-14.0, -15.0, 0.5, math.nan, "disagrees"),    # −14.5 > −15
    (-14.0, -15.0, 2.0, math.nan, "unresolved"),   # straddles the limit
    (-10.0, -15.0, math.nan, 3.0, "disagrees"),    # −13 > −15 on the defended bound
    (-20.0, -15.0, math.nan, 0.1, "unresolved"),   # a bound never supports "agrees"
    (math.nan, -15.0, 1.0, math.nan, "missing"),
])
def test_limit_verdict_table(value, limit, u, bound, expected):
    assert limit_verdict(value, limit, u, bound=bound) == expected


def test_comparison_rows_carry_ladder_and_reason():
    # closed form 10.5, FDTD 10.4 (d = 0.1 dB, t = 0.5): a divergent ladder -> unresolved,
    # a monotone one -> agrees; both rows show their uncertainty.
    models = {"closed_form": {"directivity_dbi": [10.5, 10.5]}, "exact_phase": {"directivity_dbi": [10.5, 10.5]},
              "fdtd": {"directivity_dbi": [10.4, 10.4]}}
    block = comparison_block([10e9, 11e9], models, {"directivity_db": 0.5},
                             fdtd_estimates={"directivity_db": [_estimate(DIVERGENT), _estimate(MONOTONE)]})
    rows = block["metrics"][0]["per_frequency"]
    assert [r["verdict"] for r in rows] == ["unresolved", "agrees"]
    assert [r["ladder"] for r in rows] == ["divergent", "monotone"]
    assert rows[0]["uncertainty_reason"] == "divergent ladder" and not rows[0]["uncertainty_confident"]
    assert rows[0]["fdtd_uncertainty"] == pytest.approx(0.3, abs=1e-12)  # spread 10.4 − 10.1
    assert rows[1]["fdtd_uncertainty"] == pytest.approx(0.125, abs=1e-12)
    assert block["overall"] == "unresolved"
