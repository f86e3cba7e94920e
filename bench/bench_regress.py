"""Benchmark of ``hornproof regress``: the cache-hit path, and serial vs ``mpirun -np 2``.

Run from the repository root::

    .venv/bin/python bench/bench_regress.py            # both parts (the second needs verify)
    .venv/bin/python bench/bench_regress.py --skip-mpi  # cache-hit path only

1. Cache-hit path: every shipped case (cases/*.toml) copied to a scratch folder; the result cache
   filled once with *synthetic* summaries (the cache-hit path never calls the runner, so what it
   costs does not depend on where the cached results came from); then the whole suite is compared
   again, in process and as a fresh ``python -m hornproof.compare.cli.main regress`` (interpreter start
   included). Target: under 1 s.
2. Quick tier, real runs (``hornproof.compare.jobs.verify.verify_case``): wall time serial, under
   ``mpirun -np 2`` with the automatic plan, and with ``--ranks-per-case 1`` (two process groups,
   one case each at a time), each with ``--fresh``. Skipped, and said so, when verify
   is not available.

Prints measured numbers only; nothing here is a pass/fail test.
"""

import argparse
import json
import math
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

from hornproof.compare.cli import main as cli  # noqa: E402
from hornproof.compare.regress import case_runs  # noqa: E402

REGRESS = [sys.executable, "-m", "hornproof.compare.cli.main", "regress"]


def synthetic_runner(case, out_dir, *, force=False, progress=None):
    """A stand-in summary of the right shape (used only to fill the cache)."""
    frequencies = [float(f) / 1e9 for f in case.frequencies]
    key = "directivity_2d_db" if case.fdtd.dims == 2 else "directivity_dbi"
    n = len(frequencies)
    area = case.horn.aperture_a * case.horn.aperture_b
    directivity = [10 * math.log10(4 * math.pi * area / (0.299792458 / f) ** 2) for f in frequencies]
    result = {"schema": "hornproof.result/1", "case": case.name, "case_sha256": case.sha256,
              "frequencies_ghz": frequencies,
              "models": {"fdtd": {key: directivity, "hpbw_h_deg": [20.0] * n, "hpbw_e_deg": [25.0] * n,
                                  "sll_h_db": [-20.0] * n, "sll_e_db": [-12.0] * n, "s11_db": [-25.0] * n,
                                  "uncertainty": {key: [0.1] * n}}},
              "solver": {"meep": "synthetic", "cells_per_wavelength": list(case.fdtd.cells_per_wavelength)}}
    (Path(out_dir) / "result.json").write_text(json.dumps(result))
    return result


def _quiet_main(argv, runner=None):
    """``hornproof regress ARGV`` in this process, silenced; cases that must run use ``runner``
    (None: the default, which a run served entirely from the cache never calls)."""
    saved = sys.stdout, sys.stderr
    saved_runner = case_runs.default_runner
    sys.stdout = sys.stderr = open(os.devnull, "w")
    if runner is not None:
        case_runs.default_runner = lambda: runner
    try:
        return cli.main(["regress", *argv])
    finally:
        case_runs.default_runner = saved_runner
        sys.stdout.close()
        sys.stdout, sys.stderr = saved


def bench_cache_hit(scratch, repeats):
    cases = scratch / "cases"
    cases.mkdir()
    for path in sorted((REPO / "cases").glob("*.toml")):
        shutil.copy(path, cases / path.name)
    count = len(list(cases.glob("*.toml")))
    os.chdir(scratch)
    code = _quiet_main(["--update"], runner=synthetic_runner)
    if code != 0:
        print(f"cache fill failed (exit {code}); see: cd {scratch} && python -m hornproof.compare.cli.main regress")
        return
    in_process = []
    for _ in range(repeats):
        started = time.perf_counter()
        code = _quiet_main([], runner=None)  # no runner needed: everything is cached
        in_process.append(time.perf_counter() - started)
        assert code == 0, f"cache-hit run exited {code}"
    fresh_process = []
    env = dict(os.environ, PYTHONPATH=str(REPO))
    for _ in range(repeats):
        started = time.perf_counter()
        done = subprocess.run(REGRESS, cwd=scratch, env=env,
                              capture_output=True, text=True)
        fresh_process.append(time.perf_counter() - started)
        if done.returncode != 0:
            print(done.stderr)
            break
    print(f"cache-hit path, {count} cases (every shipped case), {repeats} repeats:")
    print(f"  in process:          median {statistics.median(in_process):.3f} s  (min {min(in_process):.3f})")
    print(f"  new python process:  median {statistics.median(fresh_process):.3f} s  (min {min(fresh_process):.3f})"
          f"   target < 1 s: {'met' if statistics.median(fresh_process) < 1.0 else 'NOT met'}")


def bench_mpi(scratch, cases, timeout):
    try:
        from hornproof.compare.jobs.verify import verify_case  # noqa: F401
    except ImportError as error:
        print(f"serial vs mpirun -np 2: skipped, hornproof.compare.jobs.verify not available ({error})")
        return
    if shutil.which("mpirun") is None:
        print("serial vs mpirun -np 2: skipped, no mpirun")
        return
    env = dict(os.environ, PYTHONPATH=str(REPO))
    base = REGRESS + ["--tier", "quick", "--fresh",
            "--baselines", str(scratch / "baselines")] + [str(c) for c in cases]
    times = {}
    mpirun = ["mpirun", "--allow-run-as-root", "--oversubscribe", "-np", "2"]
    for number, (label, prefix, extra) in enumerate((("serial", [], []),
                                                     ("mpirun -np 2", mpirun, []),
                                                     ("mpirun -np 2 --ranks-per-case 1", mpirun,
                                                      ["--ranks-per-case", "1"]))):
        started = time.perf_counter()
        done = subprocess.run(prefix + base + extra + ["--results", str(scratch / f"results-{number}")],
                              cwd=scratch, env=env, capture_output=True, text=True, timeout=timeout)
        times[label] = time.perf_counter() - started
        print(f"  {label:32s} {times[label]:8.1f} s  exit {done.returncode}")
        if done.returncode not in (0, 1):
            print("   " + (done.stderr.strip().splitlines() or ["(no error text)"])[-1])
    for label in list(times)[1:]:
        print(f"  speed-up serial / {label}: {times['serial'] / times[label]:.2f}")
    print(f"  (load average at the end: {', '.join(f'{x:.1f}' for x in os.getloadavg())}; "
          "other work on the machine slows MPI runs most)")


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=5)
    parser.add_argument("--skip-mpi", action="store_true", help="only the cache-hit path")
    parser.add_argument("--cases", nargs="*", help="cases for the real quick-tier timing (default: all shipped)")
    parser.add_argument("--timeout", type=float, default=3600.0, help="per real run, seconds")
    args = parser.parse_args()
    scratch = Path(tempfile.mkdtemp(prefix="hornproof-bench-regress-"))
    try:
        (scratch / "hit").mkdir()
        bench_cache_hit(scratch / "hit", args.repeats)
        if not args.skip_mpi:
            cases = [Path(c).resolve() for c in args.cases] if args.cases else sorted((REPO / "cases").glob("*.toml"))
            print(f"quick tier, real runs, {len(cases)} cases:")
            (scratch / "mpi").mkdir()
            bench_mpi(scratch / "mpi", cases, args.timeout)
    finally:
        os.chdir(REPO)
        shutil.rmtree(scratch, ignore_errors=True)


if __name__ == "__main__":
    main()
