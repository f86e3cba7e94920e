"""Case files, format 1: read a TOML horn case in edge units and validate it into a ``Case``.

A case file describes one horn, its band, how to model it with FDTD and how closely the models
must agree. Everything read from it is converted to SI here (mm -> m, GHz -> Hz); degrees and
decibels stay only where they are tolerances or swept values shown to the user.

Every problem with a case file raises :class:`hornproof.errors.InputError` with one line,
``"<file>: <dotted.key>: <reason>"``. Conditions that are legal but worth knowing (a feed guide
that is no longer single-mode, a grid too coarse for the narrowest opening, a band edge close to
cutoff) become one-line strings in ``Case.warnings``.

The keys are listed in the tables ``*_KEYS`` below and documented in ``README.md`` ("Case
files") and ``cases/README.md`` ("Writing your own"). The format is hornproof's own.
"""

import difflib
import hashlib
import json
import math
import re
import tomllib
import types
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ...analytic.geometry import HORN_TYPES, HornGeometry, flare_half_angle, validate_geometry
from ...analytic.waveguide import (
    EIA_WAVEGUIDES,
    te01_cutoff_frequency,
    te10_cutoff_frequency,
    te20_cutoff_frequency,
    waveguide_size,
)
from ...errors import InputError
from ...sim.settings import FdtdSettings
from ...units import GHZ, MM, SPEED_OF_LIGHT
from .sweepspec import MAX_FLARE_HALF_ANGLE_DEG, SWEEP_PARAMETERS, SweepSpec, sweep_applies_to

#: The case-file format this module reads.
FORMAT_VERSION = 1

TOP_KEYS = ("format", "title", "horn", "band", "fdtd", "checks", "sweep", "tiers")
HORN_KEYS = ("type", "waveguide", "waveguide_a_mm", "waveguide_b_mm", "aperture_a_mm",
             "aperture_b_mm", "flare_length_mm", "wall_mm")
BAND_KEYS = ("f_min_ghz", "f_max_ghz", "points", "frequencies_ghz")
FDTD_KEYS = ("dims", "cells_per_wavelength", "pml_wavelengths", "padding_wavelengths",
             "feed_length_wavelengths", "decay_by", "max_time_periods", "symmetry",
             "pattern_step_deg", "full_pattern_step_deg", "quick_2d")
#: Tolerances of ``[checks]``: dB for the *_db keys, degrees for the *_deg keys.
CHECK_TOLERANCE_KEYS = ("directivity_db", "gain_db", "hpbw_deg", "first_null_deg", "sll_db",
                        "pattern_rms_db", "s11_db")
CHECK_KEYS = CHECK_TOLERANCE_KEYS + ("model",)
#: Analytic models a ``[checks]`` table may hold the FDTD result against.
CHECK_MODELS = ("closed_form", "exact_phase")
SWEEP_KEYS = ("parameter", "values", "dims", "cells_per_wavelength")
TIER_NAMES = ("quick", "full")
TIER_KEYS = ("dims", "cells_per_wavelength", "points")

#: Smallest grid density accepted, cells per wavelength at f_max.
MIN_CELLS_PER_WAVELENGTH = 4.0
#: a finer grid is a typing slip, not a model (hornproof's limit; the resource estimate
#: refuses far smaller ones on a 24 GiB machine)
MAX_CELLS_PER_WAVELENGTH = 400.0
#: Fewer cells than this across the narrowest opening of the model draws a warning
#: (common practice for FDTD: a few cells across the smallest feature; the threshold of 4 is
#: hornproof's own choice).
MIN_CELLS_ACROSS_OPENING = 4.0
#: Default ladder when ``fdtd.cells_per_wavelength`` is absent.
DEFAULT_CELLS_PER_WAVELENGTH = (12.0,)
#: The default "quick" tier never runs finer than this.
QUICK_TIER_MAX_CELLS = 10.0
#: A band edge closer than this fraction above TE10 cutoff draws a warning.
NEAR_CUTOFF_FRACTION = 0.05
DEFAULT_WALL_MM = 1.0
#: Most frequencies a band may hold (each one is a DFT monitor frequency in the FDTD model).
MAX_BAND_POINTS = 1000
#: Relative tolerance for "must equal the guide size" (sectoral horns).
_SAME_SIZE_RTOL = 1e-6

_REQUIRED = object()


class _Problem(Exception):
    """A problem at one dotted key; turned into an ``InputError`` naming the file."""

    def __init__(self, key, reason):
        super().__init__(key, reason)
        self.key = key
        self.reason = reason


