"""Classifying a case's new figures against its baseline.

Each figure is classified as:

``unchanged``       equal to the baseline at every frequency (to a tiny epsilon);
``within-noise``    changed, but nowhere both beyond the case's tolerance and beyond the
                    combined numerical uncertainty √(u_base² + u_new²);
``regressed``       at some frequency beyond the tolerance *and* beyond that uncertainty
                    (or a figure that was defined became undefined, or the other way round);
``not-comparable``  the case definition or tier settings changed since the baseline (the
                    stored case hash differs): never reported as a regression;
``new``             no baseline yet;
``failed``          the run itself failed: counts as a regression.

A case takes the worst status of its figures.
"""

import math
from dataclasses import dataclass
from typing import NamedTuple

from ..numerics.figures import FIGURES
from ..output.baseline_file import figure_unit

__all__ = [
    "STATUSES",
    "DEFAULT_TOLERANCES",
    "FigureVerdict",
    "tolerance_for",
    "classify_figure",
    "compare_case",
    "case_status",
]

# Worst first: a case takes the worst status of its figures.
STATUSES = ("failed", "regressed", "not-comparable", "new", "within-noise", "unchanged")
_RANK = {status: i for i, status in enumerate(STATUSES)}

# Used where a case gives no tolerance for a figure. Project choice (not from a standard): about
# the repeatability one expects of a coarse FDTD run on a staircased horn.
DEFAULT_TOLERANCES = {"directivity_db": 0.2, "hpbw_deg": 1.0, "sll_db": 1.0, "s11_db": 1.0}

# Relative size of a difference still read as "equal" (rounding of JSON round trips).
EQUAL_EPSILON = 1e-9


@dataclass
class FigureVerdict:
    """How one figure of one case compares with its baseline (changes in the figure's unit)."""

    figure: str
    status: str
    tolerance: float = None
    tolerance_key: str = ""
    max_change: float = None  # signed change (new − baseline) at the decisive frequency
    noise: float = None  # √(u_base² + u_new²) there
    at_frequency_ghz: float = None
    reason: str = ""
    baseline_value: float = None  # at the decisive frequency
    new_value: float = None

    def to_dict(self):
        return {
            "figure": self.figure,
            "baseline_value": self.baseline_value,
            "new_value": self.new_value,
            "unit": figure_unit(self.figure),
            "status": self.status,
            "tolerance": self.tolerance,
            "tolerance_key": self.tolerance_key,
            "max_change": self.max_change,
            "noise": self.noise,
            "at_frequency_ghz": self.at_frequency_ghz,
            "reason": self.reason,
        }


def tolerance_for(figure, checks):
    """Tolerance of a figure from the case's checks, falling back to DEFAULT_TOLERANCES.

    Returns
    -------
    tolerance : float
        In the figure's own unit (dB or degrees).
    key : str
        The check key it came from (prefixed ``default:`` for a fallback).
    """
    checks = checks or {}
    keys = FIGURES[figure].tolerance_keys if figure in FIGURES else (figure,)
    for key in keys:
        value = checks.get(key)
        if isinstance(value, (int, float)) and not isinstance(value, bool) and value >= 0:
            return float(value), key
    for key in keys:
        if key in DEFAULT_TOLERANCES:
            return DEFAULT_TOLERANCES[key], f"default:{key}"
    return 0.0, "default:none"


def classify_figure(figure, base_values, base_uncertainty, new_values, new_uncertainty, frequencies_ghz,
                    tolerance, *, tolerance_key="", epsilon=EQUAL_EPSILON):
    """Classify one figure over the band against its baseline.

    Parameters
    ----------
    figure : str
        Figure name (e.g. ``directivity_dbi``).
    base_values, new_values : sequence of float or None
        Baseline and new values per frequency, in the figure's unit (dB or degrees); None where
        the figure is undefined (e.g. no sidelobe found).
    base_uncertainty, new_uncertainty : sequence of float or None
        Absolute numerical uncertainty per value, same unit; None = not given (taken as 0).
    frequencies_ghz : sequence of float
    tolerance : float
        The case's tolerance for this figure, same unit.

    Returns
    -------
    FigureVerdict
        ``regressed`` if at some frequency |Δ| > tolerance and |Δ| > √(u_b² + u_n²), or the
        figure's definedness changed; ``unchanged`` if |Δ| ≤ epsilon·max(1, |baseline|)
        everywhere; else ``within-noise``. The decisive frequency is the one with the largest
        |Δ| / max(tolerance, noise) among the regressed ones (among all, otherwise).
    """
    count = len(frequencies_ghz)
    if not (len(base_values) == len(new_values) == len(base_uncertainty) == len(new_uncertainty) == count):
        raise ValueError(f"{figure}: values and uncertainties must have one entry per frequency")
    verdict = FigureVerdict(figure=figure, status="unchanged", tolerance=tolerance, tolerance_key=tolerance_key)
    changes = [change for change in (
        _change_at(index, base_values, base_uncertainty, new_values, new_uncertainty, tolerance, epsilon)
        for index in range(count)) if change is not None]
    if not changes:
        return verdict
    regressed = [change for change in changes if change.regressed]
    verdict.status = "regressed" if regressed else "within-noise"
    decisive = max(regressed or changes, key=lambda change: (change.score, -change.index))
    index = decisive.index
    verdict.max_change, verdict.noise = decisive.delta, decisive.noise
    verdict.at_frequency_ghz = frequencies_ghz[index]
    verdict.baseline_value, verdict.new_value = base_values[index], new_values[index]
    if decisive.delta is None:
        was, now = base_values[index], new_values[index]
        verdict.reason = (f"undefined now (was {was:.4g})" if now is None else f"was undefined, now {now:.4g}") + \
            f" at {frequencies_ghz[index]:g} GHz"
    elif verdict.status == "regressed":
        verdict.reason = (
            f"changed by {verdict.max_change:+.4g} at {verdict.at_frequency_ghz:g} GHz: beyond the tolerance "
            f"{tolerance:g} and the combined uncertainty {verdict.noise:.3g}"
        )
    else:
        verdict.reason = (
            f"largest change {verdict.max_change:+.4g} at {verdict.at_frequency_ghz:g} GHz is within the tolerance "
            f"{tolerance:g} or the combined uncertainty {verdict.noise:.3g}"
        )
    return verdict


