"""Fabrication tolerances: how machining errors in A, B, L, a, b spread a horn's figures.

Three results for one horn, its band and a tolerance ±t_i (m) on each machined size:

* **Linear sensitivities** ∂F/∂x_i of every figure F (dB or degrees per metre; shown per mm),
  by central differences with a small step (``SENSITIVITY_STEP``).
* **Monte Carlo spread**: sizes drawn independently and uniformly in ±t_i (a tolerance band
  read as "anywhere inside it", common practice for machining tolerances; no distribution is
  known for a particular shop), the figures evaluated on each drawn horn, and their mean,
  standard deviation, 2.5/97.5 % percentiles and extremes. A fixed seed makes it repeatable.
* **Delta-method spread**: σ_F ≈ √Σ (∂F/∂x_i · σ_i)², σ_i = t_i/√3 the standard deviation of
  a uniform distribution on ±t_i (first-order propagation of uncertainty; JCGM 100:2008,
  *Guide to the expression of uncertainty in measurement*, §5.1.2, law of propagation for
  uncorrelated inputs, and §4.3.7 for the rectangular distribution; from memory). For small
  tolerances it must agree with the Monte Carlo spread; where it does not, the figure is not
  linear over the tolerance band (tested).
* **Worst corners**: per figure and frequency, the sizes at the corners of the tolerance box
  that the linear model says raise and lower the figure most, x_i ± t_i·sign(∂F/∂x_i), with the
  figure evaluated there (not extrapolated).

Which sizes are free depends on the horn type: an H-plane sectoral horn's aperture height is
its guide height (a tolerance on b moves both), an E-plane sectoral horn's aperture width is its
guide width (a tolerance on a moves both).

The figures are pluggable: any mapping name -> ``function(horn, frequencies) -> array [nf]``.
:func:`aperture_model_figures` gives directivity and the two half-power beamwidths of the
closed-form or exact-phase aperture model; the beamwidth is found by root-finding on the model's
continuous cut (not read off a sampled cut, whose steps would make the sensitivities noisy).
The aperture models have no S11: a return-loss spread needs full-wave runs at the corners.
"""

import dataclasses
from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq

from . import closed_form, exact_phase

__all__ = ["DIMENSIONS", "free_dimensions", "perturbed_horn", "aperture_model_figures",
           "half_power_beamwidth", "sensitivities", "monte_carlo", "delta_method_spread",
           "worst_corners", "ToleranceStudy", "tolerance_study"]

#: machined sizes: name -> (HornGeometry field, words)
DIMENSIONS = {"A": ("aperture_a", "aperture width A"), "B": ("aperture_b", "aperture height B"),
              "L": ("flare_length", "flare length L"), "a": ("guide_a", "guide width a"),
              "b": ("guide_b", "guide height b")}
#: central-difference step, m (0.01 mm: far below any machining tolerance, far above rounding)
SENSITIVITY_STEP = 1.0e-5
#: default Monte Carlo sample count and seed
DEFAULT_SAMPLES = 400
DEFAULT_SEED = 1


def free_dimensions(kind):
    """The independent machined sizes of a horn type (see the module notes)."""
    if kind == "h-sectoral":
        return ("A", "L", "a", "b")
    if kind == "e-sectoral":
        return ("B", "L", "a", "b")
    return ("A", "B", "L", "a", "b")


def perturbed_horn(horn, deltas):
    """``horn`` with sizes changed by ``deltas`` (name -> m); tied sides of a sectoral horn follow.

    Raises ``ValueError`` (from ``HornGeometry``) when the changed horn is not buildable.
    """
    fields = {}
    for name, delta in deltas.items():
        attribute = DIMENSIONS[name][0]
        fields[attribute] = getattr(horn, attribute) + float(delta)
    if horn.kind == "h-sectoral" and "guide_b" in fields:
        fields["aperture_b"] = fields["guide_b"]
    if horn.kind == "e-sectoral" and "guide_a" in fields:
        fields["aperture_a"] = fields["guide_a"]
    return dataclasses.replace(horn, **fields)


_MODELS = {"closed_form": closed_form, "exact_phase": exact_phase}


