"""The ``[sweep]`` table of a case file, validated into a :class:`SweepSpec`.

Every swept value must make a possible horn. A sweep models the real horn in 3D unless it asks
for the 2D principal-plane first look (``dims = 2``, sectoral horns only) or for both
(``dims = [3, 2]``). Every point runs a ladder: the sweep's ``cells_per_wavelength`` (one number
N: the grids N, 1.4 N, 2 N; a list: that ladder), or without it the default ladder of each
point's horn (``sim.grid_fit.default_ladder``); each rung is fitted to the point's horn.
"""

import re

from .fdtd_table import read_cells_ladder, read_dims
from .sweepspec import GRID_RATIOS, SWEEP_PARAMETERS, SweepSpec, sweep_applies_to
from .values import CaseProblem, check_keys, describe_value, read_choice, read_number_list

SWEEP_KEYS = ("parameter", "values", "dims", "cells_per_wavelength")


def read_sweep_dims(value, horn):
    """(main dimension, also the principal plane) from ``sweep.dims``: 2, 3 or [3, 2]."""
    if isinstance(value, list):
        if not value or len(value) > 2 or len(set(map(repr, value))) != len(value):
            raise CaseProblem("sweep.dims", f"must be 2, 3 or the list [3, 2], got {describe_value(value)}")
        dims = {read_dims(item, "sweep.dims", horn) for item in value}
        return (3 if 3 in dims else 2), dims == {2, 3}
    return read_dims(value, "sweep.dims", horn), False


def read_sweep(table, horn, fdtd_fields, frequency=float("nan")):
    """The case's ``SweepSpec``, or None when the file has no ``[sweep]`` table.

    ``frequency`` is the band-centre frequency (Hz) the sweep compares at."""
    if not table:
        return None
    check_keys(table, SWEEP_KEYS, "sweep")
    parameter = read_choice(table, "parameter", "sweep", tuple(SWEEP_PARAMETERS))
    unfit = sweep_applies_to(parameter, horn.kind)
    if unfit:
        raise CaseProblem("sweep.parameter", f"cannot sweep {parameter}: {unfit}")
    if "values" not in table:
        raise CaseProblem("sweep.values", "missing required key (a list of at least 2 values)")
    values = read_number_list(table["values"], "sweep.values", minimum_length=2)
    if len(set(values)) != len(values):
        raise CaseProblem("sweep.values", "repeated value")
    dims, principal_plane = read_sweep_dims(table["dims"], horn) if "dims" in table else (3, False)
    cells = None
    if "cells_per_wavelength" in table:
        value = table["cells_per_wavelength"]
        cells = read_cells_ladder(value, "sweep.cells_per_wavelength")
        if not isinstance(value, list):
            cells = read_cells_ladder([round(cells[0] * ratio, 2) for ratio in GRID_RATIOS],
                                      "sweep.cells_per_wavelength (x 1, 1.4, 2)")
    spec = SweepSpec(parameter=parameter, values=tuple(values), dims=dims,
                     cells_per_wavelength=cells, frequency=float(frequency),
                     principal_plane=principal_plane)
    for value in values:
        try:
            spec.horn_at(horn, value)
        except ValueError as error:
            raise CaseProblem("sweep.values", f"{value:g} makes an impossible horn: "
                                              f"{_strip_parameter(str(error))}") from None
    return spec


def _strip_parameter(message):
    """Drop the leading "<parameter> = <value>: " of a SweepSpec error (the value is named)."""
    return re.sub(r"^\w+ = [^:]+: ", "", message)
