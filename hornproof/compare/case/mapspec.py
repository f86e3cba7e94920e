"""The ``[map]`` of a case file: two horn parameters stepped over a grid of value pairs.

A map is two sweeps at once: every pair (x, y) of an ``x_values`` × ``y_values`` grid is a horn.
Both parameters come from the one table of sweep parameters
(:data:`hornproof.compare.case.sweepspec.SWEEP_PARAMETERS`) and keep what a sweep of each keeps.
When one of them is the flare length it is applied first (a length keeps the flare
half-angles), then the other; two parameters that set the same aperture size (a flare
half-angle and the aperture of the same plane) cannot form a map.
"""

from dataclasses import dataclass

import numpy as np

from .sweepspec import SweepSpec

#: parameter pairs that would both set one aperture size
CONFLICTING_PAIRS = ({"flare_half_angle_h_deg", "aperture_a_mm"}, {"flare_half_angle_e_deg", "aperture_b_mm"})


def pair_conflict(x_parameter, y_parameter):
    """Why two parameters cannot span a map, or None when they can."""
    if x_parameter == y_parameter:
        return "the two map parameters are the same"
    if {x_parameter, y_parameter} in CONFLICTING_PAIRS:
        return f"{x_parameter} and {y_parameter} both set the same aperture size"
    return None


@dataclass(frozen=True)
class MapSpec:
    """Two swept horn parameters spanning a grid.

    Parameters
    ----------
    x_parameter, y_parameter : str
        Sweep parameters (:data:`~hornproof.compare.case.sweepspec.SWEEP_PARAMETERS`).
    x_values, y_values : tuple of float
        FDTD grid values in each parameter's edge unit (degrees or mm), at least two each.
    dims : {2, 3}
        Dimension of the FDTD model.
    cells_per_wavelength : tuple of float or None
        Nominal ladder of every FDTD point (fitted per point); None: each point's default
        ladder (six cells across its narrowest opening, ratio 1.3, three rungs).
    analytic_samples : int
        Samples per axis of the analytic map (between the first and last values).
    """

    x_parameter: str
    x_values: tuple
    y_parameter: str
    y_values: tuple
    dims: int
    cells_per_wavelength: tuple = None
    analytic_samples: int = 60

    def horn_at(self, base_horn, x, y):
        """The horn at ``(x, y)`` (edge units); ``ValueError`` naming the value when impossible."""
        steps = [(self.x_parameter, x), (self.y_parameter, y)]
        steps.sort(key=lambda step: step[0] != "flare_length_mm")  # the length first
        horn = base_horn
        for parameter, value in steps:
            horn = SweepSpec(parameter, (value,), self.dims, 1.0).horn_at(horn, value)
        return horn

    def fdtd_grid(self):
        """The FDTD (x, y) pairs, x fastest: list of ``(i, j, x, y)``."""
        return [(i, j, x, y) for j, y in enumerate(self.y_values) for i, x in enumerate(self.x_values)]

    def analytic_axes(self):
        """Dense axes of the analytic map, each including the FDTD values' range ends."""
        return (np.linspace(min(self.x_values), max(self.x_values), self.analytic_samples),
                np.linspace(min(self.y_values), max(self.y_values), self.analytic_samples))
