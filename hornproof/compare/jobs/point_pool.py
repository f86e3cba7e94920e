"""The point pool: FDTD points of a sweep or a map, run in parallel, cached, verified, resumable.

A *point* is one horn run on every rung of a grid-fitted ladder (:func:`run_point`); its figures
(directivity per rung and at the finest rung, the ladder's uncertainty, run times) are what a
sweep or a map needs of it. The pool:

* **caches** each finished point atomically (:mod:`hornproof.atomic`) in
  ``<points_dir>/<key>.json`` as soon as it finishes, so a killed run recomputes only the
  unfinished points. The file records its schema (:data:`POINT_SCHEMA`), the SHA-256 of the
  point's definition (horn, band, FDTD settings, ladder, hornproof and Meep versions) and the
  SHA-256 of its figures. A cached file is used only when all three match and its figures have
  the right shape (lists of the right length holding finite numbers or null); anything else —
  a hand-edited value, ``{}``, ``[]``, ``"abc"``, random bytes, a file made for another point —
  is recomputed, and the log says which file and why;
* runs the points still to do in **Meep process groups** under ``mpirun -np N``
  (:func:`hornproof.sim.mpi.process_groups`; the split is planned by
  :func:`hornproof.compare.regress.plan.plan_process_groups` from each point's estimated cost),
  each group taking whole points, most expensive first; the outcomes are gathered on rank 0
  and handed to every rank. Without ``mpirun`` it runs them one after another;
* records a point whose run **fails** (a ``RunError``, or any exception from the solver) as
  failed with a one-line reason and goes on with the others. A failed point is not cached (a
  rerun tries it again). The caller decides what a failure means: sweep and map report the
  point (NaN figures, reason listed) and exit with status 3 only when every point failed.
"""

import dataclasses
import json
import math
import time
import traceback
from dataclasses import dataclass
from pathlib import Path
from types import SimpleNamespace

import numpy as np

from ...atomic import write_text_atomic
from ...errors import HornproofError
from ...hashing import content_sha256
from ...sim import mpi
from ...sim import run as fdtd_run
from ...sim.grid_fit import fit_ladder, flared_plane
from ...sim.solver import meep_version
from ...version import build_version
from ..numerics.confidence import with_outside_terms
from ..numerics.convergence import grid_convergence
from ..numerics.figures import directivity_key
from ..numerics.power_balance import power_balance_uncertainty_db, root_sum_square
from ..output.json_document import jsonable
from ..regress.plan import plan_process_groups
from .grid_plan import combine_uncertainty, geometry_residual
from .ladder import fdtd_figures
from .messages import is_writer, say

__all__ = ["POINT_SCHEMA", "POINT_KEY_LENGTH", "PointTask", "PointOutcome", "point_definition", "point_key",
           "run_point", "write_point", "read_point", "point_shape_problem", "run_points", "every_point_failed"]

#: schema of a cached point file
POINT_SCHEMA = "hornproof.point/1"

#: hex digits of a point's content hash used as its cache file name
POINT_KEY_LENGTH = 20

#: figures of a point that hold one value per frequency (null allowed)
PER_FREQUENCY = ("directivity", "uncertainty")
#: figures that hold one value per rung of the ladder
PER_RUNG = ("cells_per_wavelength",)


@dataclass(frozen=True)
class PointTask:
    """One point to run: its horn, a label for the log and what to store beside its figures.

    ``about`` (a JSON-ready dict, e.g. ``{"flare_half_angle_h_deg": 30}``) is written into the
    cache file for people reading it; it is not part of the definition hash. ``cost`` orders
    and balances the work (estimated seconds, any common unit).

    A caller whose points are defined otherwise (e.g. a whole case per point) gives
    ``definition`` (JSON-ready; it replaces :func:`point_definition` in the hash) and ``run``
    (``run(force) -> figures``, called instead of the pool's runner), and ``rungs`` when the
    point's ladder has a different number of rungs from the pool's ``ladder`` (None: the
    rung-wise lists are not checked). The figures must hold ``directivity`` and
    ``uncertainty`` lists, one value per frequency.
    """

    horn: object
    label: str
    about: dict = dataclasses.field(default_factory=dict)
    cost: float = 1.0
    definition: dict = None
    run: object = None
    rungs: object = "ladder"


@dataclass
class PointOutcome:
    """How one point went: ``status`` is "computed", "cached" or "failed"."""

    key: str
    status: str
    figures: dict = None
    reason: str = ""
    seconds: float = 0.0


