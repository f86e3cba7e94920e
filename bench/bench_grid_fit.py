"""Grid-fitted ladders: what fitting achieves, and what adaptive refinement costs.

Run from the repository root::

    .venv/bin/python bench/bench_grid_fit.py            # residual table (instant)
    .venv/bin/python bench/bench_grid_fit.py --adaptive  # + adaptive verify of cases/pyramidal.toml

1. For every shipped case, the default ladder (six cells across the narrowest opening, ratio
   1.3) and the case's own ladder, each rung fitted: nominal and fitted cells per wavelength and
   the worst size residual; beside it, the worst residual of plain rounding at the nominal grid
   (what the ladders modelled before fitting).
2. ``--adaptive``: ``verify cases/pyramidal.toml --target-uncertainty 0.15`` (directivity and the
   other checked dB figures to ±0.15 dB, or decided) with ``--budget 300``, in a temporary
   folder; prints the wall time (target: 5 minutes on two cores), the ladder it chose, the
   directivity uncertainty reached and why it stopped. Timings are of this
   machine, in this run; machines are shared and noisy, so read them as ratios to the target.
"""

import argparse
import json
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

from hornproof.compare.case.casefile import load_case  # noqa: E402
from hornproof.compare.jobs.grid_plan import case_plane, fitted_ladder  # noqa: E402
from hornproof.sim.grid_fit import default_ladder, whole_cells  # noqa: E402
from hornproof.units import SPEED_OF_LIGHT  # noqa: E402


def plain_rounding_residual(fit, f_max):
    cell = SPEED_OF_LIGHT / f_max / fit.nominal_cells_per_wavelength
    return max(abs(whole_cells(s.nominal_m, cell, "length" if s.name == "flare_length" else "width") * cell
                   / s.nominal_m - 1) for s in fit.sizes)


def residual_table():
    print("case                 dims  ladder   nominal -> fitted (worst residual; plain rounding)")
    for path in sorted((REPO / "cases").glob("*.toml")):
        case = load_case(path)
        f_max = float(np.max(case.frequencies))
        default = default_ladder(case.horn, f_max, case.fdtd.dims, plane=case_plane(case))
        for label, nominal in (("case", case.fdtd.cells_per_wavelength), ("default", default)):
            fits = fitted_ladder(case, nominal)
            rungs = ", ".join(f"{f.nominal_cells_per_wavelength:.1f} -> {f.cells_per_wavelength:.2f} "
                              f"({100 * f.worst_relative_residual:.2f} %; {100 * plain_rounding_residual(f, f_max):.1f} %)"
                              for f in fits)
            print(f"{case.name:<20} {case.fdtd.dims}D   {label:<8} {rungs}")


def adaptive_run(target_db, budget_seconds):
    with tempfile.TemporaryDirectory() as scratch:
        out = Path(scratch) / "pyramidal"
        command = [sys.executable, "-m", "hornproof.compare.cli.main", "verify", str(REPO / "cases" / "pyramidal.toml"),
                   "--target-uncertainty", str(target_db), "--budget", str(budget_seconds), "--out", str(out), "--json"]
        started = time.perf_counter()
        done = subprocess.run(command, capture_output=True, text=True, cwd=scratch)
        seconds = time.perf_counter() - started
        if not (out / "result.json").is_file():
            print(f"adaptive verify failed (exit {done.returncode}): {done.stderr.strip().splitlines()[-1:]}")
            return
        result = json.loads((out / "result.json").read_text())
        solver = result["solver"]
        u = result["models"]["fdtd"]["uncertainty"].get("directivity_dbi")
        print(f"adaptive verify of cases/pyramidal.toml to ±{target_db:g} dB: {seconds:.0f} s wall "
              f"(target 300 s: ratio {seconds / 300:.2f}); exit {done.returncode}")
        print(f"  ladder chosen: {', '.join(f'{c:.2f}' for c in solver['cells_per_wavelength'])} cells per wavelength")
        print(f"  directivity uncertainty: {', '.join('n/a' if v is None else f'{v:.3f}' for v in u)} dB")
        print(f"  stopped: {solver.get('refinement', {}).get('stopped')}")
        print(f"  overall verdict: {result['comparison']['overall']}")


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--adaptive", action="store_true", help="also run the adaptive verify (minutes)")
    parser.add_argument("--target-uncertainty", type=float, default=0.15, metavar="DB")
    parser.add_argument("--budget", type=float, default=300.0, metavar="SECONDS",
                        help="verify's --budget (default 300 s, the target)")
    args = parser.parse_args()
    residual_table()
    if args.adaptive:
        adaptive_run(args.target_uncertainty, args.budget)


if __name__ == "__main__":
    main()
