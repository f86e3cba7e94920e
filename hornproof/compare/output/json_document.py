"""Plain JSON text of hornproof's documents (result summaries, sweeps), and reading them back.

JSON has no NaN or infinity (RFC 8259; a strict parser refuses them): they are written as
``null``. numpy arrays and scalars become lists and plain numbers.
"""

import json
import math
import os
import stat

import numpy as np

from ...errors import InputError
from .schema_check import refuse_schema


def jsonable(value):
    """Recursively convert numpy scalars/arrays to plain Python; NaN and inf become None."""
    if isinstance(value, dict):
        return {str(k): jsonable(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [jsonable(v) for v in value]
    if isinstance(value, np.ndarray):
        return [jsonable(v) for v in value.tolist()]
    if isinstance(value, (np.floating, float)):
        value = float(value)
        return value if math.isfinite(value) else None
    if isinstance(value, np.integer):
        return int(value)
    if isinstance(value, np.bool_):
        return bool(value)
    return value


def dumps(document):
    """The JSON text of ``document`` (``jsonable`` first), one trailing newline."""
    return json.dumps(jsonable(document), indent=1, sort_keys=False, allow_nan=False) + "\n"


#: largest JSON document a reader accepts (a summary of 1000 frequencies is a few MiB)
MAX_DOCUMENT_BYTES = 256 * 2**20


def read_json_document(path, schema):
    """The JSON object in ``path``; ``InputError`` (one line) unless it carries ``schema``."""
    path = os.fspath(path)
    try:
        if not stat.S_ISREG(os.stat(path).st_mode):
            raise InputError(f"{path}: not a regular file")
        if os.stat(path).st_size > MAX_DOCUMENT_BYTES:
            raise InputError(f"{path}: larger than {MAX_DOCUMENT_BYTES // 2**20} MiB; not a hornproof summary")
        with open(path, encoding="utf-8") as handle:
            document = json.load(handle)
    except FileNotFoundError:
        raise InputError(f"{path}: not found") from None
    except json.JSONDecodeError as error:
        raise InputError(f"{path}: not valid JSON ({error.msg}, line {error.lineno})") from None
    except UnicodeDecodeError as error:
        raise InputError(f"{path}: not UTF-8 text (bad byte at offset {error.start}); not a hornproof file") from None
    except RecursionError:
        raise InputError(f"{path}: nested too deeply; not a hornproof file") from None
    except OSError as error:
        raise InputError(f"{path}: cannot read ({error.strerror or error})") from None
    if not isinstance(document, dict):
        raise InputError(f"{path}: expected a JSON object (schema {schema})")
    if document.get("schema") != schema:
        refuse_schema(path, document.get("schema"), schema, holder="key")
    return document


def stamped(document, schema):
    """``document`` made JSON-ready with ``"schema"`` first; ``ValueError`` if it names another."""
    if not isinstance(document, dict):
        raise ValueError("document: expected a dict")
    found = document.get("schema", schema)
    if found != schema:
        raise ValueError(f"document: schema {found!r}, this writer writes {schema}")
    out = {"schema": schema}
    out.update(jsonable(document))
    return out
