"""Atomic file writing: a reader sees the old file or the complete new one, never half of it.

Every writer puts the bytes in a temporary file in the *same folder* as the target (so the
final rename stays on one file system), flushes and fsyncs it, then ``os.replace``-s it onto
the target name (atomic on POSIX). On any exception the temporary file is removed and the
target is left as it was.
"""

import contextlib
import os
import shutil
import tempfile

__all__ = ["atomic_path", "write_bytes_atomic", "write_text_atomic", "replace_folder"]


def _fsync_directory(directory):
    """Make the rename itself durable (best effort: not every platform allows it)."""
    try:
        fd = os.open(directory, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def _default_mode(path):
    """Mode the file would get from a plain ``open(path, "w")``: keep an existing file's mode,
    else 0o666 less the umask (``mkstemp`` alone would leave 0o600)."""
    try:
        return os.stat(path).st_mode & 0o7777
    except FileNotFoundError:
        umask = os.umask(0)
        os.umask(umask)
        return 0o666 & ~umask


def _fsync_file(path):
    with open(path, "rb+") as handle:
        handle.flush()
        os.fsync(handle.fileno())


@contextlib.contextmanager
def atomic_path(path):
    """Yield a temporary path next to ``path``; on success fsync it and rename it onto ``path``.

    For libraries that open a file by name (h5py, matplotlib's ``savefig``)::

        with atomic_path("fields.h5") as tmp:
            with h5py.File(tmp, "w") as f:
                ...

    The temporary file exists (empty) when the block starts, so a library may open it in
    ``"w"`` mode. If the block raises, the temporary file is removed and ``path`` untouched.

    Parameters
    ----------
    path : str or os.PathLike
        Final file name. Its folder must exist.
    """
    path = os.fspath(path)
    directory = os.path.dirname(os.path.abspath(path))
    base = os.path.basename(path)
    try:
        fd, temporary = tempfile.mkstemp(prefix=f".{base}.", suffix=".part", dir=directory)
    except OSError as error:
        raise OSError(error.errno, error.strerror, path) from None
    os.close(fd)
    try:
        os.chmod(temporary, _default_mode(path))
        yield temporary
        _fsync_file(temporary)
        os.replace(temporary, path)
    except OSError as error:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(temporary)
        if error.filename in (temporary, None) or error.filename2 == path:
            # name the user's file, never the temporary one
            raise OSError(error.errno, error.strerror, path) from error
        raise
    except BaseException:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(temporary)
        raise
    _fsync_directory(directory)


def write_bytes_atomic(path, data):
    """Write ``data`` (bytes) to ``path`` atomically (temporary file, fsync, rename)."""
    if not isinstance(data, (bytes, bytearray, memoryview)):
        raise ValueError(f"data: expected bytes, got {type(data).__name__}")
    with atomic_path(path) as temporary:
        with open(temporary, "wb") as handle:
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())


def write_text_atomic(path, text, encoding="utf-8"):
    """Write ``text`` (str) to ``path`` atomically; newlines are written as given."""
    if not isinstance(text, str):
        raise ValueError(f"text: expected str, got {type(text).__name__}")
    write_bytes_atomic(path, text.encode(encoding))


def replace_folder(source, target, aside):
    """Rename the finished folder ``source`` onto ``target``, replacing a folder already there.

    Folders cannot be swapped in one atomic step: an existing ``target`` is first renamed to
    ``aside`` (a free name in the same parent), then ``source`` onto ``target``, then ``aside``
    is removed. A reader sees the old folder, briefly no folder, or the complete new one —
    never a mixture.
    """
    if os.path.exists(target):
        os.replace(target, aside)
        os.replace(source, target)
        shutil.rmtree(aside, ignore_errors=True)
    else:
        os.replace(source, target)
