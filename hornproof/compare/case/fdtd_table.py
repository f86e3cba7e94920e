"""The ``[fdtd]`` table of a case file: how to model the horn full-wave, and its grid.

Reads the model's dimension (2D principal-plane or 3D), the convergence ladder of grid
densities (cells per wavelength at f_max) and the run settings into ``FdtdSettings`` keyword
arguments, and warns when a grid is too coarse for the narrowest opening of the model.
"""

import math

from ...limits import MAX_CELLS_PER_WAVELENGTH, MIN_CELLS_ACROSS_OPENING, MIN_CELLS_PER_WAVELENGTH
from ...sim.grid_fit import default_ladder, flared_plane
from ...sim.settings import FdtdSettings
from ...units import GHZ, MM, SPEED_OF_LIGHT
from .values import (
    CaseProblem,
    check_keys,
    describe_value,
    is_number,
    read_boolean,
    read_bounded,
    read_number,
    read_number_list,
    read_positive,
)

FDTD_KEYS = ("dims", "cells_per_wavelength", "pml_wavelengths", "padding_wavelengths",
             "feed_length_wavelengths", "decay_by", "max_time_periods", "symmetry",
             "pattern_step_deg", "full_pattern_step_deg", "quick_2d", "target_uncertainty_db")


def read_fdtd(table, horn, f_max):
    """FdtdSettings keyword arguments, and the quick_2d flag. Without
    ``cells_per_wavelength`` the ladder is the default rule of ``sim.grid_fit.default_ladder``
    (six cells across the narrowest opening on the coarsest rung, ratio 1.3, three rungs)."""
    check_keys(table, FDTD_KEYS, "fdtd")
    defaults = FdtdSettings()
    fields = {}
    fields["dims"] = read_dims(table["dims"], "fdtd.dims", horn) if "dims" in table \
        else defaults.dims
    if "cells_per_wavelength" in table:
        fields["cells_per_wavelength"] = read_cells_ladder(table["cells_per_wavelength"],
                                                           "fdtd.cells_per_wavelength")
    else:
        fields["cells_per_wavelength"] = tuple(default_ladder(horn, f_max, fields["dims"],
                                                              plane=flared_plane(horn, fields["dims"])))
    fields["pml_wavelengths"] = read_positive(table, "pml_wavelengths", "fdtd",
                                              unit="wavelengths",
                                              default=defaults.pml_wavelengths)
    fields["padding_wavelengths"] = read_positive(table, "padding_wavelengths", "fdtd",
                                                  unit="wavelengths",
                                                  default=defaults.padding_wavelengths)
    fields["feed_length_wavelengths"] = read_positive(table, "feed_length_wavelengths", "fdtd",
                                                      unit="guide wavelengths",
                                                      default=defaults.feed_length_wavelengths)
    fields["decay_by"] = read_bounded(table, "decay_by", "fdtd", defaults.decay_by, 0.0, 0.1,
                                      unit="a field decay factor")
    fields["max_time_periods"] = read_positive(table, "max_time_periods", "fdtd",
                                               unit="periods of f_min",
                                               default=defaults.max_time_periods)
    fields["use_symmetry"] = read_boolean(table, "symmetry", "fdtd", defaults.use_symmetry)
    if "target_uncertainty_db" in table:
        fields["target_uncertainty_db"] = read_bounded(table, "target_uncertainty_db", "fdtd", None, 0.0, 10.0,
                                                       unit="dB")
    fields["pattern_step_deg"] = read_bounded(table, "pattern_step_deg", "fdtd",
                                              defaults.pattern_step_deg, 0.0, 30.0,
                                              unit="degrees")
    fields["full_pattern_step_deg"] = read_bounded(table, "full_pattern_step_deg", "fdtd",
                                                   defaults.full_pattern_step_deg, 0.0, 30.0,
                                                   unit="degrees")
    sectoral = horn.kind != "pyramidal"
    quick_2d = read_boolean(table, "quick_2d", "fdtd", sectoral)
    if quick_2d and not sectoral:
        raise CaseProblem("fdtd.quick_2d", "a pyramidal horn has no 2D model; remove the key "
                                           "or set it to false")
    return fields, quick_2d


def read_dims(value, dotted, horn):
    """Dimension of a model, 2 or 3; a pyramidal horn has no 2D model."""
    if isinstance(value, bool) or not isinstance(value, int) or value not in (2, 3):
        raise CaseProblem(dotted, f"must be the integer 2 or 3, got {describe_value(value)}")
    if value == 2 and horn.kind == "pyramidal":
        raise CaseProblem(dotted, "a pyramidal horn flares in both planes and has no 2D model; "
                                  "use dims = 3")
    return value


def read_cells_ladder(value, dotted):
    """Cells-per-wavelength ladder: a number or a non-empty list, each >= 4; sorted ascending."""
    if is_number(value):
        cells = [read_number(value, dotted)]
    elif isinstance(value, list):
        cells = read_number_list(value, dotted)
    else:
        raise CaseProblem(dotted, f"must be a number or a list of numbers, "
                                  f"got {describe_value(value)}")
    for cell in cells:
        if cell < MIN_CELLS_PER_WAVELENGTH:
            raise CaseProblem(dotted, f"{cell:g} cells per wavelength is too coarse; "
                                      f"use at least {MIN_CELLS_PER_WAVELENGTH:g}")
        if cell > MAX_CELLS_PER_WAVELENGTH:
            raise CaseProblem(dotted, f"{cell:g} cells per wavelength is beyond any model this "
                                      f"machine could hold; use at most "
                                      f"{MAX_CELLS_PER_WAVELENGTH:g}")
    if len(set(cells)) != len(cells):
        raise CaseProblem(dotted, f"repeated value in the ladder {cells}")
    return tuple(sorted(cells))


def grid_warnings(horn, frequencies, dims, ladder, key):
    """Warn when the narrowest opening of the model spans fewer than ~4 cells at f_max.

    The narrowest opening is the guide height b, except in the 2D model of an H-plane sectoral
    horn, which has no height and whose narrowest opening is the guide width a.
    """
    if dims == 2 and horn.kind == "h-sectoral":
        opening, label = horn.guide_a, "guide width a"
    else:
        opening, label = horn.guide_b, "guide height b"
    f_max = float(frequencies.max())
    smallest_wavelength = SPEED_OF_LIGHT / f_max
    coarse = [cells for cells in ladder
              if opening * cells / smallest_wavelength < MIN_CELLS_ACROSS_OPENING]
    if not coarse:
        return []
    cells = min(coarse)
    across = opening * cells / smallest_wavelength
    needed = math.ceil(MIN_CELLS_ACROSS_OPENING * smallest_wavelength / opening)
    return [(key, f"at {cells:g} cells per wavelength the {label} = {opening / MM:g} mm spans "
                  f"only {across:.1f} cells at {f_max / GHZ:g} GHz; use at least {needed} "
                  f"for {MIN_CELLS_ACROSS_OPENING:g} cells across it")]
