import importlib.util

import pytest


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
