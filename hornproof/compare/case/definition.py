"""A parsed case definition (the TOML tables), validated into the fields of a ``Case``.

The top level holds ``format`` and ``title`` and one table per idea; each table has its own
reader module. A tier or a grid override is applied here, after every table is validated, and
is part of the hashed definition.
"""

import numpy as np

from ...hashing import content_sha256
from ...sim.settings import FdtdSettings
from ..numerics.metrics import band_centre_index
from .band_table import band_frequencies, check_band_against_guide, guide_warnings, read_band
from .checks_table import read_checks
from .feed_table import read_feed
from .fdtd_table import grid_warnings, read_fdtd
from .horn_table import read_horn, read_wall
from .range_table import read_range
from .map_table import read_map
from .plausibility import Quantities, judge
from .sweep_table import read_sweep
from .tiers_table import read_tiers
from .tolerance_table import read_tolerance
from .values import CaseProblem, check_keys, describe_value, input_error, read_table

#: The case-file format this package reads.
FORMAT_VERSION = 1

#: longest title accepted (a title is one line of a report)
MAX_TITLE_LENGTH = 200

TOP_KEYS = ("format", "title", "horn", "band", "fdtd", "checks", "sweep", "tiers", "range", "tolerance", "map", "feed")


def case_fields(path, raw, *, tier=None, cells_override=None):
    """Keyword arguments of ``Case`` for the parsed definition ``raw`` of the file ``path``.

    Raises
    ------
    InputError
        One line, ``"<file>: <dotted.key>: <reason>"``, for the first problem found.
    """
    try:
        return _validated_fields(path, raw, tier, cells_override)
    except CaseProblem as problem:
        raise input_error(path, problem) from None


def definition_sha256(definition):
    """Hex SHA-256 of the canonical JSON of a parsed definition (sorted keys, no spaces).

    Comments and layout vanish in parsing, so they do not change the hash; every value does
    (an integer ``12`` and a float ``12.0`` are different values in TOML and hash differently).
    """
    return content_sha256(definition)


def _validated_fields(path, raw, tier, cells_override):
    """Every table read in file order (the first problem met is the one reported), then the
    tier and grid override applied, the band sampled and the warnings gathered."""
    _check_format(raw)
    check_keys(raw, TOP_KEYS, "")
    title = _read_title(raw, path.stem)
    horn = read_horn(read_table(raw, "horn", required=True))
    wall = read_wall(raw["horn"])
    band = read_band(read_table(raw, "band", required=True), "band")
    check_band_against_guide(band, horn)
    fdtd_fields, quick_2d = read_fdtd(read_table(raw, "fdtd", required=False), horn,
                                      float(max(band_frequencies(band))))
    checks, check_model = read_checks(read_table(raw, "checks", required=False))
    feed = read_feed(read_table(raw, "feed", required=False))
    sweep = read_sweep(read_table(raw, "sweep", required=False), horn, fdtd_fields,
                       _centre_frequency(band_frequencies(band)))
    plausibility_warnings = _plausibility(horn, band, fdtd_fields, checks, sweep)
    tiers = read_tiers(read_table(raw, "tiers", required=False), horn, band, fdtd_fields,
                       quick_2d)
    range_distances = read_range(read_table(raw, "range", required=False))
    tolerance = read_tolerance(read_table(raw, "tolerance", required=False), horn)
    map_spec = read_map(read_table(raw, "map", required=False), horn)

    if tier is not None:
        overrides = tiers[tier]
        if "points" in overrides:
            band = dict(band, points=overrides["points"])
        for key in ("dims", "cells_per_wavelength"):
            if key in overrides:
                fdtd_fields[key] = overrides[key]
    if cells_override is not None:
        fdtd_fields["cells_per_wavelength"] = tuple(cells_override)

    frequencies = band_frequencies(band)
    frequencies.setflags(write=False)
    if range_distances:  # the 3D FDTD post-processing evaluates the range gain (sim/range_gain.py)
        fdtd_fields["extra"] = dict(fdtd_fields.get("extra") or {}, range_distances_m=tuple(range_distances))
    fdtd = FdtdSettings(**fdtd_fields)

    warnings = [f"{path}: {key}: {reason}" for key, reason in
                plausibility_warnings + guide_warnings(band, frequencies, horn)
                + grid_warnings(horn, frequencies, fdtd.dims, fdtd.cells_per_wavelength,
                                _cells_key(tier, cells_override))
                + (grid_warnings(horn, frequencies, sweep.dims, sweep.cells_per_wavelength,
                                 "sweep.cells_per_wavelength") if sweep and sweep.cells_per_wavelength else [])]
    return dict(path=path, name=path.stem, title=title, horn=horn, frequencies=frequencies,
                fdtd=fdtd, checks=checks, check_model=check_model, sweep=sweep, tiers=tiers, feed=feed,
                sha256=_variant_sha256(raw, tier, cells_override),
                computation_sha256=computation_sha256(raw, tier, cells_override),
                warnings=tuple(dict.fromkeys(warnings)), raw=raw, tier=tier,
                cells_override=tuple(cells_override) if cells_override is not None else None,
                wall=wall, range_distances=range_distances, tolerance=tolerance, map=map_spec)