def point_definition(horn, frequencies, settings, ladder):
    """Everything that defines a point's FDTD figures, JSON-ready: the horn, band, FDTD
    settings, nominal grids and the hornproof and Meep versions."""
    return {
        "horn": dataclasses.asdict(horn),
        "frequencies_hz": [float(f) for f in frequencies],
        "settings": jsonable(dataclasses.asdict(settings)),
        "cells_per_wavelength": [float(c) for c in ladder],
        "hornproof": build_version(),
        "meep": meep_version(),
    }


def point_key(horn, frequencies, settings, ladder):
    """Content hash of one point (its cache file name): :func:`point_definition` hashed."""
    return content_sha256(point_definition(horn, frequencies, settings, ladder), POINT_KEY_LENGTH)


def run_point(horn, frequencies, settings, ladder, force):
    """FDTD figures of one point on every grid of ``ladder`` (each rung fitted to this
    point's horn, :func:`hornproof.sim.grid_fit.fit_ladder`), JSON-ready.

    The uncertainty is the grid convergence index over the rungs (Celik et al. 2008, assumed
    first order where the ladder gives none) combined root-sum-square with the finest rung's
    power-balance term (:mod:`..numerics.power_balance`) and the grid fit's size residual
    (:func:`.grid_plan.geometry_residual`), as ``verify`` combines them.
    """
    fits = fit_ladder(horn, float(np.max(frequencies)), int(settings.dims), list(ladder),
                      plane=flared_plane(horn, settings.dims))
    ladder = [fit.cells_per_wavelength for fit in fits]
    results = [fdtd_run.simulate(horn, frequencies, settings, float(c), force=force) for c in ladder]
    figures = [fdtd_figures(r) for r in results]
    key = directivity_key(settings.dims)
    values = np.array([[np.nan if v is None else v for v in f[key]] for f in figures])
    finest = int(np.argmax(ladder))
    point = {"directivity": values[finest].tolist(), "directivity_per_grid": values.tolist(),
             "hpbw_h_deg": figures[finest].get("hpbw_h_deg"), "hpbw_e_deg": figures[finest].get("hpbw_e_deg"),
             "power_balance_error": figures[finest].get("power_balance_error"),
             "seconds": [r.run.get("seconds_total") for r in results],
             "timesteps": [r.run.get("timesteps") for r in results],
             "cells_per_wavelength": ladder,
             "worst_size_residual_percent": [100.0 * fit.worst_relative_residual for fit in fits],
             "wall_thickness_modelled_mm": results[finest].run.get("wall_thickness_modelled_m", np.nan) * 1e3}
    if len(ladder) > 1:
        found = grid_convergence(values, cells_per_wavelength=ladder, formal_order=1.0)
        point["uncertainty_ladder"] = [e.uncertainty for e in found]
        with_power = root_sum_square(point["uncertainty_ladder"],
                                     power_balance_uncertainty_db(point["power_balance_error"])).tolist()
        # and the grid fit's size residual, root-sum-square, exactly as verify combines them
        residual = geometry_residual(SimpleNamespace(horn=horn, frequencies=np.asarray(frequencies, dtype=float),
                                                     fdtd=settings), fits).get(key)
        point["geometry_residual"] = residual
        point["uncertainty"] = combine_uncertainty([None if not np.isfinite(u) else u for u in with_power], residual)
        point["convergence_status"] = [e.status for e in found]
        # which of it may support "holds" (confident) or only "past the tolerance" (a bound), by
        # verify's rules (numerics.confidence), each with the same non-ladder terms
        extra = np.hypot(power_balance_uncertainty_db(point["power_balance_error"]),
                         np.asarray([r or 0.0 for r in (residual or [0.0] * values.shape[1])], dtype=float))
        judged = [with_outside_terms(e.to_dict(), x) for e, x in zip(found, extra)]
        point["confident_uncertainty"] = [c for c, _ in judged]
        point["disagreement_bound"] = [b for _, b in judged]
    else:
        point["uncertainty"] = [np.nan] * values.shape[1]
        point["convergence_status"] = ["single"] * values.shape[1]
    return jsonable(point)


# --- the verified cache -------------------------------------------------------------------------
def _is_number_or_null(value):
    if value is None:
        return True
    return isinstance(value, (int, float)) and not isinstance(value, bool) and math.isfinite(value)


