"""``hornproof regress``: the nightly suite, every case run and compared with its stored baseline.

Prints a table (one row per case and figure) on standard output, writes the JSON summary
(schema ``hornproof.regress/1``, default ``<results>/regress.json``) and a JUnit XML file
(default ``<results>/regress-<tier>.junit.xml``); under ``mpirun`` only rank 0 prints and
writes. The suite itself is :mod:`hornproof.compare.regress.suite`.

Exit status: 0 no regression · 1 a figure regressed or a run failed · 2 bad input.
"""

import argparse
import errno
import os
from datetime import datetime, timezone
from pathlib import Path

from ...errors import InputError, RunError
from ...version import build_version
from ..output import regress_json
from ..output.baseline_file import write_baseline
from ..output.folders import check_replaceable_file, path_text, under_result_root
from ..output.junit import suite_name, write_junit
from ..regress.baseline import baseline_from_result
from ..regress.case_runs import NO_SPACE
from ..regress.classify import STATUSES
from ..regress.junit_cases import junit_cases
from ..regress.outcome import count_statuses, exit_status, suite_summary
from ..regress.suite import TIERS, display_path, find_case_files, run_suite

__all__ = ["setup_arguments", "run", "format_table"]

#: the JUnit suite name; a file whose suite name starts with it is this command's own report
JUNIT_SUITE = "hornproof regress"


def _positive_int(text):
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number, got {text!r}") from None
    if value < 1:
        raise argparse.ArgumentTypeError(f"must be at least 1, got {value}")
    return value


def setup_arguments(parser):
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


def _is_own_junit(path):
    return (suite_name(path) or "").startswith(JUNIT_SUITE)


def _output_files(args):
    """Check the results folder and the summary and JUnit targets before anything runs.

    Returns (results folder, summary path, JUnit path); InputError naming the option otherwise.
    """
    if args.cache_only and args.fresh:
        raise InputError("--fresh and --cache-only exclude each other: choose one")
    if args.results == "":
        raise InputError("--results: the path is empty; name a folder or leave the option out")
    results_dir = Path(args.results)

    summary_wanted = results_dir / "regress.json" if args.summary is None else Path(args.summary)
    junit_wanted = results_dir / f"regress-{args.tier}.junit.xml" if args.junit is None else Path(args.junit)

    def summary_target():
        return check_replaceable_file(summary_wanted, "--summary", regress_json.is_regress_summary,
                                      "a hornproof regress.json summary",
                                      create_parents=under_result_root(summary_wanted, results_dir))

    def junit_target():
        return check_replaceable_file(junit_wanted, "--junit", _is_own_junit, "a hornproof regress JUnit report",
                                      create_parents=under_result_root(junit_wanted, results_dir))

    # files named outside the result root are checked before the root is made, so such a
    # refusal leaves nothing behind; those inside it may have their folders made
    summary_path = summary_target() if not under_result_root(summary_wanted, results_dir) else None
    junit_path = junit_target() if not under_result_root(junit_wanted, results_dir) else None
    try:
        if results_dir.exists() and not results_dir.is_dir():
            raise InputError(f"{path_text(args.results)}: --results: exists and is not a folder")
        # the result root itself may be made; a missing parent of a named one is a typing slip
        results_dir.mkdir(parents=args.results == "results", exist_ok=True)
    except OSError as error:
        raise InputError(f"{path_text(args.results)}: --results: cannot use this as the results folder "
                         f"({error.strerror or error})") from None
    summary_path = summary_path or summary_target()
    junit_path = junit_path or junit_target()
    if summary_path.resolve() == junit_path.resolve():
        raise InputError(f"{path_text(args.junit)}: --junit: the same file as --summary; name two files")
    return results_dir, summary_path, junit_path