def half_power_beamwidth(horn, frequency, plane, model="closed_form"):
    """Full half-power beamwidth, degrees, of an aperture model's principal-plane cut.

    The first angle where the cut falls to half its boresight value is bracketed on a 0.5°
    grid and refined by Brent's method; the cut is symmetric, so HPBW = 2θ₃. NaN when the cut
    never falls 3 dB within 90°.
    """
    module = _MODELS[model]
    index = 0 if plane == "h" else 1

    def level(theta_deg):
        cuts = module.principal_plane_cuts(horn, frequency, np.atleast_1d(theta_deg))
        return np.asarray(cuts[index], dtype=float).ravel()

    grid = np.linspace(0.0, 90.0, 181)
    values = level(grid)
    half = 0.5 * values[0]
    below = np.nonzero(values < half)[0]
    if below.size == 0:
        return np.nan
    j = int(below[0])
    theta3 = brentq(lambda t: level(t)[0] - half, grid[j - 1], grid[j], xtol=1e-10)
    return 2.0 * theta3


def aperture_model_figures(model="closed_form"):
    """Figure functions of an aperture model: ``directivity_dbi``, ``hpbw_h_deg``, ``hpbw_e_deg``.

    Each is ``function(horn, frequencies) -> ndarray [nf]``. Add a figure (the phase centre,
    say) by adding a function of the same form to the returned dict.
    """
    if model not in _MODELS:
        raise ValueError(f"model must be one of {', '.join(_MODELS)}, got {model!r}")
    module = _MODELS[model]

    def directivity_dbi(horn, frequencies):
        return 10 * np.log10(module.directivity(horn, np.asarray(frequencies, dtype=float)))

    def hpbw(plane):
        def figure(horn, frequencies):
            return np.array([half_power_beamwidth(horn, f, plane, model) for f in np.atleast_1d(frequencies)])
        return figure

    return {"directivity_dbi": directivity_dbi, "hpbw_h_deg": hpbw("h"), "hpbw_e_deg": hpbw("e")}


def _evaluate(figures, horn, frequencies):
    return {name: np.asarray(function(horn, frequencies), dtype=float) for name, function in figures.items()}


def sensitivities(horn, frequencies, figures, dimensions, step=SENSITIVITY_STEP):
    """{figure: {dimension: ∂F/∂x [nf]}} in figure units per metre, central differences."""
    out = {name: {} for name in figures}
    for dim in dimensions:
        up = _evaluate(figures, perturbed_horn(horn, {dim: step}), frequencies)
        down = _evaluate(figures, perturbed_horn(horn, {dim: -step}), frequencies)
        for name in figures:
            out[name][dim] = (up[name] - down[name]) / (2 * step)
    return out


def delta_method_spread(slopes, tolerances):
    """First-order standard deviation √Σ(∂F/∂x_i · t_i/√3)² per figure, [nf] (module notes)."""
    out = {}
    for name, by_dim in slopes.items():
        terms = [(np.asarray(by_dim[dim]) * tolerances[dim] / np.sqrt(3.0)) ** 2 for dim in tolerances]
        out[name] = np.sqrt(np.sum(terms, axis=0))
    return out


def monte_carlo(horn, frequencies, figures, tolerances, samples=DEFAULT_SAMPLES, seed=DEFAULT_SEED):
    """Figures over ``samples`` horns with sizes uniform in ±tolerance.

    Returns ``(values, rejected)``: values {figure: ndarray [samples_kept, nf]} and the number of
    drawn horns that were not buildable (left out, and reported).
    """
    rng = np.random.default_rng(seed)
    dims = list(tolerances)
    draws = rng.uniform(-1.0, 1.0, size=(int(samples), len(dims))) * np.array([tolerances[d] for d in dims])
    values = {name: [] for name in figures}
    rejected = 0
    for row in draws:
        try:
            drawn = perturbed_horn(horn, dict(zip(dims, row)))
        except ValueError:
            rejected += 1
            continue
        for name, value in _evaluate(figures, drawn, frequencies).items():
            values[name].append(value)
    return {name: np.array(rows) for name, rows in values.items()}, rejected


