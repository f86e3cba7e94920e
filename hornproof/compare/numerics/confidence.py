"""Which numerical uncertainty a verdict may lean on: one rule on a grid-convergence estimate.

:func:`confident_uncertainty` is the only uncertainty that may support "agrees": a GCI from a
monotone ladder of at least three grids (Fs = 1.25 with its observed order in the accepted range,
Fs = 3 at the formal order otherwise).
:func:`disagreement_bound` is what may still support "disagrees" without one; and
:func:`ladder_health` is the short label of a ladder in tables. All three read one
:class:`~hornproof.compare.numerics.convergence.ConvergenceEstimate` or its ``to_dict()`` form
(as stored in result.json), so stored results are judged exactly like fresh ones.

The rule is hornproof's own, reasoned from the grid-convergence literature below: an
extrapolated error estimate is credible only in the asymptotic range, which three grids and a
plausible observed order establish; two grids assume the order, and oscillatory or divergent
ladders give no extrapolation.

References
----------
Roache (1997); Celik et al. (2008); Stern et al. (2001, oscillatory convergence, cited from
memory): full citations in :mod:`hornproof.compare.numerics.convergence`.
"""

import math


def _estimate_fields(estimate):
    """(status, flags, uncertainty_kind, uncertainty, observed order, number of rungs) of a
    :class:`~hornproof.compare.numerics.convergence.ConvergenceEstimate` or of its ``to_dict()`` form (None/null -> NaN)."""
    if not isinstance(estimate, dict):
        estimate = vars(estimate)

    def number(key):
        value = estimate.get(key)
        return math.nan if value is None else float(value)
    return (str(estimate.get("status", "single")), set(estimate.get("flags") or ()),
            str(estimate.get("uncertainty_kind", "none")), number("uncertainty"), number("observed_order"),
            len(estimate.get("values") or ()))


def confident_uncertainty(estimate):
    """The uncertainty a verdict may lean on to claim agreement, or None, and why.

    Parameters
    ----------
    estimate : dict or ConvergenceEstimate or None
        One figure at one frequency: :meth:`~hornproof.compare.numerics.convergence.ConvergenceEstimate.to_dict` (as stored in
        result.json) or the estimate itself; None when there is no ladder.

    Returns
    -------
    (float or None, str)
        The uncertainty (figure units) and a short reason, e.g. ``(0.12, "monotone ladder,
        observed order 1.21")`` or ``(None, "divergent ladder")``.

    Notes
    -----
    hornproof's rule, reasoned from Roache (1997) and Celik et al. (2008): an error estimate
    is credible only from at least three grids in the asymptotic range, i.e. a monotone ladder
    whose observed order lies in the accepted range; only then is the GCI (Fs = 1.25) a
    confident band. Everything else gives None:

    * one rung: no estimate at all;
    * two rungs: the order is assumed, not observed (the Fs = 3 GCI is a guess at a bound);
    * a divergent ladder: no extrapolation exists and nothing bounds the converged value;
    * an oscillatory ladder: its spread is no error estimate. Measured here: the shipped
      gentle-long case's 9.5 GHz ladder (11.889 / 11.859 / 11.862 dB at 14.9 / 19.9 / 27.6 cells
      per wavelength, spread 0.03 dB) went to 11.812 dB on a fourth rung (37.4), outside the
      spread; it may still bound a *disagreement* (:func:`disagreement_bound`);
    * a monotone ladder without an observed order. A monotone ladder of three or more rungs
      whose observed order is out of range is not shown to be in the asymptotic range (Celik et
      al. 2008, step 5 discussion); it is confident only through the conservative GCI with
      safety factor 3 at the formal order (Roache 1997), which the convergence module then
      computes (with its coarse-pair floor).

    A three-rung ladder classed ``"converged"`` (every difference within the stated noise
    floor) is confident with the larger of its spread and the noise floor: the values already
    agree to the floor the caller defends.
    """
    if estimate is None:
        return None, "no ladder"
    status, flags, kind, uncertainty, order, rungs = _estimate_fields(estimate)
    if status == "single" or rungs < 2:
        return None, "one rung"
    if status == "two-grid" or rungs < 3:
        return None, "two rungs"
    if status == "divergent":
        return None, "divergent ladder"
    if not math.isfinite(uncertainty):
        return None, "no uncertainty estimate"
    if status == "oscillatory":
        return None, "oscillatory ladder"
    if status == "converged":
        return uncertainty, "converged ladder (within the noise floor)"
    if "order-iteration-failed" in flags or not math.isfinite(order):
        return None, "monotone ladder without an observed order"
    if "order-out-of-range" in flags:
        if kind == "gci" and rungs >= 3 and math.isfinite(uncertainty):
            return uncertainty, (f"monotone ladder, observed order {order:.2f} out of range: "
                                 f"GCI with Fs = 3 at the formal order")
        return None, f"monotone ladder, observed order {order:.2f} out of range"
    if kind != "gci" or "spread-bound" in flags or "assumed-order" in flags:
        return None, "no GCI from an observed order"
    return uncertainty, f"monotone ladder, observed order {order:.2f}"