# --- the result ----------------------------------------------------------------------------


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
    cells_override : tuple or None
        The ladder set by :meth:`with_cells`, None when the case's own ladder is used.
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

    def for_tier(self, name):
        """This case with tier ``name``'s overrides applied (its own ``sha256``).

        The tier is applied to the definition as written; a grid set by :meth:`with_cells`
        stays in force. Raises ``InputError`` for a tier the case does not have.
        """
        if name not in self.tiers:
            hint = _suggestion(name, self.tiers)
            raise InputError(_one_line(f"{self.path}: tiers: unknown tier {name!r}{hint}; "
                                       f"this case has {', '.join(sorted(self.tiers))}"))
        return _build_case(self.path, self.raw, tier=name, cells_override=self.cells_override)

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
            cells = _cells_ladder(value, source)
        except _Problem as problem:
            raise InputError(_one_line(f"{self.path}: {problem.key}: {problem.reason}")) from None
        return _build_case(self.path, self.raw, tier=self.tier, cells_override=cells)


# --- entry point ---------------------------------------------------------------------------


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
    return _build_case(path, read_toml(path))


def read_toml(path):
    """Parse a TOML file into a dict; any failure is a one-line ``InputError`` naming the file."""
    path = Path(path)
    try:
        if not path.exists():
            raise InputError(f"{path}: cannot read the case file: no such file")
        if path.is_dir():
            raise InputError(f"{path}: cannot read the case file: it is a directory")
        data = path.read_bytes()
    except (OSError, ValueError) as error:  # ValueError: e.g. a NUL byte in the path
        reason = getattr(error, "strerror", None) or error
        raise InputError(_one_line(f"{path}: cannot read the case file: {reason}")) from None
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as error:
        raise InputError(f"{path}: cannot read the case file: not UTF-8 text "
                         f"(bad byte at offset {error.start})") from None
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        message = _one_line(str(error))
        found = re.search(r"\s*\(at line (\d+), column (\d+)\)\s*$", message)
        if found:
            where = f"line {found.group(1)}, column {found.group(2)}"
            message = message[:found.start()]
        else:
            found = re.search(r"\s*\(at end of document\)\s*$", message)
            where = "end of file"
            if found:
                message = message[:found.start()]
        raise InputError(f"{path}: {where}: invalid TOML: {message}") from None


def definition_sha256(definition):
    """Hex SHA-256 of the canonical JSON of a parsed definition (sorted keys, no spaces).

    Comments and layout vanish in parsing, so they do not change the hash; every value does
    (an integer ``12`` and a float ``12.0`` are different values in TOML and hash differently).
    """
    text = json.dumps(definition, sort_keys=True, separators=(",", ":"), ensure_ascii=False,
                      allow_nan=False, default=str)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


# --- building ------------------------------------------------------------------------------


def _build_case(path, raw, *, tier=None, cells_override=None):
    try:
        return _case_from_definition(path, raw, tier, cells_override)
    except _Problem as problem:
        raise InputError(_one_line(f"{path}: {problem.key}: {problem.reason}")) from None


def _case_from_definition(path, raw, tier, cells_override):
    _check_format(raw)
    _check_keys(raw, TOP_KEYS, "")
    title = _title(raw, path.stem)
    horn, guide_key = _horn(_table(raw, "horn", required=True))
    band_table = _table(raw, "band", required=True)
    band = _band(band_table, "band")
    _check_band_against_guide(band, horn, guide_key)
    fdtd_fields, quick_2d = _fdtd(_table(raw, "fdtd", required=False), horn)
    checks, check_model = _checks(_table(raw, "checks", required=False))
    sweep = _sweep(_table(raw, "sweep", required=False), horn, fdtd_fields)
    tiers = _tiers(_table(raw, "tiers", required=False), horn, band, fdtd_fields, quick_2d)

    if tier is not None:
        overrides = tiers[tier]
        if "points" in overrides:
            band = dict(band, points=overrides["points"])
        for key in ("dims", "cells_per_wavelength"):
            if key in overrides:
                fdtd_fields[key] = overrides[key]
    if cells_override is not None:
        fdtd_fields["cells_per_wavelength"] = tuple(cells_override)

    frequencies = _band_frequencies(band)
    frequencies.setflags(write=False)
    fdtd = FdtdSettings(**fdtd_fields)

    warnings = [f"{path}: {key}: {reason}" for key, reason in
                _guide_warnings(band, frequencies, horn, guide_key)
                + _grid_warnings(horn, frequencies, fdtd.dims, fdtd.cells_per_wavelength,
                                 _cells_key(tier, cells_override))
                + (_grid_warnings(horn, frequencies, sweep.dims, (sweep.cells_per_wavelength,),
                                  "sweep.cells_per_wavelength") if sweep else [])]

    if tier is None and cells_override is None:
        sha = definition_sha256(raw)
    else:
        sha = definition_sha256({"case": raw, "tier": tier,
                                 "cells_per_wavelength": list(cells_override)
                                 if cells_override is not None else None})
    return Case(path=path, name=path.stem, title=title, horn=horn, frequencies=frequencies,
                fdtd=fdtd, checks=checks, check_model=check_model, sweep=sweep, tiers=tiers,
                sha256=sha, warnings=tuple(dict.fromkeys(warnings)), raw=raw, tier=tier,
                cells_override=tuple(cells_override) if cells_override is not None else None)


