"""Building the ``hornproof.result/1`` summary (result.json) from a case and model results.

Every list is aligned with ``frequencies_ghz``. Keys may be added; existing keys are never
renamed without a schema bump.
"""

import datetime
import json
import math

import numpy as np

from ...version import build_version
from .safety import RF_EXPOSURE_CAUTION

SCHEMA = "hornproof.result/1"

#: the RF-exposure caution carried by every summary and report (one wording, in safety.py)
SAFETY_NOTE = RF_EXPOSURE_CAUTION


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


def base_summary(case):
    """The case-describing part of a result summary: identity, band, geometry."""
    freqs = np.asarray(case.frequencies, dtype=float)
    centre = float(np.sqrt(freqs.min() * freqs.max()))
    horn = case.horn
    geometry = horn.summary(centre)
    geometry["phase_error_h_wl_per_frequency"] = jsonable(horn.phase_error_h(freqs))
    geometry["phase_error_e_wl_per_frequency"] = jsonable(horn.phase_error_e(freqs))
    return {
        "schema": SCHEMA,
        "case": case.name,
        "case_file": str(case.path),
        "case_sha256": case.sha256,
        "title": case.title,
        "dims": int(case.fdtd.dims),
        "frequencies_ghz": jsonable(freqs / 1e9),
        "geometry": jsonable(geometry),
        "models": {},
        "hornproof_version": build_version(),
        "created_utc": datetime.datetime.now(datetime.timezone.utc).isoformat(timespec="seconds"),
        "warnings": list(case.warnings),
        "safety": SAFETY_NOTE,
    }


_result_stream = None


def set_result_stream(stream):
    """Where ``emit`` writes: the command's real standard output (set by the command line)."""
    global _result_stream
    _result_stream = stream


def emit(text=""):
    """Write a command's result (table or JSON) to standard output.

    While a command runs, the command line points ``sys.stdout`` at standard error so that what
    the solver prints (Meep's banners) never mixes with ``--json`` output; results go here.
    """
    import sys

    stream = _result_stream or sys.stdout
    text = str(text)
    stream.write(text if text.endswith("\n") else text + "\n")
    stream.flush()


def emit_result(as_json, document, table, where=None):
    """A command's result on standard output: the JSON document, or the table for people
    followed by where the files are."""
    if as_json:
        emit(dumps(document))
        return
    emit(table)
    if where:
        emit(f"  {where}")


def safety_lines(indent="  ", width=96):
    """The RF-exposure caution wrapped for a terminal."""
    import textwrap

    return textwrap.fill(SAFETY_NOTE, width=width, initial_indent=indent, subsequent_indent=indent)


def dumps(summary):
    return json.dumps(jsonable(summary), indent=1, sort_keys=False, allow_nan=False) + "\n"
