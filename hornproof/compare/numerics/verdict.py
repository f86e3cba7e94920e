"""Verdicts on model differences and the split of the error into its causes.

Breakdown intervals along a sweep are in :mod:`.breakdown`.

Verdict rule (per metric, per frequency), with d the difference, u ≥ 0 its numerical
uncertainty (figure units, e.g. the GCI of the FDTD value) and t the tolerance:

``"disagrees"``   |d| − u > t: beyond tolerance even at the most favourable end of the
                  uncertainty.
``"unresolved"``  otherwise, if u > t: the numerical uncertainty alone exceeds the tolerance,
                  so agreement cannot be claimed (finer cells needed).
``"agrees"``      otherwise: |d| ≤ t + u with u ≤ t.
``"missing"``     d is NaN (a model did not provide the figure).

An unknown uncertainty (NaN) is treated as unbounded: the verdict is ``"unresolved"``. Pass 0
for comparisons without numerical uncertainty (closed form against exact phase). A difference
smaller than its uncertainty is never a disagreement (|d| < u ⇒ |d| − u < 0 ≤ t).

Which uncertainty. For an FDTD figure, u must be *confident*
(:func:`hornproof.compare.numerics.confidence.confident_uncertainty`: a GCI from at least three
rungs with an observed order in range). Without one, the figure is ``"unresolved"``, never
``"agrees"``; it can still be ``"disagrees"`` when |d| − b > t for a bound b the convergence
module defends (:func:`~hornproof.compare.numerics.confidence.disagreement_bound`; none for
divergent, oscillatory or one-rung ladders). :func:`judge` applies this rule and returns the
reason with the verdict; every FDTD verdict (figure rows, pattern RMS, S11) goes through it.

Limit checks (S11 ≤ limit): ``"agrees"`` when value + u ≤ limit (the whole uncertainty band
meets the limit), ``"disagrees"`` when value − b > limit, otherwise ``"unresolved"``
(:func:`limit_verdict`).

This is the comparison-error reasoning of ASME V&V 20-2009 (the comparison error E is judged
against the validation uncertainty u_val), specialised to a stated tolerance; the exact
three-way rule is hornproof's own.

Error split. For a figure computed by the three models,

* phase-approximation error = closed form − exact phase (what the quadratic phase costs),
* aperture-model error = exact phase − FDTD (what the aperture-field model misses: walls,
  rim diffraction, reflections, higher modes),
* total error = closed form − FDTD = the sum of the two.

References
----------
ASME V&V 20-2009, Standard for Verification and Validation in Computational Fluid Dynamics
and Heat Transfer (comparison error E and validation uncertainty u_val).
"""

import math

import numpy as np

from .confidence import confident_uncertainty, ladder_health, with_outside_terms
from .figures import METRICS

VERDICTS = ("agrees", "disagrees", "unresolved", "missing")


def _float_array(values):
    """Float array from a number or a (possibly nested) list; JSON null (None) -> NaN."""
    if values is None:
        return np.array(np.nan)
    if isinstance(values, (list, tuple)):
        return np.array([np.nan if v is None else v for v in values], dtype=float)
    return np.asarray(values, dtype=float)


def verdict(difference, tolerance, uncertainty=0.0, *, bound=math.nan):
    """Verdict on one difference.

    Parameters
    ----------
    difference : float
        Model − reference, figure units (dB, degrees). NaN gives ``"missing"``.
    tolerance : float
        Accepted |difference|, figure units, ≥ 0.
    uncertainty : float
        Numerical uncertainty of the difference, figure units, ≥ 0; NaN = unknown (no
        confident uncertainty).
    bound : float
        Used only when ``uncertainty`` is NaN: a defended upper bound b (figure units) that
        still allows ``"disagrees"`` when |d| − b > t; NaN = none (the default).

    Returns
    -------
    str
        ``"agrees"``, ``"disagrees"``, ``"unresolved"`` or ``"missing"`` (module docstring).
    """
    tolerance = float(tolerance)
    if not np.isfinite(tolerance) or tolerance < 0:
        raise ValueError(f"tolerance: must be finite and non-negative, got {tolerance}")
    difference = float(difference)
    uncertainty = float(uncertainty)
    if uncertainty < 0:
        raise ValueError(f"uncertainty: must be non-negative, got {uncertainty}")
    if np.isnan(difference):
        return "missing"
    if np.isnan(uncertainty):
        bound = float(bound)
        return "disagrees" if np.isfinite(bound) and abs(difference) - bound > tolerance else "unresolved"
    if abs(difference) - uncertainty > tolerance:
        return "disagrees"
    if uncertainty > tolerance:
        return "unresolved"
    return "agrees"