def _cells_key(tier, cells_override):
    if cells_override is not None:
        return "cells_per_wavelength override"
    if tier is not None:
        return f"tiers.{tier}.cells_per_wavelength"
    return "fdtd.cells_per_wavelength"


# --- generic readers -----------------------------------------------------------------------


def _one_line(text):
    return " ".join(str(text).split())


def _join(prefix, key):
    return f"{prefix}.{key}" if prefix else key


def _describe(value):
    """A short description of a TOML value's type, for error messages."""
    if isinstance(value, bool):
        return f"a boolean ({str(value).lower()})"
    if isinstance(value, str):
        return f"a string ({value!r})"
    if isinstance(value, int):
        return f"an integer ({value})"
    if isinstance(value, float):
        return f"a number ({value!r})"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, dict):
        return "a table"
    return f"a {type(value).__name__} ({value})"


def _suggestion(word, known):
    """' (did you mean ...?)' for the nearest known name (difflib, else a prefix match), or ''."""
    word = str(word)
    match = difflib.get_close_matches(word, list(known), n=1, cutoff=0.6)
    if not match and len(word) >= 3:
        match = [name for name in known if name.startswith(word)][:1]
    return f" (did you mean {match[0]!r}?)" if match else ""


def _check_keys(table, known, prefix):
    for key in table:
        if key not in known:
            hint = _suggestion(key, known) or f" (known keys: {', '.join(known)})"
            raise _Problem(_join(prefix, key), f"unknown key{hint}")


def _table(parent, key, *, required, prefix=""):
    dotted = _join(prefix, key)
    if key not in parent:
        if required:
            raise _Problem(dotted, f"missing required table [{dotted}]")
        return {}
    value = parent[key]
    if not isinstance(value, dict):
        raise _Problem(dotted, f"must be a table [{dotted}], got {_describe(value)}")
    return value


def _is_number(value):
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def _number(value, dotted):
    """A finite int or float (never a boolean) as float."""
    if not _is_number(value):
        raise _Problem(dotted, f"must be a number, got {_describe(value)}")
    if not math.isfinite(value):
        raise _Problem(dotted, f"must be a finite number, got {value!r}")
    return float(value)


def _positive(table, key, prefix, *, unit, default=_REQUIRED):
    dotted = _join(prefix, key)
    if key not in table:
        if default is _REQUIRED:
            raise _Problem(dotted, "missing required key")
        return default
    value = _number(table[key], dotted)
    if value <= 0:
        raise _Problem(dotted, f"must be positive ({unit}), got {table[key]!r}")
    return value


def _bounded(table, key, prefix, default, low, high, *, unit, low_inclusive=False):
    """A number with low < x <= high (or low <= x if ``low_inclusive``)."""
    dotted = _join(prefix, key)
    if key not in table:
        return default
    value = _number(table[key], dotted)
    below = value < low if low_inclusive else value <= low
    if below or value > high:
        left = "[" if low_inclusive else "("
        raise _Problem(dotted, f"must be in {left}{low:g}, {high:g}] ({unit}), got {table[key]!r}")
    return value


def _integer(value, dotted):
    if isinstance(value, bool) or not isinstance(value, int):
        raise _Problem(dotted, f"must be an integer, got {_describe(value)}")
    return value


def _boolean(table, key, prefix, default):
    dotted = _join(prefix, key)
    if key not in table:
        return default
    value = table[key]
    if not isinstance(value, bool):
        raise _Problem(dotted, f"must be true or false, got {_describe(value)}")
    return value


