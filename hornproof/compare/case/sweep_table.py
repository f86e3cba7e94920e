"""The ``[sweep]`` table of a case file, validated into a :class:`SweepSpec`.

Every swept value must make a possible horn; a sweep runs one grid (no ladder), by default the
coarsest of the case's ladder, in 2D for a sectoral horn and 3D for a pyramidal one.
"""

import re

from .fdtd_table import read_cells_ladder, read_dims
from .sweepspec import SWEEP_PARAMETERS, SweepSpec, sweep_applies_to
from .values import CaseProblem, check_keys, read_choice, read_number_list

SWEEP_KEYS = ("parameter", "values", "dims", "cells_per_wavelength")


def read_sweep(table, horn, fdtd_fields):
    """The case's ``SweepSpec``, or None when the file has no ``[sweep]`` table."""
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
    default_dims = 3 if horn.kind == "pyramidal" else 2
    dims = read_dims(table["dims"], "sweep.dims", horn) if "dims" in table else default_dims
    cells = min(fdtd_fields["cells_per_wavelength"])
    if "cells_per_wavelength" in table:
        value = table["cells_per_wavelength"]
        if isinstance(value, list):
            raise CaseProblem("sweep.cells_per_wavelength", "give one number: a sweep runs one "
                                                            "grid per value, not a ladder")
        (cells,) = read_cells_ladder(value, "sweep.cells_per_wavelength")
    spec = SweepSpec(parameter=parameter, values=tuple(values), dims=dims,
                     cells_per_wavelength=cells)
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
