"""The full tier of a case with a ``[map]``: its ``verify`` run, then its map, in one cache entry.

``regress`` compares a case's ``verify`` figures (the base horn of the case file) with its
baseline. For a case with a ``[map]`` table the full tier also runs the map
(:func:`hornproof.compare.jobs.map.run_map`: estimate printed first, budget refusal unless
``--force``, FDTD points on grid-fitted ladders) into the ``map/`` folder of the same result
entry, so ``map.json`` and its report are kept with the run and a failing map fails the case.
Under ``mpirun`` the case already runs inside one process group: its map runs there as one
job (``SerialWorld``: every rank of the group steps every point together), never splitting
the group again.

What is not done here: the map's own figures (FDTD directivity and errors per point, the
breakdown intervals) are recorded in ``map/map.json`` but not classified against a baseline;
baselines hold per-frequency figures of one horn only.
"""

from pathlib import Path

from ...sim.mpi import SerialWorld
from ..jobs.messages import is_writer
from ..output.ownership import write_marker

__all__ = ["MAP_FOLDER", "MAP_TIERS", "with_map"]

#: folder of a result entry that holds the map
MAP_FOLDER = "map"
#: tiers that run a case's map (the quick tier keeps to the one coarse verify run)
MAP_TIERS = ("full",)


def with_map(verify_case, run_map):
    """A regress runner: ``verify_case`` for every case, then ``run_map`` for a case with a
    ``[map]`` in a tier of :data:`MAP_TIERS`. Returns the verify summary."""

    def runner(case, out_dir, *, force, progress):
        summary = verify_case(case, out_dir, force=force, progress=progress)
        if getattr(case, "map", None) is not None and getattr(case, "tier", None) in MAP_TIERS:
            run_map(case, Path(out_dir) / MAP_FOLDER, force=force, world=SerialWorld())
            if is_writer() and (Path(out_dir) / MAP_FOLDER).is_dir():
                # both folders stay published results of their kind (``report`` reads either)
                write_marker(Path(out_dir) / MAP_FOLDER, "map")
                write_marker(Path(out_dir), "verify")
        return summary

    return runner