def _choice(table, key, prefix, choices, *, default=_REQUIRED):
    dotted = _join(prefix, key)
    if key not in table:
        if default is _REQUIRED:
            raise _Problem(dotted, f"missing required key (one of {', '.join(map(repr, choices))})")
        return default
    value = table[key]
    if not isinstance(value, str):
        raise _Problem(dotted, f"must be a string, one of {', '.join(map(repr, choices))}; "
                               f"got {_describe(value)}")
    if value not in choices:
        raise _Problem(dotted, f"unknown value {value!r}{_suggestion(value, choices)}; "
                               f"expected one of {', '.join(map(repr, choices))}")
    return value


def _dims(value, dotted, horn):
    if isinstance(value, bool) or not isinstance(value, int) or value not in (2, 3):
        raise _Problem(dotted, f"must be the integer 2 or 3, got {_describe(value)}")
    if value == 2 and horn.kind == "pyramidal":
        raise _Problem(dotted, "a pyramidal horn flares in both planes and has no 2D model; "
                               "use dims = 3")
    return value


def _number_list(value, dotted, *, minimum_length=1):
    if not isinstance(value, list):
        raise _Problem(dotted, f"must be a list of numbers, got {_describe(value)}")
    if len(value) < minimum_length:
        if not value:
            raise _Problem(dotted, "the list is empty")
        raise _Problem(dotted, f"needs at least {minimum_length} values, got {len(value)}")
    numbers = []
    for index, item in enumerate(value):
        numbers.append(_number(item, f"{dotted}[{index}]"))
    return numbers


def _cells_ladder(value, dotted):
    """Cells-per-wavelength ladder: a number or a non-empty list, each >= 4; sorted ascending."""
    if _is_number(value):
        cells = [_number(value, dotted)]
    elif isinstance(value, list):
        cells = _number_list(value, dotted)
    else:
        raise _Problem(dotted, f"must be a number or a list of numbers, got {_describe(value)}")
    for cell in cells:
        if cell < MIN_CELLS_PER_WAVELENGTH:
            raise _Problem(dotted, f"{cell:g} cells per wavelength is too coarse; "
                                   f"use at least {MIN_CELLS_PER_WAVELENGTH:g}")
        if cell > MAX_CELLS_PER_WAVELENGTH:
            raise _Problem(dotted, f"{cell:g} cells per wavelength is beyond any model this machine "
                                   f"could hold; use at most {MAX_CELLS_PER_WAVELENGTH:g}")
    if len(set(cells)) != len(cells):
        raise _Problem(dotted, f"repeated value in the ladder {cells}")
    return tuple(sorted(cells))


# --- top level -----------------------------------------------------------------------------


def _check_format(raw):
    if "format" not in raw:
        raise _Problem("format", f"missing required key; this hornproof reads format "
                                 f"{FORMAT_VERSION} (add the line: format = {FORMAT_VERSION})")
    value = raw["format"]
    if isinstance(value, bool) or not isinstance(value, int):
        raise _Problem("format", f"must be the integer {FORMAT_VERSION}, got {_describe(value)}; "
                                 f"this hornproof reads format {FORMAT_VERSION}")
    if value != FORMAT_VERSION:
        raise _Problem("format", f"unsupported format {value}; this hornproof reads format "
                                 f"{FORMAT_VERSION}")


def _title(raw, default):
    if "title" not in raw:
        return default
    value = raw["title"]
    if not isinstance(value, str):
        raise _Problem("title", f"must be a string, got {_describe(value)}")
    if not value.strip():
        raise _Problem("title", "is empty")
    if "\n" in value or "\r" in value:
        raise _Problem("title", "must be one line")
    return value.strip()


# --- [horn] --------------------------------------------------------------------------------


def _guide(table):
    """(a, b) in metres, and the key that defined them (for messages)."""
    has_name = "waveguide" in table
    explicit = [key for key in ("waveguide_a_mm", "waveguide_b_mm") if key in table]
    if has_name and explicit:
        raise _Problem(f"horn.{explicit[0]}", "give either waveguide (an EIA size) or "
                                             "waveguide_a_mm + waveguide_b_mm, not both")
    if has_name:
        name = table["waveguide"]
        if not isinstance(name, str):
            raise _Problem("horn.waveguide", f"must be an EIA size name such as \"WR-90\", "
                                             f"got {_describe(name)}")
        try:
            guide_a, guide_b = waveguide_size(name)
        except KeyError:
            known = list(EIA_WAVEGUIDES)
            hint = _suggestion(name.strip().upper(), known)
            raise _Problem("horn.waveguide", f"unknown EIA waveguide {name!r}{hint}; known: "
                                             f"{', '.join(known)} (or give waveguide_a_mm "
                                             f"and waveguide_b_mm)") from None
        return guide_a, guide_b, "horn.waveguide"
    if not explicit:
        raise _Problem("horn.waveguide", "missing required key: give an EIA size such as "
                                         "\"WR-90\", or waveguide_a_mm and waveguide_b_mm")
    guide_a = _positive(table, "waveguide_a_mm", "horn", unit="a length in mm") * MM
    guide_b = _positive(table, "waveguide_b_mm", "horn", unit="a length in mm") * MM
    return guide_a, guide_b, "horn.waveguide_a_mm"