def _centre_frequency(frequencies):
    """The band frequency a sweep compares at (``numerics.metrics.band_centre_index``), Hz;
    NaN for a band the plausibility table will refuse anyway (not finite)."""
    if not np.all(np.isfinite(frequencies)):
        return float("nan")
    return float(frequencies[band_centre_index(frequencies)])


def _plausibility(horn, band, fdtd_fields, checks, sweep):
    """The plausibility table (:mod:`.plausibility`) over the case and every swept horn: the
    first refusal raised, the warnings returned (once each)."""
    frequencies = band_frequencies(band)
    band_keys = {"band.f_min_ghz": band["key_min"], "band.f_max_ghz": band["key_max"], "band": band["key_min"]}

    def judged(horn_here, where):
        quantities = Quantities(horn=horn_here, frequencies=frequencies, fdtd=fdtd_fields, checks=checks,
                                sweep_cells=max(sweep.cells_per_wavelength) if sweep and sweep.cells_per_wavelength
                                else None)
        try:
            return [(band_keys.get(key, key), reason) for key, reason in judge(quantities, where)]
        except CaseProblem as problem:
            raise CaseProblem(band_keys.get(problem.key, problem.key), problem.reason) from None

    warnings = judged(horn, "")
    if sweep is not None:
        swept_warnings = []
        for value, swept in sweep.horns(horn):  # read_sweep has refused impossible values
            try:
                swept_warnings += judged(swept, f"at swept value {value:g}: ")
            except CaseProblem as problem:
                raise CaseProblem("sweep.values", f"{problem.key}: {problem.reason}") from None
        fresh = [reason for _key, reason in swept_warnings]
        if fresh:
            warnings.append(("sweep.values", f"{len(fresh)} warning(s) over the swept horns, the first: {fresh[0]}"))
    return warnings


def _variant_sha256(raw, tier, cells_override):
    """Hash of the case as written, or of the definition with its tier and grid override."""
    if tier is None and cells_override is None:
        return definition_sha256(raw)
    return definition_sha256({"case": raw, "tier": tier,
                              "cells_per_wavelength": list(cells_override)
                              if cells_override is not None else None})


#: top-level tables that judge or name a computation without changing it: editing them keeps a
#: baseline comparable
JUDGEMENT_KEYS = ("checks", "title")


def computation_sha256(raw, tier=None, cells_override=None):
    """Hash of what defines the computation: the definition without its ``[checks]``
    tolerances and title, with the tier and grid override. A baseline stays comparable when
    only the judgement changes (regress, not-comparable)."""
    computation = {key: value for key, value in raw.items() if key not in JUDGEMENT_KEYS}
    return definition_sha256({"computation": computation, "tier": tier,
                              "cells_per_wavelength": list(cells_override) if cells_override is not None else None})


def _cells_key(tier, cells_override):
    """Key named in grid warnings: where the ladder in force came from."""
    if cells_override is not None:
        return "cells_per_wavelength override"
    if tier is not None:
        return f"tiers.{tier}.cells_per_wavelength"
    return "fdtd.cells_per_wavelength"


def _check_format(raw):
    if "format" not in raw:
        raise CaseProblem("format", f"missing required key; this hornproof reads format "
                                    f"{FORMAT_VERSION} (add the line: format = {FORMAT_VERSION})")
    value = raw["format"]
    if isinstance(value, bool) or not isinstance(value, int):
        raise CaseProblem("format", f"must be the integer {FORMAT_VERSION}, "
                                    f"got {describe_value(value)}; "
                                    f"this hornproof reads format {FORMAT_VERSION}")
    if value != FORMAT_VERSION:
        raise CaseProblem("format", f"unsupported format {value}; this hornproof reads format "
                                    f"{FORMAT_VERSION}")


def _read_title(raw, default):
    if "title" not in raw:
        return default
    value = raw["title"]
    if not isinstance(value, str):
        raise CaseProblem("title", f"must be a string, got {describe_value(value)}")
    if not value.strip():
        raise CaseProblem("title", "is empty")
    if "\n" in value or "\r" in value:
        raise CaseProblem("title", "must be one line")
    if len(value) > MAX_TITLE_LENGTH:
        raise CaseProblem("title", f"{len(value)} characters; at most {MAX_TITLE_LENGTH}")
    return shown_escaped(value.strip())


def shown_escaped(text):
    """``text`` with control characters (ANSI escapes, NUL, tabs) shown as Python escapes, so a
    title cannot move the cursor, recolour or cut the terminal or the report."""
    return "".join(c if c.isprintable() else repr(c)[1:-1] for c in text)
