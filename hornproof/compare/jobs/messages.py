"""Which process of a run speaks and writes, and its progress lines on standard error.

Under MPI every rank runs the same job; only the master of the current Meep communicator
(rank 0 when serial or unsplit; each group's master under ``regress``'s process groups)
prints and writes files.
"""

import sys

from ...sim.mpi import is_group_master, is_master


def is_writer():
    """True on the process that prints this run's messages and writes its files."""
    try:
        return is_group_master()
    except Exception:  # pragma: no cover - an MPI layer that cannot answer: act as serial
        return True


def say(message):
    """Print one progress or warning line on standard error, from the writing process only."""
    if is_writer():
        print(message, file=sys.stderr, flush=True)


def is_main_process():
    """True on global rank 0 (or when Meep, and so MPI, is not loaded): the one process that
    prints an error every rank raised alike."""
    if "meep" not in sys.modules:
        return True
    try:
        return is_master()
    except Exception:  # pragma: no cover - an MPI layer that cannot answer: act as serial
        return True


def silence_solver_exit_banner():
    """Keep Meep's "Elapsed run time" exit line off standard output (``--json`` stays pure JSON)."""
    from ...sim.exit_banner import silence_exit_banner  # lazy: only the command's end needs it

    silence_exit_banner()
