"""Which solver build runs here: Meep's version, the one place it is read."""

import importlib.util
import sys

UNAVAILABLE = "unavailable"


def meep_version():
    """Meep's version string, without importing Meep when it is not loaded yet.

    Importing Meep takes about a second (it starts MPI); a regression run that only reads its
    cache should not pay that. Reads ``__version__`` from the loaded module, else from the
    installed module's source, else imports it; ``"unavailable"`` when there is no Meep.
    """
    module = sys.modules.get("meep")
    if module is not None and hasattr(module, "__version__"):
        return str(module.__version__)
    try:
        spec = importlib.util.find_spec("meep")
    except (ImportError, ValueError):
        spec = None
    if spec is None or not spec.origin:
        return UNAVAILABLE
    try:
        with open(spec.origin, encoding="utf-8") as handle:
            for line in handle:
                if line.startswith("__version__"):
                    return line.split("=", 1)[1].strip().strip("'\"")
    except OSError:
        pass
    try:
        import meep

        return str(meep.__version__)
    except Exception:  # noqa: BLE001 - any failure here just means "unknown"
        return UNAVAILABLE
