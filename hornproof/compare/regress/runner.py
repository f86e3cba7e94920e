"""``hornproof regress``: the nightly suite, every case run and compared with its stored baseline.

For each case (default: every ``cases/*.toml``) and tier ("quick": ``Case.for_tier("quick")``,
coarse cells and 2D where valid; "full": the case's own ladder) the FDTD summary figures are
compared with ``<baselines>/<case>.<tier>.json`` (see :mod:`hornproof.compare.regress.baseline`), and
each figure is classified:

``unchanged``       equal to the baseline at every frequency (to a tiny epsilon);
``within-noise``    changed, but nowhere both beyond the case's tolerance and beyond the
                    combined numerical uncertainty √(u_base² + u_new²);
``regressed``       at some frequency beyond the tolerance *and* beyond that uncertainty
                    (or a figure that was defined became undefined, or the other way round);
``not-comparable``  the case definition or tier settings changed since the baseline (the
                    stored case hash differs): never reported as a regression;
``new``             no baseline yet;
``failed``          the run itself failed: counts as a regression.

Results come from a content-hash keyed cache (:mod:`hornproof.compare.regress.result_cache`): an
interrupted run resumes where it stopped; ``--fresh`` ignores the cache. Under
``mpirun -np N`` the ranks are split into process groups (``meep.divide_parallel_processes``)
and the cases are spread over the groups; only rank 0 prints and writes the table, the JSON
summary (schema ``hornproof.regress/1``) and the JUnit XML file.

Exit status: 0 no regression · 1 a figure regressed or a run failed · 2 bad input.
"""

import argparse
import contextlib
import dataclasses
import json
import math
import os
import signal
import sys
import time
import traceback
import uuid
from dataclasses import dataclass, field
from datetime import datetime, timezone
from pathlib import Path

from ... import __version__
from ...atomic import write_text_atomic
from ...errors import HornproofError, InputError, RunError
from .baseline import (
    FIGURE_UNITS,
    baseline_from_result,
    baseline_path,
    figures_from_result,
    read_baseline,
    write_baseline,
)
from ..output.junit import TestCaseRecord, write_junit
from .result_cache import RESULT_FILE, RESULT_SCHEMA, ResultCache, cache_key

__all__ = [
    "SCHEMA",
    "STATUSES",
    "DEFAULT_TOLERANCES",
    "FigureVerdict",
    "CaseOutcome",
    "tolerance_for",
    "classify_figure",
    "compare_case",
    "plan_process_groups",
    "estimate_case_cost",
    "find_case_files",
    "run_regression",
    "format_table",
    "add_regress_arguments",
    "regress_command",
    "main",
]

SCHEMA = "hornproof.regress/1"
TIERS = ("quick", "full")

# Worst first: a case takes the worst status of its figures.
STATUSES = ("failed", "regressed", "not-comparable", "new", "within-noise", "unchanged")
_RANK = {status: i for i, status in enumerate(STATUSES)}

# Check keys (case-file [checks]) that give each figure's tolerance, first match wins. A case may
# also name the figure itself (e.g. hpbw_e_deg = 2.0).
TOLERANCE_KEYS = {
    "directivity_dbi": ("directivity_dbi", "directivity_db"),
    "directivity_2d_db": ("directivity_2d_db", "directivity_db"),
    "gain_dbi": ("gain_dbi", "gain_db", "directivity_db"),
    "realized_gain_dbi": ("realized_gain_dbi", "realized_gain_db", "gain_db", "directivity_db"),
    "hpbw_h_deg": ("hpbw_h_deg", "hpbw_deg"),
    "hpbw_e_deg": ("hpbw_e_deg", "hpbw_deg"),
    "sll_h_db": ("sll_h_db", "sll_db"),
    "sll_e_db": ("sll_e_db", "sll_db"),
    "s11_db": ("s11_db",),
}

# Used where a case gives no tolerance for a figure. Project choice (not from a standard): about
# the repeatability one expects of a coarse FDTD run on a staircased horn.
DEFAULT_TOLERANCES = {"directivity_db": 0.2, "hpbw_deg": 1.0, "sll_db": 1.0, "s11_db": 1.0}

# Relative size of a difference still read as "equal" (rounding of JSON round trips).
EQUAL_EPSILON = 1e-9

# Exponent of the speed-up with r ranks in one group (speed ∝ r**exponent). Measured here
# (bench/bench_regress.py, 2-core machine shared with other work, Meep 1.25): the quick-tier 3D
# pyramidal case ran 0.73x as fast on 2 ranks as on 1; the whole quick suite 0.72x as one 2-rank
# group and 1.18x as two 1-rank groups. 0.2 keeps cases on separate ranks unless one case is far
# larger than all the others together; on dedicated nodes with large 3D cases a higher value
# (or --ranks-per-case) may do better.
PARALLEL_EFFICIENCY_EXPONENT = 0.2


# --- classification (pure) ------------------------------------------------------------------