def worst_corners(horn, frequencies, figures, slopes, tolerances):
    """Per figure and frequency, the corners that raise ("high") and lower ("low") it most.

    Returns {figure: [{"frequency_index", "high": {"deltas_m", "value"}, "low": {...}}]}; the
    value is the figure evaluated on the corner horn (NaN if that horn is not buildable).
    """
    f = np.atleast_1d(frequencies)
    out = {}
    for name, function in figures.items():
        rows = []
        for i in range(f.size):
            row = {"frequency_index": i}
            for label, sign in (("high", 1.0), ("low", -1.0)):
                # a size the figure does not depend on (|slope·t| at rounding level) stays nominal
                deltas = {d: sign * _direction(slopes[name][d][i], tolerances[d]) * tolerances[d]
                          for d in tolerances}
                try:
                    value = float(np.asarray(function(perturbed_horn(horn, deltas), f[i:i + 1]))[0])
                except ValueError:
                    value = np.nan
                row[label] = {"deltas_m": {d: float(v) for d, v in deltas.items()}, "value": value}
            rows.append(row)
        out[name] = rows
    return out


def _direction(slope, tolerance):
    """+1 / −1 / 0: the sign of the figure's change over the tolerance, 0 below 1e-9 units."""
    change = float(slope) * float(tolerance)
    return 0.0 if not np.isfinite(change) or abs(change) < 1e-9 else float(np.sign(change))


@dataclass(frozen=True)
class ToleranceStudy:
    """One tolerance study (arrays [nf]; figure units: dB, degrees; sizes m).

    ``nominal``, ``mc_mean``, ``mc_std``, ``mc_low``/``mc_high`` (2.5/97.5 %), ``mc_min``/
    ``mc_max`` and ``delta_std`` map figure -> [nf]; ``sensitivity`` figure -> dimension -> [nf]
    (per metre); ``corners`` as :func:`worst_corners`.
    """

    frequencies: np.ndarray
    tolerances: dict
    model: str
    samples: int
    rejected: int
    seed: int
    nominal: dict
    sensitivity: dict
    delta_std: dict
    mc_mean: dict
    mc_std: dict
    mc_low: dict
    mc_high: dict
    mc_min: dict
    mc_max: dict
    corners: dict
    samples_values: dict


def tolerance_study(horn, frequencies, tolerances, *, figures=None, model="closed_form",
                    samples=DEFAULT_SAMPLES, seed=DEFAULT_SEED):
    """Sensitivities, Monte Carlo and delta-method spreads and worst corners (module notes).

    Parameters
    ----------
    horn : HornGeometry
    frequencies : array_like, Hz
    tolerances : dict
        Dimension name (``DIMENSIONS``; only the horn type's free ones) -> ±tolerance, m (> 0).
    figures : dict, optional
        name -> function(horn, frequencies) -> [nf]; default :func:`aperture_model_figures`.
    model : {"closed_form", "exact_phase"}
        Aperture model of the default figures.
    samples, seed : int
        Monte Carlo sample count (≥ 10) and seed.
    """
    f = np.atleast_1d(np.asarray(frequencies, dtype=float))
    free = free_dimensions(horn.kind)
    for dim, value in tolerances.items():
        if dim not in free:
            raise ValueError(f"tolerances: {dim!r} is not a free size of a {horn.kind} horn "
                             f"(free: {', '.join(free)})")
        if not (np.isfinite(value) and value > 0):
            raise ValueError(f"tolerances: {dim} must be a positive length in m, got {value!r}")
    if not tolerances:
        raise ValueError("tolerances: give at least one")
    if int(samples) < 10:
        raise ValueError(f"samples must be at least 10, got {samples!r}")
    figures = figures or aperture_model_figures(model)
    nominal = _evaluate(figures, horn, f)
    slopes = sensitivities(horn, f, figures, list(tolerances))
    values, rejected = monte_carlo(horn, f, figures, tolerances, samples, seed)

    def stat(function):
        return {name: function(v) if v.size else np.full(f.size, np.nan) for name, v in values.items()}

    return ToleranceStudy(
        frequencies=f, tolerances=dict(tolerances), model=model, samples=int(samples), rejected=rejected,
        seed=int(seed), nominal=nominal, sensitivity=slopes, delta_std=delta_method_spread(slopes, tolerances),
        mc_mean=stat(lambda v: np.nanmean(v, axis=0)), mc_std=stat(lambda v: np.nanstd(v, axis=0, ddof=1)),
        mc_low=stat(lambda v: np.nanpercentile(v, 2.5, axis=0)),
        mc_high=stat(lambda v: np.nanpercentile(v, 97.5, axis=0)),
        mc_min=stat(lambda v: np.nanmin(v, axis=0)), mc_max=stat(lambda v: np.nanmax(v, axis=0)),
        corners=worst_corners(horn, f, figures, slopes, tolerances), samples_values=values)
