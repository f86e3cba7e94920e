import importlib.util

import pytest

from hornproof.compare.numerics.breakdown import analytic_breakdown, breakdown_interval


def pytest_collection_modifyitems(config, items):
    """Skip full-wave tests with a clear reason when Meep is not importable."""
    if importlib.util.find_spec("meep") is not None:
        return
    skip = pytest.mark.skip(reason="Meep (Debian python3-meep-mpi-default) not importable: run scripts/bootstrap")
    for item in items:
        if "fullwave" in item.keywords or "slow" in item.keywords:
            item.add_marker(skip)


def pytest_sessionfinish(session, exitstatus):
    """Meep prints "Elapsed run time" at interpreter exit; keep pytest's summary the last line."""
    import atexit
    import sys

    module = sys.modules.get("meep")
    report = getattr(module, "report_elapsed_time", None) if module is not None else None
    if report is not None:
        atexit.unregister(report)


def _synthetic_sweep(angle, phase, aperture, u):
    """A sweep.json document (schema hornproof.sweep/2) of invented numbers."""
    n = len(angle)
    return {
        "schema": "hornproof.sweep/2", "case": "sweep-synthetic", "title": "Synthetic sweep",
        "case_sha256": "1" * 64, "dims": 3, "label": "3D model of the real horn",
        "parameter": {"name": "flare_half_angle_h_deg", "label": "H-plane flare half-angle",
                      "unit": "deg", "values": list(angle), "held_fixed": "flare length"},
        "frequency_ghz": 10.5, "figure": {"name": "directivity_dbi", "label": "Directivity", "unit": "dBi"},
        "tolerance": 0.5,
        "models": {"closed_form": list(16 + phase), "exact_phase": [16.0] * n, "fdtd": list(16 - aperture)},
        "fdtd_uncertainty": list(u), "fdtd_confident_uncertainty": list(u), "fdtd_disagreement_bound": list(u),
        "fdtd_ladder": ["monotone"] * n,
        "errors": {"phase_approximation": list(phase), "aperture_model": list(aperture),
                   "total": list(phase + aperture)},
        "uncertainties": {"phase_approximation": [0.0] * n, "aperture_model": list(u), "total": list(u)},
        "breakdown": {"phase_approximation": analytic_breakdown(angle, phase, 0.5),
                      "aperture_model": breakdown_interval(angle, aperture, u, u, 0.5),
                      "total": breakdown_interval(angle, phase + aperture, u, u, 0.5)},
        "optimum": {}, "principal_plane": None, "parting": None, "solver": {}, "warnings": [],
    }


@pytest.fixture
def synthetic_sweep():
    """Builds a sweep.json document (schema hornproof.sweep/2) of invented numbers."""
    return _synthetic_sweep
