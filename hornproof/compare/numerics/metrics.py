"""Differences between two horn models over their pattern cuts (the main-lobe pattern error).

Figure-by-figure differences (one number per frequency) are plain subtractions, done where the
comparison is built (:func:`hornproof.compare.numerics.verdict.comparison_block`).

Every function here is pure and NaN-aware: arrays in, arrays out. A *figure* is one number per
band frequency (shape ``[nf]``: directivity, realized gain, HPBW, first-null angle, sidelobe
level); a *cut* is a principal-plane pattern sampled over angle (shape ``[nf, ntheta]`` or
``[ntheta]``), in dB (dBi for 3D models, 2D directivity in dB for 2D models).

Sign convention throughout: ``difference = model - reference``. The *reference* is the model
we trust more for that comparison (exact phase against the closed form, FDTD against either).

Units: decibel figures are differences in dB; angle figures (HPBW, first null) are in degrees,
as stored in ``ModelResult`` and the JSON summary. Angles are an edge unit that the pattern
metrics of ``analytic.pattern_metrics`` already report in degrees; nothing here converts units.
"""

from dataclasses import dataclass

import numpy as np

#: Default level of the main-lobe window for the pattern error: 10 dB below the reference peak.
DEFAULT_MAIN_LOBE_LEVEL_DB = -10.0


def _as_float_array(values, name):
    """Return ``values`` as a float ndarray or raise ValueError naming the parameter."""
    try:
        array = np.asarray(values, dtype=float)
    except (TypeError, ValueError) as exc:
        raise ValueError(f"{name}: not numeric ({exc})") from None
    return array


def _aligned(model, reference, model_name, reference_name):
    model = _as_float_array(model, model_name)
    reference = _as_float_array(reference, reference_name)
    if model.shape != reference.shape:
        raise ValueError(
            f"{model_name}: shape {model.shape} does not match {reference_name} "
            f"shape {reference.shape}"
        )
    return model, reference


def band_centre_index(frequencies):
    """Index of the band frequency nearest the band's geometric centre sqrt(f_min f_max)."""
    freqs = np.asarray(frequencies, dtype=float)
    return int(np.argmin(np.abs(freqs - np.sqrt(freqs.min() * freqs.max()))))


def interpolate_cut(theta_to, theta_from, cut):
    """Cut(s) resampled from angles ``theta_from`` to ``theta_to`` (degrees; NaN outside).

    Parameters
    ----------
    theta_to, theta_from : array_like, shape [ntheta_to], [ntheta_from]
        Angles, degrees, increasing.
    cut : array_like, shape [nf, ntheta_from] or [ntheta_from]
        Pattern in dB.

    Returns
    -------
    numpy.ndarray, shape [nf, ntheta_to]
        Linear interpolation in dB (common practice for finely sampled cuts).
    """
    cut = np.atleast_2d(np.asarray(cut, dtype=float))
    return np.array([np.interp(theta_to, theta_from, row, left=np.nan, right=np.nan) for row in cut])


def main_lobe_mask(theta_deg, reference_db, level_db=DEFAULT_MAIN_LOBE_LEVEL_DB):
    """Samples of the contiguous main lobe around boresight, down to ``level_db`` below peak.

    Parameters
    ----------
    theta_deg : array_like, shape [ntheta]
        Cut angles from boresight, degrees, strictly increasing.
    reference_db : array_like, shape [ntheta] or [nf, ntheta]
        Reference pattern in dB (any dB reference: dBi, or normalised).
    level_db : float
        Window level relative to the reference peak, dB; must be negative (default −10 dB).

    Returns
    -------
    numpy.ndarray of bool, same shape as ``reference_db``
        True on the run of samples that contains the sample nearest boresight and where the
        reference is at or above ``peak + level_db``. The peak is the reference's maximum over
        the whole cut (NaN ignored). A NaN sample ends the run. If the boresight sample itself
        is below the level (a beam split by large phase error or squinted), the mask is empty.

    Notes
    -----
    Windowing a pattern comparison on the main lobe at a fixed level below the peak is common
    practice; the level is a choice, not a standard.
    """
    theta = _as_float_array(theta_deg, "theta_deg")
    reference = _as_float_array(reference_db, "reference_db")
    if theta.ndim != 1 or theta.size < 1:
        raise ValueError("theta_deg: must be a non-empty 1-D array")
    if np.any(~np.isfinite(theta)) or np.any(np.diff(theta) <= 0):
        raise ValueError("theta_deg: must be finite and strictly increasing")
    if reference.shape[-1:] != theta.shape or reference.ndim not in (1, 2):
        raise ValueError(
            f"reference_db: shape {reference.shape} must be [ntheta] or [nf, ntheta] "
            f"with ntheta = {theta.size}"
        )
    if not np.isfinite(level_db) or level_db >= 0:
        raise ValueError(f"level_db: must be a negative finite number of dB, got {level_db}")
    rows = np.atleast_2d(reference)
    mask = np.zeros(rows.shape, dtype=bool)
    start = int(np.argmin(np.abs(theta)))
    for i, row in enumerate(rows):
        if np.all(np.isnan(row)):
            continue
        threshold = np.nanmax(row) + level_db
        inside = np.isfinite(row) & (row >= threshold)
        if not inside[start]:
            continue
        lo = start
        while lo > 0 and inside[lo - 1]:
            lo -= 1
        hi = start
        while hi < row.size - 1 and inside[hi + 1]:
            hi += 1
        mask[i, lo : hi + 1] = True
    return mask.reshape(reference.shape)