def _list_problem(figures, key, length):
    value = figures.get(key)
    if not isinstance(value, list):
        return f"figures.{key}: expected a list of {length} values, found {type(value).__name__}"
    if len(value) != length:
        return f"figures.{key}: expected {length} values, found {len(value)}"
    if not all(_is_number_or_null(v) for v in value):
        return f"figures.{key}: expected finite numbers or null"
    return None


def point_shape_problem(figures, n_frequencies, n_rungs):
    """Why ``figures`` is not the figures of a point with ``n_frequencies`` and ``n_rungs``
    (None: rung-wise lists not checked, and ``directivity_per_grid`` optional), or None when
    its shape is right."""
    if not isinstance(figures, dict):
        return f"figures: expected an object, found {type(figures).__name__}"
    for key in PER_FREQUENCY:
        problem = _list_problem(figures, key, n_frequencies)
        if problem:
            return problem
    for key in PER_RUNG if n_rungs is not None else ():
        problem = _list_problem(figures, key, n_rungs)
        if problem:
            return problem
    grids = figures.get("directivity_per_grid")
    if grids is None and "directivity_per_grid" not in figures and n_rungs is None:
        return None
    if not isinstance(grids, list) or (n_rungs is not None and len(grids) != n_rungs):
        return f"figures.directivity_per_grid: expected {n_rungs} rungs"
    for index, row in enumerate(grids):
        if not isinstance(row, list) or len(row) != n_frequencies or not all(_is_number_or_null(v) for v in row):
            return f"figures.directivity_per_grid[{index}]: expected {n_frequencies} finite numbers or null"
    return None


def write_point(path, definition_sha256, figures, about=None):
    """Write one finished point atomically: schema, definition hash, figures hash, figures."""
    figures = jsonable(figures)
    document = {"schema": POINT_SCHEMA, "definition_sha256": definition_sha256,
                "figures_sha256": content_sha256(figures), "about": jsonable(about or {}), "figures": figures}
    write_text_atomic(path, json.dumps(document, indent=1, allow_nan=False) + "\n")


def read_point(path, definition_sha256, n_frequencies, n_rungs):
    """``(figures, None)`` from a cached point file that passes every check, else
    ``(None, reason)``; ``(None, None)`` when there is no file. Never raises for bad content."""
    path = Path(path)
    if not path.is_file():
        return None, None
    try:
        document = json.loads(path.read_bytes().decode("utf-8"))
    except (OSError, UnicodeDecodeError, ValueError) as error:
        return None, f"not readable JSON ({type(error).__name__})"
    if not isinstance(document, dict):
        return None, f"expected a JSON object, found {type(document).__name__}"
    if document.get("schema") != POINT_SCHEMA:
        return None, f"schema {str(document.get('schema'))[:40]!r} is not {POINT_SCHEMA}"
    if document.get("definition_sha256") != definition_sha256:
        return None, "definition_sha256: made for another point definition"
    figures = document.get("figures")
    problem = point_shape_problem(figures, n_frequencies, n_rungs)
    if problem:
        return None, problem
    try:
        digest = content_sha256(figures)
    except (TypeError, ValueError):
        return None, "figures: not hashable JSON"
    if document.get("figures_sha256") != digest:
        return None, "figures_sha256: the figures do not match their hash (edited after the run?)"
    return figures, None


# --- running --------------------------------------------------------------------------------------
def _one_line(text):
    return " ".join(str(text).split()) or "no message"


def _attempt(runner, task, frequencies, settings, ladder, force):
    """``(figures, None)`` or ``(None, (reason, traceback text))``."""
    try:
        if task.run is not None:
            return task.run(force), None
        return runner(task.horn, frequencies, settings, ladder, force), None
    except HornproofError as error:
        return None, (_one_line(error), "")
    except Exception as error:  # noqa: BLE001 - one point's solver failure must not stop the others
        return None, (_one_line(f"{type(error).__name__}: {error}"), traceback.format_exc())


def _plan(world, tasks, to_run):
    """The indices each process group runs (most expensive first); the same on every rank."""
    if world.size == 1:
        return [sorted(to_run, key=lambda i: (-tasks[i].cost, i))]
    plan = None
    if world.rank == 0:
        costs = [max(float(tasks[i].cost), 1e-12) for i in to_run]
        groups = plan_process_groups(costs, world.size)
        plan = [sorted((to_run[j] for j in group), key=lambda i: (-tasks[i].cost, i)) for group in groups]
    return world.bcast(plan, root=0)