@dataclass
class FigureVerdict:
    """How one figure of one case compares with its baseline (changes in the figure's unit)."""

    figure: str
    status: str
    tolerance: float = None
    tolerance_key: str = ""
    max_change: float = None  # signed change (new − baseline) at the decisive frequency
    noise: float = None  # √(u_base² + u_new²) there
    at_frequency_ghz: float = None
    reason: str = ""
    baseline_value: float = None  # at the decisive frequency
    new_value: float = None

    def to_dict(self):
        return {
            "figure": self.figure,
            "baseline_value": self.baseline_value,
            "new_value": self.new_value,
            "unit": FIGURE_UNITS.get(self.figure, ""),
            "status": self.status,
            "tolerance": self.tolerance,
            "tolerance_key": self.tolerance_key,
            "max_change": self.max_change,
            "noise": self.noise,
            "at_frequency_ghz": self.at_frequency_ghz,
            "reason": self.reason,
        }


def tolerance_for(figure, checks):
    """Tolerance of a figure from the case's checks, falling back to DEFAULT_TOLERANCES.

    Returns
    -------
    tolerance : float
        In the figure's own unit (dB or degrees).
    key : str
        The check key it came from (prefixed ``default:`` for a fallback).
    """
    checks = checks or {}
    keys = TOLERANCE_KEYS.get(figure, (figure,))
    for key in keys:
        value = checks.get(key)
        if isinstance(value, (int, float)) and not isinstance(value, bool) and value >= 0:
            return float(value), key
    for key in keys:
        if key in DEFAULT_TOLERANCES:
            return DEFAULT_TOLERANCES[key], f"default:{key}"
    return 0.0, "default:none"


def classify_figure(figure, base_values, base_uncertainty, new_values, new_uncertainty, frequencies_ghz,
                    tolerance, *, tolerance_key="", epsilon=EQUAL_EPSILON):
    """Classify one figure over the band against its baseline.

    Parameters
    ----------
    figure : str
        Figure name (e.g. ``directivity_dbi``).
    base_values, new_values : sequence of float or None
        Baseline and new values per frequency, in the figure's unit (dB or degrees); None where
        the figure is undefined (e.g. no sidelobe found).
    base_uncertainty, new_uncertainty : sequence of float or None
        Absolute numerical uncertainty per value, same unit; None = not given (taken as 0).
    frequencies_ghz : sequence of float
    tolerance : float
        The case's tolerance for this figure, same unit.

    Returns
    -------
    FigureVerdict
        ``regressed`` if at some frequency |Δ| > tolerance and |Δ| > √(u_b² + u_n²), or the
        figure's definedness changed; ``unchanged`` if |Δ| ≤ epsilon·max(1, |baseline|)
        everywhere; else ``within-noise``. The decisive frequency is the one with the largest
        |Δ| / max(tolerance, noise) among the regressed ones (among all, otherwise).
    """
    n = len(frequencies_ghz)
    if not (len(base_values) == len(new_values) == len(base_uncertainty) == len(new_uncertainty) == n):
        raise ValueError(f"{figure}: values and uncertainties must have one entry per frequency")
    verdict = FigureVerdict(figure=figure, status="unchanged", tolerance=tolerance, tolerance_key=tolerance_key)
    changed = []  # (score, regressed, index, delta, noise)
    for i in range(n):
        b, v = base_values[i], new_values[i]
        if b is None and v is None:
            continue
        if b is None or v is None:
            changed.append((math.inf, True, i, None, None))
            continue
        delta = v - b
        if abs(delta) <= epsilon * max(1.0, abs(b)):
            continue
        noise = math.hypot(base_uncertainty[i] or 0.0, new_uncertainty[i] or 0.0)
        regressed = abs(delta) > tolerance and abs(delta) > noise
        changed.append((abs(delta) / max(tolerance, noise, 1e-300), regressed, i, delta, noise))
    if not changed:
        return verdict
    regressed = [c for c in changed if c[1]]
    verdict.status = "regressed" if regressed else "within-noise"
    _, _, i, verdict.max_change, verdict.noise = max(regressed or changed, key=lambda c: (c[0], -c[2]))
    verdict.at_frequency_ghz = frequencies_ghz[i]
    verdict.baseline_value, verdict.new_value = base_values[i], new_values[i]
    if verdict.max_change is None:
        b, v = base_values[i], new_values[i]
        verdict.reason = (f"undefined now (was {b:.4g})" if v is None else f"was undefined, now {v:.4g}") + \
            f" at {frequencies_ghz[i]:g} GHz"
    if verdict.status == "regressed" and not verdict.reason:
        verdict.reason = (
            f"changed by {verdict.max_change:+.4g} at {verdict.at_frequency_ghz:g} GHz: beyond the tolerance "
            f"{tolerance:g} and the combined uncertainty {verdict.noise:.3g}"
        )
    elif verdict.status == "within-noise":
        verdict.reason = (
            f"largest change {verdict.max_change:+.4g} at {verdict.at_frequency_ghz:g} GHz is within the tolerance "
            f"{tolerance:g} or the combined uncertainty {verdict.noise:.3g}"
        )
    return verdict


