"""Benchmark of the full-wave runs: prints measured ratios (a benchmark, not a test).

Parts (each runnable alone with ``--only NAME``; several with repeated ``--only``):

  stepping   share of wall time spent in Meep's time stepping for a small ``simulate``
  symmetry   speed-up from the two TE10 mirror planes on the same model   (target >= 4x)
  band       cost of 5 band frequencies against 1                         (target <= 1.15x)
  mpi        2 MPI ranks against 1 (mpirun)                                (target >= 1.3x)
  dims       2D against 3D model of the same H-plane sectoral horn         (target >= 50x)
  memory     peak resident memory next to hornproof.sim.estimate's figure

Every run is a fresh process (``--worker``), so peak memory (ru_maxrss) is per run and MPI
can start it. ``--small`` uses a coarser grid for a quick look. The horn is an invented
X-band H-plane sectoral horn on a WR-90 guide (a made-up test case, not a product).

``--farfield-method meep`` runs the old point-by-point get_farfield post-processing (for
before/after figures). Usage:
``.venv/bin/python bench/bench_sim.py [--small] [--only PART ...] [--farfield-method fast|meep]``
"""

import argparse
import json
import os
import resource
import shutil
import subprocess
import sys
import time

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
sys.path.insert(0, ROOT)

PARTS = ("stepping", "symmetry", "band", "mpi", "dims", "memory")
TARGETS = {"symmetry": (">=", 4.0), "band": ("<=", 1.15), "mpi": (">=", 1.3),
           "dims": (">=", 50.0)}

# invented bench horn: WR-90 feed (22.86 x 10.16 mm, EIA size), H-plane flare to 45 mm over
# 40 mm, 1 mm walls; band 9.5-10.5 GHz
HORN = dict(kind="h-sectoral", guide_a=22.86e-3, guide_b=10.16e-3, aperture_a=45e-3,
            aperture_b=10.16e-3, flare_length=40e-3, wall_thickness=1.0e-3)


# --- one run in this process ---------------------------------------------------------------------
def worker(spec):
    """Run one ``simulate`` (or a plain Meep run if the physics is missing); return figures."""
    import numpy as np

    started = time.perf_counter()
    from hornproof.analytic.geometry import HornGeometry
    from hornproof.sim.settings import FdtdSettings

    horn = HornGeometry(**HORN)
    extra = {"farfield_method": spec["farfield_method"]} if spec.get("farfield_method") else {}
    settings = FdtdSettings(dims=spec["dims"], use_symmetry=spec["symmetry"],
                            decay_by=spec.get("decay_by", 1e-3), pattern_step_deg=5.0, **extra)
    n = spec["frequencies"]
    span = spec.get("relative_span", 0.05)  # default band 9.5-10.5 GHz
    frequencies = (np.linspace(10e9 * (1 - span), 10e9 * (1 + span), n) if n > 1
                   else np.array([10e9]))
    try:
        from hornproof.sim.run import simulate
    except ImportError:
        simulate = None
    if simulate is None:
        return plain_meep_worker(spec, started)
    import meep as mp

    mp.verbosity(0)
    rss_before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024
    stepping_marks = []
    plain_run = mp.Simulation.run

    stepping_cpu = []

    def run_and_note_memory(self, *args, **kwargs):  # peak RSS when stepping ends, CPU time
        cpu = time.process_time()
        value = plain_run(self, *args, **kwargs)
        stepping_cpu.append(time.process_time() - cpu)
        stepping_marks.append(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024)
        return value

    mp.Simulation.run = run_and_note_memory
    t0 = time.perf_counter()
    result = simulate(horn, frequencies, settings, spec["cells_per_wavelength"], force=True)
    simulate_seconds = time.perf_counter() - t0
    run = result.run
    figures = {
        "what": "simulate",
        "process_seconds": time.perf_counter() - started,
        "simulate_seconds": simulate_seconds,
        "seconds_total": run.get("seconds_total"),
        "seconds_stepping": run.get("seconds_stepping"),
        "seconds_post_processing": run.get("seconds_post_processing"),
        "farfield_method": run.get("farfield_method"),
        "timesteps": run.get("timesteps"),
        "meep_time": run.get("meep_time"),
        "grid_cells": run.get("grid_cells"),
        "mpi_processes": run.get("mpi_processes"),
        "directivity_dbi": [float(x) for x in np.atleast_1d(result.directivity_dbi)],
        "peak_rss_bytes": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024,
        "rss_before_simulate_bytes": rss_before,
        "rss_after_stepping_bytes": stepping_marks[-1] if stepping_marks else None,
        "stepping_cpu_seconds": sum(stepping_cpu),
        "load_average": os.getloadavg()[0],
    }
    figures["estimate"] = memory_estimate(horn, frequencies, settings,
                                          spec["cells_per_wavelength"], run.get("timesteps", 0))
    return figures


