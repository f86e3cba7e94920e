"""Reading ``result.json`` (schema ``hornproof.result/1``), the summary of a verify or simulate run.

The summary is assembled in :mod:`hornproof.compare.output.summary`; its keys are described in
DEVELOPERS.md ("Result summary"). Readers refuse any other schema string with one line naming
the file and the schema this version reads.
"""

import json
from pathlib import Path

from ...errors import InputError

RESULT_SCHEMA = "hornproof.result/1"


def read_schema_json(path, schema):
    """Load the JSON object in ``path`` and check that its ``schema`` key equals ``schema``.

    Raises
    ------
    InputError
        The file is missing, is not JSON, is not an object, or carries another schema (one
        line naming the file and the expected schema, with a hint).
    """
    try:
        data = json.loads(Path(path).read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise InputError(f"{path}: not found") from None
    except json.JSONDecodeError as error:
        raise InputError(f"{path}: not valid JSON ({error.msg}, line {error.lineno})") from None
    if not isinstance(data, dict):
        raise InputError(f"{path}: expected a JSON object")
    found = data.get("schema")
    if found != schema:
        raise InputError(
            f"{path}: schema: {found!r} is not {schema!r}; this hornproof reads only {schema} — "
            "re-run the case with this version, or use the hornproof version that wrote it"
        )
    return data


def read_result_json(path):
    """The ``hornproof.result/1`` summary in ``path`` as a dict (see :func:`read_schema_json`)."""
    return read_schema_json(path, RESULT_SCHEMA)
