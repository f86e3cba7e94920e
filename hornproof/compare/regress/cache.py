"""Cache of finished run results, keyed by a content hash of everything that decides them.

Layout (one folder per finished run)::

    <root>/<case name>/<key>/result.json       the hornproof.result/1 summary (from verify)
    <root>/<case name>/<key>/cache-key.json    what the key was computed from (for people)
    <root>/<case name>/<key>/...               anything else the run wrote (report.html, ...)

The key is a SHA-256 over (case-definition hash, tier, tier settings, solver version,
hornproof version), so an edited case, other settings, another Meep or another hornproof
never hit an old entry.

A run in progress writes into a hidden sibling folder ``.<key>.partial-<token>`` which is
renamed onto ``<key>`` only once the run has finished; a killed run leaves at most a hidden
partial folder, which lookups never read. A failed run's folder is kept for diagnosis as
``.<key>.failed`` (also never read as a result).
"""

import hashlib
import json
import os
import shutil
from pathlib import Path

from ...atomic import replace_folder, write_text_atomic
from ...hashing import content_sha256
from ..output.result_json import RESULT_SCHEMA

__all__ = [
    "RESULT_FILE",
    "KEY_FILE",
    "cache_key",
    "ResultCache",
]

RESULT_FILE = "result.json"
KEY_FILE = "cache-key.json"
KEY_LENGTH = 24  # hex digits of the SHA-256 kept in folder names (96 bits)


def cache_key(case_sha256, tier, settings, solver_version, hornproof_version):
    """Content hash naming one cached result.

    Parameters
    ----------
    case_sha256 : str
        Hash of the (tier-adjusted) case definition, ``Case.for_tier(tier).sha256``.
    tier : str
        "quick" or "full".
    settings : dict
        JSON-ready FDTD settings of the tier case.
    solver_version : str
        Meep version string.
    hornproof_version : str

    Returns
    -------
    key : str
        ``KEY_LENGTH`` hex digits.
    inputs : dict
        The values hashed (stored beside the result as ``cache-key.json``).
    """
    inputs = {
        "case_sha256": str(case_sha256),
        "tier": str(tier),
        "settings": settings,
        "solver_version": str(solver_version),
        "hornproof_version": str(hornproof_version),
    }
    return content_sha256(inputs, KEY_LENGTH), inputs


def _safe_component(name, what):
    text = str(name)
    if not text or text in (".", "..") or "/" in text or "\\" in text or text.startswith("."):
        raise ValueError(f"{what}: {text!r} cannot name a results folder")
    return text


class ResultCache:
    """Finished results under ``root``; see the module docstring for the layout.

    Parameters
    ----------
    root : str or os.PathLike
        The results folder (created on first write).
    """

    def __init__(self, root):
        self.root = Path(root)

    def entry_dir(self, case_name, key):
        """Folder of the finished result for (case, key) (may not exist)."""
        return self.root / _safe_component(case_name, "case name") / _safe_component(key, "key")

    def lookup(self, case_name, key, expected_case_sha256=None, notes=None):
        """Return the cached summary dict, or None when there is no usable finished result.

        A folder whose ``result.json`` is missing, unreadable, of another schema or of another
        case hash is not a result: it is reported in ``notes`` (a list, if given) and ignored,
        so the case runs again and the entry is replaced.
        """
        path = self.entry_dir(case_name, key) / RESULT_FILE
        if not path.parent.is_dir():
            return None
        problem = None
        try:
            data = path.read_bytes()
            result = json.loads(data.decode("utf-8"))
        except FileNotFoundError:
            problem = "no result.json"
        except (OSError, UnicodeDecodeError, ValueError) as error:
            problem = f"unreadable ({error})"
        else:
            if not isinstance(result, dict):
                problem = "not a JSON object"
            elif result.get("schema") != RESULT_SCHEMA:
                problem = f"schema: {result.get('schema')!r}, expected {RESULT_SCHEMA!r}"
            elif expected_case_sha256 is not None and result.get("case_sha256") != expected_case_sha256:
                problem = "case_sha256: does not match the case"
            elif hashlib.sha256(data).hexdigest() != _recorded_result_sha256(path.parent / KEY_FILE):
                problem = "content does not match the hash recorded in cache-key.json (edited or corrupt)"
        if problem is not None:
            if notes is not None:
                notes.append(f"{path}: {problem}; ignored, the case runs again")
            return None
        return result

    # --- writing ------------------------------------------------------------------------------

    def partial_dir(self, case_name, key, token):
        """Hidden folder a run in progress writes into (never read as a result)."""
        case_dir = self.root / _safe_component(case_name, "case name")
        return case_dir / f".{_safe_component(key, 'key')}.partial-{_safe_component(token, 'token')}"

    def begin(self, case_name, key, token):
        """Create (empty) and return the partial folder for a new run."""
        partial = self.partial_dir(case_name, key, token)
        if partial.exists():
            shutil.rmtree(partial)
        partial.mkdir(parents=True)
        return partial

    def commit(self, partial, case_name, key, inputs):
        """Publish a finished run: write ``cache-key.json``, then rename the folder onto its key.

        The run must have written a readable ``result.json`` of schema hornproof.result/1;
        otherwise ValueError and nothing is published. Returns the entry folder.
        """
        partial = Path(partial)
        try:
            result = json.loads((partial / RESULT_FILE).read_text(encoding="utf-8"))
        except (OSError, UnicodeDecodeError, ValueError) as error:
            raise ValueError(f"{partial / RESULT_FILE}: not a finished result ({error})") from None
        if not isinstance(result, dict) or result.get("schema") != RESULT_SCHEMA:
            raise ValueError(f"{partial / RESULT_FILE}: schema: expected {RESULT_SCHEMA!r}")
        recorded = dict(inputs, result_sha256=hashlib.sha256((partial / RESULT_FILE).read_bytes()).hexdigest())
        write_text_atomic(partial / KEY_FILE, json.dumps(recorded, indent=2, sort_keys=True) + "\n")
        final = self.entry_dir(case_name, key)
        # another run may have published the same key meanwhile (or a broken entry is in the
        # way): replace_folder moves it aside first
        aside = final.with_name(f".{key}.replaced-{partial.name.rsplit('-', 1)[-1]}")
        if aside.exists():
            shutil.rmtree(aside)
        replace_folder(partial, final, aside)
        return final

    def keep_failed(self, partial, case_name, key):
        """Keep a failed run's folder as ``.<key>.failed`` (replacing an older one); return it."""
        partial = Path(partial)
        failed = partial.with_name(f".{_safe_component(key, 'key')}.failed")
        if failed.exists():
            shutil.rmtree(failed, ignore_errors=True)
        if partial.exists():
            os.replace(partial, failed)
        return failed

    def discard(self, partial):
        """Remove a partial folder (an interrupted run)."""
        shutil.rmtree(Path(partial), ignore_errors=True)

    def write_result(self, partial, result):
        """Write a summary dict as ``result.json`` into a partial folder (atomically).

        For runners that return the summary without writing it (verify writes it itself).
        """
        write_text_atomic(Path(partial) / RESULT_FILE, json.dumps(result, indent=2, sort_keys=True) + "\n")


def _recorded_result_sha256(key_file):
    """The ``result_sha256`` recorded in an entry's ``cache-key.json``, or ``""`` (matches no
    content, so the case runs again) when it is missing, unreadable or from an entry written
    before the hash was recorded."""
    try:
        recorded = json.loads(key_file.read_text(encoding="utf-8")).get("result_sha256")
    except (OSError, ValueError, AttributeError):
        return ""
    return recorded if isinstance(recorded, str) else ""