def verdicts(differences, tolerance, uncertainties=0.0):
    """Verdicts for arrays of differences (shape [nf]); uncertainties broadcast.

    Returns
    -------
    list of str
        One verdict per element, see :func:`verdict`.
    """
    d = np.atleast_1d(_float_array(differences))
    u = np.broadcast_to(_float_array(uncertainties), d.shape)
    return [verdict(di, tolerance, ui) for di, ui in zip(d, u)]


def _finite_or_none(value):
    return None if value is None or not math.isfinite(float(value)) else float(value)


def judge(difference, tolerance, estimate, *, limit=False, extra=0.0):
    """Verdict on an FDTD-based difference (or a limit check) from its ladder estimate.

    Parameters
    ----------
    difference : float or None
        Model − FDTD (figure units); for ``limit=True`` the FDTD value itself. None/NaN gives
        ``"missing"``.
    tolerance : float
        The tolerance t (figure units, ≥ 0); for ``limit=True`` the limit (value ≤ limit).
    estimate : dict or ConvergenceEstimate or None
        The figure's convergence estimate at this frequency (``ConvergenceEstimate.to_dict()``).
    limit : bool
        Judge ``difference`` as a value against an upper limit (:func:`limit_verdict`).
    extra : float
        Further numerical uncertainty outside the ladder (figure units, ≥ 0; e.g. the finest
        grid's power-balance term and the grid fit's size residual), combined root-sum-square
        with the ladder's number and bound; it cannot make an unconfident ladder confident.

    Returns
    -------
    dict
        ``verdict``; ``uncertainty`` (the estimate's number whatever its kind, so a table never
        hides it; None if there is none); ``confident`` (bool); ``ladder`` (short label,
        :func:`~hornproof.compare.numerics.confidence.ladder_health`); ``reason`` (why the
        uncertainty is or is not confident).
    """
    _, reason = confident_uncertainty(estimate)
    confident, bound = with_outside_terms(estimate, extra)
    extra = 0.0 if extra is None or not math.isfinite(float(extra)) else abs(float(extra))
    u = math.nan if confident is None else confident
    b = math.nan if bound is None else bound
    d = math.nan if difference is None else float(difference)
    judged = limit_verdict(d, tolerance, u, bound=b) if limit else verdict(d, tolerance, u, bound=b)
    shown = None
    if estimate is not None:
        shown = _finite_or_none(estimate.get("uncertainty") if isinstance(estimate, dict) else estimate.uncertainty)
        shown = None if shown is None else math.hypot(shown, extra)
    return {"verdict": judged, "uncertainty": shown, "confident": confident is not None,
            "ladder": ladder_health(estimate), "reason": reason}


def limit_verdict(value, limit, uncertainty=0.0, *, bound=math.nan):
    """Verdict on a value that must not exceed ``limit`` (e.g. S11 ≤ −15 dB).

    ``"agrees"`` if value + u ≤ limit; ``"disagrees"`` if value − u > limit (with u NaN:
    value − ``bound`` > limit); ``"unresolved"`` otherwise (also when u is NaN and there is no
    bound); ``"missing"`` when value is NaN. u, bound in the value's units, ≥ 0.
    """
    value, limit, uncertainty = float(value), float(limit), float(uncertainty)
    if not np.isfinite(limit):
        raise ValueError(f"limit: must be finite, got {limit}")
    if uncertainty < 0:
        raise ValueError(f"uncertainty: must be non-negative, got {uncertainty}")
    if np.isnan(value):
        return "missing"
    margin = uncertainty if np.isfinite(uncertainty) else float(bound)
    if np.isfinite(margin) and value - margin > limit:
        return "disagrees"
    if np.isfinite(uncertainty) and value + uncertainty <= limit:
        return "agrees"
    return "unresolved"


