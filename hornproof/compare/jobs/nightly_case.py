"""What the nightly suite runs for one case: ``verify``, and for a case with a ``[sweep]`` the
sweep too, whose breakdown intervals and optima join the case's figures.

The quick tier runs the sweep's analytic models only (the phase-approximation breakdown and the
analytic optima: instant, and they should never move); the full tier runs every point in FDTD
as ``hornproof sweep`` does. The sweep's folder is ``sweep/`` inside the case's result folder.
"""

from pathlib import Path

from ..numerics.metrics import band_centre_index
from ..output.result_json import write_result_json
from .messages import is_writer, say
from .sweep import regress_figures, run_sweep
from .verify import verify_case

#: the tier whose nightly run computes the sweep's FDTD points
FDTD_SWEEP_TIER = "full"


def run_nightly_case(case, out_dir, *, force=False, progress=None):
    """Verify ``case`` into ``out_dir``; with a sweep, run it into ``out_dir/sweep`` and add its
    figures (``sweep_figures``) to the summary and result.json. Returns the summary."""
    summary = verify_case(case, out_dir, force=force, progress=progress)
    if case.sweep is None:
        return summary
    document = run_sweep(case, Path(out_dir) / "sweep", analytic_only=case.tier != FDTD_SWEEP_TIER, force=force,
                         log=say)
    summary["sweep_figures"] = regress_figures(document, band_centre_index(case.frequencies))
    if is_writer():
        write_result_json(Path(out_dir) / "result.json", summary)
    return summary
