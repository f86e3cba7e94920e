"""Recording a baseline: a finished run's figures and the settings that produced them.

The file format (``hornproof.baseline/1``) is :mod:`hornproof.compare.output.baseline_file`.
"""

import dataclasses
import json
from datetime import datetime, timezone

from ..output.baseline_file import Baseline, figures_from_result

__all__ = ["settings_record", "baseline_from_result"]


def settings_record(case):
    """JSON-ready FDTD settings of a (tier) case, for the cache key and the baseline."""
    settings = getattr(case, "fdtd", None)
    if settings is None:
        return {}
    if dataclasses.is_dataclass(settings):
        record = dataclasses.asdict(settings)
    elif isinstance(settings, dict):
        record = dict(settings)
    else:
        return {"repr": repr(settings)}
    return json.loads(json.dumps(record, sort_keys=True, default=str))


def baseline_from_result(result, *, case, tier, settings, hornproof_version, recorded_utc=None,
                         computation_sha256=""):
    """Build a Baseline from a finished run's summary.

    Parameters
    ----------
    result : dict
        hornproof.result/1 summary.
    case : str
        Case name.
    tier : str
    settings : dict
        JSON-ready FDTD settings of the tier case (:func:`settings_record`).
    hornproof_version : str
        :func:`hornproof.version.build_version` of the code that ran.
    recorded_utc : str, optional
        ISO-8601 UTC time stamp; now by default.
    """
    frequencies, figures = figures_from_result(result)
    solver = result.get("solver") if isinstance(result.get("solver"), dict) else {}
    if recorded_utc is None:
        recorded_utc = datetime.now(timezone.utc).replace(microsecond=0).strftime("%Y-%m-%dT%H:%M:%SZ")
    return Baseline(
        case=case,
        tier=tier,
        case_sha256=str(result.get("case_sha256", "")),
        frequencies_ghz=frequencies,
        figures=figures,
        solver={k: solver[k] for k in ("meep", "cells_per_wavelength") if k in solver},
        settings=settings,
        hornproof_version=hornproof_version,
        recorded_utc=recorded_utc,
        computation_sha256=computation_sha256,
    )
