"""Meep's exit banner: at exit, Meep prints "Elapsed run time" on standard output.

hornproof reports its own times, and ``--json`` output must stay pure JSON, so the command line
unregisters that exit hook. Only a Meep already loaded is touched (this never imports Meep).
"""

import atexit
import sys


def silence_exit_banner():
    """Unregister Meep's "Elapsed run time" exit hook, if Meep is loaded."""
    module = sys.modules.get("meep")
    report = getattr(module, "report_elapsed_time", None) if module is not None else None
    if report is not None:
        atexit.unregister(report)
