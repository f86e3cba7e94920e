"""Which hornproof produced a file: the one version string every output carries.

``VERSION`` is the release number. Between releases the code that computes a result changes
without the number changing, so outputs record :func:`build_version` — the release number plus
a short digest of the package's Python sources — and the regression cache keys on it: a nightly
run after a code change runs again instead of reading yesterday's results.
"""

import functools
import hashlib
from pathlib import Path

VERSION = "0.1.0"

#: hex digits of the source digest kept in the version string
SOURCE_DIGEST_LENGTH = 12


def source_digest(package=None):
    """Short SHA-256 over the package's Python sources (relative paths and contents).

    Parameters
    ----------
    package : path-like, optional
        Package folder to digest; default: the installed ``hornproof`` package.

    Returns
    -------
    str
        ``SOURCE_DIGEST_LENGTH`` hex digits.
    """
    package = Path(package) if package is not None else Path(__file__).resolve().parent
    digest = hashlib.sha256()
    for path in sorted(package.rglob("*.py")):
        if "__pycache__" in path.parts:
            continue
        digest.update(str(path.relative_to(package)).encode("utf-8") + b"\0")
        try:
            digest.update(path.read_bytes())
        except OSError:
            digest.update(b"<unreadable>")
        digest.update(b"\0")
    return digest.hexdigest()[:SOURCE_DIGEST_LENGTH]


@functools.lru_cache(maxsize=1)
def build_version():
    """``<VERSION>+src.<source digest>``: the string written into result.json, sweep.json,
    baselines, regress.json and JUnit properties (computed once per process)."""
    return f"{VERSION}+src.{source_digest()}"
