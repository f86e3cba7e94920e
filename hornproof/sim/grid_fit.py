"""Grid-fitted rungs: every rung of a convergence ladder models the same horn.

Meep puts PEC faces on grid planes only (see :mod:`hornproof.sim.walls`), and mirror symmetry
about the axis needs an even number of cells across every transverse size (checked here: a
Meep run with an odd cell count and ``Mirror`` planes differs from the same run without them).
So the model's guide a, b and aperture A, B are whole *even* numbers of cells and the flare
length a whole number of cells. Rounding each rung's sizes at a nominal cell size models a
different horn on every rung (b = 11.24 / 8.99 / 10.71 mm for a 10.16 mm WR-90 was seen), and
a grid-convergence index over such a ladder measures the rounding, not the discretisation.

Instead, the cell size of each rung is a free choice near the nominal one: :func:`fit_grid`
scans cells per wavelength near the nominal value: the best fit (smallest worst relative size
residual |modelled − nominal| / nominal over the horn's defining sizes) within ``±NEAR_WINDOW``
if it meets ``RESIDUAL_GOAL``; otherwise, within ``±FIT_WINDOW``, the candidate nearest the
nominal value among those within ``RESIDUAL_GOAL`` (or tied at the smallest residual found). :func:`fit_ladder` fits the rungs coarse to fine, each at least ``MIN_RATIO`` finer
than the one before, so the refinement ratio stays usable for Richardson extrapolation (Celik et
al. 2008 recommend a ratio above 1.3). The wall thickness is not fitted: it is at least two
cells (a thinner PEC wall lets fields through) and reported as modelled.

Measured on the shipped cases (bench/bench_grid_fit.py prints it): with a ±15 % window the
worst residual is about 1 % or less from 17 cells per wavelength up; what is left is reported per
rung and propagated into the uncertainty by the jobs (the exact-phase model's change between
nominal and modelled sizes).

References
----------
I. B. Celik et al., "Procedure for estimation and reporting of uncertainty due to
discretization in CFD applications", J. Fluids Eng. 130 (2008) 078001 (refinement ratio > 1.3,
geometrically similar grids).
"""

from dataclasses import dataclass

import numpy as np

from ..units import MM, SPEED_OF_LIGHT

#: a rung's cells per wavelength may differ from the nominal value by this fraction
FIT_WINDOW = 0.15
#: the best fit within this fraction of the nominal value is taken when it meets RESIDUAL_GOAL
NEAR_WINDOW = 0.05
#: candidate cell sizes scanned in a window
FIT_SAMPLES = 1201
#: smallest ratio of cells per wavelength between consecutive fitted rungs (Celik et al. ask for
#: more than 1.3 between *nominal* rungs; fitting may bring two rungs to 1.2, hornproof's limit)
MIN_RATIO = 1.2
#: a fit whose worst size residual is within this is good enough: among such candidates the
#: one nearest the nominal cells per wavelength wins (cheaper than chasing a smaller residual)
RESIDUAL_GOAL = 0.01
#: default ladder: cells across the narrowest modelled opening on the coarsest rung, the ratio
#: between rungs and the number of rungs (hornproof's rule; a few cells across the smallest
#: feature is common FDTD practice, Celik et al. ask for ratios above 1.3 and three grids)
DEFAULT_CELLS_ACROSS_OPENING = 6.0
DEFAULT_RATIO = 1.3
DEFAULT_RUNGS = 3
#: the default ladder never starts coarser than this (about ten cells per wavelength is the
#: usual floor for FDTD phase accuracy, common practice; 12 is hornproof's choice)
DEFAULT_MIN_CELLS_PER_WAVELENGTH = 12.0


@dataclass(frozen=True)
class FittedSize:
    """One defining size of the horn on one rung."""

    name: str
    nominal_m: float
    modelled_m: float
    cells: int

    @property
    def relative_residual(self):
        return (self.modelled_m - self.nominal_m) / self.nominal_m


@dataclass(frozen=True)
class GridFit:
    """The grid of one rung: its cells per wavelength (at f_max) and the sizes it models."""

    nominal_cells_per_wavelength: float
    cells_per_wavelength: float
    sizes: tuple

    @property
    def worst_relative_residual(self):
        return max(abs(size.relative_residual) for size in self.sizes)

    def to_dict(self):
        """JSON-ready record (mm, per cent) for result.json."""
        return {
            "nominal_cells_per_wavelength": self.nominal_cells_per_wavelength,
            "cells_per_wavelength": self.cells_per_wavelength,
            "worst_residual_percent": 100.0 * self.worst_relative_residual,
            "sizes": {size.name: {"nominal_mm": size.nominal_m / MM, "modelled_mm": size.modelled_m / MM,
                                  "cells": size.cells, "residual_percent": 100.0 * size.relative_residual}
                      for size in self.sizes},
        }


def flared_plane(horn, dims):
    """The plane a 2D model of ``horn`` keeps: "h" for an H-plane sectoral horn, "e" for an
    E-plane one; None in 3D (``sim.layout`` refuses a 2D pyramidal model)."""
    if int(dims) == 3:
        return None
    return "h" if horn.kind == "h-sectoral" else "e"


