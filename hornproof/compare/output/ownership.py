"""Ownership of output folders: hornproof replaces or deletes only what it can prove it made.

Every folder a command publishes carries a marker file, ``.hornproof-folder.json`` (schema
``hornproof.folder/1``), naming the *kind* of the command that wrote it (``verify``,
``simulate``, ``sweep``) and every entry it wrote. A later run may replace or write into an
existing folder only when

* the folder is empty, or
* its marker has this schema family and the same kind as the command's, and every entry in the
  folder is one the marker lists (a file a user added makes the folder not ours to replace).

Staging folders (``.<name>.partial-*``) carry a second marker, ``.hornproof-staging``, from the
moment they are made until they are renamed into place: a leftover of a killed run is
recognised by it (and only such leftovers are ever deleted), and ``report`` refuses them.
The format is hornproof's own.
"""

import json
import os
import shutil
from pathlib import Path

from ...atomic import write_text_atomic

#: file name of the ownership marker inside a published folder
MARKER_NAME = ".hornproof-folder.json"
#: schema of the marker (a reader accepts this family, any version)
MARKER_SCHEMA = "hornproof.folder/1"
#: file name of the sentinel inside a staging folder (removed just before it is published)
STAGING_SENTINEL = ".hornproof-staging"
#: the kinds of folder hornproof publishes
FOLDER_KINDS = ("verify", "simulate", "sweep", "map")


def write_marker(folder, kind, extra_entries=()):
    """Write the ownership marker of ``folder`` listing every entry now in it.

    Parameters
    ----------
    folder : Path
        The (staging or published) folder.
    kind : str
        One of :data:`FOLDER_KINDS`.
    extra_entries : iterable of str
        Entries to list even if not present yet (a sweep's ``points`` cache).
    """
    if kind not in FOLDER_KINDS:
        raise ValueError(f"kind: expected one of {FOLDER_KINDS}, got {kind!r}")
    folder = Path(folder)
    entries = sorted(({p.name for p in folder.iterdir()} | set(extra_entries))
                     - {MARKER_NAME, STAGING_SENTINEL})
    document = {"schema": MARKER_SCHEMA, "kind": kind, "entries": entries}
    write_text_atomic(folder / MARKER_NAME, json.dumps(document, indent=1) + "\n")


def read_marker(folder):
    """The marker of ``folder`` as a dict with ``kind`` and ``entries``, or None when there is
    none or it is not a valid hornproof marker (never raises for bad content)."""
    path = Path(folder) / MARKER_NAME
    try:
        if not path.is_file() or path.stat().st_size > 1_000_000:
            return None
        document = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return None
    if not isinstance(document, dict):
        return None
    schema, kind, entries = document.get("schema"), document.get("kind"), document.get("entries")
    if not (isinstance(schema, str) and schema.split("/")[0] == MARKER_SCHEMA.split("/")[0]):
        return None
    if kind not in FOLDER_KINDS or not isinstance(entries, list) \
            or not all(isinstance(e, str) for e in entries):
        return None
    return {"kind": kind, "entries": entries}


def ownership_problem(folder, kind):
    """Why hornproof may not replace or write into ``folder`` as a ``kind`` command; None when
    it may (the folder is missing, empty, or a marked folder of the same kind holding only
    entries it lists)."""
    folder = Path(folder)
    if not folder.exists():
        return None
    entries = {p.name for p in folder.iterdir()}
    if not entries:
        return None
    marker = read_marker(folder)
    if marker is None:
        return ("the folder exists and is not a hornproof result folder (no valid "
                f"{MARKER_NAME} marker)")
    if marker["kind"] != kind:
        return f"the folder holds a hornproof {marker['kind']} result, not a {kind} result"
    foreign = sorted(entries - set(marker["entries"]) - {MARKER_NAME, STAGING_SENTINEL})
    if foreign:
        shown = ", ".join(repr(name) for name in foreign[:3]) + (" ..." if len(foreign) > 3 else "")
        return f"the folder holds entries hornproof did not write ({shown})"
    return None


def is_published_result(folder):
    """True when ``folder`` is a published hornproof result: a valid marker, no staging
    sentinel, and not named like a staging folder."""
    folder = Path(folder)
    if is_staging_name(folder.name) or (folder / STAGING_SENTINEL).exists():
        return False
    return read_marker(folder) is not None


def is_staging_name(name):
    """True for the name of a staging or set-aside folder (``.<name>.partial-*``, ``.old-*``)."""
    return name.startswith(".") and (".partial-" in name or ".old-" in name)


def stale_leftovers(out_dir):
    """Leftovers of killed runs publishing to ``out_dir``: staging and set-aside folders beside
    it that carry the staging sentinel or are empty, and its hidden model-image files.

    Call only while holding the output lock of ``out_dir`` (:mod:`.output_lock`), so that no
    live run owns them.
    """
    out_dir = Path(out_dir)
    parent = out_dir.parent
    if not parent.is_dir():
        return []
    found = []
    for prefix in (f".{out_dir.name}.partial-", f".{out_dir.name}.old-"):
        for path in sorted(parent.glob(glob_escape(prefix) + "*")):
            if path.is_symlink() or not path.is_dir():
                continue
            try:
                empty = not any(path.iterdir())
            except OSError:
                continue
            if empty or (path / STAGING_SENTINEL).is_file() or read_marker(path) is not None:
                found.append(path)
    for path in sorted(parent.glob(glob_escape(f".{out_dir.name}.model") + "*.png")):
        if path.is_file() and not path.is_symlink():
            found.append(path)
    return found


def remove_leftovers(paths):
    """Delete leftovers found by :func:`stale_leftovers`; return the ones removed."""
    removed = []
    for path in paths:
        try:
            if path.is_dir() and not path.is_symlink():
                shutil.rmtree(path)
            else:
                os.unlink(path)
        except OSError:
            continue
        removed.append(path)
    return removed


def glob_escape(text):
    """``text`` with glob's special characters made literal."""
    return "".join(f"[{c}]" if c in "*?[]" else c for c in text)


def remove_unused_folder(folder):
    """Remove ``folder`` if it holds nothing but its marker and empty folders (a run that was
    refused after claiming it); anything else is left as it is."""
    folder = Path(folder)
    entries = list(folder.iterdir()) if folder.is_dir() else []
    if all(p.name == MARKER_NAME or (p.is_dir() and not p.is_symlink() and not any(p.iterdir())) for p in entries):
        for entry in entries:
            entry.rmdir() if entry.is_dir() else entry.unlink()
        folder.rmdir()
