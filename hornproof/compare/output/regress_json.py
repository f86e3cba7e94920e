"""The regression summary ``regress.json`` (schema ``hornproof.regress/1``).

One JSON object per run of the suite, pretty-printed with sorted keys::

    {"schema": "hornproof.regress/1", "tier": "quick",
     "hornproof_version": "<release>+src.<digest>", "solver_version": "1.25.0",
     "started_utc": "...", "finished_utc": "...", "exit_status": 0,
     "counts": {"unchanged": 40, ...},          # figures per status (a failed case counts once)
     "baselines_updated": ["cases/baselines/<case>.<tier>.json", ...],
     "cases": [{"case": ..., "status": ..., "figures": [{"figure": ..., "status": ...}, ...]}, ...]}

Keys may be added; these are never renamed without a schema bump.
"""

import json
from pathlib import Path

from ...atomic import write_text_atomic
from ...version import build_version

__all__ = ["SCHEMA", "summary_document", "dumps", "write_summary", "is_regress_summary"]

SCHEMA = "hornproof.regress/1"
SCHEMA_FAMILY = "hornproof.regress/"


def summary_document(cases, *, tier, counts, exit_status, solver_version, started_utc, finished_utc, updated=()):
    """The ``hornproof.regress/1`` document (a dict).

    Parameters
    ----------
    cases : list of dict
        One JSON-ready entry per case (``CaseOutcome.to_dict()``).
    tier : str
    counts : dict of str -> int
        Figures per status.
    exit_status : int
        The run's exit status (0 no regression, 1 a regression or failed run).
    solver_version : str
        Meep's version string.
    started_utc, finished_utc : str
        ISO-8601 UTC time stamps.
    updated : sequence of str
        Baseline files written by this run.
    """
    return {
        "schema": SCHEMA,
        "tier": tier,
        "hornproof_version": build_version(),
        "solver_version": solver_version,
        "started_utc": started_utc,
        "finished_utc": finished_utc,
        "exit_status": exit_status,
        "counts": counts,
        "baselines_updated": list(updated),
        "cases": list(cases),
    }


def dumps(document):
    """The document as written (indented, sorted keys, trailing newline not included)."""
    return json.dumps(document, indent=2, sort_keys=True)


def write_summary(path, document):
    """Write the document to ``path`` atomically."""
    write_text_atomic(path, dumps(document) + "\n")


def is_regress_summary(path):
    """True when ``path`` holds a regression summary of a hornproof schema (any version), i.e.
    a file a new run may replace."""
    try:
        schema = json.loads(Path(path).read_text(encoding="utf-8")).get("schema", "")
    except (OSError, UnicodeDecodeError, ValueError, AttributeError):
        return False
    return isinstance(schema, str) and schema.startswith(SCHEMA_FAMILY)
