"""The ``[checks]`` table of a case file: how closely FDTD must agree with an analytic model.

Each tolerance key (the one list is ``compare.numerics.figures.CHECK_TOLERANCE_KEYS``) holds a
positive tolerance, dB for the *_db keys, degrees for the *_deg keys, mm for *_mm and
percentage points for *_pct; ``model`` names the
analytic model the FDTD result is held against.
"""

from ..numerics.figures import CHECK_TOLERANCE_KEYS
from .values import check_keys, read_choice, read_positive

CHECK_KEYS = CHECK_TOLERANCE_KEYS + ("model",)
#: Analytic models a ``[checks]`` table may hold the FDTD result against.
CHECK_MODELS = ("closed_form", "exact_phase")


def read_checks(table):
    """(tolerance key -> tolerance, name of the analytic model the checks compare against)."""
    check_keys(table, CHECK_KEYS, "checks")
    checks = {}
    for key in CHECK_TOLERANCE_KEYS:
        if key in table:
            unit = {"_db": "dB", "_mm": "mm", "_pct": "percentage points"}.get(key[key.rfind("_"):], "degrees")
            checks[key] = read_positive(table, key, "checks", unit=f"a tolerance in {unit}")
    model = read_choice(table, "model", "checks", CHECK_MODELS, default="closed_form")
    return checks, model