def overall_verdict(verdict_list):
    """One verdict from many: any disagreement wins, then any unresolved, else agrees.

    ``"missing"`` entries are ignored; an empty or all-missing list is ``"unresolved"``.
    """
    items = [v for v in verdict_list if v != "missing"]
    unknown = set(items) - set(VERDICTS)
    if unknown:
        raise ValueError(f"verdict_list: unknown verdicts {sorted(unknown)}")
    if not items:
        return "unresolved"
    if "disagrees" in items:
        return "disagrees"
    if "unresolved" in items:
        return "unresolved"
    return "agrees"


def error_split(closed_form, exact_phase, fdtd):
    """Split the closed-form error into its phase-approximation and aperture-model parts.

    Parameters
    ----------
    closed_form, exact_phase, fdtd : array_like, shape [nf]
        The same figure from the three models (figure units; NaN allowed).

    Returns
    -------
    dict of str -> numpy.ndarray [nf]
        ``phase_approximation_error`` = closed form − exact phase,
        ``aperture_model_error`` = exact phase − FDTD,
        ``total_error`` = closed form − FDTD (= the sum of the other two).
    """
    closed_form = np.asarray(closed_form, dtype=float)
    exact_phase = np.asarray(exact_phase, dtype=float)
    fdtd = np.asarray(fdtd, dtype=float)
    if not (closed_form.shape == exact_phase.shape == fdtd.shape):
        raise ValueError(
            f"closed_form, exact_phase, fdtd: shapes {closed_form.shape}, {exact_phase.shape}, {fdtd.shape} differ"
        )
    return {
        "phase_approximation_error": closed_form - exact_phase,
        "aperture_model_error": exact_phase - fdtd,
        "total_error": closed_form - fdtd,
    }


#: Metric name in the comparison block -> (figure key in result.json models, label, unit): a
#: read of the one figure table (:data:`hornproof.compare.numerics.figures.METRICS`).
COMPARED_FIGURES = {metric: (figure.key, figure.label, figure.unit) for metric, figure in METRICS.items()}


def _column(figures, key, nf):
    if figures is None or key not in figures or figures[key] is None:
        return np.full(nf, np.nan)
    values = np.array([np.nan if v is None else v for v in figures[key]], dtype=float)
    if values.shape != (nf,):
        raise ValueError(f"models: figure {key!r} has {values.size} values, expected {nf}")
    return values


def _json_float(value):
    value = float(value)
    return value if np.isfinite(value) else None