def memory_estimate(horn, frequencies, settings, cells_per_wavelength, steps=0):
    """hornproof.sim.estimate's figures for the model ``simulate`` lays out."""
    from hornproof.sim import estimate
    from hornproof.sim.layout import plan_layout

    layout = plan_layout(horn, frequencies, settings, cells_per_wavelength)
    result = estimate.estimate_for_layout(layout, len(frequencies), settings.use_symmetry,
                                          steps=steps or 0)
    return {"cells": result.cells, "pml_cells": result.pml_cells,
            "memory_bytes": result.memory_bytes, "seconds": result.seconds,
            "model_bytes": result.memory_bytes - estimate.BASE_MEMORY_BYTES}


def plain_meep_worker(spec, started):
    """Fallback when ``hornproof.sim.run.simulate`` does not exist: an empty cell with PML."""
    import meep as mp

    mp.verbosity(0)
    size = 3.0 if spec["dims"] == 3 else 6.0
    cell = mp.Vector3(size, size, size if spec["dims"] == 3 else 0)
    symmetries = [mp.Mirror(mp.X, phase=+1), mp.Mirror(mp.Y, phase=-1)] if spec["symmetry"] else []
    sim = mp.Simulation(cell_size=cell, resolution=spec["cells_per_wavelength"],
                        boundary_layers=[mp.PML(0.5)], symmetries=symmetries,
                        sources=[mp.Source(mp.GaussianSource(1.0, fwidth=0.5), component=mp.Ey,
                                           center=mp.Vector3())])
    t0 = time.perf_counter()
    sim.run(until=20)
    stepping = time.perf_counter() - t0
    return {"what": "plain meep (simulate not present)", "seconds_stepping": stepping,
            "seconds_total": time.perf_counter() - started, "process_seconds":
            time.perf_counter() - started,
            "peak_rss_bytes": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024}


# --- driver -------------------------------------------------------------------------------------
def run_worker(spec, processes=1):
    from hornproof.sim import mpi

    command = [sys.executable, os.path.abspath(__file__), "--worker", json.dumps(spec)]
    if processes > 1:
        mpirun = shutil.which("mpirun")
        if mpirun is None:
            raise RuntimeError("mpirun not found (Debian openmpi-bin)")
        command = mpi.mpirun_command(processes, command, mpirun=mpirun)
    t0 = time.perf_counter()
    completed = subprocess.run(command, capture_output=True, text=True,
                               env=mpi.launch_environment(), cwd=ROOT)
    wall = time.perf_counter() - t0
    lines = [line for line in completed.stdout.splitlines() if line.startswith("BENCH ")]
    if completed.returncode != 0 or not lines:
        tail = (completed.stderr or completed.stdout).strip().splitlines()[-5:]
        raise RuntimeError(f"worker {spec} failed (exit {completed.returncode}): "
                           + " | ".join(tail))
    figures = json.loads(lines[-1][len("BENCH "):])
    figures["launch_wall_seconds"] = wall
    return figures


def cpu_ratio(slow, fast):
    """Ratio of stepping CPU seconds (steadier than wall time on a shared machine)."""
    if not slow.get("stepping_cpu_seconds") or not fast.get("stepping_cpu_seconds"):
        return float("nan")
    return slow["stepping_cpu_seconds"] / fast["stepping_cpu_seconds"]


def verdict(part, ratio):
    if part not in TARGETS:
        return ""
    sense, target = TARGETS[part]
    met = ratio >= target if sense == ">=" else ratio <= target
    return f"  (target {sense} {target:g}x: {'met' if met else 'NOT met'})"


