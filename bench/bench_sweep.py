"""Benchmark of the point pool behind ``sweep`` and ``map``: seconds per 3D point and rung,
serial against ``mpirun -np 2`` process groups, and the share of cells in PML and padding.

Run from the repository root::

    .venv/bin/python bench/bench_sweep.py --small   # a few minutes on two cores
    .venv/bin/python bench/bench_sweep.py           # coarsest default rung; also times the map case
    .venv/bin/python bench/bench_sweep.py --only pml

Parts (each prints measured numbers and the ratio to its target; nothing here is a test):

1. ``pool`` — N small 3D points of an invented WR-90 H-plane sectoral family (flare length
   40 mm, flare half-angles 10…40°) run through :func:`hornproof.compare.jobs.point_pool.run_points`
   once serially and once under ``mpirun -np 2`` (two process groups of one rank each: the
   pool's plan), each in a fresh scratch cache. Prints seconds per point and rung (serial run)
   and the wall-time ratio serial / parallel. Target ≥ 1.5× on two cores.
2. ``pml`` — the largest point of a sweep (default: the shipped flare sweep's family run in 3D,
   ``cases/sweep-h-flare.toml`` at its widest flare; ``--small``: the map case's widest, longest
   point): the share of the cell's volume in PML and in padding (non-PML cells outside the
   horn's own bounding box, feed included) with the default settings and with alternatives,
   and the directivity of each on the same fitted rung against a reference with thicker PML
   and more padding. Targets: PML + padding ≤ 35 % of the cells; directivity within 0.02 dB
   of the reference.
3. ``sweep3d`` (only when asked: ``--only sweep3d``; ten minutes of CPU or more) — the shipped 3D
   flare sweep ``cases/sweep-h-flare-3d.toml`` run by ``hornproof sweep`` in a scratch folder:
   seconds per point and rung, the whole sweep's wall and CPU time, and the ratio to the target
   of 20 minutes on two cores.
4. ``map`` (not with ``--small``) — the shipped map case ``cases/map-h-flare.toml`` run by
   ``hornproof map`` in a scratch folder: its printed estimate, then seconds per point and rung
   and the whole map.

The machine is shared (other work on the same two cores makes every time longer and the ratio
noisier): the load average is printed before and after each part.
"""

import argparse
import json
import math
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

import numpy as np  # noqa: E402

from hornproof.analytic.geometry import HornGeometry  # noqa: E402
from hornproof.sim.grid_fit import default_ladder, fit_grid  # noqa: E402
from hornproof.sim.layout import plan_layout  # noqa: E402
from hornproof.sim.mpi import launch_environment, mpirun_command  # noqa: E402
from hornproof.sim.settings import FdtdSettings  # noqa: E402

WR90_A, WR90_B = 22.86e-3, 10.16e-3
FREQUENCY = 10e9
TARGET_SPEEDUP = 1.5
TARGET_SHARE = 0.35
TARGET_DIRECTIVITY_DB = 0.02
TARGET_SWEEP_SECONDS = 20 * 60


def load():
    return "load average %.2f %.2f %.2f" % os.getloadavg()


def h_sectoral(angle_deg, length_m):
    aperture = WR90_A + 2 * length_m * math.tan(math.radians(angle_deg))
    return HornGeometry("h-sectoral", WR90_A, WR90_B, aperture, WR90_B, length_m, 1e-3)


# --- part 1: the pool, serial and under mpirun -np 2 ---------------------------------------------
def pool_worker(spec_text):
    """Run the pool on the points of ``spec`` and write what happened (rank 0) as JSON."""
    from hornproof.compare.jobs.point_pool import PointTask, run_points
    from hornproof.sim import mpi

    spec = json.loads(spec_text)
    tasks = [PointTask(h_sectoral(angle, spec["length"]), f"{angle} deg", cost=angle) for angle in spec["angles"]]
    started = time.monotonic()
    outcomes = run_points(tasks, frequencies=[FREQUENCY], settings=FdtdSettings(dims=3, pattern_step_deg=2.0),
                          ladder=spec["ladder"], points_dir=spec["points"], log=lambda m: None)
    wall = time.monotonic() - started
    if mpi.rank() == 0:
        Path(spec["report"]).write_text(json.dumps({
            "wall": wall, "status": [o.status for o in outcomes],
            "seconds": [o.figures.get("seconds") if o.figures else None for o in outcomes],
            "cells_per_wavelength": [o.figures.get("cells_per_wavelength") if o.figures else None for o in outcomes],
            "directivity": [o.figures.get("directivity") if o.figures else None for o in outcomes]}))


