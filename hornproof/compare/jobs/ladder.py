"""The FDTD convergence ladder of a case: run each grid, report progress, estimate convergence.

A ladder is the case's list of grid densities (cells per wavelength at f_max). Each grid is one
``sim.run.simulate`` call, coarse first, with a resource line before it and a summary line after
it; the per-frequency figures of every grid then give each figure's grid-convergence estimate
(:mod:`hornproof.compare.numerics.convergence`).
"""

import time

import numpy as np

from ...sim import run as fdtd_run
from ...sim.estimate import available_memory_bytes, estimate_for_layout, far_field_frequency_cost
from ...sim.layout import plan_layout
from ...sim.progress import ProgressReporter
from ..numerics.convergence import grid_convergence
from ..numerics.figures import directivity_key
from ..output.json_document import jsonable
from .feed_figures import FEED_LADDER_FIGURES
from .messages import say

#: FDTD figures whose ladder gets a convergence estimate
LADDER_FIGURES = ("directivity_dbi", "directivity_2d_db", "gain_dbi", "realized_gain_dbi", "gain_2d_db",
                  "realized_gain_2d_db", "hpbw_h_deg",
                  "hpbw_e_deg", "first_null_h_deg", "first_null_e_deg", "sll_h_db", "sll_e_db", "s11_db") + FEED_LADDER_FIGURES

#: staircased PEC walls converge at about first order (observed in development runs of this
#: project, DEVELOPERS.md "Modelling notes"); used where the ladder cannot give an observed
#: order (two grids) — hornproof's choice, stated in the report
FORMAL_ORDER = 1.0

#: FDTD figures besides the pattern metrics that go into result.json, per frequency
EXTRA_FIGURES = ("gain_dbi", "realized_gain_dbi", "s11_db", "s11_real", "s11_imag", "vswr",
                 "power_balance_error", "incident_power", "reflected_power", "radiated_power")


def relative_cost(cells_per_wavelength, dims):
    """Cost of a run relative to 1 cell per wavelength: cells × steps ∝ cpw^(dims + 1)."""
    return float(cells_per_wavelength) ** (dims + 1)


def resource_line(case, cells_per_wavelength):
    """One line: grid cells and memory the run will take (``sim.estimate``), before it runs."""
    layout = plan_layout(case.horn, case.frequencies, case.fdtd, cells_per_wavelength)
    estimate = estimate_for_layout(layout, len(case.frequencies), use_symmetry=case.fdtd.use_symmetry)
    free = available_memory_bytes()
    free_text = "" if free is None else f" of {free / 2**30:.1f} GiB available"
    step, fitting = far_field_frequency_cost(layout, len(case.frequencies), case.fdtd.use_symmetry, free)
    fit_text = "" if fitting is None else f", up to {fitting:,} would fit"
    return (f"estimate: {estimate.cells:,} grid cells stored, peak memory about "
            f"{estimate.peak_memory_bytes / 2**20:,.0f} MiB{free_text}; each further far-field (gain) "
            f"frequency about {step / 2**20:.1f} MiB{fit_text}")


def progress_reporter(case, cells_per_wavelength):
    """The default progress display of one FDTD run of ``case`` (a terminal line on stderr)."""
    return ProgressReporter(f"hornproof:   {case.name} at {cells_per_wavelength:.2f} cells per wavelength")


def run_fdtd_ladder(case, ladder, *, force=False, log=say, progress=None):
    """Run the FDTD model once per grid of ``ladder`` (cells per wavelength), coarse first.

    Returns the list of SimResult, in the order of ``ladder`` as given.
    """
    order = sorted(range(len(ladder)), key=lambda i: ladder[i])
    results = [None] * len(ladder)
    dims = int(case.fdtd.dims)
    rate = None
    for step, i in enumerate(order, start=1):
        cells_per_wavelength = float(ladder[i])
        remaining = sum(relative_cost(ladder[j], dims) for j in order[step - 1:])
        eta = "" if rate is None else f", about {remaining / rate:.0f} s left for the ladder"
        log(f"hornproof: FDTD grid {step}/{len(ladder)}: {cells_per_wavelength:.2f} cells per wavelength "
            f"({dims}D){eta}")
        log(f"hornproof:   {resource_line(case, cells_per_wavelength)}")
        started = time.monotonic()
        result = fdtd_run.simulate(case.horn, case.frequencies, case.fdtd, cells_per_wavelength, force=force,
                                   progress=progress or progress_reporter(case, cells_per_wavelength))
        seconds = time.monotonic() - started
        rate = relative_cost(cells_per_wavelength, dims) / max(seconds, 1e-3)
        log(grid_done_line(result, dims, seconds))
        for warning in result.run.get("warnings", []) or []:
            log(f"hornproof: warning: {warning}")
        results[i] = result
    return results