def defining_sizes(horn, dims, plane=None):
    """The sizes the model must reproduce: name -> (metres, "width" or "length").

    Widths are modelled as an even number of cells (mirror symmetry), lengths as any whole
    number. A 2D model keeps only its flared plane (``plane`` "h" or "e").
    """
    widths = {"guide_a": horn.guide_a, "guide_b": horn.guide_b,
              "aperture_a": horn.aperture_a, "aperture_b": horn.aperture_b}
    if int(dims) == 2:
        keep = ("guide_a", "aperture_a") if plane == "h" else ("guide_b", "aperture_b")
        widths = {name: widths[name] for name in keep}
    if horn.kind == "h-sectoral":
        widths.pop("aperture_b", None)
    if horn.kind == "e-sectoral":
        widths.pop("aperture_a", None)
    sizes = {name: (value, "width") for name, value in widths.items()}
    sizes["flare_length"] = (horn.flare_length, "length")
    return sizes


def whole_cells(length, cell, kind):
    """Cells the model gives ``length``: an even count (at least 2) for a width, a whole count
    (at least 1) for a length. Arrays broadcast."""
    if kind == "width":
        return 2 * np.maximum(1, np.rint(np.asarray(length) / cell / 2.0)).astype(int)
    return np.maximum(1, np.rint(np.asarray(length) / cell)).astype(int)


def _worst_residual(sizes, cells_per_wavelength, unit):
    """Worst relative residual over ``sizes`` for each candidate cells-per-wavelength value."""
    cell = unit / np.asarray(cells_per_wavelength, dtype=float)
    worst = np.zeros_like(cell)
    for length, kind in sizes.values():
        modelled = whole_cells(length, cell, kind) * cell
        worst = np.maximum(worst, np.abs(modelled - length) / length)
    return worst


def _candidates(nominal, half_width, lowest):
    low = nominal * (1.0 - half_width)
    if lowest is not None:
        low = max(low, float(lowest))
    return np.linspace(low, max(nominal * (1.0 + half_width), low), FIT_SAMPLES)


def fit_grid(horn, f_max, dims, nominal_cells_per_wavelength, *, plane=None, lowest=None, window=FIT_WINDOW):
    """The rung near ``nominal_cells_per_wavelength`` that models ``horn`` most closely.

    Parameters
    ----------
    horn : analytic.geometry.HornGeometry
    f_max : float
        Top band frequency, Hz (cells per wavelength are counted at it).
    dims : int
        2 or 3; ``plane`` ("h"/"e") names the flared plane of a 2D model.
    nominal_cells_per_wavelength : float
        The target grid density.
    lowest : float, optional
        The fitted value must be at least this (keeps a ladder's refinement ratio).
    window : float
        Relative half-width of the scanned range.

    Returns
    -------
    GridFit
        See the module docstring for the rule.
    """
    nominal = float(nominal_cells_per_wavelength)
    if not np.isfinite(nominal) or nominal <= 0:
        raise ValueError(f"nominal_cells_per_wavelength must be positive, got {nominal_cells_per_wavelength!r}")
    unit = SPEED_OF_LIGHT / float(f_max)
    sizes = defining_sizes(horn, dims, plane)
    chosen = None
    for half_width in (NEAR_WINDOW, window):
        candidates = _candidates(nominal, half_width, lowest)
        worst = np.round(_worst_residual(sizes, candidates, unit), 6)  # ties within 1e-6 are equal
        if half_width == NEAR_WINDOW and worst.min() <= RESIDUAL_GOAL:
            best = np.flatnonzero(worst == worst.min())  # near the nominal value: the best fit
        elif half_width == NEAR_WINDOW:
            continue
        else:
            best = np.flatnonzero(worst <= max(RESIDUAL_GOAL, worst.min()))  # good enough, nearest
        chosen = float(candidates[best[np.argmin(np.abs(candidates[best] - nominal))]])
        break
    cell = unit / chosen
    fitted = tuple(FittedSize(name, float(length), float(whole_cells(length, cell, kind) * cell),
                              int(whole_cells(length, cell, kind)))
                   for name, (length, kind) in sizes.items())
    return GridFit(nominal, chosen, fitted)


def fit_ladder(horn, f_max, dims, nominal_ladder, *, plane=None, min_ratio=MIN_RATIO):
    """Fit every rung of ``nominal_ladder`` (any order), coarse to fine, each at least
    ``min_ratio`` times finer than the previous fitted rung. Returns GridFits in the input order."""
    order = sorted(range(len(nominal_ladder)), key=lambda i: float(nominal_ladder[i]))
    fits = [None] * len(nominal_ladder)
    previous = None
    for i in order:
        lowest = None if previous is None else previous * min_ratio
        fits[i] = fit_grid(horn, f_max, dims, nominal_ladder[i], plane=plane, lowest=lowest)
        previous = fits[i].cells_per_wavelength
    return fits


def narrowest_opening(horn, dims, plane=None):
    """The narrowest opening the model must resolve (m): guide b in 3D (or a if smaller), the
    flared plane's guide width in 2D."""
    if int(dims) == 2:
        return horn.guide_a if plane == "h" else horn.guide_b
    return min(horn.guide_a, horn.guide_b)


def default_ladder(horn, f_max, dims, *, plane=None, cells_across=DEFAULT_CELLS_ACROSS_OPENING,
                   ratio=DEFAULT_RATIO, rungs=DEFAULT_RUNGS):
    """Nominal cells per wavelength of the default ladder: the coarsest rung puts ``cells_across``
    cells across the narrowest opening (and at least ``DEFAULT_MIN_CELLS_PER_WAVELENGTH``),
    each next rung is ``ratio`` times finer; rounded to 0.1 (the rungs are fitted afterwards)."""
    wavelength = SPEED_OF_LIGHT / float(f_max)
    coarsest = max(cells_across * wavelength / narrowest_opening(horn, dims, plane),
                   DEFAULT_MIN_CELLS_PER_WAVELENGTH)
    return [round(float(coarsest * ratio**i), 1) for i in range(rungs)]