def run_pool(spec, processes):
    argv = [sys.executable, str(Path(__file__).resolve()), "--pool-worker", json.dumps(spec)]
    command = argv if processes == 1 else mpirun_command(processes, argv)
    env = dict(launch_environment(), OMPI_ALLOW_RUN_AS_ROOT="1", OMPI_ALLOW_RUN_AS_ROOT_CONFIRM="1")
    started = time.monotonic()
    done = subprocess.run(command, capture_output=True, text=True, cwd=REPO, env=env)
    outer = time.monotonic() - started
    if done.returncode != 0:
        raise SystemExit(f"pool run with {processes} process(es) failed:\n{done.stderr[-3000:]}")
    report = json.loads(Path(spec["report"]).read_text())
    report["outer"] = outer
    return report


def part_pool(args, scratch):
    angles = [10, 20, 30, 40]
    ladder = [12.0] if args.small else [float(default_ladder(h_sectoral(10, 0.04), FREQUENCY, 3)[0])]
    print(f"\n[pool] {len(angles)} 3D points (WR-90 H-plane sectoral, L = 40 mm, {angles} deg), "
          f"nominal rung {ladder[0]:g} cells per wavelength; {load()}")
    from hornproof.compare.regress.plan import plan_process_groups

    plan = plan_process_groups([float(a) for a in angles], 2)
    print(f"  the pool's plan on 2 ranks: {len(plan)} process group(s), points {plan}")
    reports = {}
    for processes in (1, 2):
        spec = {"angles": angles, "length": 0.04, "ladder": ladder,
                "points": str(scratch / f"points-np{processes}"), "report": str(scratch / f"pool-np{processes}.json")}
        reports[processes] = run_pool(spec, processes)
        print(f"  {processes} process(es): pool wall {reports[processes]['wall']:.1f} s "
              f"(whole command {reports[processes]['outer']:.1f} s); {load()}")
    serial = reports[1]
    for angle, seconds, cells in zip(angles, serial["seconds"], serial["cells_per_wavelength"]):
        rungs = ", ".join(f"{c:.1f} cells/wl: {s:.1f} s" for c, s in zip(cells, seconds))
        print(f"  serial, {angle:2d} deg: {rungs}")
    same = all(np.allclose(a, b, atol=1e-9) for a, b in zip(serial["directivity"], reports[2]["directivity"]))
    ratio = serial["wall"] / reports[2]["wall"]
    print(f"  serial / mpirun -np 2 (pool wall time): {ratio:.2f}x (target >= {TARGET_SPEEDUP}x: "
          f"{'met' if ratio >= TARGET_SPEEDUP else 'MISSED'}); same directivities in both runs: {same}")


# --- part 2: PML and padding ----------------------------------------------------------------------
def shares(layout):
    """(PML share, padding share) of the cell's volume (mirror symmetry scales both alike)."""
    size = list(layout.cell_size)
    z_low = layout.cell_center_z - size[-1] / 2
    total = math.prod(size)
    inner = math.prod(s - 2 * layout.pml for s in size[:-1]) * (size[-1] - layout.pml - layout.pml_back)
    horn_box = math.prod(2 * (h - layout.padding) for h in layout.box_half) * (
        layout.flare_length - (z_low + layout.pml_back))
    return 1 - inner / total, (inner - horn_box) / total


def directivity_at(horn, settings, cells):
    from hornproof.sim import run as fdtd_run

    started = time.monotonic()
    result = fdtd_run.simulate(horn, np.array([FREQUENCY]), settings, cells)
    return float(result.directivity_dbi[0]), time.monotonic() - started


def part_pml(args):
    if args.small:
        horn, what = h_sectoral(45, 0.06), "map case's widest, longest point (45 deg, 60 mm)"
    else:
        horn, what = h_sectoral(55, 0.06), "shipped flare sweep's widest member in 3D (55 deg, 60 mm)"
    cells = fit_grid(horn, FREQUENCY, 3, default_ladder(horn, FREQUENCY, 3)[0]).cells_per_wavelength
    variants = [("default", 0.5, 0.3), ("lean", 0.35, 0.15), ("thin PML", 0.25, 0.3),
                ("thin PML, lean pad", 0.25, 0.1), ("reference (thick)", 1.0, 0.6)]
    print(f"\n[pml] {what}, A = {horn.aperture_a * 1e3:.1f} mm; fitted rung {cells:.2f} cells per wavelength; "
          f"{load()}")
    measured = {}
    for name, pml, padding in variants:
        settings = FdtdSettings(dims=3, pml_wavelengths=pml, padding_wavelengths=padding, pattern_step_deg=2.0)
        layout = plan_layout(horn, np.array([FREQUENCY]), settings, cells)
        pml_share, padding_share = shares(layout)
        box = math.prod(2 * h for h in layout.box_half) * (layout.box_z[1] - layout.box_z[0])
        outside_box = 1 - box / math.prod(layout.cell_size)
        directivity, seconds = directivity_at(horn, settings, cells)
        measured[name] = directivity
        print(f"  {name:18s} pml {pml:.2f} wl, padding {padding:.2f} wl: PML {100 * pml_share:.1f} % + padding "
              f"{100 * padding_share:.1f} % = {100 * (pml_share + padding_share):.1f} % of the cells "
              f"(target <= {100 * TARGET_SHARE:.0f} %; outside the near-to-far box {100 * outside_box:.1f} %); "
              f"D = {directivity:.3f} dBi in {seconds:.0f} s")
    reference = measured["reference (thick)"]
    for name, _, _ in variants[:-1]:
        change = measured[name] - reference
        print(f"  {name:18s} D - reference = {change:+.3f} dB (target within {TARGET_DIRECTIVITY_DB} dB: "
              f"{'met' if abs(change) <= TARGET_DIRECTIVITY_DB else 'MISSED'})")
    print(f"  {load()}")