def _sectoral_side(table, key, kind, guide, plane_word, guide_word):
    """Aperture side that a sectoral horn keeps equal to the guide: defaulted or checked."""
    if key not in table:
        return guide
    value = _positive(table, key, "horn", unit="a length in mm") * MM
    if abs(value - guide) > _SAME_SIZE_RTOL * guide:
        raise _Problem(f"horn.{key}", f"{value / MM:g} mm differs from the guide {guide_word} "
                                      f"{guide / MM:g} mm; {_kind_words(kind)} keeps {plane_word} "
                                      f"equal to it (leave the key out)")
    return guide


def _kind_words(kind):
    """A horn type in plain words with its article, for messages."""
    return {"h-sectoral": "an H-plane sectoral horn", "e-sectoral": "an E-plane sectoral horn",
            "pyramidal": "a pyramidal horn"}[kind]


def _horn(table):
    _check_keys(table, HORN_KEYS, "horn")
    kind = _choice(table, "type", "horn", HORN_TYPES)
    guide_a, guide_b, guide_key = _guide(table)
    if guide_b > guide_a:
        raise _Problem(_b_key(guide_key), f"guide height b = {guide_b / MM:g} mm exceeds width "
                                          f"a = {guide_a / MM:g} mm (TE10 needs E along the "
                                          f"short side)")
    if kind == "e-sectoral":
        aperture_a = _sectoral_side(table, "aperture_a_mm", kind, guide_a, "A", "width a")
    else:
        aperture_a = _positive(table, "aperture_a_mm", "horn", unit="a length in mm") * MM
    if kind == "h-sectoral":
        aperture_b = _sectoral_side(table, "aperture_b_mm", kind, guide_b, "B", "height b")
    else:
        aperture_b = _positive(table, "aperture_b_mm", "horn", unit="a length in mm") * MM
    flare_length = _positive(table, "flare_length_mm", "horn", unit="a length in mm") * MM
    wall = _positive(table, "wall_mm", "horn", unit="a length in mm",
                     default=DEFAULT_WALL_MM) * MM

    for key, aperture, guide, side, guide_side in (
            ("aperture_a_mm", aperture_a, guide_a, "width A", "width a"),
            ("aperture_b_mm", aperture_b, guide_b, "height B", "height b")):
        if aperture < guide * (1 - 1e-9):
            raise _Problem(f"horn.{key}", f"aperture {side} = {aperture / MM:g} mm is smaller "
                                          f"than the guide {guide_side} = {guide / MM:g} mm")
    if kind in ("h-sectoral", "pyramidal") and not aperture_a > guide_a:
        raise _Problem("horn.aperture_a_mm", f"{_kind_words(kind)} flares in the H-plane: "
                                             f"A must exceed the guide width a = "
                                             f"{guide_a / MM:g} mm")
    if kind in ("e-sectoral", "pyramidal") and not aperture_b > guide_b:
        raise _Problem("horn.aperture_b_mm", f"{_kind_words(kind)} flares in the E-plane: "
                                             f"B must exceed the guide height b = "
                                             f"{guide_b / MM:g} mm")
    for key, aperture, guide, plane in (("aperture_a_mm", aperture_a, guide_a, "H"),
                                        ("aperture_b_mm", aperture_b, guide_b, "E")):
        angle = math.degrees(flare_half_angle(guide, aperture, flare_length))
        if angle >= MAX_FLARE_HALF_ANGLE_DEG:
            raise _Problem(f"horn.{key}", f"{plane}-plane flare half-angle {angle:.1f} deg is "
                                          f"{MAX_FLARE_HALF_ANGLE_DEG:g} deg or more: not a horn "
                                          f"(lengthen flare_length_mm or shrink the aperture)")

    fields = dict(kind=kind, guide_a=guide_a, guide_b=guide_b, aperture_a=aperture_a,
                  aperture_b=aperture_b, flare_length=flare_length, wall_thickness=wall)
    problems = validate_geometry(types.SimpleNamespace(**fields))
    if problems:  # a safety net: the checks above should have named the problem already
        field, reason = problems[0]
        raise _Problem(_geometry_key(field, guide_key), reason)
    return HornGeometry(**fields), guide_key


