"""Output folders: checked before any run, so a mistake costs nothing and loses nothing.

A command may write into (and replace) a folder only if it is new, empty, or a previous
result of the same kind that hornproof can prove it made (its ownership marker,
:mod:`.ownership`); anything else is refused with a one-line ``InputError`` naming the option
and the path before the solver starts. Missing parent folders are created only for hornproof's
own default result root (``results/...``), never for a path the user named.
"""

import contextlib
import os
import shutil
import tempfile
from pathlib import Path

from ...atomic import replace_folder
from ...errors import InputError
from .output_lock import output_lock
from .ownership import (STAGING_SENTINEL, ownership_problem, remove_leftovers, remove_unused_folder, stale_leftovers,
                        write_marker)


def path_text(path):
    """A path as shown in a one-line message: control characters (a newline) escaped."""
    text = os.fspath(path) if not isinstance(path, str) else path
    if isinstance(text, bytes):
        text = os.fsdecode(text)
    return "".join(c if c.isprintable() else repr(c)[1:-1] for c in text)


#: hornproof's own result root (relative to the working folder): the one place where missing
#: parent folders are created for an output
RESULT_ROOT = "results"


def under_result_root(path, root=RESULT_ROOT):
    """True when ``path`` lies inside the result root ``root`` (both resolved without requiring
    them to exist): only there does hornproof create missing parent folders."""
    try:
        Path(path).resolve().relative_to(Path(root).resolve())
    except (ValueError, OSError, RuntimeError):
        return False
    return Path(path).resolve() != Path(root).resolve()


def _refuse_empty(path, option):
    if path is None or str(path) == "":
        raise InputError(f"{option}: the path is empty; name a folder or file, or leave the option out")


def check_output_folder(path, option="--out", kind="verify", create_parents=False):
    """Refuse an output folder that would lose data or cannot be written; return it as a Path.

    Parameters
    ----------
    path : str or Path
        The folder the command will (re)create.
    option : str
        How the user named it (for the message).
    kind : str
        The command's folder kind (``verify``, ``simulate``, ``sweep``): an existing folder is
        accepted only if empty or marked by hornproof as this kind (:func:`.ownership_problem`).
    create_parents : bool
        Create missing parent folders (only for hornproof's own default result root); a path
        the user named must have an existing parent.
    """
    _refuse_empty(path, option)
    folder = Path(path)
    text = path_text(path)
    try:
        if folder.resolve() == Path.cwd().resolve() or folder.resolve() == Path(folder.anchor):
            raise InputError(f"{text}: {option}: refusing to use the working folder or a root as a result folder; "
                             "name a new folder")
        if folder.is_symlink():
            raise InputError(f"{text}: {option}: is a symbolic link; name a real folder")
        if folder.exists() and not folder.is_dir():
            raise InputError(f"{text}: {option}: exists and is not a folder; name a new folder")
        problem = ownership_problem(folder, kind) if folder.is_dir() else None
    except (OSError, RuntimeError) as error:  # RuntimeError: a symbolic-link loop in resolve()
        raise InputError(f"{text}: {option}: cannot inspect the path ({_reason(error)})") from None
    if problem:
        raise InputError(f"{text}: {option}: {problem}; refusing to replace it (name a new or empty folder)")
    parent = folder.parent
    if not parent.is_dir() and not create_parents:
        raise InputError(f"{text}: {option}: the parent folder {path_text(str(parent))!r} does not exist "
                         "(hornproof creates only its own default result folders)")
    _check_writable(parent, text, option, create=create_parents)
    return folder


def _reason(error):
    if isinstance(error, RuntimeError):
        return "symbolic link loop"
    return error.strerror or str(error)


def _check_writable(folder, text, option, create=False):
    """Prove a file can be written in ``folder`` (created first only when ``create``)."""
    try:
        if create:
            folder.mkdir(parents=True, exist_ok=True)
        handle, probe = tempfile.mkstemp(prefix=".hornproof-write-check-", dir=folder)
        os.close(handle)
        os.unlink(probe)
    except OSError as error:
        raise InputError(f"{text}: {option}: cannot write there ({error.strerror or error})") from None


def check_new_file(path, option):
    """A file the command will create: its folder must exist and be writable, the file must not
    exist (never overwrite)."""
    _refuse_empty(path, option)
    target = Path(path)
    text = path_text(path)
    if target.exists() or target.is_symlink():
        raise InputError(f"{text}: {option}: the file exists; refusing to overwrite it")
    if not target.parent.is_dir():
        raise InputError(f"{text}: {option}: the folder {path_text(str(target.parent))!r} does not exist")
    _check_writable(target.parent, text, option)
    return target


