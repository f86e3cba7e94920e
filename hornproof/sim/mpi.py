"""Who am I under MPI: rank, size, master; the world communicator and its process groups.

Meep's MPI build (Debian ``python3-meep-mpi-default``) initialises MPI when imported, also
for a plain serial ``python`` (one process). Its helpers, as they behave in Meep 1.25.0:

* ``mp.count_processors()`` — processes in the *current* communicator (the group, after
  ``divide_parallel_processes``); ``mp.my_rank()`` — rank in it; ``mp.am_master()`` — rank 0
  of it; ``mp.my_global_rank()`` and ``mp.am_really_master()`` — the same over all processes.
* ``mp.divide_parallel_processes(n)`` splits the processes into ``n`` groups (contiguous
  ranks, from memory of Meep's C++ source; nothing here relies on the order) and returns
  this process's group index; every ``Simulation`` built afterwards lives in its group only
  (checked by tests/sim/test_mpi.py). ``mp.end_divide_parallel()`` returns to the world
  communicator.
* ``mp.merge_subgroup_data(array)`` gathers one array per group; in Meep 1.25.0 it calls
  ``np.bool``, which numpy 1.24 (Debian's) removed, so it raises ``AttributeError`` here.
  Results of process groups are therefore gathered with mpi4py (any picklable value).

Importing this module never imports Meep; the functions do, lazily, and fall back to a
serial answer (rank 0 of 1) when Meep is not installed.
"""

import contextlib
import os
import time

__all__ = ["rank", "size", "is_master", "is_group_master", "SerialWorld", "world", "wait_idle",
           "process_groups", "launch_environment", "mpirun_command"]


def _meep():
    try:
        import meep
    except ImportError:
        return None
    return meep


def _environment_rank():
    """Rank from the launcher's environment (Open MPI, MPICH/Hydra, Slurm), or 0."""
    for name in ("OMPI_COMM_WORLD_RANK", "PMI_RANK", "PMIX_RANK", "SLURM_PROCID"):
        if os.environ.get(name, "").isdigit():
            return int(os.environ[name])
    return 0


def _environment_size():
    for name in ("OMPI_COMM_WORLD_SIZE", "PMI_SIZE", "SLURM_NTASKS"):
        if os.environ.get(name, "").isdigit():
            return int(os.environ[name])
    return 1


def rank():
    """This process's rank among all processes (0 when serial)."""
    mp = _meep()
    return int(mp.my_global_rank()) if mp is not None else _environment_rank()


def size():
    """Number of processes in the whole run (1 when serial)."""
    mp = _meep()
    if mp is None:
        return _environment_size()
    try:
        from mpi4py import MPI
    except ImportError:
        return int(mp.count_processors())  # world size unless groups are active
    return int(MPI.COMM_WORLD.Get_size())


def is_master():
    """True on the one process that prints and writes files (global rank 0)."""
    mp = _meep()
    return bool(mp.am_really_master()) if mp is not None else _environment_rank() == 0


def is_group_master():
    mp = _meep()
    return bool(mp.am_master()) if mp is not None else True


# --- communicators and process groups ------------------------------------------------------------
#: environment variables by which MPI launchers (Open MPI, MPICH/Hydra, PMIx, Slurm) mark a rank
_LAUNCHER_MARKERS = ("OMPI_COMM_WORLD_SIZE", "PMI_SIZE", "PMIX_RANK", "MPI_LOCALNRANKS", "SLURM_NTASKS_MPI")


class SerialWorld:
    """Stands in for an MPI communicator when running on one process (the mpi4py methods used)."""

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


def world():
    """The MPI world communicator when launched by an MPI launcher with several ranks, else a
    :class:`SerialWorld`.

    Detected from the launcher's environment first, so a plain run never starts MPI (importing
    Meep takes about a second). Meep is imported before mpi4py so that MPI starts the way Meep
    expects; both imports are lazy for that reason.
    """
    if not any(name in os.environ for name in _LAUNCHER_MARKERS):
        return SerialWorld()
    _meep()
    try:
        from mpi4py import MPI
    except ImportError:
        return SerialWorld()
    communicator = MPI.COMM_WORLD
    return communicator if communicator.Get_size() > 1 else SerialWorld()


def wait_idle(communicator, poll_seconds=0.05):
    """Wait until every rank of ``communicator`` has arrived, sleeping between checks.

    A blocking MPI barrier busy-polls (Open MPI spins a core at 100 %): a rank whose process
    group finished early would take a core from the groups still running Meep.
    """
    start = getattr(communicator, "Ibarrier", None)
    if start is None:
        communicator.Barrier()
        return
    request = start()
    while not request.Test():
        time.sleep(poll_seconds)


@contextlib.contextmanager
def process_groups(communicator, groups):
    """Split the ranks of ``communicator`` into ``groups`` process groups for the ``with`` block.

    Yields ``(group index, group communicator)``. With Meep installed the split is Meep's own
    (``divide_parallel_processes``), so every ``Simulation`` built inside the block lives in its
    group only; Meep's division ends when the block is left. Without Meep, rank r goes to group
    r·groups // size. On one process (or one group) nothing is divided.
    """
    if communicator.size == 1 or groups == 1:
        yield 0, communicator
        return
    mp = _meep()
    group = int(mp.divide_parallel_processes(groups)) if mp is not None \
        else communicator.rank * groups // communicator.size
    try:
        yield group, communicator.Split(group, communicator.rank)
    finally:
        if mp is not None:
            mp.end_divide_parallel()


# --- starting an MPI run from Python ------------------------------------------------------------
_LAUNCHER_PREFIXES = ("OMPI_", "PMIX_", "PMI_")


def launch_environment():
    """Environment for a child ``mpirun``: ``os.environ`` without MPI launcher variables.

    A Python process that has imported Meep is an MPI singleton, and Open MPI puts its own
    variables into the process's C environment; a child ``mpirun`` that inherits them exits
    with status 1 and no message (seen here with Open MPI 4.1). ``os.environ`` still holds the
    environment from before the import, so passing a filtered copy of it explicitly works.
    """
    return {k: v for k, v in os.environ.items() if not k.startswith(_LAUNCHER_PREFIXES)}


def mpirun_command(processes, argv, *, mpirun="mpirun"):
    """``mpirun -np N [--allow-run-as-root] --oversubscribe argv…`` as a list.

    ``--allow-run-as-root`` only when running as root (Open MPI refuses root otherwise);
    ``--oversubscribe`` so N ranks start even when the machine's slots are counted as busy.
    """
    if int(processes) < 1:
        raise ValueError(f"processes: must be >= 1, got {processes}")
    command = [mpirun, "-np", str(int(processes))]
    if hasattr(os, "geteuid") and os.geteuid() == 0:
        command.append("--allow-run-as-root")
    command.append("--oversubscribe")
    return command + [str(a) for a in argv]
