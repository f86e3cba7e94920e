"""Refinement to a target uncertainty: add finer rungs until the checked figures are decided.

``verify --target-uncertainty X`` (or ``[fdtd] target_uncertainty_db``) keeps adding a rung
``DEFAULT_RATIO`` times finer than the finest one (fitted like every rung) while some checked
figure is still open: its verdict is *unresolved*, or it is a dB figure whose uncertainty is
above X. Before each new rung its time (scaled from the rungs already run: cost ∝
cells_per_wavelength^(dims + 1)) and memory (``sim.estimate``) are estimated; the refinement
stops, and says why, when the time would pass ``--budget`` or the memory would not fit.
"""

import math
from dataclasses import dataclass

import numpy as np

from ...limits import MAX_CELLS_PER_WAVELENGTH
from ...sim.estimate import available_memory_bytes, estimate_for_layout
from ...sim.grid_fit import DEFAULT_RATIO, MIN_RATIO, fit_grid
from ...sim.layout import plan_layout
from ..numerics.figures import METRICS
from ..numerics.power_balance import POWER_BALANCE_FIGURES, power_balance_uncertainty_db
from ..numerics.verdict import judge
from .grid_plan import case_plane, geometry_residual
from .ladder import fdtd_figures, ladder_convergence, relative_cost


#: most rungs one refinement adds (a target that finer grids do not reach — an oscillating
#: ladder stays oscillating — must not run for hours without a budget; hornproof's limit)
MAX_ADDED_RUNGS = 3


@dataclass(frozen=True)
class RefinementGoal:
    """What refinement aims at: ``target_db`` (dB figures' uncertainty), ``budget_seconds``
    (wall time of the whole ladder, None: no limit)."""

    target_db: float
    budget_seconds: float | None = None


def open_figures(case, summary_models, sim_results, fits, tolerances, target_db):
    """Checked figures still open: [(metric, uncertainty shown or None, verdict)], judged as
    verify judges them (:func:`hornproof.compare.numerics.verdict.judge`: only a confident
    ladder can support *agrees*)."""
    ladder = [fit.cells_per_wavelength for fit in fits]
    nf = len(case.frequencies)
    _, estimates, _ = ladder_convergence(ladder, [fdtd_figures(r) for r in sim_results], nf)
    finest = fdtd_figures(sim_results[int(np.argmax(ladder))])
    power = power_balance_uncertainty_db(finest.get("power_balance_error") or [0.0] * nf)
    geometry = geometry_residual(case, fits)
    model = summary_models[case.check_model]
    still_open = []
    for metric, tolerance in tolerances.items():
        figure = METRICS[metric]
        values, reference = finest.get(figure.key) or [None] * nf, model.get(figure.key) or [None] * nf
        found = estimates.get(figure.key, [None] * nf)
        for index in range(nf):
            if values[index] is None or reference[index] is None:
                continue
            extra = math.hypot(float(power[index]) if figure.key in POWER_BALANCE_FIGURES else 0.0,
                               (geometry.get(figure.key) or [0.0] * nf)[index] or 0.0)
            judged = judge(reference[index] - values[index], tolerance, found[index], extra=extra)
            u = judged["uncertainty"]
            if judged["verdict"] == "unresolved" or (figure.unit == "dB" and (u is None or u > target_db)):
                still_open.append((metric, u, judged["verdict"]))
                break
    return still_open


def next_rung(case, fits, goal, seconds_so_far, seconds_per_cost):
    """The fit of the next finer rung, or (None, reason) when the budget or memory forbids it."""
    finest = max(fit.cells_per_wavelength for fit in fits)
    if finest * MIN_RATIO > MAX_CELLS_PER_WAVELENGTH:
        return None, f"the next rung would pass hornproof's limit of {MAX_CELLS_PER_WAVELENGTH:g} cells per wavelength"
    fit = fit_grid(case.horn, float(np.max(case.frequencies)), int(case.fdtd.dims), finest * DEFAULT_RATIO,
                   plane=case_plane(case), lowest=finest * MIN_RATIO)
    expected = relative_cost(fit.cells_per_wavelength, int(case.fdtd.dims)) * seconds_per_cost
    if goal.budget_seconds is not None and seconds_so_far + expected > goal.budget_seconds:
        return None, (f"the next rung ({fit.cells_per_wavelength:.2f} cells per wavelength) would take about "
                      f"{expected:.0f} s, past the budget of {goal.budget_seconds:g} s")
    layout = plan_layout(case.horn, case.frequencies, case.fdtd, fit.cells_per_wavelength)
    memory = estimate_for_layout(layout, len(case.frequencies), use_symmetry=case.fdtd.use_symmetry)
    free = available_memory_bytes()
    if free is not None and memory.peak_memory_bytes > free:
        return None, (f"the next rung ({fit.cells_per_wavelength:.2f} cells per wavelength) needs about "
                      f"{memory.peak_memory_bytes / 2**30:.1f} GiB, more than the {free / 2**30:.1f} GiB free")
    return fit, None


def refine(case, summary_models, fits, sim_results, goal, run_rungs, log):
    """Add rungs until no checked figure is open or the budget stops it.

    ``run_rungs(list of cells per wavelength) -> list of SimResult`` runs new rungs (the ladder
    runner). Returns (fits, sim_results, why it stopped), all rungs coarse to fine.
    """
    from .verify import check_tolerances  # verify imports this module at its top

    fits, sim_results = list(fits), list(sim_results)
    added = 0
    while True:
        finest = fdtd_figures(sim_results[int(np.argmax([fit.cells_per_wavelength for fit in fits]))])
        tolerances = check_tolerances(case, finest, int(case.fdtd.dims))
        still_open = open_figures(case, summary_models, sim_results, fits, tolerances, goal.target_db)
        if not still_open:
            return fits, sim_results, (f"target reached: every checked figure decided, dB figures within "
                                       f"±{goal.target_db:g} dB")
        spent = [float(r.run.get("seconds_total") or 0.0) for r in sim_results]
        costs = [relative_cost(fit.cells_per_wavelength, int(case.fdtd.dims)) for fit in fits]
        fit, reason = next_rung(case, fits, goal, sum(spent), sum(spent) / max(sum(costs), 1e-30))
        if fit is not None and added >= MAX_ADDED_RUNGS:
            fit, reason = None, f"{added} rungs added, the most one refinement adds"
        if fit is None:
            names = ", ".join(metric for metric, _, _ in still_open)
            return fits, sim_results, f"stopped with {names} still open: {reason}"
        log(f"hornproof: refining: {', '.join(metric for metric, _, _ in still_open)} still open; adding "
            f"{fit.cells_per_wavelength:.2f} cells per wavelength")
        sim_results += run_rungs([fit.cells_per_wavelength])
        fits.append(fit)
        added += 1