def check_replaceable_file(path, option, is_own, what, create_parents=False):
    """A file the command will write, replacing only its own earlier output; return it as a Path.

    Refused with a one-line ``InputError`` naming the path and the option when it is a folder,
    a symbolic link, not a regular file, or an existing file that ``is_own(path)`` does not
    recognise (``what`` names the kind of file expected, for the message). Its folder must
    exist (created only when ``create_parents``, for hornproof's default result root) and be
    writable.
    """
    _refuse_empty(path, option)
    target = Path(path)
    text = path_text(path)
    try:
        if target.is_symlink():
            raise InputError(f"{text}: {option}: is a symbolic link; refusing to write through it")
        if target.is_dir():
            raise InputError(f"{text}: {option}: is a folder; name a file")
        if target.exists() and not target.is_file():
            raise InputError(f"{text}: {option}: is not a regular file; refusing to write it")
        if target.exists() and not is_own(target):
            raise InputError(f"{text}: {option}: the file exists and is not {what}; refusing to overwrite it")
    except OSError as error:
        raise InputError(f"{text}: {option}: cannot inspect the path ({_reason(error)})") from None
    if not target.parent.is_dir() and not create_parents:
        raise InputError(f"{text}: {option}: the folder {path_text(str(target.parent))!r} does not exist "
                         "(hornproof creates only its own default result folders)")
    _check_writable(target.parent, text, option, create=create_parents)
    return target


def publish_folder(out_dir, write, kind="verify"):
    """Build a result folder under a temporary name, then swap it into place.

    ``write(staging)`` writes every file into ``staging``; then the ownership marker of
    ``kind`` is added, and only then is the old folder (if any) moved aside and the new one
    renamed to ``out_dir``. The staging folder carries a sentinel (``.hornproof-staging``)
    until just before the rename, so a leftover of a killed run is recognised as one. On any
    failure or signal the staging folder is removed and ``out_dir`` is left as it was.
    """
    out_dir = Path(out_dir)
    out_dir.parent.mkdir(parents=True, exist_ok=True)
    staging = Path(tempfile.mkdtemp(prefix=f".{out_dir.name}.partial-", dir=out_dir.parent))
    try:
        (staging / STAGING_SENTINEL).touch()
        write(staging)
        write_marker(staging, kind)
        os.unlink(staging / STAGING_SENTINEL)
        os.chmod(staging, 0o755)
        old = Path(tempfile.mkdtemp(prefix=f".{out_dir.name}.old-", dir=out_dir.parent))
        os.rmdir(old)
        replace_folder(staging, out_dir, old)
    except OSError as error:
        shutil.rmtree(staging, ignore_errors=True)
        raise _named_for_user(error, staging, out_dir) from error
    except BaseException:
        shutil.rmtree(staging, ignore_errors=True)
        raise
    return out_dir


def _named_for_user(error, staging, out_dir):
    """``error`` naming the file in the user's folder instead of the staging folder."""
    name = os.fsdecode(error.filename) if error.filename is not None else None
    if name is None or not name.startswith(str(staging)):
        return error if name is not None else OSError(error.errno, error.strerror, str(out_dir))
    return OSError(error.errno, error.strerror, str(out_dir) + name[len(str(staging)):])


@contextlib.contextmanager
def claimed_output_folder(out_dir, option, kind, *, hold=True, tell=None):
    """Hold the output lock of ``out_dir`` for a run, re-check ownership under it, and clear
    the leftovers of killed runs of the same output (:func:`.ownership.stale_leftovers`).

    Parameters
    ----------
    out_dir : Path
        Checked already by :func:`check_output_folder`.
    option : str
        How the user named it (for messages).
    kind : str
        The command's folder kind.
    hold : bool
        False on the MPI ranks that do not write: they neither lock nor clean.
    tell : callable, optional
        Receives one line per leftover removed.
    """
    if not hold:
        yield Path(out_dir)
        return
    with output_lock(out_dir, option):
        problem = ownership_problem(out_dir, kind) if Path(out_dir).is_dir() else None
        if problem:  # another run published something different between the check and the lock
            raise InputError(f"{path_text(out_dir)}: {option}: {problem}; refusing to replace it")
        for removed in remove_leftovers(stale_leftovers(out_dir)):
            if tell is not None:
                tell(f"hornproof: removed a leftover of a killed run: {path_text(removed)}")
        yield Path(out_dir)


@contextlib.contextmanager
def resumable_output_folder(path, option, kind, entries, *, default, writer=True, tell=None):
    """The output folder of a resumable command (``sweep``, ``map``): checked
    (:func:`check_output_folder`), claimed (:func:`claimed_output_folder`) and marked with its
    ``entries`` before the run, so a killed run's folder is still recognised as its own; marked
    again after it. A run refused with an ``InputError`` before it wrote anything removes the
    folder it created.

    ``path`` is the user's ``--out`` (None: ``default``, under the result root).
    """
    option = option if path is not None else f"the default {kind} folder"
    out_dir = check_output_folder(Path(path) if path is not None else Path(default), option, kind=kind,
                                  create_parents=path is None or under_result_root(path))
    with claimed_output_folder(out_dir, option, kind, hold=writer, tell=tell):
        created = writer and not out_dir.exists()
        if writer:
            out_dir.mkdir(exist_ok=True)
            write_marker(out_dir, kind, extra_entries=entries)
        try:
            yield out_dir
        except InputError:
            if created:
                remove_unused_folder(out_dir)
            raise
        if writer:
            write_marker(out_dir, kind, extra_entries=entries)