def base_spec(args, **changes):
    spec = {"dims": 3, "symmetry": True, "frequencies": 1,
            "cells_per_wavelength": 10.0 if args.small else 16.0}
    if args.farfield_method:
        spec["farfield_method"] = args.farfield_method
    spec.update(changes)
    return spec


def part_stepping(args):
    r = run_worker(base_spec(args))
    share = r["seconds_stepping"] / r["seconds_total"]
    share_process = r["seconds_stepping"] / r["process_seconds"]
    print(f"[stepping] {r['what']}: stepping {r['seconds_stepping']:.2f} s of simulate "
          f"{r['seconds_total']:.2f} s = {100 * share:.0f} %; of the whole process "
          f"{r['process_seconds']:.2f} s (imports included) = {100 * share_process:.0f} %; "
          f"{r.get('timesteps')} steps, {r.get('grid_cells', 0):.3g} cells before symmetry")
    estimate = r.get("estimate")
    if estimate:
        print(f"[stepping] estimated stepping time for those {r['timesteps']} steps: "
              f"{estimate['seconds']:.2f} s; measured {r['seconds_stepping']:.2f} s wall, "
              f"{r['stepping_cpu_seconds']:.2f} s CPU (load average {r['load_average']:.1f}; "
              f"rate from ~/.cache/hornproof/stepping_rate.json or the build machine's default)")
    return {"stepping_share": share, "stepping_share_process": share_process}


def part_symmetry(args):
    with_symmetry = run_worker(base_spec(args, symmetry=True))
    without = run_worker(base_spec(args, symmetry=False))
    ratio = without["seconds_stepping"] / with_symmetry["seconds_stepping"]
    ratio_total = without["seconds_total"] / with_symmetry["seconds_total"]
    same = ""
    if "directivity_dbi" in with_symmetry:
        diff = abs(with_symmetry["directivity_dbi"][0] - without["directivity_dbi"][0])
        same = f"; directivity differs by {diff:.4f} dB"
    ratio_cpu = cpu_ratio(without, with_symmetry)
    print(f"[symmetry] stepping {without['seconds_stepping']:.2f} s without, "
          f"{with_symmetry['seconds_stepping']:.2f} s with mirrors: {ratio:.2f}x "
          f"({ratio_cpu:.2f}x in CPU time; simulate total {ratio_total:.2f}x){same}"
          + verdict("symmetry", ratio))
    return {"symmetry_speedup": ratio, "symmetry_speedup_cpu": ratio_cpu,
            "symmetry_speedup_total": ratio_total}


def part_band(args):
    """5 frequencies vs 1. The cell is laid out from the band (grid at f_max, PML at f_min),
    so a 9.5-10.5 GHz band also makes a bigger, finer model; 5 frequencies within ±0.1 % of
    10 GHz keep the model the same and measure the cost of the frequency count alone."""
    one = run_worker(base_spec(args, frequencies=1))
    out = {}
    for label, span in (("same model, 5 f within 0.1 %", 0.001), ("9.5-10.5 GHz band", 0.05)):
        five = run_worker(base_spec(args, frequencies=5, relative_span=span))
        ratio = five["seconds_total"] / one["seconds_total"]
        ratio_stepping = five["seconds_stepping"] / one["seconds_stepping"]
        ratio_cpu = five["stepping_cpu_seconds"] / one["stepping_cpu_seconds"]
        print(f"[band] {label}: simulate 5 frequencies {five['seconds_total']:.2f} s, 1 frequency "
              f"{one['seconds_total']:.2f} s: {ratio:.2f}x (stepping {ratio_stepping:.2f}x wall, "
              f"{ratio_cpu:.2f}x CPU; steps {five['timesteps']} vs {one['timesteps']}; cells "
              f"{five['grid_cells']:.3g} vs {one['grid_cells']:.3g})" + verdict("band", ratio))
        key = "band_cost_ratio" if span < 0.01 else "band_cost_ratio_wide_band"
        out[key] = ratio
        out[key + "_stepping_cpu"] = ratio_cpu
    return out


