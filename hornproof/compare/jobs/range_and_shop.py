"""Range and shop figures of a verify run: wall loss, finite-range gain, tolerance study.

One entry point for :mod:`.verify` (orchestration only; each idea has its own module):
:mod:`.wall_loss_block`, :mod:`.range_block`, :mod:`.tolerance_block`. Each adds its block to
the summary only when the case asks for it (``horn.wall_material``, ``[range]`` or
``--range-m``, ``[tolerance]``); a case without them gives the same result as before.
"""

from .range_block import range_block
from .tolerance_block import tolerance_block
from .wall_loss_block import apply_wall_loss, wall_loss_block, wall_loss_of


def add_range_and_shop(case, summary, sim_results=None, ladder=None):
    """Add ``wall_loss``, ``finite_range`` and ``tolerance`` to ``summary`` (in place) as the
    case asks, and lower the gains of ``summary["models"]`` by the wall loss. Call it after the
    FDTD block is in ``models`` and before the comparison; ``sim_results`` and ``ladder`` (the
    FDTD rungs) add the FDTD range gain of a 3D model."""
    loss = wall_loss_of(case)
    if loss is not None:
        summary["wall_loss"] = wall_loss_block(case, loss)
        apply_wall_loss(summary["models"], loss, case.fdtd.dims)
    ranged = range_block(case, loss, sim_results, ladder)
    if ranged is not None:
        summary["finite_range"] = ranged
    study = tolerance_block(case)
    if study is not None:
        summary["tolerance"] = study
    return summary
