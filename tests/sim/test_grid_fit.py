"""Grid-fitted rungs: every rung models the same horn (sim/grid_fit.py).

Outside facts used:
* EIA RS-261 / IEC 60153-2 WR-90: 22.86 x 10.16 mm (0.900 x 0.400 in; from memory).
* TE10 of a rectangular guide: cutoff c/(2a), transverse wavenumber π/a (D. M. Pozar,
  *Microwave Engineering*, 4th ed., §3.3; exact).
* The Yee scheme's numerical dispersion relation in 3D,
  [sin(ωΔt/2)/(cΔt)]² = Σ_i [sin(k_iΔ/2)/Δ]² (A. Taflove, S. Hagness, *Computational
  Electrodynamics*, 3rd ed., ch. 4; from memory), with Meep's Courant number 0.5 (Meep docs).
* Celik et al., J. Fluids Eng. 130 (2008) 078001: refinement ratio above 1.3 recommended.
"""

import numpy as np
import pytest

from hornproof.analytic.geometry import HornGeometry
from hornproof.sim.grid_fit import (DEFAULT_CELLS_ACROSS_OPENING, FIT_WINDOW, MIN_RATIO, default_ladder,
                                    fit_grid, fit_ladder, whole_cells)
from hornproof.sim.layout import plan_layout
from hornproof.sim.settings import FdtdSettings

WR90 = (22.86e-3, 10.16e-3)
C = 299_792_458.0
PYRAMIDAL = HornGeometry("pyramidal", *WR90, 80e-3, 60e-3, 70e-3, wall_thickness=1e-3)
H_SECTORAL = HornGeometry("h-sectoral", *WR90, 90e-3, WR90[1], 90e-3, wall_thickness=1e-3)
F_MAX = 10.5e9
BAND = np.array([9.5e9, 10.0e9, 10.5e9])


def _modelled(layout):
    unit = layout.unit_length
    return {"guide_a": layout.guide_a * unit, "guide_b": layout.guide_b * unit,
            "aperture_a": layout.aperture_a * unit, "aperture_b": layout.aperture_b * unit,
            "flare_length": layout.flare_length * unit}


@pytest.mark.parametrize("horn, dims", [(PYRAMIDAL, 3), (H_SECTORAL, 2), (H_SECTORAL, 3)])
def test_the_layout_models_exactly_the_fitted_sizes(horn, dims):
    settings = FdtdSettings(dims=dims)
    plane = "h" if dims == 2 else None
    for fit in fit_ladder(horn, F_MAX, dims, [17, 22, 29], plane=plane):
        modelled = _modelled(plan_layout(horn, BAND, settings, fit.cells_per_wavelength))
        for size in fit.sizes:
            assert modelled[size.name] == pytest.approx(size.modelled_m, rel=1e-12)


def test_fitting_beats_plain_rounding_on_the_wr90_horn():
    # the reviewer's finding: plain rounding at 16 / 20 / 28 cells per wavelength modelled b as
    # 11.24 / 8.99 / 10.71 mm for 10.16 mm. Fitted rungs stay within 2 % (hornproof's measured
    # rule: <= 2 % from 17 cells per wavelength up, 1 % at 22.7)
    for nominal in (17, 20, 22, 28):
        fit = fit_grid(PYRAMIDAL, F_MAX, 3, nominal)
        plain_cell = C / F_MAX / nominal
        plain_worst = max(abs(whole_cells(s.nominal_m, plain_cell, "length" if s.name == "flare_length" else "width")
                              * plain_cell / s.nominal_m - 1) for s in fit.sizes)
        assert fit.worst_relative_residual <= 0.02
        assert fit.worst_relative_residual <= plain_worst + 1e-12
        assert abs(fit.cells_per_wavelength / nominal - 1) <= FIT_WINDOW + 1e-12
        assert all(s.cells % 2 == 0 for s in fit.sizes if s.name != "flare_length")


def test_ladder_keeps_a_usable_refinement_ratio():
    fits = fit_ladder(PYRAMIDAL, F_MAX, 3, [16.9, 21.9, 28.5])
    values = [f.cells_per_wavelength for f in fits]
    assert values == sorted(values)
    assert all(b / a >= MIN_RATIO - 1e-12 for a, b in zip(values, values[1:]))


