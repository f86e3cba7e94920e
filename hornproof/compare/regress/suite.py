"""The nightly suite: every case run (or read from the cache) and compared with its baseline.

For each case (default: every ``cases/*.toml``) and tier ("quick": ``Case.for_tier("quick")``,
coarse cells and 2D where valid; "full": the case's own ladder) the FDTD summary figures are
compared with ``<baselines>/<case>.<tier>.json`` (:mod:`hornproof.compare.output.baseline_file`)
and classified (:mod:`hornproof.compare.regress.classify`).

Results come from a content-hash keyed cache (:mod:`hornproof.compare.regress.cache`): an
interrupted run resumes where it stopped; ``fresh`` ignores the cache. Under ``mpirun -np N``
the ranks are split into process groups (:func:`hornproof.sim.mpi.process_groups`) and the cases
are spread over the groups (:mod:`hornproof.compare.regress.plan`); only rank 0 gets the outcomes.
"""

import contextlib
import sys
from dataclasses import dataclass
from pathlib import Path

from ...errors import HornproofError, InputError
from ...sim import mpi
from ...sim.solver import meep_version
from ...version import build_version
from ..case.casefile import load_case
from ..output.baseline_file import baseline_path, figures_from_result, read_baseline
from . import case_runs
from .baseline import settings_record
from .cache import RESULT_FILE, ResultCache, cache_key
from .classify import case_status, compare_case
from .outcome import CaseOutcome

__all__ = ["TIERS", "SuiteCase", "find_case_files", "display_path", "load_cases", "run_regression", "run_suite"]

TIERS = ("quick", "full")


@dataclass
class SuiteCase:
    """One case of the suite: its file, its definition, the tier case that runs, its baseline
    (None when there is none yet) and what became of it."""

    path: Path
    case: object
    tier_case: object
    baseline: object = None
    outcome: CaseOutcome = None


def find_case_files(paths, default_dir="cases"):
    """Case files named on the command line: files as given, folders by their ``*.toml``.

    With no paths, every ``*.toml`` in ``default_dir``. Raises InputError for missing paths
    and for an empty selection.
    """
    selected = []
    if not paths:
        folder = Path(default_dir)
        if not folder.is_dir():
            raise InputError(f"{folder}: no such folder (name case files, or run where cases/ is)")
        paths = [folder]
    for raw in paths:
        path = Path(raw)
        if path.is_dir():
            found = sorted(path.glob("*.toml"))
            if not found:
                raise InputError(f"{path}: no *.toml case files in this folder")
            selected.extend(found)
        elif path.is_file():
            selected.append(path)
        else:
            raise InputError(f"{path}: no such case file")
    unique = []
    for path in selected:
        if path not in unique:
            unique.append(path)
    return unique


def display_path(path):
    """A path relative to the working folder when it is inside it (stable across machines)."""
    if not path:
        return ""
    path = Path(path)
    try:
        return str(path.resolve().relative_to(Path.cwd().resolve()))
    except ValueError:
        return str(path)


def load_cases(paths, tier, loader=load_case):
    """Load each case file and its tier case; InputError (exit 2) naming the file on any problem,
    including two cases of one name (baselines and results are stored by case name)."""
    loaded = []
    for path in paths:
        try:
            case = loader(path)
        except HornproofError:
            raise
        except (ValueError, OSError) as error:
            raise InputError(f"{path}: {error}") from None
        try:
            tier_case = case.for_tier(tier)
        except HornproofError:
            raise
        except ValueError as error:
            raise InputError(f"{path}: tier {tier}: {error}") from None
        loaded.append(SuiteCase(Path(path), case, tier_case))
    names = {}
    for entry in loaded:
        try:
            ResultCache(".").entry_dir(entry.case.name, "key")
        except ValueError as error:
            raise InputError(f"{entry.path}: {error} (rename the case file)") from None
        if entry.case.name in names:
            raise InputError(f"{entry.path}: name: {entry.case.name!r} is also the name of {names[entry.case.name]} "
                             "(baselines and results are stored by case name)")
        names[entry.case.name] = entry.path
    return loaded