def part_mpi(args):
    spec = base_spec(args, symmetry=False)  # a bigger model, where ranks have work to share
    serial = run_worker(spec, processes=1)
    parallel = run_worker(spec, processes=2)
    ratio = serial["seconds_stepping"] / parallel["seconds_stepping"]
    ratio_total = serial["seconds_total"] / parallel["seconds_total"]
    print(f"[mpi] stepping 1 rank {serial['seconds_stepping']:.2f} s, 2 ranks "
          f"{parallel['seconds_stepping']:.2f} s: {ratio:.2f}x (simulate total "
          f"{ratio_total:.2f}x; machine has {os.cpu_count()} cores, shared)"
          + verdict("mpi", ratio))
    return {"mpi_speedup": ratio, "mpi_speedup_total": ratio_total}


def part_dims(args):
    three = run_worker(base_spec(args, dims=3))
    two = run_worker(base_spec(args, dims=2))
    ratio = three["seconds_total"] / two["seconds_total"]
    ratio_stepping = three["seconds_stepping"] / two["seconds_stepping"]
    ratio_cpu = cpu_ratio(three, two)
    print(f"[dims] simulate 3D {three['seconds_total']:.2f} s, 2D {two['seconds_total']:.3f} s: "
          f"{ratio:.1f}x (stepping alone {ratio_stepping:.1f}x wall, {ratio_cpu:.1f}x CPU; "
          f"both with mirror symmetry; cells {three['grid_cells']:.3g} vs {two['grid_cells']:.3g})"
          + verdict("dims", ratio))
    return {"dims_speedup": ratio, "dims_speedup_stepping": ratio_stepping,
            "dims_speedup_stepping_cpu": ratio_cpu}


def part_memory(args):
    out = {}
    for label, spec in (("3D, mirrors", base_spec(args)),
                        ("3D, no mirrors", base_spec(args, symmetry=False)),
                        ("3D, no mirrors, 5 f", base_spec(args, symmetry=False, frequencies=5))):
        r = run_worker(spec)
        estimate = r.get("estimate")
        if not estimate:
            print(f"[memory] {label}: peak RSS {r['peak_rss_bytes'] / 2**20:.0f} MiB "
                  "(no estimate: simulate not present)")
            continue
        stepping_peak = r["rss_after_stepping_bytes"]
        ratio = stepping_peak / estimate["memory_bytes"]
        after = r["peak_rss_bytes"] - stepping_peak
        print(f"[memory] {label}: peak RSS at the end of stepping {stepping_peak / 2**20:.0f} MiB"
              f" vs estimate {estimate['memory_bytes'] / 2**20:.0f} MiB (measured/estimate "
              f"{ratio:.2f}; {estimate['cells']} cells stored, {estimate['pml_cells']} in PML); "
              f"post-processing then adds {after / 2**20:.0f} MiB "
              f"(peak {r['peak_rss_bytes'] / 2**20:.0f} MiB)")
        out[f"memory_ratio {label}"] = ratio
        out[f"post_processing_mib {label}"] = after / 2**20
        out[f"memory_ratio {label}"] = ratio
    return out


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--only", action="append", choices=PARTS, help="run only this part")
    parser.add_argument("--small", action="store_true", help="coarser grid, quick run")
    parser.add_argument("--json", action="store_true", help="print all ratios as JSON at the end")
    parser.add_argument("--farfield-method", choices=("fast", "meep"),
                        help="far-field transform of simulate (default: FdtdSettings' default)")
    parser.add_argument("--worker", help=argparse.SUPPRESS)
    args = parser.parse_args(argv)
    if args.worker:
        figures = worker(json.loads(args.worker))
        from hornproof.sim import mpi

        if mpi.is_master():
            print("BENCH " + json.dumps(figures), flush=True)
        return 0
    results, failures = {}, 0
    for part in args.only or PARTS:
        t0 = time.perf_counter()
        try:
            results.update(globals()[f"part_{part}"](args))
        except Exception as error:  # a benchmark reports a broken part and goes on
            failures += 1
            print(f"[{part}] FAILED: {type(error).__name__}: {error}")
        print(f"[{part}] ({time.perf_counter() - t0:.0f} s)", flush=True)
    if args.json:
        print(json.dumps(results, indent=2))
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