def test_default_ladder_resolves_the_narrowest_opening():
    nominal = default_ladder(PYRAMIDAL, F_MAX, 3)
    wavelength = C / F_MAX
    assert nominal[0] * WR90[1] / wavelength >= DEFAULT_CELLS_ACROSS_OPENING - 0.05
    assert len(nominal) == 3 and all(b / a == pytest.approx(1.3, abs=0.01) for a, b in zip(nominal, nominal[1:]))
    # a 2D H-plane model: the guide width a is its narrowest opening; the floor of 12 applies
    assert default_ladder(H_SECTORAL, F_MAX, 2, plane="h")[0] == pytest.approx(12.0)


@pytest.mark.fullwave
def test_mirror_symmetry_needs_an_even_cell_count():
    # why every width is an even number of cells: with Mirror planes, Meep gives the unsymmetric
    # run's field for an even cell count and a different one for an odd count (seen here: 9 %)
    import meep as mp

    mp.verbosity(0)

    def run(nx, symmetric):
        source = [mp.Source(mp.GaussianSource(1, fwidth=0.5), component=mp.Ey, center=mp.Vector3(0, 0, -0.5),
                            size=mp.Vector3(0.8, 0.4, 0))]
        sim = mp.Simulation(cell_size=mp.Vector3(nx / 10, 1.4, 3), resolution=10, sources=source,
                            boundary_layers=[mp.PML(0.5)], eps_averaging=False,
                            symmetries=[mp.Mirror(mp.X, phase=1), mp.Mirror(mp.Y, phase=-1)] if symmetric else [])
        sim.run(until=6)
        field = sim.get_array(component=mp.Ey, center=mp.Vector3(), size=mp.Vector3(nx / 10, 0, 0))
        sim.reset_meep()
        return field

    def mismatch(nx):
        plain, mirrored = run(nx, False), run(nx, True)
        return np.max(np.abs(plain - mirrored)) / np.max(np.abs(plain))

    assert mismatch(30) < 1e-9
    assert mismatch(31) > 1e-3


def _effective_width(beta, frequency, cells_per_wavelength):
    """Guide width a_eff (Meep units) that the Yee dispersion relation gives for the measured β."""
    step = 1.0 / cells_per_wavelength
    dt = 0.5 * step
    temporal = (np.sin(np.pi * frequency * dt) / dt) ** 2
    axial = (np.sin(beta * step / 2) / step) ** 2
    return np.pi * step / (2 * np.arcsin(step * np.sqrt(temporal - axial)))


@pytest.mark.fullwave
@pytest.mark.parametrize("nominal", [17])
def test_straight_wr90_cutoff_matches_c_over_2a(nominal):
    _check_cutoff(nominal)


@pytest.mark.slow
@pytest.mark.parametrize("nominal", [22, 29])
def test_straight_wr90_cutoff_matches_c_over_2a_finer(nominal):
    _check_cutoff(nominal)


def _check_cutoff(nominal):
    from hornproof.sim.guide_check import simulate_guide

    # a rung fitted to the guide width (the only size the TE10 cutoff depends on)
    stand_in = HornGeometry("h-sectoral", *WR90, 2 * WR90[0], WR90[1], 2 * WR90[0], wall_thickness=1e-4)
    fit = fit_grid(stand_in, F_MAX, 2, nominal, plane="h")
    result = simulate_guide(*WR90, BAND, FdtdSettings(), fit.cells_per_wavelength, termination="matched")
    layout = result["layout"]
    width = _effective_width(np.asarray(result["beta"]), layout.meep_frequency(BAND), fit.cells_per_wavelength)
    # the wall convention (metal faces on the grid planes through the tangential E nodes): the
    # guide the fields see is exactly the modelled whole-cell width, once the grid's own
    # dispersion is taken out with the Yee relation (measured here: within 0.03 %)
    assert np.all(np.abs(width / layout.guide_a - 1) < 0.001), width / layout.guide_a
    # and the modelled TE10 cutoff c / (2 a_eff) is c / (2a) of the nominal WR-90 within 0.5 %
    a_nominal = WR90[0] / layout.unit_length
    assert np.all(np.abs(width / a_nominal - 1) < 0.005), width / a_nominal
