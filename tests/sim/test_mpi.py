"""MPI helpers: serial answers, rank/size against the launcher's environment, a small Meep run
parallel vs serial, and runs inside process groups vs a serial loop."""

import json
import os
import shutil
import subprocess
import sys
import textwrap

import pytest

from hornproof.sim import mpi

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
MPIRUN = shutil.which("mpirun")

SCRIPT = textwrap.dedent(r"""
    import json, os, sys
    sys.path.insert(0, ROOT)
    import meep as mp
    mp.verbosity(0)
    from hornproof.sim import mpi

    def dipole_flux(frequency):
        # An Ez point dipole in a 2 x 2 x 2 box with PML; flux out of a closed box around it
        sim = mp.Simulation(cell_size=mp.Vector3(2, 2, 2), resolution=10,
                            boundary_layers=[mp.PML(0.5)],
                            sources=[mp.Source(mp.GaussianSource(frequency, fwidth=0.3 * frequency),
                                               component=mp.Ez, center=mp.Vector3())])
        box = sim.add_flux(frequency, 0, 1,
                           *[mp.FluxRegion(center=mp.Vector3(*[0.4 * s if i == a else 0 for i in range(3)]),
                                           size=mp.Vector3(*[0 if i == a else 0.8 for i in range(3)]),
                                           weight=s)
                             for a in range(3) for s in (1, -1)])
        sim.run(until_after_sources=4)
        value = mp.get_fluxes(box)[0]
        sim.reset_meep()
        return value

    def grouped_fluxes(frequencies):
        # one frequency per process group at a time (all of them in one group when serial);
        # each group's rank 0 reports, and rank 0 of the world merges and shares the results
        world = mpi.world()
        groups = min(world.size, len(frequencies))
        mine = {}
        with mpi.process_groups(world, groups) as (group, communicator):
            for index in range(group, len(frequencies), groups):
                mine[index] = dipole_flux(frequencies[index])
            report["group"], report["group_size"] = group, communicator.size
            if communicator.rank != 0:
                mine = {}
        merged = {}
        for part in world.gather(mine, root=0) or []:
            merged.update(part)
        merged = world.bcast(merged, root=0)
        return [merged[i] for i in range(len(frequencies))]

    mode, out = sys.argv[1], sys.argv[2]
    report = {"rank": mpi.rank(), "size": mpi.size(), "master": mpi.is_master(),
              "env_rank": os.environ.get("OMPI_COMM_WORLD_RANK")}
    if mode == "single":
        report["flux"] = dipole_flux(1.0)
    elif mode == "groups":
        report["fluxes"] = grouped_fluxes([1.0, 1.3])
    with open(f"{out}.{report['rank']}", "w") as handle:
        json.dump(report, handle)
""").replace("ROOT", repr(ROOT))


def _run(tmp_path, mode, processes):
    script = tmp_path / "job.py"
    script.write_text(SCRIPT)
    out = tmp_path / mode
    command = [sys.executable, str(script), mode, str(out)]
    if processes > 1:
        command = mpi.mpirun_command(processes, command, mpirun=MPIRUN)
    # a filtered environment: this pytest process has imported Meep (see launch_environment)
    subprocess.run(command, check=True, capture_output=True, timeout=180, cwd=tmp_path,
                   env=mpi.launch_environment())
    reports = [json.loads((tmp_path / f"{mode}.{r}").read_text()) for r in range(processes)]
    for path in tmp_path.glob(f"{mode}.*"):
        path.unlink()
    return reports


def test_mpirun_command_flags():
    # Open MPI mpirun(1): root needs --allow-run-as-root; --oversubscribe allows more ranks
    # than free slots
    command = mpi.mpirun_command(2, ["python", "x.py"])
    assert command[:3] == ["mpirun", "-np", "2"] and command[-2:] == ["python", "x.py"]
    assert "--oversubscribe" in command
    assert ("--allow-run-as-root" in command) == (os.geteuid() == 0)


def test_serial_answers_in_this_process():
    # a plain python process is one MPI process of rank 0 (MPI standard: a singleton init)
    assert mpi.rank() == 0
    assert mpi.size() == 1
    assert mpi.is_master() is True
    world = mpi.world()  # no launcher variables here: the serial stand-in
    assert (world.rank, world.size) == (0, 1)
    assert world.bcast("x", root=0) == "x" and world.gather(3, root=0) == [3]
    with mpi.process_groups(world, 1) as (group, communicator):
        assert group == 0 and communicator.size == 1


needs_mpirun = pytest.mark.skipif(MPIRUN is None, reason="mpirun (openmpi-bin) not installed")


@pytest.mark.fullwave
@needs_mpirun
def test_parallel_meep_run_equals_serial(tmp_path):
    serial = _run(tmp_path, "single", 1)[0]
    parallel = _run(tmp_path, "single", 2)
    # Open MPI sets OMPI_COMM_WORLD_RANK for each process it starts (mpirun(1) man page)
    assert [p["rank"] for p in parallel] == [0, 1]
    assert [int(p["env_rank"]) for p in parallel] == [0, 1]
    assert [p["size"] for p in parallel] == [2, 2]
    assert [p["master"] for p in parallel] == [True, False]
    assert serial["flux"] > 0  # a radiating dipole sends power out of the box
    # Meep splits the grid into chunks; the same update on each cell gives the same fields,
    # only the flux sum's order differs: 1e-6 relative is ample
    for report in parallel:
        assert report["flux"] == pytest.approx(serial["flux"], rel=1e-6)


@pytest.mark.fullwave
@needs_mpirun
def test_process_groups_equal_serial_runs(tmp_path):
    serial = _run(tmp_path, "groups", 1)[0]["fluxes"]
    grouped = _run(tmp_path, "groups", 2)
    for report in grouped:  # every rank gets all results, in task order
        assert report["fluxes"] == pytest.approx(serial, rel=1e-6)
    # two ranks, two groups: one rank each, each its own group (Meep's split, one run per group)
    assert sorted(report["group"] for report in grouped) == [0, 1]
    assert [report["group_size"] for report in grouped] == [1, 1]
    # the two frequencies are different runs: their fluxes must differ (not one run twice)
    assert abs(serial[0] - serial[1]) > 1e-3 * abs(serial[0])
