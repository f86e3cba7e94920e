"""The ``[map]`` table of a case file, validated into a :class:`MapSpec`.

Keys: ``x_parameter``, ``x_values``, ``y_parameter``, ``y_values`` (each parameter one of the
sweep parameters, each list at least two distinct values), optional ``dims`` (default 3),
``cells_per_wavelength`` (a number or a ladder; default: each point's own default ladder) and
``analytic_samples`` (samples per axis of the analytic map, 8 to 400, default 60). Every FDTD
grid pair must make a possible horn.
"""

from .fdtd_table import read_cells_ladder, read_dims
from .mapspec import MapSpec, pair_conflict
from .sweepspec import SWEEP_PARAMETERS, sweep_applies_to
from .values import CaseProblem, check_keys, read_choice, read_integer, read_number_list

MAP_KEYS = ("x_parameter", "x_values", "y_parameter", "y_values", "dims", "cells_per_wavelength",
            "analytic_samples")
#: limits of analytic_samples (per axis): coarser hides the contour, finer only costs time
ANALYTIC_SAMPLES_RANGE = (8, 400)


def _read_axis(table, axis, horn):
    parameter = read_choice(table, f"{axis}_parameter", "map", tuple(SWEEP_PARAMETERS))
    unfit = sweep_applies_to(parameter, horn.kind)
    if unfit:
        raise CaseProblem(f"map.{axis}_parameter", f"cannot map {parameter}: {unfit}")
    key = f"{axis}_values"
    if key not in table:
        raise CaseProblem(f"map.{key}", "missing required key (a list of at least 2 values)")
    values = read_number_list(table[key], f"map.{key}", minimum_length=2)
    if len(set(values)) != len(values):
        raise CaseProblem(f"map.{key}", "repeated value")
    return parameter, tuple(values)


def read_map(table, horn):
    """The case's ``MapSpec``, or None when the file has no ``[map]`` table."""
    if not table:
        return None
    check_keys(table, MAP_KEYS, "map")
    x_parameter, x_values = _read_axis(table, "x", horn)
    y_parameter, y_values = _read_axis(table, "y", horn)
    conflict = pair_conflict(x_parameter, y_parameter)
    if conflict:
        raise CaseProblem("map.y_parameter", conflict)
    dims = read_dims(table["dims"], "map.dims", horn) if "dims" in table else 3
    ladder = (read_cells_ladder(table["cells_per_wavelength"], "map.cells_per_wavelength")
              if "cells_per_wavelength" in table else None)
    samples = 60
    if "analytic_samples" in table:
        samples = read_integer(table["analytic_samples"], "map.analytic_samples")
        low, high = ANALYTIC_SAMPLES_RANGE
        if not low <= samples <= high:
            raise CaseProblem("map.analytic_samples", f"must be from {low} to {high}, got {samples}")
    spec = MapSpec(x_parameter, x_values, y_parameter, y_values, dims, ladder, samples)
    for _, _, x, y in spec.fdtd_grid():
        try:
            spec.horn_at(horn, x, y)
        except ValueError as error:
            raise CaseProblem("map", f"({x_parameter} = {x:g}, {y_parameter} = {y:g}) makes an impossible "
                                     f"horn: {error}") from None
    return spec
