"""Baseline files (schema ``hornproof.baseline/1``): the stored figures a nightly run is compared with.

One file per case and tier, ``<baselines>/<case>.<tier>.json``, pretty JSON with sorted keys so
a change to a baseline reads as a small diff in review::

    {
      "case": "wr90-h-sectoral",
      "case_sha256": "…",                 # hash of the tier case definition
      "figures": {
        "directivity_dbi": {"uncertainty": [0.12, 0.1], "values": [14.2, 15.0]},
        …
      },
      "frequencies_ghz": [9.0, 10.0],
      "hornproof_version": "0.1.0",
      "recorded_utc": "2026-12-02T03:00:00Z",
      "schema": "hornproof.baseline/1",
      "settings": {…},                     # FDTD settings of the tier
      "solver": {"cells_per_wavelength": [...], "meep": "1.25.0"},
      "tier": "quick",
      "units": {"directivity_dbi": "dBi", …}
    }

Figures are the FDTD model's summary figures (``models.fdtd`` of the result summary), each a
list aligned with ``frequencies_ghz``; ``uncertainty`` holds the absolute numerical uncertainty
of each value in the figure's own unit, or null where the run gave none.

This module is the file format (writing, reading, version check) and the reading of those
figures from a result summary; the comparison with a baseline is in
:mod:`hornproof.compare.regress.classify`.
"""

import json
import math
from dataclasses import dataclass, field
from pathlib import Path

from ...atomic import write_text_atomic
from ...errors import InputError
from ...limits import MAX_BASELINE_UNCERTAINTY

__all__ = [
    "SCHEMA",
    "FIGURES",
    "FIGURE_UNITS",
    "figure_unit",
    "FigureRecord",
    "Baseline",
    "baseline_path",
    "figures_from_result",
    "write_baseline",
    "read_baseline",
]

SCHEMA = "hornproof.baseline/1"
SCHEMA_FAMILY = "hornproof.baseline/"

# The FDTD summary figures kept in a baseline, with their units (result-summary keys carry the unit).
FIGURE_UNITS = {
    "directivity_dbi": "dBi",
    "directivity_2d_db": "dB",
    "gain_dbi": "dBi",
    "realized_gain_dbi": "dBi",
    "hpbw_h_deg": "deg",
    "hpbw_e_deg": "deg",
    "sll_h_db": "dB",
    "sll_e_db": "dB",
    "s11_db": "dB",
}
FIGURES = tuple(FIGURE_UNITS)

#: a sweep's figures (``sweep_figures`` of a summary, :func:`hornproof.compare.jobs.sweep.regress_figures`)
#: are named ``sweep_<what>_<unit>``, the unit being the swept parameter's
SWEEP_FIGURE_PREFIX = "sweep_"


def figure_unit(name):
    """The unit of a baseline figure: from the table, or a sweep figure's name suffix."""
    if name in FIGURE_UNITS:
        return FIGURE_UNITS[name]
    if name.startswith(SWEEP_FIGURE_PREFIX):
        return name.rsplit("_", 1)[-1]
    return ""

# Older summaries name the directivity uncertainty after its check ("directivity_db").
_UNCERTAINTY_ALIASES = {"directivity_dbi": ("directivity_db",), "directivity_2d_db": ("directivity_db",)}


@dataclass
class FigureRecord:
    """One figure over the band: values and their absolute uncertainties (None = not given)."""

    values: list
    uncertainty: list


@dataclass
class Baseline:
    """The content of one baseline file (see the module docstring for the keys)."""

    case: str
    tier: str
    case_sha256: str
    frequencies_ghz: list
    figures: dict
    solver: dict = field(default_factory=dict)
    settings: dict = field(default_factory=dict)
    hornproof_version: str = ""
    recorded_utc: str = ""
    computation_sha256: str = ""  # hash without [checks]/title; "" in baselines older than it

    def to_dict(self):
        return {
            "schema": SCHEMA,
            "case": self.case,
            "tier": self.tier,
            "case_sha256": self.case_sha256,
            "frequencies_ghz": list(self.frequencies_ghz),
            "figures": {
                name: {"values": list(rec.values), "uncertainty": list(rec.uncertainty)}
                for name, rec in self.figures.items()
            },
            "units": {name: figure_unit(name) for name in self.figures},
            "solver": dict(self.solver),
            "settings": dict(self.settings),
            "hornproof_version": self.hornproof_version,
            "recorded_utc": self.recorded_utc,
            **({"computation_sha256": self.computation_sha256} if self.computation_sha256 else {}),
        }