def disagreement_bound(estimate):
    """An upper bound on the uncertainty that may still support a *disagreement*, or None.

    A difference can be called a disagreement without a confident uncertainty only when it
    exceeds the tolerance by more than a bound the procedure can defend. hornproof accepts:

    * the confident uncertainty itself;
    * Roache's (1997) conservative GCI with Fs = 3 at the assumed order, for two rungs and for
      a monotone ladder whose observed order is out of range (with this module's coarse-pair
      floor);
    * for an oscillatory ladder, its whole spread (max − min over all rungs): Stern et al.
      (2001) take half that range as the uncertainty of an oscillating solution (from
      memory); the whole range is a factor 2 beyond it.

    Divergent and one-rung ladders have no such bound (None): the differences grow or do not
    exist, so nothing limits where the grid-converged value lies and the verdict can only be
    "unresolved". The bound never supports "agrees" (see :func:`confident_uncertainty`).

    Parameters
    ----------
    estimate : dict or ConvergenceEstimate or None
        As for :func:`confident_uncertainty`.

    Returns
    -------
    float or None
        Figure units.
    """
    confident, _ = confident_uncertainty(estimate)
    if confident is not None:
        return confident
    if estimate is None:
        return None
    status, flags, kind, uncertainty, _, rungs = _estimate_fields(estimate)
    if not (math.isfinite(uncertainty) and uncertainty >= 0):
        return None
    if kind == "gci" and rungs >= 2 and (
            status == "two-grid" or (status == "monotonic" and "spread-bound" not in flags)):
        return uncertainty
    if status == "oscillatory" and kind == "spread-bound" and rungs >= 3:
        return uncertainty
    return None


def with_outside_terms(estimate, extra):
    """(confident uncertainty, disagreement bound) of ``estimate``, each combined root-sum-square
    with ``extra`` — uncertainty from outside the ladder (power balance, grid-fit residual), as
    :func:`hornproof.compare.numerics.verdict.judge` combines them; None stays None (an outside
    term cannot make an unconfident ladder confident)."""
    extra = 0.0 if extra is None or not math.isfinite(float(extra)) else abs(float(extra))
    confident, _ = confident_uncertainty(estimate)
    bound = disagreement_bound(estimate)
    return (None if confident is None else math.hypot(confident, extra),
            None if bound is None else math.hypot(bound, extra))


#: the short ladder label of the tables ("ladder" column): status -> words
LADDER_LABELS = {"monotonic": "monotone", "oscillatory": "oscillatory", "divergent": "divergent",
                 "converged": "converged", "two-grid": "2 rungs", "single": "1 rung"}


def ladder_health(estimate):
    """Short label of a figure's ladder for tables: ``"monotone"``, ``"oscillatory"``,
    ``"divergent"``, ``"converged"``, ``"2 rungs"``, ``"1 rung"``, ``"no ladder"``; a monotone
    ladder whose observed order is out of range or missing reads ``"monotone, Fs = 3"`` (its
    uncertainty is the conservative GCI at the formal order)."""
    if estimate is None:
        return "no ladder"
    status, flags, _, _, _, rungs = _estimate_fields(estimate)
    if rungs < 2:
        return "1 rung"
    label = LADDER_LABELS.get(status, status)
    if status == "monotonic" and {"order-out-of-range", "order-iteration-failed"} & flags:
        label += ", Fs = 3"
    return label