@dataclass(frozen=True)
class PatternError:
    """Pattern error of one principal-plane cut over the main lobe, per band frequency.

    Attributes
    ----------
    rms_db : numpy.ndarray [nf]
        Root mean square of ``model - reference`` (dB) over the main-lobe samples.
    worst_db : numpy.ndarray [nf]
        The signed difference (dB) of largest magnitude over the main lobe.
    worst_angle_deg : numpy.ndarray [nf]
        The cut angle (degrees) where ``worst_db`` occurs.
    samples : numpy.ndarray of int [nf]
        How many finite samples entered the statistics (0 gives NaN results).
    level_db : float
        The main-lobe window level used, dB below the reference peak.
    """

    rms_db: np.ndarray
    worst_db: np.ndarray
    worst_angle_deg: np.ndarray
    samples: np.ndarray
    level_db: float

    def to_dict(self):
        """JSON-ready dict of lists (NaN -> None)."""
        def clean(a):
            return [None if not np.isfinite(v) else float(v) for v in np.atleast_1d(a)]

        return {
            "rms_db": clean(self.rms_db),
            "worst_db": clean(self.worst_db),
            "worst_angle_deg": clean(self.worst_angle_deg),
            "samples": [int(v) for v in np.atleast_1d(self.samples)],
            "level_db": float(self.level_db),
        }


def pattern_error(theta_deg, model_db, reference_db, level_db=DEFAULT_MAIN_LOBE_LEVEL_DB,
                  normalize=False):
    """RMS and worst-point difference of a pattern cut over the reference's main lobe.

    Parameters
    ----------
    theta_deg : array_like, shape [ntheta]
        Cut angles from boresight, degrees, strictly increasing.
    model_db, reference_db : array_like, shape [ntheta] or [nf, ntheta]
        Patterns of the model under test and of the reference, dB (dBi for 3D directivity
        cuts). NaN samples are skipped.
    level_db : float
        Main-lobe window level relative to the reference peak, dB (default −10 dB); see
        :func:`main_lobe_mask`.
    normalize : bool
        If True, subtract each pattern's own peak before differencing, so the error measures
        the shape only (the directivity difference is then excluded). Default False: the
        difference of the absolute patterns (dBi), which includes any directivity offset.

    Returns
    -------
    PatternError
        Arrays of shape [nf] (a 1-D cut gives shape [1]).

    Notes
    -----
    RMS of a dB difference over a window is common practice for pattern agreement; it weights
    every angle sample equally (no solid-angle weighting), so the cut should be sampled
    uniformly in angle for the number to mean "RMS over the lobe".
    """
    model, reference = _aligned(model_db, reference_db, "model_db", "reference_db")
    mask = main_lobe_mask(theta_deg, reference, level_db)
    theta = np.asarray(theta_deg, dtype=float)
    model = np.atleast_2d(model)
    reference = np.atleast_2d(reference)
    mask = np.atleast_2d(mask)
    if normalize:
        with np.errstate(invalid="ignore"):
            model = model - _nanmax_rows(model)[:, None]
            reference = reference - _nanmax_rows(reference)[:, None]
    difference = model - reference
    usable = mask & np.isfinite(difference)
    nf = difference.shape[0]
    rms = np.full(nf, np.nan)
    worst = np.full(nf, np.nan)
    worst_angle = np.full(nf, np.nan)
    count = usable.sum(axis=1)
    for i in range(nf):
        if count[i] == 0:
            continue
        d = difference[i, usable[i]]
        rms[i] = np.sqrt(np.mean(d**2))
        j = int(np.argmax(np.abs(d)))
        worst[i] = d[j]
        worst_angle[i] = theta[usable[i]][j]
    return PatternError(rms, worst, worst_angle, count, float(level_db))


def _nanmax_rows(rows):
    out = np.full(rows.shape[0], np.nan)
    for i, row in enumerate(rows):
        if np.any(np.isfinite(row)):
            out[i] = np.nanmax(row)
    return out