def grid_done_line(result, dims, seconds):
    """The line printed after one grid: time, directivity range, worst power-balance error."""
    directivity = np.asarray(result.directivity_dbi)
    balance = np.nanmax(np.abs(result.extra.get("power_balance_error", [np.nan]))) * 100
    return (f"hornproof:   done in {seconds:.1f} s; {directivity_key(dims).replace('_', ' ')} "
            f"{np.nanmin(directivity):.2f}..{np.nanmax(directivity):.2f}, power balance error {balance:.1f} %")


def solver_warnings(sim_results, ladder):
    """The solver's one-line warnings, each tagged with the grid it came from."""
    out = []
    for cells_per_wavelength, result in zip(ladder, sim_results):
        for warning in result.run.get("warnings", []) or []:
            out.append(f"FDTD at {cells_per_wavelength:.2f} cells per wavelength: {warning}")
    return out


def fdtd_figures(result):
    """JSON-ready per-frequency FDTD figures of one grid (cut arrays stay in fields.h5)."""
    figures = {key: value for key, value in result.to_model_result().figures().items()
               if not (isinstance(value, list) and value and isinstance(value[0], list))}
    extra = result.extra
    for key in EXTRA_FIGURES:
        if key in extra:
            figures[key] = jsonable(np.asarray(extra[key], dtype=float))
    if int(result.dims) == 2:
        for key in ("gain_dbi", "realized_gain_dbi"):
            if key in figures:
                figures[key.replace("_dbi", "_2d_db")] = figures.pop(key)
    return figures


def figure_column(figures, key, nf):
    """One figure of a grid as a float array [nf] (missing or null -> NaN)."""
    values = figures.get(key)
    if values is None:
        return np.full(nf, np.nan)
    return np.array([np.nan if v is None else v for v in values], dtype=float)


def ladder_convergence(ladder, level_figures, nf):
    """Convergence estimates of every FDTD figure from the ladder.

    Returns (uncertainty: {figure: [nf]}, estimates: {figure: [ConvergenceEstimate.to_dict()]},
    values: {figure: [[nf] per grid]}).
    """
    uncertainty, estimates, values = {}, {}, {}
    for key in LADDER_FIGURES:
        stack = np.array([figure_column(figures, key, nf) for figures in level_figures])
        if np.all(np.isnan(stack)):
            continue
        values[key] = stack.tolist()
        if len(ladder) == 1:
            uncertainty[key] = [None] * nf
            continue
        found = grid_convergence(stack, cells_per_wavelength=ladder, formal_order=FORMAL_ORDER)
        estimates[key] = [e.to_dict() for e in found]
        uncertainty[key] = [e.uncertainty if np.isfinite(e.uncertainty) else None for e in found]
    return uncertainty, estimates, values


def solver_block(case, sim_results, ladder, seconds):
    """The ``solver`` block of result.json: Meep, the grids, the modelled sizes, the run times."""
    finest = sim_results[int(np.argmax(ladder))]
    run = finest.run
    return jsonable({
        "name": "meep",
        "meep": run.get("meep_version"),
        "dims": int(case.fdtd.dims),
        "cells_per_wavelength": [float(c) for c in ladder],
        "finest_cells_per_wavelength": float(max(ladder)),
        "grid_step_mm": [r.run.get("grid_step_m", np.nan) * 1e3 for r in sim_results],
        "wall_thickness_requested_mm": run.get("wall_thickness_requested_m", np.nan) * 1e3,
        "wall_thickness_modelled_mm": [r.run.get("wall_thickness_modelled_m", np.nan) * 1e3 for r in sim_results],
        "cells_across_guide_b": [r.run.get("cells_across_guide_b") for r in sim_results],
        "modelled_sizes_mm": [{k[len("modelled_"):-2] + "_mm": v * 1e3 for k, v in r.run.items()
                               if k.startswith("modelled_") and k.endswith("_m") and isinstance(v, (int, float))}
                              for r in sim_results],
        "symmetry": run.get("symmetry"),
        "mpi_processes": run.get("mpi_processes"),
        "timesteps": [r.run.get("timesteps") for r in sim_results],
        "seconds_per_grid": [r.run.get("seconds_total") for r in sim_results],
        "seconds": seconds,
        "decay_by": case.fdtd.decay_by,
        "pml_wavelengths": case.fdtd.pml_wavelengths,
        "padding_wavelengths": case.fdtd.padding_wavelengths,
        "formal_order_assumed": FORMAL_ORDER,
        "max_power_balance_error": float(np.nanmax(np.abs(finest.extra.get("power_balance_error", [np.nan])))),
    })