def _b_key(guide_key):
    return "horn.waveguide_b_mm" if guide_key == "horn.waveguide_a_mm" else guide_key


def _geometry_key(field, guide_key):
    """Case-file key of a ``HornGeometry`` field."""
    return {"kind": "horn.type", "guide_a": guide_key, "guide_b": _b_key(guide_key),
            "aperture_a": "horn.aperture_a_mm", "aperture_b": "horn.aperture_b_mm",
            "flare_length": "horn.flare_length_mm", "wall_thickness": "horn.wall_mm"}[field]


# --- [band] --------------------------------------------------------------------------------


def _band(table, prefix):
    """Validated band: {"list": [GHz...]} or {"f_min", "f_max", "points"} in GHz."""
    _check_keys(table, BAND_KEYS, prefix)
    if "frequencies_ghz" in table:
        clash = [key for key in ("f_min_ghz", "f_max_ghz", "points") if key in table]
        if clash:
            raise _Problem(f"{prefix}.{clash[0]}", "give either frequencies_ghz or "
                                                   "f_min_ghz + f_max_ghz + points, not both")
        dotted = f"{prefix}.frequencies_ghz"
        values = _number_list(table["frequencies_ghz"], dotted)
        if len(values) > MAX_BAND_POINTS:
            raise _Problem(dotted, f"holds {len(values)} frequencies; at most {MAX_BAND_POINTS}")
        for value in values:
            if value <= 0:
                raise _Problem(dotted, f"frequencies must be positive (GHz), got {value:g}")
        if any(later <= earlier for earlier, later in zip(values, values[1:])):
            raise _Problem(dotted, "frequencies must be strictly increasing")
        return {"list": values, "key_min": dotted, "key_max": dotted}
    if "f_min_ghz" not in table and "f_max_ghz" not in table:
        raise _Problem(f"{prefix}.f_min_ghz", "missing required key: give f_min_ghz, f_max_ghz "
                                              "and points, or frequencies_ghz = [...]")
    f_min = _positive(table, "f_min_ghz", prefix, unit="GHz")
    f_max = _positive(table, "f_max_ghz", prefix, unit="GHz")
    if f_min > f_max:
        raise _Problem(f"{prefix}.f_min_ghz", f"f_min_ghz = {f_min:g} is above "
                                              f"f_max_ghz = {f_max:g}")
    if "points" in table:
        points = _band_points(table["points"], f"{prefix}.points", f_min, f_max)
    elif f_min == f_max:
        points = 1
    else:
        raise _Problem(f"{prefix}.points", "missing required key (number of frequencies from "
                                           "f_min_ghz to f_max_ghz)")
    return {"f_min": f_min, "f_max": f_max, "points": points, "points_key": f"{prefix}.points",
            "key_min": f"{prefix}.f_min_ghz", "key_max": f"{prefix}.f_max_ghz"}


def _band_points(value, dotted, f_min, f_max):
    points = _integer(value, dotted)
    if points < 1:
        raise _Problem(dotted, f"must be at least 1, got {points}")
    if points > MAX_BAND_POINTS:
        raise _Problem(dotted, f"must be at most {MAX_BAND_POINTS}, got {points}")
    if points == 1 and f_min != f_max:
        raise _Problem(dotted, "one point needs f_min_ghz equal to f_max_ghz "
                               "(or list the frequency in frequencies_ghz)")
    if points > 1 and f_min == f_max:
        raise _Problem(dotted, f"f_min_ghz equals f_max_ghz, so points must be 1, got {points}")
    return points


def _band_frequencies(band):
    """Frequencies of a validated band, Hz."""
    if "list" in band:
        return np.array(band["list"], dtype=float) * GHZ
    return np.linspace(band["f_min"], band["f_max"], band["points"]) * GHZ


def _check_band_against_guide(band, horn, guide_key):
    frequencies = _band_frequencies(band)
    cutoff = float(te10_cutoff_frequency(horn.guide_a))
    lowest = float(frequencies.min())
    if lowest <= cutoff:
        raise _Problem(band["key_min"], f"{lowest / GHZ:g} GHz is at or below the TE10 cutoff "
                                        f"{cutoff / GHZ:.4g} GHz of the feed guide "
                                        f"(a = {horn.guide_a / MM:g} mm): nothing propagates")


