"""The head of every ``hornproof.result/1`` summary (result.json): case identity, band, geometry.

Every list is aligned with ``frequencies_ghz``. Keys may be added; existing keys are never
renamed without a schema bump.
"""

import datetime

import numpy as np

from ...units import GHZ
from .json_document import jsonable
from .result_json import RESULT_SCHEMA
from ...version import build_version
from .safety import RF_EXPOSURE_CAUTION

#: the RF-exposure caution carried by every summary and report (one wording, in safety.py)
SAFETY_NOTE = RF_EXPOSURE_CAUTION


def base_summary(case):
    """The case-describing part of a result summary: identity, band, geometry."""
    freqs = np.asarray(case.frequencies, dtype=float)
    centre = float(np.sqrt(freqs.min() * freqs.max()))
    horn = case.horn
    geometry = horn.summary(centre)
    geometry["phase_error_h_wl_per_frequency"] = jsonable(horn.phase_error_h(freqs))
    geometry["phase_error_e_wl_per_frequency"] = jsonable(horn.phase_error_e(freqs))
    return {
        "schema": RESULT_SCHEMA,
        "case": case.name,
        "case_file": str(case.path),
        "case_sha256": case.sha256,
        "title": case.title,
        "dims": int(case.fdtd.dims),
        "frequencies_ghz": jsonable(freqs / GHZ),
        "geometry": jsonable(geometry),
        "models": {},
        "hornproof_version": build_version(),
        "created_utc": datetime.datetime.now(datetime.timezone.utc).isoformat(timespec="seconds"),
        "warnings": list(case.warnings),
        "safety": SAFETY_NOTE,
    }
