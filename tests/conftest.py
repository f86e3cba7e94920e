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