def _guide_warnings(band, frequencies, horn, guide_key):
    warnings = []
    cutoff = float(te10_cutoff_frequency(horn.guide_a))
    lowest, highest = float(frequencies.min()), float(frequencies.max())
    if lowest < cutoff * (1 + NEAR_CUTOFF_FRACTION):
        warnings.append((band["key_min"], f"{lowest / GHZ:g} GHz is within "
                                          f"{NEAR_CUTOFF_FRACTION:.0%} of the TE10 cutoff "
                                          f"{cutoff / GHZ:.4g} GHz: the feed is strongly "
                                          f"dispersive there and hard to match"))
    for mode, limit, size in (("TE20", float(te20_cutoff_frequency(horn.guide_a)),
                               f"a = {horn.guide_a / MM:g} mm"),
                              ("TE01", float(te01_cutoff_frequency(horn.guide_b)),
                               f"b = {horn.guide_b / MM:g} mm")):
        if highest > limit:
            warnings.append((band["key_max"], f"above {limit / GHZ:.4g} GHz the {mode} mode can "
                                              f"propagate in the feed guide ({size}); the "
                                              f"models assume a pure TE10 feed"))
    return warnings


def _grid_warnings(horn, frequencies, dims, ladder, key):
    """Warn when the narrowest opening of the model spans fewer than ~4 cells at f_max.

    The narrowest opening is the guide height b, except in the 2D model of an H-plane sectoral
    horn, which has no height and whose narrowest opening is the guide width a.
    """
    if dims == 2 and horn.kind == "h-sectoral":
        opening, label = horn.guide_a, "guide width a"
    else:
        opening, label = horn.guide_b, "guide height b"
    f_max = float(frequencies.max())
    smallest_wavelength = SPEED_OF_LIGHT / f_max
    coarse = [cells for cells in ladder
              if opening * cells / smallest_wavelength < MIN_CELLS_ACROSS_OPENING]
    if not coarse:
        return []
    cells = min(coarse)
    across = opening * cells / smallest_wavelength
    needed = math.ceil(MIN_CELLS_ACROSS_OPENING * smallest_wavelength / opening)
    return [(key, f"at {cells:g} cells per wavelength the {label} = {opening / MM:g} mm spans "
                  f"only {across:.1f} cells at {f_max / GHZ:g} GHz; use at least {needed} "
                  f"for {MIN_CELLS_ACROSS_OPENING:g} cells across it")]


# --- [fdtd] --------------------------------------------------------------------------------


def _fdtd(table, horn):
    """FdtdSettings keyword arguments, and the quick_2d flag."""
    _check_keys(table, FDTD_KEYS, "fdtd")
    defaults = FdtdSettings()
    fields = {}
    fields["dims"] = _dims(table["dims"], "fdtd.dims", horn) if "dims" in table else defaults.dims
    if "cells_per_wavelength" in table:
        fields["cells_per_wavelength"] = _cells_ladder(table["cells_per_wavelength"],
                                                       "fdtd.cells_per_wavelength")
    else:
        fields["cells_per_wavelength"] = DEFAULT_CELLS_PER_WAVELENGTH
    fields["pml_wavelengths"] = _positive(table, "pml_wavelengths", "fdtd", unit="wavelengths",
                                          default=defaults.pml_wavelengths)
    fields["padding_wavelengths"] = _positive(table, "padding_wavelengths", "fdtd",
                                              unit="wavelengths",
                                              default=defaults.padding_wavelengths)
    fields["feed_length_wavelengths"] = _positive(table, "feed_length_wavelengths", "fdtd",
                                                  unit="guide wavelengths",
                                                  default=defaults.feed_length_wavelengths)
    fields["decay_by"] = _bounded(table, "decay_by", "fdtd", defaults.decay_by, 0.0, 0.1,
                                  unit="a field decay factor")
    fields["max_time_periods"] = _positive(table, "max_time_periods", "fdtd",
                                           unit="periods of f_min",
                                           default=defaults.max_time_periods)
    fields["use_symmetry"] = _boolean(table, "symmetry", "fdtd", defaults.use_symmetry)
    fields["pattern_step_deg"] = _bounded(table, "pattern_step_deg", "fdtd",
                                          defaults.pattern_step_deg, 0.0, 30.0, unit="degrees")
    fields["full_pattern_step_deg"] = _bounded(table, "full_pattern_step_deg", "fdtd",
                                               defaults.full_pattern_step_deg, 0.0, 30.0,
                                               unit="degrees")
    sectoral = horn.kind != "pyramidal"
    quick_2d = _boolean(table, "quick_2d", "fdtd", sectoral)
    if quick_2d and not sectoral:
        raise _Problem("fdtd.quick_2d", "a pyramidal horn has no 2D model; remove the key or "
                                        "set it to false")
    return fields, quick_2d


