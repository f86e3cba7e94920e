"""The power-balance error of the finest FDTD grid as a term of the numerical uncertainty.

On a lossless (PEC) model the power radiated through the near-to-far box should equal the
power the feed guide carries towards the horn, P_inc − P_refl. Their relative difference ε
(``power_balance_error`` of the run) is numerical error: of the box flux, of the mode fit at
the feed, of the grid. Directivity divides the radiation intensity by the radiated power, so a
power error ε moves directivity, gain and realized gain by about

    u_P = 10 log10(1 + |ε|)  dB,

whichever sign ε has (a stated project choice; for the few-percent errors seen here it differs
from the other one-sided bound |10 log10(1 − |ε|)| by under 0.002 dB at |ε| = 2 %).

The grid ladder's own uncertainty (GCI, or a spread bound; :mod:`.convergence`) does not see
this error when it is the same on every grid, so the two are combined by root-sum-square,

    u = √(u_GCI² + u_P²),

treating them as independent (a stated project choice, the way ASME V&V 20-2009 combines
independent uncertainty components). Where the ladder gives no uncertainty
(one grid, or no estimate) the combined one is missing too: the power-balance term alone is
never claimed as the numerical uncertainty. The ladder's own number stays visible beside the
combined one.
"""

import math

import numpy as np

__all__ = ["POWER_BALANCE_FIGURES", "power_balance_uncertainty_db", "root_sum_square",
           "with_power_balance"]

#: FDTD figures normalised by the radiated power (directivity and the gains derived from it),
#: 3D and 2D keys of result.json
POWER_BALANCE_FIGURES = ("directivity_dbi", "directivity_2d_db", "gain_dbi", "realized_gain_dbi",
                         "gain_2d_db", "realized_gain_2d_db")


def power_balance_uncertainty_db(power_balance_error):
    """u_P = 10 log10(1 + |ε|) dB per frequency; NaN where ε is missing (None or NaN)."""
    error = np.array([np.nan if e is None else e for e in np.atleast_1d(power_balance_error)], dtype=float)
    return 10 * np.log10(1 + np.abs(error))


def root_sum_square(*terms):
    """√(Σ tᵢ²) elementwise; NaN where any term is missing (None or NaN)."""
    stacked = np.array([[np.nan if v is None else v for v in np.atleast_1d(t)] for t in terms], dtype=float)
    return np.sqrt(np.sum(stacked**2, axis=0))


def _listed(values):
    return [None if not math.isfinite(v) else float(v) for v in values]


def with_power_balance(uncertainty, power_balance_error):
    """The ladder's per-figure uncertainty with the power-balance term added where it applies.

    Parameters
    ----------
    uncertainty : dict
        Figure key -> [nf] ladder uncertainty (None where missing), as from
        ``jobs.ladder.ladder_convergence``.
    power_balance_error : sequence of float or None
        ε per frequency, on the finest grid (None: not available; nothing is added).

    Returns
    -------
    (dict, dict)
        The combined uncertainty (same keys; figures outside ``POWER_BALANCE_FIGURES`` and
        everything when ε is not available are unchanged copies) and the parts:
        ``{"ladder": {figure: [nf]}, "power_balance_db": [nf], "combination": ...}``.
    """
    ladder = {key: list(values) for key, values in uncertainty.items()}
    if power_balance_error is None:
        return dict(ladder), {"ladder": ladder, "power_balance_db": None, "combination": "ladder only"}
    term = power_balance_uncertainty_db(power_balance_error)
    combined = {}
    for key, values in ladder.items():
        if key in POWER_BALANCE_FIGURES and len(values) == term.size:
            combined[key] = _listed(root_sum_square(values, term))
        else:
            combined[key] = list(values)
    parts = {"ladder": ladder, "power_balance_db": _listed(term),
             "combination": "root-sum-square of the ladder uncertainty and 10 log10(1 + |power balance error|) "
                            "of the finest grid, for directivity and gains"}
    return combined, parts