def compare_case(baseline, case_sha256, frequencies_ghz, figures, checks):
    """Verdicts for every figure of one case's new result.

    Parameters
    ----------
    baseline : hornproof.compare.regress.baseline.Baseline or None
    case_sha256 : str
        Hash of the tier case definition that produced the new result.
    frequencies_ghz : list of float
    figures : dict of str -> FigureRecord
        The new result's figures (:func:`hornproof.compare.regress.baseline.figures_from_result`).
    checks : dict
        The case's tolerances.

    Returns
    -------
    list of FigureVerdict
        In the order of the new result's figures, then figures only the baseline has.
    """
    verdicts = []
    names = list(figures) + ([n for n in baseline.figures if n not in figures] if baseline else [])
    for name in names:
        tolerance, key = tolerance_for(name, checks)
        record = figures.get(name)
        if baseline is None:
            verdicts.append(FigureVerdict(name, "new", tolerance, key, reason="no baseline"))
            continue
        if baseline.case_sha256 != case_sha256:
            verdicts.append(FigureVerdict(
                name, "not-comparable", tolerance, key,
                reason=f"case or tier settings changed since the baseline (hash {baseline.case_sha256[:12]} -> "
                       f"{str(case_sha256)[:12]}); rerun with --update to accept",
            ))
            continue
        if not _same_frequencies(baseline.frequencies_ghz, frequencies_ghz):
            verdicts.append(FigureVerdict(name, "not-comparable", tolerance, key,
                                          reason="frequencies differ from the baseline's"))
            continue
        base = baseline.figures.get(name)
        if base is None:
            verdicts.append(FigureVerdict(name, "new", tolerance, key, reason="figure not in the baseline"))
            continue
        if record is None:
            verdicts.append(FigureVerdict(name, "regressed", tolerance, key,
                                          reason="figure in the baseline is missing from the new result"))
            continue
        verdicts.append(classify_figure(name, base.values, base.uncertainty, record.values, record.uncertainty,
                                        frequencies_ghz, tolerance, tolerance_key=key))
    return verdicts


def _same_frequencies(a, b):
    return len(a) == len(b) and all(abs(x - y) <= 1e-9 * max(1.0, abs(x)) for x, y in zip(a, b))


def case_status(figure_verdicts):
    """The worst status among a case's figures ("unchanged" for none)."""
    if not figure_verdicts:
        return "unchanged"
    return min((v.status for v in figure_verdicts), key=_RANK.__getitem__)


# --- planning (pure) ----------------------------------------------------------------------------


def estimate_case_cost(case):
    """Rough relative work of one case: Σ over the ladder of cells × time steps.

    cells ∝ Π (extent / λ · cells per λ) over the model's dimensions, time steps ∝ cells per λ
    (Courant limit). Extents are the aperture (plus a wavelength of padding and PML) across, and
    the flare length plus a wavelength of feed along the axis, at f_max. Only used to balance the
    process groups; 1.0 when the case lacks the attributes.
    """
    try:
        f_max = max(float(f) for f in case.frequencies)
        wavelength = 299_792_458.0 / f_max
        horn = case.horn
        dims = int(case.fdtd.dims)
        ladder = [float(c) for c in case.fdtd.cells_per_wavelength]
        across_a = horn.aperture_a / wavelength + 2.0
        across_b = horn.aperture_b / wavelength + 2.0
        along = horn.flare_length / wavelength + 2.0
        extents = [max(across_a, across_b), along] if dims == 2 else [across_a, across_b, along]
        total = 0.0
        for cells in ladder:
            product = 1.0
            for extent in extents:
                product *= extent * cells
            total += product * cells
        return total if total > 0 and math.isfinite(total) else 1.0
    except (AttributeError, TypeError, ValueError):
        return 1.0


