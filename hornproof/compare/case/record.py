"""The ``Case`` record: one validated case file, SI inside, and its tier and grid variants."""

from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ...analytic.geometry import HornGeometry
from ...errors import InputError
from ...sim.settings import FdtdSettings
from .definition import case_fields
from .fdtd_table import read_cells_ladder
from .range_table import range_distances
from .values import CaseProblem, input_error, one_line, suggestion


@dataclass(frozen=True, eq=False)
class Case:
    """A validated case, SI inside.

    Attributes
    ----------
    path : Path
        The case file.
    name : str
        The file stem (``cases/demo-h-sectoral.toml`` -> ``"demo-h-sectoral"``).
    title : str
        One-line human title (defaults to ``name``).
    horn : HornGeometry
        The horn, metres.
    frequencies : numpy.ndarray
        Analysis frequencies, Hz, ascending (read-only array).
    fdtd : FdtdSettings
        How to model it; ``cells_per_wavelength`` is a tuple, ascending.
    checks : dict
        Check name (``CHECK_TOLERANCE_KEYS``) -> tolerance, dB or degrees as the name says.
    check_model : str
        Which analytic model the checks hold FDTD against: ``"closed_form"`` or ``"exact_phase"``.
    sweep : SweepSpec or None
    tiers : dict
        Tier name -> dict of overrides (``dims``, ``cells_per_wavelength``, ``points``).
    sha256 : str
        Hex SHA-256 of the canonical JSON of the parsed definition (comments and layout do not
        count); a tier or a grid override is part of the hashed definition.
    warnings : tuple of str
        One-line warnings, ``"<file>: <key>: <reason>"``.
    raw : dict
        The parsed TOML table, as read.
    tier : str or None
        The tier applied by :meth:`for_tier`, None for the case as written.
    computation_sha256 : str
        Hash of what defines the computation (no ``[checks]``, no title): what regress
        compares baselines by.
    cells_override : tuple or None
        The ladder set by :meth:`with_cells`, None when the case's own ladder is used.
    feed : FeedSpec
        The ``[feed]`` table (``case.feed_table``): reflector half-angle or f/D, beam levels.
    wall : horn_table.WallSpec or None
        The walls' metal and feed guide length (None: perfect conductors, gain = directivity).
    range_distances : tuple of float
        On-axis distances (m) at which to predict a range measurement (``[range]``); empty: none.
    tolerance : tolerance_table.ToleranceSpec or None
        The tolerance study asked for (``[tolerance]``), None: none.
    map : MapSpec or None
        The case's ``[map]`` (two swept parameters), None without one.
    """

    path: Path
    name: str
    title: str
    horn: HornGeometry
    frequencies: np.ndarray
    fdtd: FdtdSettings
    checks: dict
    check_model: str
    sweep: object
    tiers: dict
    sha256: str
    warnings: tuple
    raw: dict
    tier: str = None
    cells_override: tuple = None
    feed: object = None
    wall: object = None
    range_distances: tuple = ()
    tolerance: object = None
    map: object = None
    computation_sha256: str = ""

    @classmethod
    def from_definition(cls, path, raw, *, tier=None, cells_override=None):
        """The case defined by the parsed TOML ``raw`` of the file ``path``.

        Raises ``InputError`` (one line naming file, key and reason) for any problem.
        """
        return cls(**case_fields(path, raw, tier=tier, cells_override=cells_override))

    def for_tier(self, name):
        """This case with tier ``name``'s overrides applied (its own ``sha256``).

        The tier is applied to the definition as written; a grid set by :meth:`with_cells`
        stays in force. Raises ``InputError`` for a tier the case does not have.
        """
        if name not in self.tiers:
            hint = suggestion(name, self.tiers)
            raise InputError(one_line(f"{self.path}: tiers: unknown tier {name!r}{hint}; "
                                      f"this case has {', '.join(sorted(self.tiers))}"))
        return Case.from_definition(self.path, self.raw, tier=name,
                                    cells_override=self.cells_override)

    def with_range(self, distances_m, *, source="--range-m"):
        """This case with its ``[range]`` distances (m) replaced (its own ``sha256``)."""
        try:
            distances = range_distances(list(distances_m), source)
        except CaseProblem as problem:
            raise input_error(self.path, problem) from None
        raw = dict(self.raw, range={"distances_m": list(distances)})
        return Case.from_definition(self.path, raw, tier=self.tier, cells_override=self.cells_override)

    def with_cells(self, cells_per_wavelength, *, source="--cells-per-wavelength"):
        """This case with its convergence ladder replaced (its own ``sha256``).

        Parameters
        ----------
        cells_per_wavelength : number or sequence of numbers
            New ladder, cells per wavelength at f_max, each at least 4.
        source : str
            Name used for this value in error messages (the command-line option).
        """
        value = list(cells_per_wavelength) if isinstance(cells_per_wavelength, (list, tuple)) \
            else cells_per_wavelength
        try:
            cells = read_cells_ladder(value, source)
        except CaseProblem as problem:
            raise input_error(self.path, problem) from None
        return Case.from_definition(self.path, self.raw, tier=self.tier, cells_override=cells)
