"""A fixed-geometry horn: the interval from three fitted rungs contains a fourth, finer rung.

The grid-convergence index (Celik et al., J. Fluids Eng. 130 (2008) 078001; Roache, Annu. Rev.
Fluid Mech. 29 (1997) 123) claims that the grid-converged value lies within φ1 ± GCI. Its
observable consequence, checked here on the shipped 2D demo horn whose fitted ladder is
monotone: a fourth, finer rung's value lies inside the interval the first three give. Only
monotone (confident) ladders are held to this; an oscillating ladder's spread is shown but not
trusted (numerics/confidence.py says why).
"""

from pathlib import Path

import numpy as np
import pytest

from hornproof.compare.case.casefile import load_case
from hornproof.compare.jobs.grid_plan import fitted_ladder
from hornproof.compare.numerics.confidence import confident_uncertainty
from hornproof.compare.numerics.convergence import grid_convergence

ROOT = Path(__file__).resolve().parents[3]


@pytest.mark.fullwave
def test_three_rung_interval_contains_a_fourth_finer_rung():
    from hornproof.sim.run import simulate

    case = load_case(ROOT / "cases" / "demo-h-sectoral.toml")
    fits = fitted_ladder(case, [14, 20, 28, 37])
    ladder = [fit.cells_per_wavelength for fit in fits]
    values = np.array([simulate(case.horn, case.frequencies, case.fdtd, c).directivity_dbi for c in ladder])
    estimates = grid_convergence(values[:3], cells_per_wavelength=ladder[:3], formal_order=1.0)
    checked = 0
    for index, estimate in enumerate(estimates):
        uncertainty, reason = confident_uncertainty(estimate)
        if uncertainty is None:
            continue
        checked += 1
        assert abs(values[3, index] - estimate.fine_value) <= uncertainty, (index, reason)
    # measured here: the demo's directivity ladder is monotone at all five frequencies
    assert checked == len(case.frequencies)