def _group_sizes(world_size, groups):
    """Ranks per group as Meep divides them (rank r goes to group r·groups // world_size)."""
    sizes = [0] * groups
    for r in range(world_size):
        sizes[r * groups // world_size] += 1
    return sizes


def plan_process_groups(costs, world_size, efficiency_exponent=PARALLEL_EFFICIENCY_EXPONENT, ranks_per_case=None):
    """Choose the number of process groups and which cases each runs.

    Tries every group count g = 1 … min(world_size, cases); each group's speed is
    (its ranks)**efficiency_exponent; cases go largest first to the group that would finish
    them earliest (longest-processing-time rule). The g with the shortest estimated makespan
    wins (fewer groups on a tie). ``ranks_per_case`` fixes g = world_size // ranks_per_case
    (at least 1, at most the number of cases) instead.

    Parameters
    ----------
    costs : sequence of float
        Relative work of each case (:func:`estimate_case_cost`).
    world_size : int
        Number of MPI ranks.
    efficiency_exponent : float
        Speed of a group of r ranks relative to one rank is r**efficiency_exponent.
    ranks_per_case : int, optional
        Ranks wanted per group (``--ranks-per-case``).

    Returns
    -------
    assignment : list of list of int
        For each group, the indices into ``costs`` it runs, in order.
    """
    if world_size < 1:
        raise ValueError(f"world_size: {world_size} must be >= 1")
    n = len(costs)
    if n == 0:
        return [[]]
    if ranks_per_case is not None and ranks_per_case < 1:
        raise ValueError(f"ranks_per_case: {ranks_per_case} must be >= 1")
    candidates = range(1, min(world_size, n) + 1)
    if ranks_per_case is not None:
        candidates = [max(1, min(world_size // ranks_per_case, n))]
    best = None
    for groups in candidates:
        speeds = [size ** efficiency_exponent for size in _group_sizes(world_size, groups)]
        finish = [0.0] * groups
        assignment = [[] for _ in range(groups)]
        for index in sorted(range(n), key=lambda i: (-costs[i], i)):
            target = min(range(groups), key=lambda g: (finish[g] + costs[index] / speeds[g], g))
            finish[target] += costs[index] / speeds[target]
            assignment[target].append(index)
        makespan = max(finish)
        if best is None or makespan < best[0] * (1 - 1e-9):
            best = (makespan, assignment)
    return [sorted(group) for group in best[1]]


# --- the environment ---------------------------------------------------------------------------


def solver_version():
    """Meep's version string without importing Meep when it is not loaded yet.

    Importing Meep takes about a second (it starts MPI); the cache-hit path should not pay that.
    Reads ``__version__`` from the installed module's source, else imports it.
    """
    module = sys.modules.get("meep")
    if module is not None and hasattr(module, "__version__"):
        return str(module.__version__)
    try:
        import importlib.util

        spec = importlib.util.find_spec("meep")
    except (ImportError, ValueError):
        spec = None
    if spec is None or not spec.origin:
        return "unavailable"
    try:
        with open(spec.origin, encoding="utf-8") as handle:
            for line in handle:
                if line.startswith("__version__"):
                    return line.split("=", 1)[1].strip().strip("'\"")
    except OSError:
        pass
    try:
        import meep

        return str(meep.__version__)
    except Exception:  # noqa: BLE001 - any failure here just means "unknown"
        return "unavailable"


def source_digest(package=None):
    """Short SHA-256 over the hornproof package's Python sources (paths and contents).

    Part of the cache key next to the version number: between releases the code that computes a
    result changes without the version changing, and a nightly run must then run again, not read
    yesterday's results.
    """
    import hashlib

    package = Path(package) if package is not None else Path(__file__).resolve().parents[1]
    digest = hashlib.sha256()
    for path in sorted(package.rglob("*.py")):
        if "__pycache__" in path.parts:
            continue
        digest.update(str(path.relative_to(package)).encode("utf-8") + b"\0")
        try:
            digest.update(path.read_bytes())
        except OSError:
            digest.update(b"<unreadable>")
        digest.update(b"\0")
    return digest.hexdigest()[:12]


def hornproof_build():
    """``<version>+src.<source digest>``: which hornproof code produced a result."""
    return f"{__version__}+src.{source_digest()}"


def settings_record(case):
    """JSON-ready FDTD settings of a (tier) case, for the cache key and the baseline."""
    settings = getattr(case, "fdtd", None)
    if settings is None:
        return {}
    if dataclasses.is_dataclass(settings):
        record = dataclasses.asdict(settings)
    elif isinstance(settings, dict):
        record = dict(settings)
    else:
        return {"repr": repr(settings)}
    return json.loads(json.dumps(record, sort_keys=True, default=str))


class _SerialWorld:
    """Stands in for an MPI communicator when running on one process."""

    rank = 0
    size = 1

    def bcast(self, value, root=0):
        return value

    def gather(self, value, root=0):
        return [value]

    def Barrier(self):
        pass

    def Split(self, color, key):
        return self


def _mpi_world():
    """The MPI world communicator when launched by an MPI launcher with several ranks, else None.

    Detected from the launcher's environment first, so a plain run never starts MPI.
    """
    markers = ("OMPI_COMM_WORLD_SIZE", "PMI_SIZE", "PMIX_RANK", "MPI_LOCALNRANKS", "SLURM_NTASKS_MPI")
    if not any(name in os.environ for name in markers):
        return None
    try:
        import meep  # noqa: F401 - starts MPI the way Meep expects, before mpi4py is used
    except ImportError:
        pass
    try:
        from mpi4py import MPI
    except ImportError:
        return None
    world = MPI.COMM_WORLD
    return world if world.Get_size() > 1 else None


def _wait_idle(comm, poll_seconds=0.05):
    """Wait until every rank of ``comm`` has arrived, sleeping between checks.

    A blocking MPI barrier busy-polls (Open MPI spins a core at 100 %): a rank whose process
    group finished early would take a core from the groups still running Meep.
    """
    start = getattr(comm, "Ibarrier", None)
    if start is None:
        comm.Barrier()
        return
    request = start()
    while not request.Test():
        time.sleep(poll_seconds)


def _divide(world, groups):
    """Split the ranks into ``groups`` process groups; return (group index, group communicator)."""
    try:
        import meep
    except ImportError:
        meep = None
    if meep is not None:
        group = int(meep.divide_parallel_processes(groups))
    else:
        group = world.rank * groups // world.size
    return group, world.Split(group, world.rank), meep


# --- running --------------------------------------------------------------------------------


@dataclass
class CaseOutcome:
    """Everything known about one case after a regression run."""

    name: str
    case_file: str
    tier: str
    case_sha256: str
    key: str = ""
    status: str = "unchanged"
    source: str = ""  # "cache" | "run" | "" (failed before a result)
    seconds: float = 0.0
    reason: str = ""
    detail: str = ""
    result_dir: str = ""
    report: str = ""
    baseline_file: str = ""
    baseline_case_sha256: str = ""
    figures: list = field(default_factory=list)
    result: dict = field(default=None, repr=False)
    cache_inputs: dict = field(default=None, repr=False)
    settings: dict = field(default=None, repr=False)

    def to_dict(self):
        return {
            "case": self.name,
            "case_file": self.case_file,
            "tier": self.tier,
            "case_sha256": self.case_sha256,
            "cache_key": self.key,
            "status": self.status,
            "source": self.source,
            "seconds": round(self.seconds, 3),
            "reason": self.reason,
            "result_dir": self.result_dir,
            "report": self.report,
            "baseline_file": self.baseline_file,
            "baseline_case_sha256": self.baseline_case_sha256,
            "figures": [v.to_dict() for v in self.figures],
        }


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


def _display_path(path):
    """A path relative to the working folder when it is inside it (stable across machines)."""
    if not path:
        return ""
    path = Path(path)
    try:
        return str(path.resolve().relative_to(Path.cwd().resolve()))
    except ValueError:
        return str(path)


def _default_runner():
    try:
        from ..jobs.verify import verify_case
    except ImportError as error:
        raise RunError(f"hornproof.compare.jobs.verify is not available ({error}): cannot run cases") from None
    return verify_case


def _default_loader():
    try:
        from ..case.casefile import load_case
    except ImportError as error:
        raise RunError(f"hornproof.compare.case.casefile is not available ({error}): cannot read cases") from None
    return load_case


def _load_cases(paths, tier, loader):
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
        loaded.append((Path(path), case, tier_case))
    names = {}
    for path, case, _ in loaded:
        try:
            ResultCache(".").entry_dir(case.name, "key")
        except ValueError as error:
            raise InputError(f"{path}: {error} (rename the case file)") from None
        if case.name in names:
            raise InputError(f"{path}: name: {case.name!r} is also the name of {names[case.name]} "
                             "(baselines and results are stored by case name)")
        names[case.name] = path
    return loaded


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


def _run_one(runner, cache, tier_case, key, inputs, token, group_comm, *, force, log):
    """Run one case inside one process group. Returns (record or None on non-masters).

    The record is {"ok": bool, "seconds": float, "reason": str, "detail": str, "dir": str}.
    """
    master = group_comm.rank == 0
    partial = cache.partial_dir(tier_case.name, key, token)
    if master:
        cache.begin(tier_case.name, key, token)
    group_comm.Barrier()
    started = time.monotonic()
    error = None
    try:
        result = runner(tier_case, partial, force=force, progress=None)
    except HornproofError as exc:
        error = (str(exc).splitlines()[0] if str(exc) else type(exc).__name__, "")
    except Exception as exc:  # noqa: BLE001 - a bug in one case must not stop the suite
        error = (f"{type(exc).__name__}: {exc}", traceback.format_exc())
    except BaseException:
        if master:
            cache.discard(partial)
        raise
    seconds = time.monotonic() - started
    errors = group_comm.gather(error, root=0)
    if not master:
        return None
    problems = [e for e in errors if e is not None]
    if not problems:
        try:
            if not (partial / RESULT_FILE).exists():
                if not isinstance(result, dict) or result.get("schema") != RESULT_SCHEMA:
                    raise ValueError(f"the run returned no {RESULT_SCHEMA} summary")
                cache.write_result(partial, result)
            _check_result(partial / RESULT_FILE, tier_case.sha256)  # only usable results enter the cache
            final = cache.commit(partial, tier_case.name, key, inputs)
        except (ValueError, OSError) as exc:
            problems.append((str(exc), ""))
        else:
            return {"ok": True, "seconds": seconds, "reason": "", "detail": "", "dir": str(final)}
    failed_dir = cache.keep_failed(partial, tier_case.name, key)
    reason, detail = problems[0]
    log(f"{tier_case.name}: run failed: {reason}")
    if detail:
        log(detail.rstrip())
    return {"ok": False, "seconds": seconds, "reason": reason, "detail": detail, "dir": str(failed_dir)}


def run_regression(case_paths, *, tier="quick", results_dir="results", baselines_dir=None, fresh=False,
                   force=False, runner=None, loader=None, log=None, world=None, ranks_per_case=None,
                   cache_only=False):
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
        ``hornproof.compare.jobs.verify.verify_case``.
    loader : callable, optional
        ``loader(path) -> Case``; default ``hornproof.compare.case.casefile.load_case``.
    log : callable, optional
        Receives one-line progress messages (default: stderr of the printing rank).
    world : MPI communicator, optional
        Default: detected (``mpirun``), else serial.
    ranks_per_case : int, optional
        Under MPI, ranks per process group; default chosen from the case sizes
        (:func:`plan_process_groups`).
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
        world = _mpi_world() or _SerialWorld()
    if log is None:
        def log(message):
            print(f"hornproof regress: {message}", file=sys.stderr, flush=True)
    loader = loader or _default_loader()
    loaded = _load_cases(case_paths, tier, loader)
    cache = ResultCache(results_dir)
    solver = solver_version()
    build = hornproof_build()

    outcomes = []
    baselines = []
    for path, case, tier_case in loaded:
        settings = settings_record(tier_case)
        key, inputs = cache_key(tier_case.sha256, tier, settings, solver, build)
        folder = Path(baselines_dir) if baselines_dir is not None else path.parent / "baselines"
        bpath = baseline_path(folder, case.name, tier)
        baselines.append(read_baseline(bpath))  # InputError (exit 2) before any work is done
        outcomes.append(CaseOutcome(
            name=case.name, case_file=_display_path(path), tier=tier, case_sha256=str(tier_case.sha256),
            key=key, baseline_file=_display_path(bpath), cache_inputs=inputs, settings=settings,
        ))

    # Rank 0 decides what is already done; everyone gets the same list.
    to_run = None
    if world.rank == 0:
        notes = []
        to_run = []
        for index, ((_, _, tier_case), outcome) in enumerate(zip(loaded, outcomes)):
            cached = None if fresh else cache.lookup(outcome.name, outcome.key, str(tier_case.sha256), notes)
            if cached is None:
                to_run.append(index)
            else:
                outcome.result, outcome.source = cached, "cache"
                outcome.result_dir = _display_path(cache.entry_dir(outcome.name, outcome.key))
        for note in notes:
            log(note)
        if cache_only:
            log(f"{len(loaded)} case(s), tier {tier}: {len(loaded) - len(to_run)} from cache, "
                f"{len(to_run)} without a cached result (not run: --cache-only)")
        else:
            log(f"{len(loaded)} case(s), tier {tier}: {len(loaded) - len(to_run)} from cache, {len(to_run)} to run"
                + (f" on {world.size} ranks" if world.size > 1 else ""))
    to_run = world.bcast(to_run, root=0)
    not_run = []
    if cache_only:
        not_run, to_run = to_run, []
    token = world.bcast(uuid.uuid4().hex[:12] if world.rank == 0 else None, root=0)
    runner = runner or (_default_runner() if to_run else None)

    records = {}
    if to_run:
        if world.size > 1:
            plan = None
            if world.rank == 0:
                costs = [estimate_case_cost(loaded[i][2]) for i in to_run]
                plan = [[to_run[j] for j in group]
                        for group in plan_process_groups(costs, world.size, ranks_per_case=ranks_per_case)]
            plan = world.bcast(plan, root=0)
            group, group_comm, meep = _divide(world, len(plan))
        else:
            plan, group, group_comm, meep = [to_run], 0, world, None
        try:
            mine = plan[group]
            for count, index in enumerate(mine, 1):
                _, _, tier_case = loaded[index]
                if group_comm.rank == 0:
                    where = f"group {group}: " if len(plan) > 1 else ""
                    log(f"{where}[{count}/{len(mine)}] {tier_case.name}: running")
                record = _run_one(runner, cache, tier_case, outcomes[index].key, outcomes[index].cache_inputs,
                                  f"{token}g{group}", group_comm, force=force, log=log)
                if record is not None:
                    records[index] = record
                group_comm.Barrier()
        finally:
            if meep is not None and world.size > 1:
                meep.end_divide_parallel()
        _wait_idle(world)  # a rank done early sleeps here instead of spinning in MPI
        gathered = world.gather(records, root=0)
        if world.rank == 0:
            records = {}
            for part in gathered:
                records.update(part)
    world.Barrier()
    if world.rank != 0:
        return None

    for index in not_run:
        outcomes[index].status = "failed"
        outcomes[index].reason = "no cached result and --cache-only given (not run)"
    for index in to_run:
        outcome, record = outcomes[index], records.get(index)
        if record is None:
            outcome.status, outcome.reason = "failed", "no process group reported this case"
            continue
        outcome.seconds = record["seconds"]
        if not record["ok"]:
            outcome.status, outcome.reason, outcome.detail = "failed", record["reason"], record["detail"]
            outcome.result_dir = _display_path(record["dir"])
            continue
        outcome.source = "run"
        outcome.result_dir = _display_path(record["dir"])
        notes = []
        outcome.result = cache.lookup(outcome.name, outcome.key, outcome.case_sha256, notes)
        if outcome.result is None:
            outcome.status = "failed"
            outcome.reason = notes[0] if notes else f"{record['dir']}: finished result could not be read back"

    for (path, case, tier_case), outcome, baseline in zip(loaded, outcomes, baselines):
        if outcome.status == "failed":
            continue
        if baseline is not None:
            outcome.baseline_case_sha256 = baseline.case_sha256
        try:
            frequencies, figures = figures_from_result(outcome.result)
        except ValueError as error:
            outcome.status = "failed"
            outcome.reason = f"{outcome.result_dir}/{RESULT_FILE}: {error}"
            continue
        outcome.figures = compare_case(baseline, outcome.case_sha256, frequencies, figures,
                                       getattr(case, "checks", {}) or {})
        outcome.status = case_status(outcome.figures)
        report = Path(outcome.result_dir) / "report.html" if outcome.result_dir else None
        outcome.report = str(report) if report is not None and report.is_file() else ""
    return outcomes


# --- output -------------------------------------------------------------------------------------


def _fmt(value, spec):
    return "-" if value is None else format(value, spec)


def format_table(outcomes):
    """The plain-text table: one row per case and figure (one row for a failed case).

    Deterministic for the same results (no timings, no cache source), so a resumed or parallel run
    prints the same table as an uninterrupted serial one.
    """
    header = ("case", "figure", "status", "change", "tolerance", "noise", "at GHz")
    rows = []
    for outcome in outcomes:
        if outcome.status == "failed" or not outcome.figures:
            rows.append((outcome.name, "(run)", outcome.status, "-", "-", "-", "-"))
            continue
        for v in outcome.figures:
            rows.append((outcome.name, v.figure, v.status, _fmt(v.max_change, "+.3f"), _fmt(v.tolerance, ".3f"),
                         _fmt(v.noise, ".3f"), _fmt(v.at_frequency_ghz, ".3f")))
    widths = [max(len(str(r[i])) for r in rows + [header]) for i in range(len(header))]
    lines = ["  ".join(str(c).ljust(w) if i < 3 else str(c).rjust(w) for i, (c, w) in enumerate(zip(row, widths)))
             .rstrip() for row in [header] + rows]
    lines.insert(1, "  ".join("-" * w for w in widths))
    return "\n".join(lines)


def count_statuses(outcomes):
    """{status: number of figures} over all cases (a failed case counts once as "failed")."""
    counts = {status: 0 for status in STATUSES}
    for outcome in outcomes:
        if outcome.status == "failed" or not outcome.figures:
            counts[outcome.status] += 1
        else:
            for v in outcome.figures:
                counts[v.status] += 1
    return counts


def exit_status(outcomes):
    """1 when any case regressed or failed, else 0."""
    return 1 if any(o.status in ("regressed", "failed") for o in outcomes) else 0


def summary_document(outcomes, *, tier, started_utc, finished_utc, updated=()):
    """The hornproof.regress/1 JSON summary (a dict)."""
    return {
        "schema": SCHEMA,
        "tier": tier,
        "hornproof_version": outcomes[0].cache_inputs["hornproof_version"] if outcomes else hornproof_build(),
        "solver_version": solver_version(),
        "started_utc": started_utc,
        "finished_utc": finished_utc,
        "exit_status": exit_status(outcomes),
        "counts": count_statuses(outcomes),
        "baselines_updated": list(updated),
        "cases": [o.to_dict() for o in outcomes],
    }


def junit_cases(outcomes, tier):
    """JUnit testcases: per case one "run" testcase, then one per figure.

    failure: regressed figures and failed runs; skipped: new and not-comparable figures.
    """
    records = []
    for outcome in outcomes:
        classname = f"regress.{tier}.{outcome.name}"
        if outcome.status == "failed":
            records.append(TestCaseRecord(classname, "run", "failure", message=outcome.reason, kind="run-failed",
                                          detail=outcome.detail or outcome.reason, time_s=outcome.seconds,
                                          system_out=f"case file: {outcome.case_file}\nrun folder: {outcome.result_dir}"))
            continue
        records.append(TestCaseRecord(classname, "run", "passed", time_s=outcome.seconds,
                                      system_out=f"case file: {outcome.case_file}\nresult: {outcome.result_dir}\n"
                                                 f"source: {outcome.source}"))
        for v in outcome.figures:
            text = f"{v.status}: {v.reason}".rstrip(": ")
            if v.status == "regressed":
                records.append(TestCaseRecord(classname, v.figure, "failure", message=v.reason, kind="regressed",
                                              detail=f"{v.reason}\nreport: {outcome.report}"))
            elif v.status in ("new", "not-comparable"):
                records.append(TestCaseRecord(classname, v.figure, "skipped", message=f"{v.status}: {v.reason}"))
            else:
                records.append(TestCaseRecord(classname, v.figure, "passed", system_out=text))
    return records


# --- command line -----------------------------------------------------------------------------


def _positive_int(text):
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number, got {text!r}") from None
    if value < 1:
        raise argparse.ArgumentTypeError(f"must be at least 1, got {value}")
    return value


def add_regress_arguments(parser):
    """Add the ``regress`` options to an argparse (sub)parser."""
    parser.add_argument("cases", nargs="*", metavar="CASE",
                        help="case files or folders of them (default: every *.toml in cases/)")
    parser.add_argument("--tier", choices=TIERS, default="quick",
                        help="quick: coarse cells, 2D where valid (default); full: each case's own ladder")
    parser.add_argument("--update", action="store_true",
                        help="store this run's figures as the new baselines (after printing the comparison)")
    parser.add_argument("--baselines", metavar="DIR",
                        help="baseline folder (default: baselines/ beside each case file)")
    parser.add_argument("--results", metavar="DIR", default="results",
                        help="result cache folder (default: results)")
    parser.add_argument("--fresh", action="store_true", help="ignore cached results and run every case again")
    parser.add_argument("--cache-only", action="store_true",
                        help="run nothing: compare the cached results; a case without one counts as failed")
    parser.add_argument("--force", action="store_true", help="passed on to each run (run even if the estimate "
                                                             "exceeds free memory)")
    parser.add_argument("--ranks-per-case", type=_positive_int, metavar="N",
                        help="under mpirun: ranks per process group, i.e. per case run at a time "
                             "(default: chosen from the case sizes)")
    parser.add_argument("--junit", metavar="FILE",
                        help="JUnit XML output (default: <results>/regress-<tier>.junit.xml)")
    parser.add_argument("--json", action="store_true",
                        help="print the hornproof.regress/1 summary on stdout instead of the table")
    parser.add_argument("--summary", metavar="FILE",
                        help="JSON summary output, schema hornproof.regress/1 (default: <results>/regress.json)")
    return parser


def _now_utc():
    return datetime.now(timezone.utc).replace(microsecond=0).strftime("%Y-%m-%dT%H:%M:%SZ")


class _TerminateAsExit:
    """While active, SIGTERM raises SystemExit(143) so partial folders are cleaned up."""

    def __enter__(self):
        self.previous = None
        try:
            self.previous = signal.signal(signal.SIGTERM, self._handler)
        except ValueError:  # not the main thread
            self.previous = None
        return self

    @staticmethod
    def _handler(signum, frame):
        raise SystemExit(128 + signum)

    def __exit__(self, *exc):
        if self.previous is not None:
            signal.signal(signal.SIGTERM, self.previous)
        return False


def regress_command(args, *, runner=None, loader=None, world=None):
    """Run ``hornproof regress`` from parsed arguments; return the exit status.

    User errors are raised as hornproof.errors.HornproofError (the command line prints them as
    one line, exit 2/3). Other ranks than 0 return the same status as rank 0.
    """
    started = _now_utc()
    if world is None:
        with contextlib.redirect_stdout(sys.stderr):  # Meep's banner when MPI starts
            world = _mpi_world() or _SerialWorld()
    if getattr(args, "cache_only", False) and args.fresh:
        raise InputError("--fresh and --cache-only exclude each other: choose one")
    results_dir = Path(args.results)
    try:
        results_dir.mkdir(parents=True, exist_ok=True)
    except OSError as error:
        raise InputError(f"{results_dir}: --results: cannot use this as the results folder "
                         f"({error.strerror or error})") from None
    # Standard output is for the table (or the JSON summary); what the runs print (Meep's banner,
    # progress) goes to standard error.
    with _TerminateAsExit(), contextlib.redirect_stdout(sys.stderr):
        paths = find_case_files(args.cases)
        outcomes = run_regression(paths, tier=args.tier, results_dir=results_dir, baselines_dir=args.baselines,
                                  fresh=args.fresh, force=args.force, runner=runner, loader=loader, world=world,
                                  ranks_per_case=getattr(args, "ranks_per_case", None),
                                  cache_only=getattr(args, "cache_only", False))
    error, status = None, 0
    if world.rank == 0:
        try:
            status = _finish(args, outcomes, results_dir, started)
        except HornproofError as exc:
            error, status = exc, exc.exit_code
    status = world.bcast(status, root=0)
    if getattr(args, "json", False):
        _silence_meep_exit_banner()
    if error is not None:
        raise error
    return status


def _silence_meep_exit_banner():
    """Meep prints "Elapsed run time" on standard output at exit; keep ``--json`` output pure JSON."""
    module = sys.modules.get("meep")
    report = getattr(module, "report_elapsed_time", None) if module is not None else None
    if report is not None:
        import atexit

        atexit.unregister(report)


def _finish(args, outcomes, results_dir, started):
    tier = args.tier
    table = format_table(outcomes)
    lines = [table, ""]
    for outcome in outcomes:
        if outcome.status == "regressed":
            if outcome.report:
                lines.append(f"regressed: {outcome.name}: report {outcome.report}")
            else:
                lines.append(f"regressed: {outcome.name}: result folder {outcome.result_dir} (no report.html)")
        elif outcome.status == "failed":
            lines.append(f"failed: {outcome.name}: {outcome.reason} (run folder {outcome.result_dir})")
    counts = count_statuses(outcomes)
    lines.append(f"{len(outcomes)} case(s), tier {tier}: "
                 + ", ".join(f"{counts[s]} {s}" for s in reversed(STATUSES) if counts[s]))
    updated = []
    if args.update:
        for outcome in outcomes:
            if outcome.status == "failed" or outcome.result is None:
                continue
            path = Path(outcome.baseline_file)
            try:
                write_baseline(path, baseline_from_result(
                    outcome.result, case=outcome.name, tier=tier, settings=outcome.settings,
                    hornproof_version=outcome.cache_inputs["hornproof_version"]))
            except (ValueError, OSError) as error:
                raise InputError(f"{path}: cannot write baseline ({error})") from None
            updated.append(_display_path(path))
        lines.append(f"baselines written: {len(updated)}" + "".join(f"\n  {p}" for p in updated))
    if not getattr(args, "json", False):
        print("\n".join(lines), flush=True)

    summary_path = Path(args.summary) if args.summary else results_dir / "regress.json"
    junit_path = Path(args.junit) if args.junit else results_dir / f"regress-{tier}.junit.xml"
    document = summary_document(outcomes, tier=tier, started_utc=started, finished_utc=_now_utc(), updated=updated)
    try:
        for path in (summary_path, junit_path):
            path.parent.mkdir(parents=True, exist_ok=True)
        write_text_atomic(summary_path, json.dumps(document, indent=2, sort_keys=True) + "\n")
        write_junit(junit_path, f"hornproof regress ({tier})", junit_cases(outcomes, tier),
                    properties={"tier": tier, "hornproof_version": document["hornproof_version"],
                                "solver_version": document["solver_version"]})
    except OSError as error:
        raise InputError(f"{error.filename or summary_path}: cannot write ({error.strerror or error})") from None
    if getattr(args, "json", False):
        print(json.dumps(document, indent=2, sort_keys=True), flush=True)
    if args.update:
        return 1 if any(o.status == "failed" for o in outcomes) else 0
    return exit_status(outcomes)


def main(argv=None, *, runner=None, loader=None):
    """``python -m hornproof.compare.regress.runner``: the same as ``hornproof regress``."""
    parser = argparse.ArgumentParser(prog="hornproof regress", description=__doc__.splitlines()[0])
    parser.add_argument("--debug", action="store_true", help="show tracebacks for every error")
    add_regress_arguments(parser)
    args = parser.parse_args(argv)
    try:
        return regress_command(args, runner=runner, loader=loader)
    except HornproofError as error:
        if args.debug:
            raise
        message = str(error).splitlines()[0] if str(error) else type(error).__name__
        if os.environ.get("OMPI_COMM_WORLD_RANK", os.environ.get("PMI_RANK", "0")) == "0":
            print(f"hornproof regress: error: {message}", file=sys.stderr)  # once, not once per rank
        return error.exit_code


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