def _prepare(entries, tier, baselines_dir):
    """Read every baseline (InputError before any work is done) and start each outcome."""
    solver, build = meep_version(), build_version()
    for entry in entries:
        settings = settings_record(entry.tier_case)
        key, inputs = cache_key(entry.tier_case.sha256, tier, settings, solver, build)
        folder = Path(baselines_dir) if baselines_dir is not None else entry.path.parent / "baselines"
        stored = baseline_path(folder, entry.case.name, tier)
        entry.baseline = read_baseline(stored, expected_case=entry.case.name)
        entry.outcome = CaseOutcome(
            name=entry.case.name, case_file=display_path(entry.path), tier=tier,
            case_sha256=str(entry.tier_case.sha256), key=key, baseline_file=display_path(stored),
            computation_sha256=str(entry.tier_case.computation_sha256),
            cache_inputs=inputs, settings=settings,
        )


def _read_cache(entries, cache, *, fresh, log):
    """On rank 0: fill the outcomes found in the cache; return the indices still to run."""
    notes, to_run = [], []
    for index, entry in enumerate(entries):
        outcome = entry.outcome
        cached = None if fresh else cache.lookup(outcome.name, outcome.key, outcome.case_sha256, notes)
        if cached is None:
            to_run.append(index)
        else:
            outcome.result, outcome.source = cached, "cache"
            outcome.result_dir = display_path(cache.entry_dir(outcome.name, outcome.key))
    for note in notes:
        log(note)
    return to_run


def _collect_runs(entries, to_run, records, cache):
    """On rank 0: each run case's outcome from its record and the cache entry it wrote."""
    for index in to_run:
        outcome, record = entries[index].outcome, records.get(index)
        if record is None:
            outcome.status, outcome.reason = "failed", "no process group reported this case"
            continue
        outcome.seconds = record.seconds
        outcome.result_dir = display_path(record.folder)
        if not record.ok:
            outcome.status, outcome.reason, outcome.detail = "failed", record.reason, record.detail
            continue
        outcome.source = "run"
        notes = []
        outcome.result = cache.lookup(outcome.name, outcome.key, outcome.case_sha256, notes)
        if outcome.result is None:
            outcome.status = "failed"
            outcome.reason = notes[0] if notes else f"{record.folder}: finished result could not be read back"


def _classify(entries):
    """On rank 0: compare every case that has a result with its baseline."""
    for entry in entries:
        outcome = entry.outcome
        if outcome.status == "failed":
            continue
        if entry.baseline is not None:
            outcome.baseline_case_sha256 = entry.baseline.case_sha256
        try:
            frequencies, figures = figures_from_result(outcome.result)
        except ValueError as error:
            outcome.status = "failed"
            outcome.reason = f"{outcome.result_dir}/{RESULT_FILE}: {error}"
            continue
        outcome.figures = compare_case(entry.baseline, outcome.case_sha256, frequencies, figures,
                                       getattr(entry.case, "checks", {}) or {},
                                       computation_sha256=outcome.computation_sha256)
        outcome.status = case_status(outcome.figures)
        report = Path(outcome.result_dir) / "report.html" if outcome.result_dir else None
        outcome.report = str(report) if report is not None and report.is_file() else ""


def _log_to_stderr(message):
    print(f"hornproof regress: {message}", file=sys.stderr, flush=True)


def _announce(world, entries, to_run, tier, cache_only, log):
    """Rank 0's one-line plan: how many cases come from the cache and how many run."""
    cached = len(entries) - len(to_run)
    if cache_only:
        log(f"{len(entries)} case(s), tier {tier}: {cached} from cache, "
            f"{len(to_run)} without a cached result (not run: --cache-only)")
    else:
        log(f"{len(entries)} case(s), tier {tier}: {cached} from cache, {len(to_run)} to run"
            + (f" on {world.size} ranks" if world.size > 1 else ""))


