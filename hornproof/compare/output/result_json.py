"""``result.json``: the summary of a verify or simulate run (schema ``hornproof.result/1``).

The keys are described in :mod:`hornproof.compare.report.html` and ARCHITECTURE.md; keys may be
added, none is renamed without a schema bump.
"""

from ...atomic import write_text_atomic
from ...errors import InputError
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
    document = read_json_document(path, RESULT_SCHEMA)
    problem = result_shape_problem(document)
    if problem:
        raise InputError(f"{path}: {problem}; not a result.json as hornproof writes it")
    return document


def result_shape_problem(document):
    """Why ``document`` is not shaped like a ``hornproof.result/1`` summary (the keys every
    reader relies on), or None: ``case`` a string, ``frequencies_ghz`` a list of positive
    numbers, ``models`` a table of tables whose lists are aligned with the frequencies."""
    if not isinstance(document.get("case"), str):
        return "case: must be a string"
    frequencies = document.get("frequencies_ghz")
    if not isinstance(frequencies, list) or not all(
            isinstance(f, (int, float)) and not isinstance(f, bool) and f > 0 for f in frequencies):
        return "frequencies_ghz: must be a list of positive numbers"
    models = document.get("models", {})
    if not isinstance(models, dict):
        return "models: must be a table"
    for name, model in models.items():
        if not isinstance(model, dict):
            return f"models.{name}: must be a table"
        for key, values in model.items():
            if isinstance(values, list) and values and not isinstance(values[0], list) \
                    and len(values) != len(frequencies):
                return f"models.{name}.{key}: {len(values)} values for {len(frequencies)} frequencies"
    for key in ("comparison", "solver", "geometry"):
        if key in document and not isinstance(document[key], dict):
            return f"{key}: must be a table"
    return None