def comparison_block(frequencies, models, tolerances, fdtd_uncertainties=None, *,
                     model_checked="closed_form", convergence=None, fdtd_estimates=None,
                     fdtd_extra_uncertainties=None):
    """The ``comparison`` block of result.json (documented in :mod:`hornproof.compare.report.html`).

    Parameters
    ----------
    frequencies : array_like [nf]
        Band frequencies, Hz (written as GHz).
    models : dict
        ``{"closed_form": figures, "exact_phase": figures, "fdtd": figures}`` with figures as
        in ``ModelResult.figures()`` (lists [nf], None = NaN). A missing model is all NaN.
    tolerances : dict of str -> float
        Metric name (a key of :data:`COMPARED_FIGURES`, e.g. ``"directivity_db"``) ->
        tolerance in the metric's unit. Only these metrics are compared.
    fdtd_uncertainties : dict of str -> array_like [nf], optional
        Metric name -> absolute numerical uncertainty of the FDTD value (e.g. the GCI from
        :mod:`hornproof.compare.numerics.convergence`); missing = unknown (NaN, verdict "unresolved").
        Taken as confident as given (the caller vouches, e.g. an exact reference); a metric with
        an entry in ``fdtd_estimates`` ignores it.
    model_checked : {"closed_form", "exact_phase"}
        The analytic model the verdict is about; its difference to FDTD is judged.
    convergence : dict, optional
        Stored as is under ``"convergence"`` (see the report module docstring).
    fdtd_estimates : dict of str -> list of dict [nf], optional
        Metric name -> the FDTD figure's convergence estimate per frequency
        (``ConvergenceEstimate.to_dict()``; None = no ladder). The verdict then follows
        :func:`judge`: only a confident uncertainty can support "agrees".

    Returns
    -------
    dict
        JSON-ready (NaN -> None).
    """
    if model_checked not in ("closed_form", "exact_phase"):
        raise ValueError(f"model_checked: must be 'closed_form' or 'exact_phase', got {model_checked!r}")
    f = np.atleast_1d(np.asarray(frequencies, dtype=float))
    nf = f.size
    fdtd_uncertainties = fdtd_uncertainties or {}
    metrics = []
    all_verdicts = []
    for metric, tolerance in tolerances.items():
        if metric not in COMPARED_FIGURES:
            raise ValueError(f"tolerances: unknown metric {metric!r} (known: {sorted(COMPARED_FIGURES)})")
        key, label, unit = COMPARED_FIGURES[metric]
        # Realized gain: only FDTD has it; the analytic models are matched, so their gain is
        # their realized gain: directivity less the wall loss when the case names a wall metal
        # (``gain_dbi``, jobs/wall_loss_block.py), else directivity (lossless walls).
        def analytic_key(name):
            if key != "realized_gain_dbi":
                return key
            return "gain_dbi" if "gain_dbi" in (models.get(name) or {}) else "directivity_dbi"
        closed_form = _column(models.get("closed_form"), analytic_key("closed_form"), nf)
        exact_phase = _column(models.get("exact_phase"), analytic_key("exact_phase"), nf)
        fdtd = _column(models.get("fdtd"), key, nf)
        fdtd_uncertainty = np.broadcast_to(np.asarray(
            [np.nan if v is None else v for v in np.atleast_1d(fdtd_uncertainties.get(metric, np.nan)).tolist()],
            dtype=float), (nf,))
        split = error_split(closed_form, exact_phase, fdtd)
        checked = closed_form if model_checked == "closed_form" else exact_phase
        difference = checked - fdtd
        if metric in (fdtd_estimates or {}):
            estimates = list(fdtd_estimates[metric]) + [None] * max(0, nf - len(fdtd_estimates[metric]))
            extra = list((fdtd_extra_uncertainties or {}).get(metric, [])) + [0.0] * nf
            judged = [judge(difference[i], tolerance, estimates[i], extra=extra[i]) for i in range(nf)]
        else:
            judged = [{"verdict": v, "uncertainty": _finite_or_none(u), "confident": bool(np.isfinite(u)),
                       "ladder": None, "reason": None} for v, u in zip(verdicts(difference, tolerance, fdtd_uncertainty),
                                                               fdtd_uncertainty)]
        metric_verdicts = [j["verdict"] for j in judged]
        all_verdicts.extend(metric_verdicts)
        rows = []
        for i in range(nf):
            fdtd_uncertainty_shown = judged[i]["uncertainty"]
            rows.append({
                "frequency_ghz": _json_float(f[i] / 1e9),
                "closed_form": _json_float(closed_form[i]),
                "exact_phase": _json_float(exact_phase[i]),
                "fdtd": _json_float(fdtd[i]),
                "fdtd_uncertainty": None if fdtd_uncertainty_shown is None else _json_float(fdtd_uncertainty_shown),
                "uncertainty_confident": judged[i]["confident"],
                "ladder": judged[i]["ladder"],
                "uncertainty_reason": judged[i]["reason"],
                "difference": _json_float(difference[i]),
                "phase_approximation_error": _json_float(split["phase_approximation_error"][i]),
                "aperture_model_error": _json_float(split["aperture_model_error"][i]),
                "total_error": _json_float(split["total_error"][i]),
                "verdict": metric_verdicts[i],
            })
        metrics.append({"metric": metric, "label": label, "unit": unit,
                        "tolerance": float(tolerance), "per_frequency": rows})
    block = {"model_checked": model_checked, "reference": "fdtd", "metrics": metrics,
             "overall": overall_verdict(all_verdicts)}
    if convergence is not None:
        block["convergence"] = convergence
    return block