class _Change(NamedTuple):
    """A figure's change at one frequency: its size relative to max(tolerance, noise) (``score``),
    whether it is a regression, the frequency index, the signed change and the combined noise
    (both None when the figure became defined or undefined there)."""

    score: float
    regressed: bool
    index: int
    delta: float | None
    noise: float | None


def _change_at(index, base_values, base_uncertainty, new_values, new_uncertainty, tolerance, epsilon):
    """The change at frequency ``index``, or None where the figure is equal (or undefined on both sides)."""
    baseline, new = base_values[index], new_values[index]
    if baseline is None and new is None:
        return None
    if baseline is None or new is None:
        return _Change(math.inf, True, index, None, None)
    delta = new - baseline
    if abs(delta) <= epsilon * max(1.0, abs(baseline)):
        return None
    noise = math.hypot(base_uncertainty[index] or 0.0, new_uncertainty[index] or 0.0)
    regressed = abs(delta) > tolerance and abs(delta) > noise
    return _Change(abs(delta) / max(tolerance, noise, 1e-300), regressed, index, delta, noise)


def compare_case(baseline, case_sha256, frequencies_ghz, figures, checks):
    """Verdicts for every figure of one case's new result.

    Parameters
    ----------
    baseline : hornproof.compare.output.baseline_file.Baseline or None
    case_sha256 : str
        Hash of the tier case definition that produced the new result.
    frequencies_ghz : list of float
    figures : dict of str -> FigureRecord
        The new result's figures (:func:`hornproof.compare.output.baseline_file.figures_from_result`).
    checks : dict
        The case's tolerances.

    Returns
    -------
    list of FigureVerdict
        In the order of the new result's figures, then figures only the baseline has.
    """
    verdicts = []
    names = list(figures) + ([n for n in baseline.figures if n not in figures] if baseline else [])
    for name in names:
        tolerance, key = tolerance_for(name, checks)
        record = figures.get(name)
        if baseline is None:
            verdicts.append(FigureVerdict(name, "new", tolerance, key, reason="no baseline"))
            continue
        if baseline.case_sha256 != case_sha256:
            verdicts.append(FigureVerdict(
                name, "not-comparable", tolerance, key,
                reason=f"case or tier settings changed since the baseline (hash {baseline.case_sha256[:12]} -> "
                       f"{str(case_sha256)[:12]}); rerun with --update to accept",
            ))
            continue
        if not _same_frequencies(baseline.frequencies_ghz, frequencies_ghz):
            verdicts.append(FigureVerdict(name, "not-comparable", tolerance, key,
                                          reason="frequencies differ from the baseline's"))
            continue
        base = baseline.figures.get(name)
        if base is None:
            verdicts.append(FigureVerdict(name, "new", tolerance, key, reason="figure not in the baseline"))
            continue
        if record is None:
            verdicts.append(FigureVerdict(name, "regressed", tolerance, key,
                                          reason="figure in the baseline is missing from the new result"))
            continue
        verdicts.append(classify_figure(name, base.values, base.uncertainty, record.values, record.uncertainty,
                                        frequencies_ghz, tolerance, tolerance_key=key))
    return verdicts


def _same_frequencies(a, b):
    return len(a) == len(b) and all(abs(x - y) <= 1e-9 * max(1.0, abs(x)) for x, y in zip(a, b))


def case_status(figure_verdicts):
    """The worst status among a case's figures ("unchanged" for none)."""
    if not figure_verdicts:
        return "unchanged"
    return min((verdict.status for verdict in figure_verdicts), key=_RANK.__getitem__)
