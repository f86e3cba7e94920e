"""The analytic layer of a map: both aperture models on a dense grid of the two parameters.

Instant (a few seconds for 60 × 60): the closed-form (quadratic phase, Fresnel) and the
exact-phase directivity of every horn of the grid at one frequency, and the
phase-approximation error closed form − exact phase. Where a pair makes no horn (an aperture
smaller than the guide, a flare of 80° or more) the values are NaN.
"""

import numpy as np

from ...analytic import closed_form, exact_phase
from ...units import db10

__all__ = ["model_directivities", "analytic_map"]


def model_directivities(horn, frequency, dims):
    """``(closed form, exact phase)`` directivity in dB (dBi in 3D, 2D directivity in 2D) —
    the same functions :func:`hornproof.analytic.predict.predict` reports."""
    if int(dims) == 2:
        return (float(db10(closed_form.directivity_2d(horn, frequency))),
                float(db10(exact_phase.directivity_2d(horn, frequency))))
    return (float(db10(closed_form.directivity(horn, frequency))),
            float(db10(exact_phase.directivity(horn, frequency))))


def analytic_map(base_horn, spec, frequency, dims):
    """Dense grids ([ny][nx]) of both models, their difference and the peak phase errors.

    Returns a dict: ``x``, ``y`` (axes, edge units), ``closed_form``, ``exact_phase``,
    ``phase_approximation_error`` (dB), ``phase_error_h_wl``, ``phase_error_e_wl``.
    """
    x_axis, y_axis = spec.analytic_axes()
    shape = (len(y_axis), len(x_axis))
    grids = {name: np.full(shape, np.nan) for name in ("closed_form", "exact_phase", "phase_error_h_wl",
                                                       "phase_error_e_wl")}
    for j, y in enumerate(y_axis):
        for i, x in enumerate(x_axis):
            try:
                horn = spec.horn_at(base_horn, float(x), float(y))
            except ValueError:
                continue
            grids["closed_form"][j, i], grids["exact_phase"][j, i] = model_directivities(horn, frequency, dims)
            grids["phase_error_h_wl"][j, i] = horn.phase_error_h(frequency)
            grids["phase_error_e_wl"][j, i] = horn.phase_error_e(frequency)
    grids["phase_approximation_error"] = grids["closed_form"] - grids["exact_phase"]
    return dict(x=x_axis, y=y_axis, **grids)
