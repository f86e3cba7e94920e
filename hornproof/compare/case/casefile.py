"""Case files, format 1: read a TOML horn case in edge units and validate it into a ``Case``.

A case file describes one horn, its band, how to model it with FDTD and how closely the models
must agree. Everything read from it is converted to SI (mm -> m, GHz -> Hz); degrees and
decibels stay only where they are tolerances or swept values shown to the user.

Every problem with a case file raises :class:`hornproof.errors.InputError` with one line,
``"<file>: <dotted.key>: <reason>"``. Conditions that are legal but worth knowing (a feed guide
that is no longer single-mode, a grid too coarse for the narrowest opening, a band edge close to
cutoff) become one-line strings in ``Case.warnings``.

This module is the entry point; the format lives in one module per table: ``horn_table``,
``band_table``, ``fdtd_table``, ``checks_table``, ``sweep_table``, ``tiers_table`` (each with
its ``*_KEYS``), the top level in ``definition``, typed values in ``values``, the file itself in
``reading`` and the record in ``record``. The keys are documented in ``README.md`` ("Case
files") and ``cases/README.md`` ("Writing your own"). The format is hornproof's own.
"""

from pathlib import Path

from .reading import read_toml
from .record import Case

__all__ = ["Case", "load_case"]


def load_case(path):
    """Read and validate a format-1 case file.

    Parameters
    ----------
    path : str or Path
        The ``.toml`` case file.

    Returns
    -------
    Case

    Raises
    ------
    InputError
        One line, ``"<file>: <dotted.key>: <reason>"``, for every problem with the file.
    """
    path = Path(path)
    return Case.from_definition(path, read_toml(path))
