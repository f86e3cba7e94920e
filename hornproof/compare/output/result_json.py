"""``result.json``: the summary of a verify or simulate run (schema ``hornproof.result/1``).

The keys are described in :mod:`hornproof.compare.report.html` and ARCHITECTURE.md; keys may be
added, none is renamed without a schema bump.
"""

from ...atomic import write_text_atomic
from .json_document import dumps, read_json_document, stamped

RESULT_SCHEMA = "hornproof.result/1"


def write_result_json(path, summary):
    """Write the summary ``result.json`` atomically with ``"schema": "hornproof.result/1"``.

    NaN and infinities become ``null``. A summary carrying a different schema is refused
    (``ValueError``): it was built for another format version. Returns the JSON-ready summary.
    """
    document = stamped(summary, RESULT_SCHEMA)
    write_text_atomic(path, dumps(document))
    return document


def read_result_json(path):
    """Read a ``result.json``; refuse other schemas with a one-line ``InputError`` and a hint."""
    return read_json_document(path, RESULT_SCHEMA)