# --- part 3: the shipped map case --------------------------------------------------------------
def part_map(args, scratch):
    out = scratch / "map"
    print(f"\n[map] hornproof map cases/map-h-flare.toml (scratch folder); {load()}")
    started = time.monotonic()
    env = dict(os.environ, MPLBACKEND="Agg")
    done = subprocess.run([sys.executable, "-m", "hornproof.compare.cli.main", "map", "cases/map-h-flare.toml",
                           "--out", str(out), "--json"], capture_output=True, text=True, cwd=REPO, env=env)
    wall = time.monotonic() - started
    for line in done.stderr.splitlines():
        if "estimate" in line or "whole map" in line or "rungs" in line:
            print("  " + line)
    if done.returncode != 0:
        print(f"  map failed (exit {done.returncode}): {done.stderr.strip().splitlines()[-1]}")
        return
    document = json.loads(done.stdout)
    for point in document["points"]:
        files = [json.loads(p.read_text()) for p in (out / "points").glob("*.json")]
        match = [f for f in files if f["about"] == {document["x"]["name"]: point["x"], document["y"]["name"]: point["y"]}]
        rungs = ""
        if match:
            figures = match[0]["figures"]
            rungs = ", ".join(f"{c:.1f}: {s:.1f} s" for c, s in zip(figures["cells_per_wavelength"], figures["seconds"]))
        print(f"  point ({point['x']:g}, {point['y']:g}): {point.get('seconds') or 0:.0f} s run "
              f"(estimate {point['estimated_seconds']:.0f} s); per rung {rungs}")
    print(f"  whole map: {wall:.0f} s wall (command); {load()}")


def part_sweep3d(args, scratch):
    out = scratch / "sweep3d"
    print(f"\n[sweep3d] hornproof sweep cases/sweep-h-flare-3d.toml (scratch folder); {load()}")
    before = os.times()
    started = time.monotonic()
    env = dict(os.environ, MPLBACKEND="Agg")
    done = subprocess.run([sys.executable, "-m", "hornproof.compare.cli.main", "sweep", "cases/sweep-h-flare-3d.toml",
                           "--out", str(out), "--json"], capture_output=True, text=True, cwd=REPO, env=env)
    wall = time.monotonic() - started
    after = os.times()
    cpu = (after.children_user + after.children_system) - (before.children_user + before.children_system)
    if done.returncode != 0:
        print(f"  sweep failed (exit {done.returncode}): {done.stderr.strip().splitlines()[-1]}")
        return
    document = json.loads(done.stdout)
    for block in (document, document.get("principal_plane") or {}):
        for point in block.get("points") or []:
            rungs = ", ".join(f"{c:.1f}: {t:.1f} s" for c, t in zip(point.get("cells_per_wavelength") or [],
                                                                     point.get("seconds") or []))
            print(f"  {block['dims']}D point {point['value']:g}: per rung {rungs}")
    print(f"  whole sweep: {wall:.0f} s wall, {cpu:.0f} s CPU; ratio to the {TARGET_SWEEP_SECONDS / 60:.0f}-minute "
          f"target {wall / TARGET_SWEEP_SECONDS:.2f} (wall, {'met' if wall <= TARGET_SWEEP_SECONDS else 'missed'}); {load()}")


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--small", action="store_true", help="coarse grid and the smaller largest point")
    parser.add_argument("--only", action="append", choices=("pool", "pml", "map", "sweep3d"), help="run only these parts")
    parser.add_argument("--pool-worker", help=argparse.SUPPRESS)
    args = parser.parse_args(argv)
    if args.pool_worker:
        pool_worker(args.pool_worker)
        return 0
    parts = args.only or (["pool", "pml"] if args.small else ["pool", "pml", "map"])
    print(f"bench_sweep: {'--small, ' if args.small else ''}parts {', '.join(parts)}; {os.cpu_count()} cores; {load()}")
    with tempfile.TemporaryDirectory(prefix="bench-sweep-") as folder:
        scratch = Path(folder)
        if "pool" in parts:
            part_pool(args, scratch)
        if "pml" in parts:
            part_pml(args)
        if "map" in parts:
            part_map(args, scratch)
        if "sweep3d" in parts:
            part_sweep3d(args, scratch)
    return 0


if __name__ == "__main__":
    sys.exit(main())
