"""The full-wave run: ``simulate(horn, frequencies, settings, cells_per_wavelength)``.

One broadband Gaussian pulse covers the band; every band frequency is taken from the DFT
monitors of the same run, which stops once the DFT fields have settled
(``stop_when_dft_decayed`` with ``settings.decay_by``) or at the cap
``settings.max_time_periods`` (then ``RunError``).

Figures returned (per band frequency):

* directivity D = 4π U / P_rad, P_rad the power through the closed near-to-far box;
* gain G = e_rad D with the radiation efficiency e_rad = 1 (PEC walls, no wall loss modelled),
  so G = D; realized gain G (1 − |S11|²) (IEEE Std 145-2013; :mod:`hornproof.sim.gain`);
* the power balance, radiated vs P_inc − P_refl (the net power the feed guide carries towards
  the horn): its relative error is a numerical-quality figure, not an efficiency;
* S11 at the throat plane (z = 0) and VSWR;
* co- and cross-polar principal-plane cuts (Ludwig's third definition, E along y).

In 2D (``settings.dims == 2``, sectoral horns) the flared plane alone is modelled and the
directivity is the 2D one, D₂ = 2π U′ / P′ per unit length. What the 2D model leaves out:
the H-plane model (E out of plane) is a parallel-plate horn of infinite height — it has the
TE10 cutoff and guide wavelength right but no E-plane aperture, no E-plane edge diffraction
and no fields leaking round the narrow walls; the E-plane model (E in plane) carries a TEM
wave between infinite plates, so it misses the TE10 dispersion (guide wavelength, wave
impedance, cutoff) and the cos(πx/a) taper of the H-plane. Neither gives a 3D directivity.
"""

import time

import numpy as np

from ..errors import RunError
from .estimate import check_fits, estimate_for_layout
from .feed import add_axis_mode_monitor, add_guide_flux, add_mode_monitor, dense_band, feed_source, mode_profile, source_band
from .layout import boundary_layers, plan_layout
from .postprocess import post_process
from .surface import add_far_field_monitors, closed_surface, farfield_method
from .walls import horn_geometry, staircase_warnings, symmetries


def estimated_cells(layout, use_symmetry=True):
    """Grid cells of the model (after the mirror planes, which Meep exploits)."""
    cells = float(np.prod([s * layout.resolution for s in layout.cell_size]))
    if use_symmetry:
        cells /= 2 ** (2 if layout.dims == 3 else 1)
    return cells


def _stop_condition(settings, layout, source_end, f_min_meep, component, probe, progress, state):
    """DFT-convergence stop with a time cap, a divergence check and progress reports."""
    import meep as mp

    transit = sum(layout.cell_size)
    minimum = source_end + transit
    cap = minimum + settings.max_time_periods / f_min_meep
    state["time_cap"] = cap
    decayed = mp.stop_when_dft_decayed(tol=settings.decay_by, minimum_run_time=minimum, maximum_run_time=cap)

    def until(sim):
        state["steps"] += 1
        if state["steps"] % 200 == 0:
            value = sim.get_field_point(component, probe)
            if not np.isfinite(value) or abs(value) > 1e30:
                raise RunError(f"the FDTD run diverged (field {value!r} at t = {sim.meep_time():.4g})")
            if progress is not None:
                progress({"stage": "stepping", "meep_time": sim.meep_time(), "time_cap": cap,
                          "elapsed_s": time.monotonic() - state["t0"]})
        return decayed(sim)

    return until


def _build_simulation(layout, settings, meep_frequencies, dense=None):
    """The Meep simulation of the horn with its feed and monitors.

    Returns (sim, symmetries, pulse width, monitors) with monitors as ``post_process`` takes them.
    ``dense`` (Hz, or None) adds a second mode monitor for S11 over the dense band.
    """
    import meep as mp  # lazy: Meep is slow to import

    centre, width = source_band(meep_frequencies)
    source = feed_source(layout, centre, width)
    mirrors = symmetries(layout, settings.use_symmetry)
    sim = mp.Simulation(cell_size=mp.Vector3(*layout.cell_size), resolution=layout.resolution,
                        geometry=horn_geometry(layout), boundary_layers=boundary_layers(layout),
                        sources=[source], symmetries=mirrors, eps_averaging=False, dimensions=layout.dims)
    monitors = {"mode": add_mode_monitor(sim, layout, meep_frequencies),
                "guide_flux": add_guide_flux(sim, layout, meep_frequencies)}
    if dense is not None:
        dense_meep = layout.meep_frequency(dense)
        # the dense band on the guide axis (a line); the band frequencies too, to check it against
        # the full-plane projection of the band's own S11
        both = np.concatenate([dense_meep, meep_frequencies])
        monitors["dense_mode"] = (add_axis_mode_monitor(sim, layout, both), dense, dense_meep)
    monitors["far_field"], monitors["box_flux"] = add_far_field_monitors(
        sim, closed_surface(layout), meep_frequencies, farfield_method(settings))
    return sim, mirrors, width, monitors


