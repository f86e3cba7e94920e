"""Output folders: checked before any run, so a mistake costs nothing and loses nothing.

A command may write into (and replace) a folder only if it is new, empty, or a previous
result of the same kind (it holds a ``result.json`` or ``sweep.json`` of a hornproof schema);
anything else is refused with a one-line ``InputError`` before the solver starts.
"""

import json
import os
import shutil
import tempfile
from pathlib import Path

from ...atomic import replace_folder
from ...errors import InputError
from .result_json import RESULT_SCHEMA
from .map_json import MAP_SCHEMA
from .sweep_json import SWEEP_SCHEMA

#: schema family (any version) of the marker file that makes a folder a hornproof result of each kind
RESULT_MARKERS = {"result.json": RESULT_SCHEMA.split("/")[0] + "/", "sweep.json": SWEEP_SCHEMA.split("/")[0] + "/",
                  "map.json": MAP_SCHEMA.split("/")[0] + "/"}


def _is_result_folder(folder, markers):
    for name in markers:
        marker = folder / name
        if not marker.is_file():
            continue
        try:
            schema = json.loads(marker.read_text()).get("schema", "")
        except (OSError, ValueError, AttributeError):
            return False
        if isinstance(schema, str) and schema.startswith(RESULT_MARKERS[name]):
            return True
    return False


def check_output_folder(path, option="--out", markers=("result.json",), allow_partial=()):
    """Refuse an output folder that would lose data or cannot be written; return it as a Path.

    Parameters
    ----------
    path : str or Path
        The folder the command will (re)create.
    option : str
        How the user named it (for the message).
    markers : tuple of str
        Marker files (keys of ``RESULT_MARKERS``) that make an existing folder replaceable.
    allow_partial : tuple of str
        Names of entries that also make an existing folder acceptable (e.g. a sweep's
        ``points`` cache, which a resumed sweep must reuse).
    """
    folder = Path(path)
    text = str(path)
    if folder.resolve() == Path.cwd().resolve() or folder.resolve() == Path(folder.anchor):
        raise InputError(f"{text}: {option}: refusing to use the working folder or a root as a result folder; "
                         "name a new folder")
    if folder.exists() and not folder.is_dir():
        raise InputError(f"{text}: {option}: exists and is not a folder; name a new folder")
    if folder.is_dir():
        entries = [p.name for p in folder.iterdir()]
        acceptable = (not entries or _is_result_folder(folder, markers)
                      or any(name in entries for name in allow_partial))
        if not acceptable:
            raise InputError(f"{text}: {option}: the folder exists and is not a hornproof result folder; "
                             "refusing to replace it (name a new or empty folder)")
    parent = folder.parent if not folder.is_dir() else folder
    _check_writable(parent, text, option)
    return folder


def _check_writable(folder, text, option):
    """Create ``folder`` if needed and prove a file can be written there."""
    try:
        folder.mkdir(parents=True, exist_ok=True)
        handle, probe = tempfile.mkstemp(prefix=".hornproof-write-check-", dir=folder)
        os.close(handle)
        os.unlink(probe)
    except OSError as error:
        raise InputError(f"{text}: {option}: cannot write there ({error.strerror or error})") from None


def check_new_file(path, option):
    """A file the command will create: its folder must exist and be writable, the file must not
    exist (never overwrite)."""
    target = Path(path)
    if target.exists():
        raise InputError(f"{path}: {option}: the file exists; refusing to overwrite it")
    if not target.parent.is_dir():
        raise InputError(f"{path}: {option}: the folder {str(target.parent)!r} does not exist")
    _check_writable(target.parent, str(path), option)
    return target


def check_replaceable_file(path, option, is_own, what):
    """A file the command will write, replacing only its own earlier output; return it as a Path.

    Refused with a one-line ``InputError`` naming the path and the option when it is a folder,
    or an existing file that ``is_own(path)`` does not recognise (``what`` names the kind of
    file expected, for the message). Its folder is created if needed and must be writable.
    """
    target = Path(path)
    if target.is_dir():
        raise InputError(f"{path}: {option}: is a folder; name a file")
    if target.exists() and not is_own(target):
        raise InputError(f"{path}: {option}: the file exists and is not {what}; refusing to overwrite it")
    _check_writable(target.parent, str(path), option)
    return target


def publish_folder(out_dir, write):
    """Build a result folder under a temporary name, then swap it into place.

    ``write(staging)`` writes every file into ``staging``; only when it returns is the old
    folder (if any) moved aside and the new one renamed to ``out_dir``. On any failure or
    signal the staging folder is removed and ``out_dir`` is left as it was.
    """
    out_dir = Path(out_dir)
    out_dir.parent.mkdir(parents=True, exist_ok=True)
    staging = Path(tempfile.mkdtemp(prefix=f".{out_dir.name}.partial-", dir=out_dir.parent))
    try:
        write(staging)
        os.chmod(staging, 0o755)
        old = Path(tempfile.mkdtemp(prefix=f".{out_dir.name}.old-", dir=out_dir.parent))
        os.rmdir(old)
        replace_folder(staging, out_dir, old)
    except BaseException:
        shutil.rmtree(staging, ignore_errors=True)
        raise
    return out_dir