def run_regression(case_paths, *, tier="quick", results_dir="results", baselines_dir=None, fresh=False,
                   force=False, runner=None, loader=load_case, log=_log_to_stderr, world=None,
                   ranks_per_case=None, cache_only=False):
    """Run (or read from the cache) every case and compare it with its baseline.

    Parameters
    ----------
    case_paths : list of path
        Case files, already selected (:func:`find_case_files`).
    tier : {"quick", "full"}
    results_dir : path
        Root of the result cache.
    baselines_dir : path, optional
        Where baselines are; default ``baselines/`` beside each case file.
    fresh : bool
        Ignore cached results (run every case again).
    force : bool
        Passed to the runner.
    runner : callable, optional
        ``runner(case, out_dir, *, force, progress) -> summary dict``; raises
        hornproof.errors.RunError/InputError when the run fails. Default:
        :func:`hornproof.compare.regress.case_runs.default_runner`.
    loader : callable
        ``loader(path) -> Case``; default ``hornproof.compare.case.casefile.load_case``.
    log : callable
        Receives one-line progress messages (default: standard error).
    world : MPI communicator, optional
        Default: :func:`hornproof.sim.mpi.world` (``mpirun``, else serial).
    ranks_per_case : int, optional
        Under MPI, ranks per process group; default chosen from the case sizes
        (:func:`hornproof.compare.regress.plan.plan_process_groups`).
    cache_only : bool
        Run nothing: a case without a cached result is "failed" (not run).

    Returns
    -------
    list of CaseOutcome or None
        The outcomes on rank 0; None on the other ranks.
    """
    if tier not in TIERS:
        raise InputError(f"--tier: {tier!r}, expected one of {', '.join(TIERS)}")
    if world is None:
        world = mpi.world()
    entries = load_cases(case_paths, tier, loader)
    _prepare(entries, tier, baselines_dir)
    cache = ResultCache(results_dir)
    to_run = None
    if world.rank == 0:  # rank 0 decides what is already done; everyone gets the same list
        to_run = _read_cache(entries, cache, fresh=fresh, log=log)
        _announce(world, entries, to_run, tier, cache_only, log)
    to_run = world.bcast(to_run, root=0)
    not_run, to_run = (to_run, []) if cache_only else ([], to_run)
    records = {}
    if to_run:
        records = case_runs.run_cases(world, entries, to_run, runner or case_runs.default_runner(), cache,
                             ranks_per_case=ranks_per_case, force=force, log=log)
    world.Barrier()
    if world.rank != 0:
        return None
    for index in not_run:
        entries[index].outcome.status = "failed"
        entries[index].outcome.reason = "no cached result and --cache-only given (not run)"
    _collect_runs(entries, to_run, records, cache)
    _classify(entries)
    return [entry.outcome for entry in entries]


def run_suite(case_paths, finish, *, world=None, **options):
    """Run the suite on every rank, then ``finish(outcomes)`` on rank 0 only.

    What the runs print (Meep's banner, progress) goes to standard error, so standard output
    stays for what ``finish`` prints. Returns ``finish``'s exit status on every rank; a
    hornproof error raised by ``finish`` is raised on every rank (the command line prints it once).
    ``options`` are those of :func:`run_regression`.
    """
    with contextlib.redirect_stdout(sys.stderr):
        if world is None:
            world = mpi.world()  # Meep prints a banner when MPI starts
        outcomes = run_regression(case_paths, world=world, **options)
    error, status = None, 0
    if world.rank == 0:
        try:
            status = finish(outcomes)
        except HornproofError as exc:
            error, status = exc, exc.exit_code
    status = world.bcast(status, root=0)
    if error is not None:
        raise error
    return status
