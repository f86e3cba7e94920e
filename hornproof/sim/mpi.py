"""Who am I under MPI: rank, size, master; and running independent jobs in process groups.

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
  :func:`run_in_groups` therefore gathers with mpi4py itself (any picklable result).

Importing this module never imports Meep; the functions do, lazily, and fall back to a
serial answer (rank 0 of 1) when Meep is not installed.
"""

import os

__all__ = ["rank", "size", "is_master", "group_rank", "group_size", "is_group_master",
           "barrier", "run_in_groups", "launch_environment", "mpirun_command"]


def _meep():
    try:
        import meep  # lazy and optional: slow to import, and it starts MPI (and prints a banner)
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
        from mpi4py import MPI  # lazy and optional: mpi4py may be absent in a serial install
    except ImportError:
        return int(mp.count_processors())  # world size unless groups are active
    return int(MPI.COMM_WORLD.Get_size())


def is_master():
    """True on the one process that prints and writes files (global rank 0)."""
    mp = _meep()
    return bool(mp.am_really_master()) if mp is not None else _environment_rank() == 0


def group_rank():
    """Rank inside the current Meep communicator (the group, if divided)."""
    mp = _meep()
    return int(mp.my_rank()) if mp is not None else 0


def group_size():
    """Processes in the current Meep communicator (the group, if divided)."""
    mp = _meep()
    return int(mp.count_processors()) if mp is not None else 1


def is_group_master():
    mp = _meep()
    return bool(mp.am_master()) if mp is not None else True


def barrier():
    """Wait for all processes (no-op when serial)."""
    if size() > 1:
        from mpi4py import MPI  # lazy: only a parallel run needs it

        MPI.COMM_WORLD.Barrier()


def run_in_groups(tasks, function, n_groups=None):
    """Run ``function(task)`` for every task, spreading the tasks over process groups.

    The processes are split into ``n_groups`` groups with ``mp.divide_parallel_processes``
    (default: one group per process); group g runs tasks g, g + n, g + 2n, … each on all of
    its processes (a Meep run inside ``function`` is parallel within the group). The results
    of each group's rank 0 are gathered with mpi4py and returned, in task order, on every
    process. Serially (one process) it is a plain loop.

    Parameters
    ----------
    tasks : sequence
        Inputs, one per independent run (e.g. frequencies or resolutions).
    function : callable
        ``function(task) -> result``; the result must be picklable. It must build its own
        ``mp.Simulation`` (one made before the split belongs to the world communicator).
    n_groups : int, optional
        Number of groups, at most the number of processes.

    Returns
    -------
    list
        ``[function(task) for task in tasks]`` as computed by the groups.
    """
    tasks = list(tasks)
    world = size()
    n_groups = world if n_groups is None else int(n_groups)
    if n_groups < 1:
        raise ValueError(f"n_groups: must be >= 1, got {n_groups}")
    n_groups = min(n_groups, world)
    if world == 1 or n_groups == 1:
        return [function(task) for task in tasks]

    # lazy: only a parallel run needs them, and Meep is slow to import
    import meep as mp
    from mpi4py import MPI

    group = int(mp.divide_parallel_processes(n_groups))
    mine, error = {}, None
    try:
        for index in range(group, len(tasks), n_groups):
            mine[index] = function(tasks[index])
    except Exception as exc:  # reported on every rank below, so no group waits forever
        error = f"group {group}, rank {rank()}: {type(exc).__name__}: {exc}"
    finally:
        is_group_leader = bool(mp.am_master())
        mp.end_divide_parallel()
    gathered = MPI.COMM_WORLD.allgather((mine if is_group_leader else {}, error))
    errors = [e for _, e in gathered if e]
    if errors:
        raise RuntimeError("run_in_groups: " + "; ".join(errors))
    merged = {}
    for part, _ in gathered:
        merged.update(part)
    missing = [i for i in range(len(tasks)) if i not in merged]
    if missing:
        raise RuntimeError(f"run_in_groups: no result for tasks {missing}")
    return [merged[i] for i in range(len(tasks))]


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