def baseline_path(baselines_dir, case_name, tier):
    """``<baselines_dir>/<case_name>.<tier>.json``."""
    return Path(baselines_dir) / f"{case_name}.{tier}.json"


def _number_or_none(value, where):
    """A finite float, or None for null/NaN. ``where`` names the place for the error."""
    if value is None:
        return None
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise ValueError(f"{where}: expected a number or null, got {type(value).__name__}")
    value = float(value)
    if math.isnan(value):
        return None
    if math.isinf(value):
        raise ValueError(f"{where}: infinite value")
    return value


def _frequency_list(frequencies):
    """``frequencies_ghz`` as a non-empty list of numbers (ValueError naming the key)."""
    if not isinstance(frequencies, list) or not frequencies:
        raise ValueError("frequencies_ghz: missing or empty")
    frequencies = [_number_or_none(f, f"frequencies_ghz[{i}]") for i, f in enumerate(frequencies)]
    if any(f is None for f in frequencies):
        raise ValueError("frequencies_ghz: null frequency")
    return frequencies


def _number_list(values, length, where):
    if not isinstance(values, list):
        raise ValueError(f"{where}: expected a list, got {type(values).__name__}")
    if len(values) != length:
        raise ValueError(f"{where}: {len(values)} values, expected {length} (one per frequency)")
    return [_number_or_none(v, f"{where}[{i}]") for i, v in enumerate(values)]


def figures_from_result(result):
    """Frequencies and FDTD figures of a hornproof.result/1 summary.

    Returns
    -------
    frequencies_ghz : list of float
    figures : dict of str -> FigureRecord
        Only figures present in ``models.fdtd``; uncertainty None where not given.

    Raises
    ------
    ValueError
        Naming the key, when the summary lacks the frequencies or the FDTD model, or a list
        is not aligned with the frequencies.
    """
    if not isinstance(result, dict):
        raise ValueError("summary: expected a JSON object")
    frequencies = _frequency_list(result.get("frequencies_ghz"))
    models = result.get("models")
    fdtd = models.get("fdtd") if isinstance(models, dict) else None
    if not isinstance(fdtd, dict):
        raise ValueError("models.fdtd: missing (no full-wave figures in the result)")
    uncertainty = fdtd.get("uncertainty") or {}
    if not isinstance(uncertainty, dict):
        raise ValueError("models.fdtd.uncertainty: expected a table of lists")
    n = len(frequencies)
    figures = {}
    for name in FIGURES:
        if name not in fdtd:
            continue
        values = _number_list(fdtd[name], n, f"models.fdtd.{name}")
        u = None
        for key in (name,) + _UNCERTAINTY_ALIASES.get(name, ()):
            if uncertainty.get(key) is not None:
                u = _number_list(uncertainty[key], n, f"models.fdtd.uncertainty.{key}")
                break
        if u is None:
            u = [None] * n
        if any(x is not None and x < 0 for x in u):
            raise ValueError(f"models.fdtd.uncertainty.{name}: negative uncertainty")
        figures[name] = FigureRecord(values=values, uncertainty=u)
    if not figures:
        raise ValueError("models.fdtd: none of the summary figures " + ", ".join(FIGURES))
    figures.update(_sweep_figures(result.get("sweep_figures"), n))
    return frequencies, figures