def _run_in_group(communicator, tasks, mine, keys, run, log, where):
    """Run this group's points; return {index: PointOutcome} on the group's rank 0."""
    done = {}
    for count, index in enumerate(mine, 1):
        task = tasks[index]
        master = communicator.rank == 0
        if master:
            log(f"hornproof: {where}[{count}/{len(mine)}] {task.label}: running")
        started = time.monotonic()
        figures, error = _attempt(run["runner"], task, run["frequencies"], run["settings"], run["ladder"],
                                  run["force"])
        seconds = time.monotonic() - started
        errors = communicator.gather(error, root=0)
        if master:
            problems = [e for e in errors if e is not None]
            if problems:
                reason, detail = problems[0]
                log(f"hornproof: {where}{task.label}: failed: {reason}")
                if detail:
                    log(detail.rstrip())
                done[index] = PointOutcome(keys[index], "failed", None, reason, seconds)
            else:
                path = run["points_dir"] / f"{keys[index][:POINT_KEY_LENGTH]}.json"
                if is_writer():  # one writer also when a caller's group runs the pool as one job
                    write_point(path, keys[index], figures, task.about)
                done[index] = PointOutcome(keys[index], "computed", jsonable(figures), "", seconds)
                log(f"hornproof: {where}{task.label}: done in {seconds:.0f} s")
        communicator.Barrier()
    return done


def run_points(tasks, *, frequencies, settings, ladder, points_dir, force=False, log=say, world=None,
               runner=None):
    """Run (or read from the cache) every point of ``tasks``; outcomes in the order of ``tasks``.

    Parameters
    ----------
    tasks : list of PointTask
    frequencies : array_like
        Band, Hz.
    settings : FdtdSettings
        Model settings of every point (``dims`` included).
    ladder : list of float
        Nominal cells per wavelength of every point (fitted per point by the runner).
    points_dir : path
        The cache folder (created if missing).
    force : bool
        Passed to the runner (run beyond the memory check).
    log : callable
        One-line progress messages.
    world : communicator, optional
        Default :func:`hornproof.sim.mpi.world` (``mpirun``, else serial).
    runner : callable, optional
        ``runner(horn, frequencies, settings, ladder, force) -> figures``; default
        :func:`run_point` (tests pass a fake solver).

    Returns
    -------
    list of PointOutcome
        On every rank.
    """
    world = world if world is not None else mpi.world()
    frequencies = np.asarray(frequencies, dtype=float)
    points_dir = Path(points_dir)
    ladder = [float(c) for c in ladder]
    keys = [content_sha256(t.definition if t.definition is not None
                           else point_definition(t.horn, frequencies, settings, ladder)) for t in tasks]
    outcomes = None
    if world.rank == 0:
        points_dir.mkdir(parents=True, exist_ok=True)
        outcomes = []
        for task, key in zip(tasks, keys):
            path = points_dir / f"{key[:POINT_KEY_LENGTH]}.json"
            rungs = len(ladder) if task.rungs == "ladder" else task.rungs
            figures, problem = read_point(path, key, len(frequencies), rungs)
            if problem:
                log(f"hornproof: {task.label}: cached point {path.name} not used ({problem}); recomputing")
            outcomes.append(PointOutcome(key, "cached", figures) if figures is not None else None)
    outcomes = world.bcast(outcomes, root=0)
    to_run = [i for i, outcome in enumerate(outcomes) if outcome is None]
    if not to_run:
        return outcomes
    run = {"runner": runner or run_point, "frequencies": frequencies, "settings": settings, "ladder": ladder,
           "force": force, "points_dir": points_dir}
    plan = _plan(world, tasks, to_run)
    with mpi.process_groups(world, len(plan)) as (group, communicator):
        where = f"group {group}: " if len(plan) > 1 else ""
        done = _run_in_group(communicator, tasks, plan[group], keys, run, log, where)
    if world.size > 1:
        mpi.wait_idle(world)  # a group done early sleeps instead of spinning in MPI
        gathered = world.gather(done, root=0)
        done = {}
        for part in gathered or []:
            done.update(part)
        done = world.bcast(done, root=0)
    for index in to_run:
        outcomes[index] = done.get(index) or PointOutcome(keys[index], "failed", None,
                                                          "no process group reported this point")
    return outcomes


def every_point_failed(outcomes):
    """True when there were points and none of them has figures (the rule for exit status 3)."""
    return bool(outcomes) and all(o.status == "failed" for o in outcomes)
