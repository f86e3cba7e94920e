"""``sweep.json``: the document of a sweep run (schema ``hornproof.sweep/2``).

The keys are described in :mod:`hornproof.compare.report.html`.
"""

from ...atomic import write_text_atomic
from .json_document import dumps, read_json_document, stamped

SWEEP_SCHEMA = "hornproof.sweep/2"


def write_sweep_json(path, document):
    """Write ``sweep.json`` atomically with ``"schema": "hornproof.sweep/2"``; NaN -> ``null``.

    A document carrying a different schema is refused (``ValueError``). Returns the JSON-ready
    document.
    """
    document = stamped(document, SWEEP_SCHEMA)
    write_text_atomic(path, dumps(document))
    return document


def read_sweep_json(path):
    """Read a ``sweep.json``; refuse other schemas with a one-line ``InputError`` and a hint."""
    return read_json_document(path, SWEEP_SCHEMA)
