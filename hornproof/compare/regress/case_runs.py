"""Running the cases the cache does not hold: each inside its MPI process group, into the cache.

A run writes into a hidden partial folder of the cache; only a usable ``hornproof.result/1``
summary of the case that ran is published (:meth:`hornproof.compare.regress.cache.ResultCache.commit`);
a failed run's folder is kept for diagnosis. Under ``mpirun`` the cases are spread over process
groups (:mod:`hornproof.compare.regress.plan`, :func:`hornproof.sim.mpi.process_groups`).
"""

import json
import time
import traceback
import uuid
from dataclasses import dataclass
from pathlib import Path

from ...errors import HornproofError, RunError
from ...sim import mpi
from ..output.result_json import RESULT_SCHEMA
from ..output.baseline_file import figures_from_result
from .cache import RESULT_FILE
from .plan import estimate_case_cost, plan_process_groups

__all__ = ["RunRecord", "default_runner", "run_cases"]


@dataclass
class RunRecord:
    """How one run of one case went (as its process group's rank 0 saw it)."""

    ok: bool
    seconds: float
    folder: str
    reason: str = ""
    detail: str = ""


def default_runner():
    """``hornproof.compare.jobs.nightly_case.run_nightly_case`` (verify, and a case's sweep),
    imported only when a case must run: it loads the solver stack, which a run served from the
    cache should not pay for."""
    try:
        from ..jobs.nightly_case import run_nightly_case
    except ImportError as error:
        raise RunError(f"hornproof.compare.jobs.nightly_case is not available ({error}): cannot run cases") from None
    return run_nightly_case


def _check_result(path, case_sha256):
    """ValueError naming the file and key unless ``path`` is a usable summary of this case."""
    try:
        result = json.loads(Path(path).read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, ValueError) as error:
        raise ValueError(f"{path}: unreadable ({error})") from None
    if not isinstance(result, dict) or result.get("schema") != RESULT_SCHEMA:
        raise ValueError(f"{path}: schema: expected {RESULT_SCHEMA!r}")
    if result.get("case_sha256") != case_sha256:
        raise ValueError(f"{path}: case_sha256: {str(result.get('case_sha256'))[:12]!r} is not the hash of the "
                         f"case run ({str(case_sha256)[:12]!r})")
    try:
        figures_from_result(result)
    except ValueError as error:
        raise ValueError(f"{path}: {error}") from None


def _call_runner(runner, tier_case, partial, *, force):
    """Run one case; return (summary or None, error or None) where error is (reason, traceback)."""
    try:
        return runner(tier_case, partial, force=force, progress=None), None
    except HornproofError as exc:
        return None, (str(exc).splitlines()[0] if str(exc) else type(exc).__name__, "")
    except Exception as exc:  # noqa: BLE001 - a bug in one case must not stop the suite
        return None, (f"{type(exc).__name__}: {exc}", traceback.format_exc())


def _publish(cache, partial, tier_case, key, inputs, result):
    """Put a finished run into the cache; only usable results enter it. Returns the entry folder."""
    if not (partial / RESULT_FILE).exists():
        if not isinstance(result, dict) or result.get("schema") != RESULT_SCHEMA:
            raise ValueError(f"the run returned no {RESULT_SCHEMA} summary")
        cache.write_result(partial, result)
    _check_result(partial / RESULT_FILE, tier_case.sha256)
    return cache.commit(partial, tier_case.name, key, inputs)


def _run_one(runner, cache, tier_case, outcome, token, communicator, *, force, log):
    """Run one case on the ranks of ``communicator`` (one process group).

    Returns a RunRecord on the group's rank 0, None on its other ranks.
    """
    master = communicator.rank == 0
    partial = cache.partial_dir(tier_case.name, outcome.key, token)
    if master:
        cache.begin(tier_case.name, outcome.key, token)
    communicator.Barrier()
    started = time.monotonic()
    try:
        result, error = _call_runner(runner, tier_case, partial, force=force)
    except BaseException:  # interrupted (SIGTERM, Ctrl-C): leave no partial folder behind
        if master:
            cache.discard(partial)
        raise
    seconds = time.monotonic() - started
    errors = communicator.gather(error, root=0)
    if not master:
        return None
    problems = [e for e in errors if e is not None]
    if not problems:
        try:
            final = _publish(cache, partial, tier_case, outcome.key, outcome.cache_inputs, result)
        except (ValueError, OSError) as exc:
            problems.append((str(exc), ""))
        else:
            return RunRecord(ok=True, seconds=seconds, folder=str(final))
    failed_dir = cache.keep_failed(partial, tier_case.name, outcome.key)
    reason, detail = problems[0]
    log(f"{tier_case.name}: run failed: {reason}")
    if detail:
        log(detail.rstrip())
    return RunRecord(ok=False, seconds=seconds, folder=str(failed_dir), reason=reason, detail=detail)


def _plan(world, entries, to_run, ranks_per_case):
    """The cases (indices into ``entries``) of each process group; the same list on every rank."""
    if world.size == 1:
        return [to_run]
    plan = None
    if world.rank == 0:
        costs = [estimate_case_cost(entries[i].tier_case) for i in to_run]
        plan = [[to_run[j] for j in group]
                for group in plan_process_groups(costs, world.size, ranks_per_case=ranks_per_case)]
    return world.bcast(plan, root=0)


def run_cases(world, entries, to_run, runner, cache, *, ranks_per_case, force, log):
    """Run the cases ``to_run`` over the process groups; return {index: RunRecord} on rank 0."""
    plan = _plan(world, entries, to_run, ranks_per_case)
    token = world.bcast(uuid.uuid4().hex[:12] if world.rank == 0 else None, root=0)
    records = {}
    with mpi.process_groups(world, len(plan)) as (group, group_communicator):
        mine = plan[group]
        for count, index in enumerate(mine, 1):
            tier_case = entries[index].tier_case
            if group_communicator.rank == 0:
                where = f"group {group}: " if len(plan) > 1 else ""
                log(f"{where}[{count}/{len(mine)}] {tier_case.name}: running")
            record = _run_one(runner, cache, tier_case, entries[index].outcome, f"{token}g{group}", group_communicator,
                             force=force, log=log)
            if record is not None:
                records[index] = record
            group_communicator.Barrier()
    if world.size == 1:
        return records
    mpi.wait_idle(world)  # a rank done early sleeps here instead of spinning in MPI
    gathered = world.gather(records, root=0)
    merged = {}
    for part in gathered or []:
        merged.update(part)
    return merged
