"""One run per output: an exclusive lock on the folder a command publishes to.

A run takes the lock before its solver starts and keeps it until its folder is published. The
lock is a file ``.<name>.hornproof-lock`` beside the output folder, held with ``flock``
(released by the kernel when the process dies, so a killed run never leaves a stale lock). A
second run on the same output does not wait: it is refused at once with one line naming the
option and the path (exit 2), so a nightly job fails early instead of queueing behind a
long run. The lock file is removed when the run ends.
"""

import contextlib
import fcntl
import os
from pathlib import Path

from ...errors import InputError


def lock_path(out_dir):
    """The lock file of the output folder ``out_dir``."""
    out_dir = Path(out_dir)
    return out_dir.parent / f".{out_dir.name}.hornproof-lock"


@contextlib.contextmanager
def output_lock(out_dir, option="--out"):
    """Hold the exclusive lock of ``out_dir`` for the ``with`` block.

    Raises
    ------
    InputError
        Another run holds it, or the lock file cannot be made (one line, naming ``option``
        and the user's path).
    """
    path = lock_path(out_dir)
    while True:
        try:
            fd = os.open(path, os.O_RDWR | os.O_CREAT | os.O_NOFOLLOW, 0o644)
        except OSError as error:
            raise InputError(f"{out_dir}: {option}: cannot take the output lock "
                             f"({error.strerror or error})") from None
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:
            os.close(fd)
            raise InputError(f"{out_dir}: {option}: another hornproof run is writing this folder; "
                             "wait for it to finish or name another folder") from None
        # the holder before us may have removed the file after we opened it: retry on the new one
        try:
            same = os.fstat(fd).st_ino == os.stat(path, follow_symlinks=False).st_ino
        except FileNotFoundError:
            same = False
        if same:
            break
        os.close(fd)
    try:
        yield path
    finally:
        with contextlib.suppress(OSError):
            os.unlink(path)
        os.close(fd)