def run(args):
    """Run ``hornproof regress`` from parsed arguments; return the exit status.

    User errors are raised as hornproof.errors.HornproofError (the command line prints them as
    one line, exit 2/3). Other ranks than 0 return the same status as rank 0.
    """
    started = _now_utc()
    results_dir, summary_path, junit_path = _output_files(args)
    paths = find_case_files(args.cases)

    def finish(outcomes):
        return _finish(args, outcomes, started, summary_path, junit_path)

    return run_suite(paths, finish, tier=args.tier, results_dir=results_dir, baselines_dir=args.baselines,
                     fresh=args.fresh, force=args.force, ranks_per_case=args.ranks_per_case,
                     cache_only=args.cache_only)


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
        for verdict in outcome.figures:
            rows.append((outcome.name, verdict.figure, verdict.status, _fmt(verdict.max_change, "+.3f"),
                         _fmt(verdict.tolerance, ".3f"), _fmt(verdict.noise, ".3f"),
                         _fmt(verdict.at_frequency_ghz, ".3f")))
    widths = [max(len(str(r[i])) for r in rows + [header]) for i in range(len(header))]
    lines = ["  ".join(str(c).ljust(w) if i < 3 else str(c).rjust(w) for i, (c, w) in enumerate(zip(row, widths)))
             .rstrip() for row in [header] + rows]
    lines.insert(1, "  ".join("-" * w for w in widths))
    return "\n".join(lines)


def _report_lines(outcomes, tier):
    """The table, where to look for each regressed or failed case, and the counts."""
    lines = [format_table(outcomes), ""]
    for outcome in outcomes:
        if outcome.status == "regressed":
            if outcome.report:
                lines.append(f"regressed: {outcome.name}: report {outcome.report}")
            else:
                lines.append(f"regressed: {outcome.name}: result folder {outcome.result_dir} (no report.html)")
        elif outcome.status == "failed":
            lines.append(f"failed: {outcome.name}: {outcome.reason} (run folder {outcome.result_dir})")
        elif outcome.status == "not-comparable":
            reason = next((v.reason for v in outcome.figures if v.status == "not-comparable"), "")
            lines.append(f"not-comparable: {outcome.name}: {reason.split('; ')[0]}; review the change, then run "
                         f"'hornproof regress --update {outcome.case_file}'")
    counts = count_statuses(outcomes)
    lines.append(f"{len(outcomes)} case(s), tier {tier}: "
                 + ", ".join(f"{counts[s]} {s}" for s in reversed(STATUSES) if counts[s]))
    return lines


def _update_baselines(outcomes, tier):
    """Store every finished run's figures as its new baseline; return the files written."""
    updated = []
    for outcome in outcomes:
        if outcome.status == "failed" or outcome.result is None:
            continue
        path = Path(outcome.baseline_file)
        try:
            write_baseline(path, baseline_from_result(
                outcome.result, case=outcome.name, tier=tier, settings=outcome.settings,
                hornproof_version=build_version(), computation_sha256=outcome.computation_sha256))
        except (ValueError, OSError) as error:
            raise InputError(f"{path}: cannot write baseline ({error})") from None
        updated.append(display_path(path))
    return updated


def error_for_user(error, fallback):
    """The user-facing error for an ``OSError`` met writing the outputs: a full disk is a
    resource failure (exit 3), anything else an output path that cannot be used (exit 2)."""
    where = path_text(os.fsdecode(error.filename) if error.filename else fallback)
    if error.errno in (errno.ENOSPC, errno.EDQUOT):
        return RunError(f"{where}: no space left on the device; finished runs stay "
                        "cached: free space and run regress again")
    return InputError(f"{where}: cannot write ({error.strerror or error})")


def _finish(args, outcomes, started, summary_path, junit_path):
    """On rank 0: print the table, update baselines if asked, write the summary and JUnit files."""
    tier = args.tier
    lines = _report_lines(outcomes, tier)
    updated = []
    if args.update:
        updated = _update_baselines(outcomes, tier)
        lines.append(f"baselines written: {len(updated)}" + "".join(f"\n  {p}" for p in updated))
    if not args.json:
        print("\n".join(lines), flush=True)
    document = suite_summary(outcomes, tier=tier, started_utc=started, finished_utc=_now_utc(), updated=updated)
    try:
        regress_json.write_summary(summary_path, document)
        write_junit(junit_path, f"{JUNIT_SUITE} ({tier})", junit_cases(outcomes, tier),
                    properties={"tier": tier, "hornproof_version": document["hornproof_version"],
                                "solver_version": document["solver_version"]})
    except OSError as error:
        raise error_for_user(error, summary_path) from None
    if args.json:
        print(regress_json.dumps(document), flush=True)
    if any(o.status == "failed" and NO_SPACE in (o.reason or "") for o in outcomes):
        return 3  # README: 3 the run failed (out of resources)
    if args.update:
        return 1 if any(o.status == "failed" for o in outcomes) else 0
    return exit_status(outcomes)
