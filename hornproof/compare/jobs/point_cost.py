"""What an FDTD point will cost before it runs: seconds and peak memory, rung by rung.

A point runs its horn on every rung of a grid-fitted ladder. For each rung the cell is laid out
exactly as the run will lay it out (:func:`hornproof.sim.layout.plan_layout`) and
:func:`hornproof.sim.estimate.estimate_for_layout` turns cells and time steps into seconds and
memory. The number of time steps is not known before a run (it stops when the DFT fields have
settled); it is estimated from the cell's size:

    run time ≈ :data:`RUN_TIME_PER_TRANSIT` × (sum of the cell's sides), Meep units
    (one unit = one wavelength at f_max, i.e. one period), steps = run time × resolution / 0.5
    (Meep's Courant number 0.5).

Calibration (measured here 2026-12-02, Meep 1.25.0, two cores lightly loaded): two 3D WR-90
H-plane sectoral horns, 60 mm long, 20° and 40° flare, 18.0 cells per wavelength, one
frequency: run times 53.4 and 55.4 periods for cells whose sides summed to 13.3 and 15.2
(ratios 4.0 and 3.65: 3.8 is used, within ±6 % of both). The whole run then took 6.3 and
5.3 s against 5.1 + 1 and 7.1 + 1 s estimated (the second term: :data:`SECONDS_AFTER_STEPPING`
for the far-field transform and bookkeeping): the estimate is good to about ±30 %, enough to
plan and to refuse a map far beyond a budget, not a promise.
"""

from dataclasses import dataclass

import numpy as np

from ...sim.estimate import courant_timesteps, estimate_for_layout
from ...sim.grid_fit import fit_ladder, flared_plane
from ...sim.layout import plan_layout
from ...units import SPEED_OF_LIGHT

__all__ = ["RUN_TIME_PER_TRANSIT", "SECONDS_AFTER_STEPPING", "RungCost", "rung_costs", "point_cost"]

#: run time of a horn model in periods at f_max per unit of the cell's summed side lengths
#: (measured, see the module docstring)
RUN_TIME_PER_TRANSIT = 3.8

#: seconds a run takes after stepping (far-field transform, power bookkeeping), measured
SECONDS_AFTER_STEPPING = 1.0


@dataclass(frozen=True)
class RungCost:
    """The estimate of one rung: fitted cells per wavelength, stored cells, PML cells, time
    steps, seconds, peak memory (bytes)."""

    cells_per_wavelength: float
    cells: int
    pml_cells: int
    timesteps: int
    seconds: float
    peak_memory_bytes: float


def rung_costs(horn, frequencies, settings, ladder, *, rate=None):
    """A :class:`RungCost` per rung of the fitted ``ladder`` (nominal cells per wavelength).

    Raises ``ValueError`` (naming the parameter) when the horn cannot be laid out.
    """
    frequencies = np.asarray(frequencies, dtype=float)
    f_max = float(np.max(frequencies))
    fits = fit_ladder(horn, f_max, int(settings.dims), list(ladder), plane=flared_plane(horn, settings.dims))
    out = []
    for fit in fits:
        cells_per_wavelength = fit.cells_per_wavelength
        layout = plan_layout(horn, frequencies, settings, cells_per_wavelength)
        run_time = RUN_TIME_PER_TRANSIT * float(sum(layout.cell_size))  # Meep units
        steps = courant_timesteps(run_time * layout.unit_length / SPEED_OF_LIGHT,
                                  layout.resolution / layout.unit_length)
        estimate = estimate_for_layout(layout, len(frequencies), use_symmetry=settings.use_symmetry, steps=steps,
                                       rate=rate)
        out.append(RungCost(cells_per_wavelength, estimate.cells, estimate.pml_cells, steps,
                            estimate.seconds + SECONDS_AFTER_STEPPING, estimate.peak_memory_bytes))
    return out


def point_cost(horn, frequencies, settings, ladder, *, rate=None):
    """Estimated seconds of one point (all its rungs), or 1.0 when the horn cannot be laid out
    (the run itself then reports why)."""
    try:
        return float(sum(r.seconds for r in rung_costs(horn, frequencies, settings, ladder, rate=rate)))
    except ValueError:
        return 1.0