# --- [checks] ------------------------------------------------------------------------------


def _checks(table):
    _check_keys(table, CHECK_KEYS, "checks")
    checks = {}
    for key in CHECK_TOLERANCE_KEYS:
        if key in table:
            unit = "dB" if key.endswith("_db") else "degrees"
            checks[key] = _positive(table, key, "checks", unit=f"a tolerance in {unit}")
    model = _choice(table, "model", "checks", CHECK_MODELS, default="closed_form")
    return checks, model


# --- [sweep] -------------------------------------------------------------------------------


def _sweep(table, horn, fdtd_fields):
    if not table:
        return None
    _check_keys(table, SWEEP_KEYS, "sweep")
    parameter = _choice(table, "parameter", "sweep", tuple(SWEEP_PARAMETERS))
    unfit = sweep_applies_to(parameter, horn.kind)
    if unfit:
        raise _Problem("sweep.parameter", f"cannot sweep {parameter}: {unfit}")
    if "values" not in table:
        raise _Problem("sweep.values", "missing required key (a list of at least 2 values)")
    values = _number_list(table["values"], "sweep.values", minimum_length=2)
    if len(set(values)) != len(values):
        raise _Problem("sweep.values", "repeated value")
    default_dims = 3 if horn.kind == "pyramidal" else 2
    dims = _dims(table["dims"], "sweep.dims", horn) if "dims" in table else default_dims
    cells = min(fdtd_fields["cells_per_wavelength"])
    if "cells_per_wavelength" in table:
        value = table["cells_per_wavelength"]
        if isinstance(value, list):
            raise _Problem("sweep.cells_per_wavelength", "give one number: a sweep runs one grid "
                                                         "per value, not a ladder")
        (cells,) = _cells_ladder(value, "sweep.cells_per_wavelength")
    spec = SweepSpec(parameter=parameter, values=tuple(values), dims=dims,
                     cells_per_wavelength=cells)
    for value in values:
        try:
            spec.horn_at(horn, value)
        except ValueError as error:
            raise _Problem("sweep.values", f"{value:g} makes an impossible horn: "
                                           f"{_strip_parameter(str(error))}") from None
    return spec


def _strip_parameter(message):
    """Drop the leading "<parameter> = <value>: " of a SweepSpec error (the value is named)."""
    return re.sub(r"^\w+ = [^:]+: ", "", message)


# --- [tiers] -------------------------------------------------------------------------------


def _tiers(table, horn, band, fdtd_fields, quick_2d):
    """Tier name -> overrides; defaults for tiers the file does not define."""
    _check_keys(table, TIER_NAMES, "tiers")
    coarsest = min(fdtd_fields["cells_per_wavelength"])
    quick = {"cells_per_wavelength": (min(coarsest, QUICK_TIER_MAX_CELLS),)}
    if quick_2d and horn.kind != "pyramidal":
        quick["dims"] = 2
    tiers = {"quick": quick, "full": {}}
    for name in TIER_NAMES:
        tier_table = _table(table, name, required=False, prefix="tiers")
        if name not in table:
            continue
        prefix = f"tiers.{name}"
        _check_keys(tier_table, TIER_KEYS, prefix)
        overrides = {}
        if "dims" in tier_table:
            overrides["dims"] = _dims(tier_table["dims"], f"{prefix}.dims", horn)
        if "cells_per_wavelength" in tier_table:
            overrides["cells_per_wavelength"] = _cells_ladder(
                tier_table["cells_per_wavelength"], f"{prefix}.cells_per_wavelength")
        if "points" in tier_table:
            if "list" in band:
                raise _Problem(f"{prefix}.points", "the band is a frequencies_ghz list; points "
                                                   "applies only to f_min_ghz/f_max_ghz bands")
            overrides["points"] = _band_points(tier_table["points"], f"{prefix}.points",
                                               band["f_min"], band["f_max"])
        tiers[name] = overrides
    return tiers
