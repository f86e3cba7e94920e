"""Which grids a job runs, and what the grid's leftover size error can do to each figure.

Every rung is fitted (:func:`hornproof.sim.grid_fit.fit_ladder`) so that it models the horn's
own sizes as closely as whole cells allow; the nominal cells per wavelength are targets. What
remains — each rung's modelled guide, aperture and length differ from the nominal ones by up to
a few per cent of a cell — is propagated into the uncertainty here: the exact-phase aperture
model is evaluated for the horn as each rung models it and for the nominal horn, and the largest
change of a figure over the rungs is that figure's *geometry-residual* uncertainty. It is
combined with the grid-convergence uncertainty by root-sum-square (the two are independent
sources; hornproof's choice, stated in the report).
"""

import dataclasses
import math

import numpy as np

from ...analytic.predict import predict
from ...sim.grid_fit import fit_ladder, flared_plane

#: figures whose geometry-residual uncertainty the aperture model can give
GEOMETRY_FIGURES = ("directivity_dbi", "directivity_2d_db", "gain_dbi", "realized_gain_dbi", "hpbw_h_deg",
                    "hpbw_e_deg", "first_null_h_deg", "first_null_e_deg", "sll_h_db", "sll_e_db")
#: gain and realized gain follow directivity (lossless walls)
FOLLOWS_DIRECTIVITY = {"gain_dbi": "directivity_dbi", "realized_gain_dbi": "directivity_dbi",
                       "gain_2d_db": "directivity_2d_db", "realized_gain_2d_db": "directivity_2d_db"}


def case_plane(case):
    """"h" or "e" for a 2D model of ``case`` (the plane it keeps), None in 3D."""
    return flared_plane(case.horn, case.fdtd.dims)


def fitted_ladder(case, nominal_ladder):
    """The grid fits of ``nominal_ladder`` (cells per wavelength at f_max) for ``case``."""
    return fit_ladder(case.horn, float(np.max(case.frequencies)), int(case.fdtd.dims), list(nominal_ladder),
                      plane=case_plane(case))


def modelled_horn(horn, fit):
    """The horn as the fitted grid models it (sizes the fit did not touch stay nominal)."""
    sizes = {size.name: size.modelled_m for size in fit.sizes}
    if horn.kind == "h-sectoral" and "guide_b" in sizes:
        sizes["aperture_b"] = sizes["guide_b"]
    if horn.kind == "e-sectoral" and "guide_a" in sizes:
        sizes["aperture_a"] = sizes["guide_a"]
    return dataclasses.replace(horn, **sizes)


def _figures(model):
    figures = model.figures()
    return {key: np.array([np.nan if v is None else v for v in figures[key]], dtype=float)
            for key in GEOMETRY_FIGURES if figures.get(key) is not None}


def geometry_residual(case, fits):
    """Per figure and frequency, the largest change of the exact-phase model's value between the
    nominal horn and the horn modelled on any rung: {figure key: [nf]} (figure units)."""
    dims = int(case.fdtd.dims)
    nominal = _figures(predict(case.horn, case.frequencies, dims=dims)["exact_phase"])
    worst = {key: np.zeros(len(case.frequencies)) for key in nominal}
    for fit in fits:
        modelled = _figures(predict(modelled_horn(case.horn, fit), case.frequencies, dims=dims)["exact_phase"])
        for key, values in nominal.items():
            change = np.abs(modelled[key] - values)
            worst[key] = np.fmax(worst[key], np.where(np.isfinite(change), change, 0.0))
    for key, source in FOLLOWS_DIRECTIVITY.items():
        if source in worst:
            worst[key] = worst[source]
    return {key: values.tolist() for key, values in worst.items()}


def combine_uncertainty(grid_convergence, geometry):
    """Root-sum-square of the ladder's uncertainty and the geometry residual, per frequency.

    ``None`` (no ladder uncertainty) stays ``None``: a residual cannot make an unknown known.
    """
    combined = []
    for index, value in enumerate(grid_convergence):
        extra = geometry[index] if geometry is not None and index < len(geometry) else 0.0
        combined.append(None if value is None else math.hypot(float(value), float(extra or 0.0)))
    return combined