def write_baseline(path, baseline):
    """Write a baseline file atomically (pretty JSON, sorted keys); create its folder."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    text = json.dumps(baseline.to_dict(), indent=2, sort_keys=True, allow_nan=False) + "\n"
    write_text_atomic(path, text)


def _stored_figure(name, entry, n):
    """One stored figure of a baseline as a FigureRecord; ValueError naming the key when it is
    malformed or its uncertainty is beyond ``limits.MAX_BASELINE_UNCERTAINTY`` for its unit."""
    if not isinstance(entry, dict):
        raise ValueError(f"figures.{name}: expected a table with values and uncertainty")
    values = _number_list(entry.get("values"), n, f"figures.{name}.values")
    u = _number_list(entry.get("uncertainty"), n, f"figures.{name}.uncertainty")
    if any(x is not None and x < 0 for x in u):
        raise ValueError(f"figures.{name}.uncertainty: negative uncertainty")
    unit = figure_unit(name)
    bound = MAX_BASELINE_UNCERTAINTY.get("deg" if unit.startswith("deg") else "dB" if "dB" in unit else "")
    if bound is not None and any(x is not None and x > bound for x in u):
        raise ValueError(f"figures.{name}.uncertainty: {max(x for x in u if x is not None):g} {unit} "
                         f"is beyond {bound:g} {unit}: an uncertainty that large would call any change "
                         "noise; rerun 'hornproof regress --update' to record a real one")
    return FigureRecord(values=values, uncertainty=u)


def read_baseline(path, expected_case=None):
    """Read a baseline file; None when it does not exist.

    ``expected_case``: the case name the baseline must carry (a baseline copied from another
    case is refused). An uncertainty beyond ``limits.MAX_BASELINE_UNCERTAINTY`` of its figure's
    unit is refused too: it would call any change noise.

    Raises
    ------
    InputError
        ``"<file>: <key>: <reason>"`` for unreadable files, unknown schema versions (with a hint)
        and malformed content.
    """
    path = Path(path)
    try:
        text = path.read_text(encoding="utf-8")
    except FileNotFoundError:
        return None
    except (OSError, UnicodeDecodeError) as error:
        raise InputError(f"{path}: cannot read ({error})") from None
    try:
        data = json.loads(text)
    except ValueError as error:
        raise InputError(f"{path}: not valid JSON ({error})") from None
    if not isinstance(data, dict):
        raise InputError(f"{path}: expected a JSON object")
    schema = data.get("schema")
    if schema != SCHEMA:
        if isinstance(schema, str) and schema.startswith(SCHEMA_FAMILY):
            raise InputError(
                f"{path}: schema: {schema!r} is not supported by this hornproof (reads {SCHEMA!r}); "
                "upgrade hornproof, or rerun 'hornproof regress --update' after moving this file away"
            )
        raise InputError(f"{path}: schema: {schema!r}, expected {SCHEMA!r} (not a hornproof baseline file)")
    try:
        for key in ("case", "tier", "case_sha256"):
            if not isinstance(data.get(key), str):
                raise ValueError(f"{key}: missing or not a string")
        if expected_case is not None and data["case"] != expected_case:
            raise ValueError(f"case: the baseline is for case {data['case']!r}, not {expected_case!r} "
                             "(copied from another case?); move it away and run 'hornproof regress --update'")
        if not isinstance(data.get("computation_sha256", ""), str):
            raise ValueError("computation_sha256: not a string")
        frequencies = _frequency_list(data.get("frequencies_ghz"))
        raw = data.get("figures")
        if not isinstance(raw, dict) or not raw:
            raise ValueError("figures: missing or empty")
        figures = {name: _stored_figure(name, entry, len(frequencies)) for name, entry in raw.items()}
        for key in ("solver", "settings"):
            if not isinstance(data.get(key, {}), dict):
                raise ValueError(f"{key}: expected a table")
    except ValueError as error:
        raise InputError(f"{path}: {error}") from None
    return Baseline(
        case=data["case"],
        tier=data["tier"],
        case_sha256=data["case_sha256"],
        frequencies_ghz=frequencies,
        figures=figures,
        solver=data.get("solver", {}),
        settings=data.get("settings", {}),
        hornproof_version=str(data.get("hornproof_version", "")),
        recorded_utc=str(data.get("recorded_utc", "")),
        computation_sha256=data.get("computation_sha256", ""),
    )


def _sweep_figures(block, n):
    """The sweep's regress figures of a summary: each a value at one band frequency (the one the
    sweep compares at), None at the others. ``block`` is ``{"frequency_index": i, "figures":
    {name: {"value", "uncertainty"}}}`` or None."""
    if block is None:
        return {}
    if not isinstance(block, dict) or not isinstance(block.get("figures"), dict):
        raise ValueError("sweep_figures: expected a table with 'frequency_index' and 'figures'")
    index = block.get("frequency_index")
    if isinstance(index, bool) or not isinstance(index, int) or not 0 <= index < n:
        raise ValueError(f"sweep_figures.frequency_index: expected an index below {n}")
    out = {}
    for name, entry in block["figures"].items():
        if not str(name).startswith(SWEEP_FIGURE_PREFIX) or not isinstance(entry, dict):
            raise ValueError(f"sweep_figures.figures.{name}: not a sweep figure")
        values, uncertainty = [None] * n, [None] * n
        values[index] = _number_or_none(entry.get("value"), f"sweep_figures.figures.{name}.value")
        uncertainty[index] = _number_or_none(entry.get("uncertainty"), f"sweep_figures.figures.{name}.uncertainty")
        if uncertainty[index] is not None and uncertainty[index] < 0:
            raise ValueError(f"sweep_figures.figures.{name}.uncertainty: negative uncertainty")
        out[name] = FigureRecord(values=values, uncertainty=uncertainty)
    return out