def _run_until_settled(sim, layout, settings, meep_frequencies, width, progress):
    """Step until the DFT fields settle; ``RunError`` at the time cap. Returns the run state."""
    import meep as mp  # lazy: Meep is slow to import

    name, _ = mode_profile(layout)
    state = {"steps": 0, "t0": time.monotonic()}
    until = _stop_condition(settings, layout, 10.0 / width, float(meep_frequencies.min()), getattr(mp, name),
                            layout.point((0, 0), layout.source_z), progress, state)
    t_step = time.monotonic()
    sim.run(until=until)
    state["seconds_stepping"] = time.monotonic() - t_step
    if sim.meep_time() >= state["time_cap"] - 1e-9:
        raise RunError(f"the DFT fields did not settle to {settings.decay_by:g} within "
                       f"{settings.max_time_periods:g} periods of f_min; raise max_time_periods or decay_by")
    return state


def _run_metadata(horn, layout, settings, cells_per_wavelength, sim, mirrors, state, meep_frequencies):
    """The ``run`` metadata of ``simulate`` known once the run has settled (see its docstring)."""
    import meep as mp  # lazy: Meep is slow to import

    unit = layout.unit_length
    return {
        "wall_thickness_modelled_m": layout.wall_thickness_m,
        "wall_thickness_requested_m": float(horn.wall_thickness),
        "cells_per_wavelength": float(cells_per_wavelength),
        "resolution_cells_per_m": layout.resolution / unit,
        "grid_step_m": unit / layout.resolution,
        "cell_size_m": layout.cell_size_m,
        "grid_cells": estimated_cells(layout, use_symmetry=False),
        "seconds_stepping": state["seconds_stepping"],
        "seconds_total": time.monotonic() - state["t_start"],
        "meep_version": mp.__version__,
        "symmetry": [f"Mirror({'XYZ'[s.direction]}, phase={s.phase.real:+g})" for s in mirrors],
        "timesteps": int(state["steps"]),
        "meep_time": float(sim.meep_time()),
        "time_cap": float(state["time_cap"]),
        "mpi_processes": int(mp.count_processors()),
        "cells_across_guide_b": horn.guide_b / unit * layout.resolution,
        "warnings": staircase_warnings(layout, meep_frequencies),
        # the model rounds every size to whole cells (faces on grid planes; see sim.walls)
        "modelled_guide_a_m": layout.guide_a * unit,
        "modelled_guide_b_m": layout.guide_b * unit,
        "modelled_aperture_a_m": layout.aperture_a * unit,
        "modelled_aperture_b_m": layout.aperture_b * unit,
        "modelled_flare_length_m": layout.flare_length * unit,
        "layout": {"unit_length_m": unit, "source_z_m": layout.source_z * unit,
                   "box_z_m": tuple(z * unit for z in layout.box_z),
                   "pml_m": layout.pml * unit},
    }


def simulate(horn, frequencies, settings, cells_per_wavelength, *, progress=None, force=False):
    """Build and run the Meep model of ``horn`` over ``frequencies`` (Hz).

    Parameters
    ----------
    horn : HornGeometry
    frequencies : array of float
        Band frequencies, Hz; all above the TE10 cutoff of the feed guide.
    settings : FdtdSettings
    cells_per_wavelength : float
        Grid density at the top band frequency.
    progress : callable or None
        Called now and then with a dict: ``stage``, ``meep_time``, ``time_cap``, ``elapsed_s``.
    force : bool
        Run even when the memory estimate exceeds the memory available (``sim.estimate.check_fits``).

    Returns
    -------
    SimResult
        ``run`` metadata: wall_thickness_modelled_m, wall_thickness_requested_m,
        cells_per_wavelength, resolution_cells_per_m, grid_step_m, cell_size_m, grid_cells,
        seconds_total, seconds_stepping, meep_version, symmetry, timesteps, meep_time,
        time_cap, mpi_processes, cells_across_guide_b, warnings (list of one-line strings,
        e.g. a staircase that may reflect coherently), modelled_guide_a_m, modelled_guide_b_m,
        modelled_aperture_a_m, modelled_aperture_b_m, modelled_flare_length_m (sizes as
        rounded to whole cells), layout (dict).
    """
    t_start = time.monotonic()
    frequencies = np.atleast_1d(np.asarray(frequencies, dtype=float))
    layout = plan_layout(horn, frequencies, settings, cells_per_wavelength)
    check_fits(estimate_for_layout(layout, frequencies.size, use_symmetry=settings.use_symmetry), force)
    try:
        import meep as mp  # lazy: Meep is slow to import, and its absence is a run error here
    except ImportError as exc:  # pragma: no cover - depends on the machine
        raise RunError("Meep is not importable (Debian python3-meep-mpi-default): run scripts/bootstrap") from exc
    mp.verbosity(0)
    meep_frequencies = layout.meep_frequency(frequencies)
    sim, mirrors, width, monitors = _build_simulation(layout, settings, meep_frequencies, dense_band(frequencies))
    state = _run_until_settled(sim, layout, settings, meep_frequencies, width, progress)
    state["t_start"] = t_start
    t_far = time.monotonic()
    result = post_process(sim, layout, settings, frequencies, meep_frequencies, monitors)
    seconds_post = time.monotonic() - t_far
    result.run.update({"farfield_method": farfield_method(settings), "seconds_post_processing": seconds_post})
    result.run.update(_run_metadata(horn, layout, settings, cells_per_wavelength, sim, mirrors, state,
                                    meep_frequencies))
    if progress is not None:
        progress({"stage": "done", "meep_time": sim.meep_time(), "time_cap": state["time_cap"],
                  "elapsed_s": time.monotonic() - t_start})
    sim.reset_meep()
    return result
