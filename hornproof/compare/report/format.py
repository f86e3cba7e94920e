"""Numbers, units and names as people read them in the report.

Values arrive in the JSON summaries' edge units (the key suffix says which: ``_mm``, ``_deg``,
``_wl``, ``_ghz``, ``_db``, ``_dbi``); this module turns them into text with trade words, a unit
and sensible digits. One word stands for a missing value everywhere (:data:`MISSING_VALUE`):
HTML tables, the terminal summaries and the figures.
"""

import math
import re

#: the one word for a value that is not there (None, NaN, inf) in tables, terminal and plots
MISSING_VALUE = "n/a"

#: key suffix -> (unit shown, decimals)
UNIT_SUFFIXES = (("_mm", "mm", 2), ("_deg", "deg", 1), ("_wl", "wavelengths", 3), ("_ghz", "GHz", 3),
                 ("_dbi", "dBi", 2), ("_db", "dB", 2), ("_s", "s", 2))

#: keys of the result's geometry and solver blocks -> trade words (the unit comes from the suffix)
QUANTITY_NAMES = {
    "type": "Horn type",
    "guide_a_mm": "Feed guide width a",
    "guide_b_mm": "Feed guide height b",
    "aperture_a_mm": "Aperture width A (H-plane)",
    "aperture_b_mm": "Aperture height B (E-plane)",
    "flare_length_mm": "Flare length (throat to aperture)",
    "wall_mm": "Wall thickness",
    "apex_h_mm": "Apex distance, H-plane",
    "apex_e_mm": "Apex distance, E-plane",
    "slant_h_mm": "Slant length, H-plane",
    "slant_e_mm": "Slant length, E-plane",
    "flare_half_angle_h_deg": "Flare half-angle, H-plane",
    "flare_half_angle_e_deg": "Flare half-angle, E-plane",
    "phase_error_h_wl": "Peak phase error, H-plane",
    "phase_error_e_wl": "Peak phase error, E-plane",
    "phase_reference_ghz": "Frequency of the peak phase errors above",
    "phase_error_h_wl_per_frequency": "Peak phase error, H-plane, at each band frequency",
    "phase_error_e_wl_per_frequency": "Peak phase error, E-plane, at each band frequency",
    "name": "Solver",
    "meep": "Meep version",
    "dims": "Model dimensions",
    "cells_per_wavelength": "Cells per wavelength at f_max (ladder)",
    "finest_cells_per_wavelength": "Cells per wavelength at f_max (finest grid)",
    "grid_step_mm": "Grid step, per grid",
    "wall_thickness_requested_mm": "Wall thickness, requested",
    "wall_thickness_modelled_mm": "Wall thickness, modelled, per grid",
    "cells_across_guide_b": "Cells across the guide height b, per grid",
    "modelled_sizes_mm": "Modelled sizes, per grid",
    "symmetry": "Mirror symmetry",
    "mpi_processes": "MPI processes",
    "timesteps": "Time steps, per grid",
    "seconds_per_grid": "Run time, per grid",
    "seconds": "Run time, total",
    "seconds_per_point": "Run time, per swept value",
    "decay_by": "Stop when the DFT fields have decayed by (relative)",
    "pml_wavelengths": "PML thickness (wavelengths at f_min)",
    "padding_wavelengths": "Space around the horn (wavelengths at f_max)",
    "formal_order_assumed": "Convergence order assumed when the ladder gives none",
    "max_power_balance_error": "Largest power-balance error",
}
#: short names of modelled sizes inside one grid's entry
SIZE_SYMBOLS = {"guide_a_mm": "a", "guide_b_mm": "b", "aperture_a_mm": "A", "aperture_b_mm": "B",
                "flare_length_mm": "L"}
#: keys whose value is a ratio shown in per cent
PERCENT_KEYS = frozenset({"max_power_balance_error"})
#: keys in seconds without a suffix
SECOND_KEYS = frozenset({"seconds", "seconds_per_grid", "seconds_per_point"})

#: extra-check names written by verify -> what the table shows
CHECK_NAMES = {"s11_db": "S11", "pattern_rms_h_plane": "Main-lobe pattern RMS error, H-plane",
               "pattern_rms_e_plane": "Main-lobe pattern RMS error, E-plane"}

#: decimals a figure in this unit is shown with in the tables (levels to 0.01 dB, angles to 0.1 deg)
UNIT_DECIMALS = {"dB": 2, "dBi": 2, "deg": 1, "GHz": 3, "%": 2}

_MIRROR = re.compile(r"Mirror\((\w+), phase=([+-]?\d+)\)")


def is_missing(value):
    """True for None and for non-finite numbers."""
    if value is None:
        return True
    return isinstance(value, float) and not math.isfinite(value)


def number(value, digits=3):
    """A number with ``digits`` decimals, a typographic minus and no negative zero."""
    if value is None:
        return MISSING_VALUE
    try:
        value = float(value)
    except (TypeError, ValueError):
        return str(value)
    if not math.isfinite(value):
        return MISSING_VALUE
    if round(value, digits) == 0:
        value = 0.0  # no "−0.000"
    return f"{value:.{digits}f}".replace("-", "\u2212")


def unit_decimals(unit):
    """Decimals for a figure in ``unit`` (:data:`UNIT_DECIMALS`; 3 for any other unit)."""
    return UNIT_DECIMALS.get(unit, 3)


def step_decimals(values, unit):
    """Decimals a value interpolated between swept ``values`` can honestly show.

    One decimal below a step of 10 units, none from 10 up; angles never more than one decimal.
    """
    finite = sorted(float(v) for v in values if not is_missing(v))
    steps = [b - a for a, b in zip(finite, finite[1:]) if b > a]
    if not steps:
        return 1
    decimals = max(0, 1 - math.floor(math.log10(min(steps))))
    return min(decimals, 1 if unit == "deg" else 2)


def mirror_text(planes):
    """``["Mirror(X, phase=+1)", "Mirror(Y, phase=-1)"]`` -> ``"x (even), y (odd)"``.

    Even/odd is Meep's mirror phase (+1/−1), which acts on E as a vector field.
    """
    if not planes:
        return "none"
    out = []
    for plane in planes:
        match = _MIRROR.fullmatch(str(plane).strip())
        if match is None:
            out.append(str(plane))
            continue
        out.append(f"{match.group(1).lower()} ({'even' if int(match.group(2)) > 0 else 'odd'})")
    return ", ".join(out)


def quantity_unit(key):
    """(trade name, unit, decimals) of a geometry or solver key."""
    if key in PERCENT_KEYS:
        return QUANTITY_NAMES[key], "%", 2
    if key in SECOND_KEYS:
        return QUANTITY_NAMES[key], "s", 2
    for suffix, unit, decimals in UNIT_SUFFIXES:
        if key.endswith(suffix) or key.endswith(suffix + "_per_frequency"):
            return QUANTITY_NAMES.get(key, key.replace("_", " ").capitalize()), unit, decimals
    return QUANTITY_NAMES.get(key, key.replace("_", " ").capitalize()), "", 3


def value_text(value, decimals=3):
    """Any JSON value as text: numbers to ``decimals``, lists comma-separated."""
    if value is None:
        return MISSING_VALUE
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if not math.isfinite(value):
            return MISSING_VALUE
        if value == int(value) and abs(value) < 1e6:
            return number(value, 0)
        if abs(value) < 10.0 ** -decimals:
            return f"{value:.3g}".replace("-", "\u2212")  # small ratios such as a decay of 1e-4
        return number(value, decimals)
    if isinstance(value, (list, tuple)):
        separator = " · " if any(isinstance(v, dict) for v in value) else ", "
        return separator.join(value_text(v, decimals) for v in value)
    if isinstance(value, dict):
        return "; ".join(f"{SIZE_SYMBOLS.get(k, k)} {value_text(v, decimals)}" for k, v in value.items())
    return str(value)


def quantity_rows(mapping):
    """Rows ``{"name", "value", "unit"}`` for a flat geometry or solver block."""
    rows = []
    for key, value in mapping.items():
        name, unit, decimals = quantity_unit(str(key))
        if key == "symmetry":
            text = mirror_text(value if isinstance(value, (list, tuple)) else [value])
        elif key in PERCENT_KEYS and not is_missing(value):
            text = value_text(100.0 * float(value), decimals)
        elif key == "dims" and value in (2, 3):
            text = "2D (principal-plane model)" if value == 2 else "3D"
        else:
            text = value_text(value, decimals)
        rows.append({"name": name, "value": text, "unit": unit})
    return rows


def _edge_text(value, unit, decimals):
    return "the first value" if value == "below range" else f"{number(value, decimals)} {unit}"


def breakdown_words(interval, unit, decimals=1):
    """A breakdown interval (:func:`hornproof.compare.numerics.breakdown.breakdown_interval`)
    in words, for tables and the terminal."""
    if not isinstance(interval, dict):
        return MISSING_VALUE
    status = interval.get("status")
    earliest, latest, nominal = interval.get("earliest"), interval.get("latest"), interval.get("nominal")
    if status == "holds throughout":
        return "holds over the whole sweep, uncertainty included"
    if status == "past tolerance from the start":
        return "already past the tolerance at the first value"
    if status == "breaks":
        back = interval.get("back_within") or []
        spans = [number(lo, decimals) if hi == lo else f"{number(lo, decimals)}–{number(hi, decimals)}"
                 for lo, hi in back]
        again = f"; back within the tolerance at {', '.join(spans)} {unit}" if back else ""
        if earliest == latest:
            return f"breaks at {_edge_text(latest, unit, decimals)}{again}"
        middle = "" if nominal in (None, "below range") else f", nominal {number(nominal, decimals)}"
        return (f"breaks between {_edge_text(earliest, unit, decimals)} and "
                f"{_edge_text(latest, unit, decimals)}{middle}{again}")
    if earliest is None:
        return f"unresolved: {interval.get('reason') or 'no usable point'}"
    return f"unresolved: may break from {_edge_text(earliest, unit, decimals)} on; {interval.get('reason', '')}".rstrip("; ")


def crossing_text(value, unit, decimals=1, where="the map"):
    """One end of a breakdown (a crossing of the tolerance) in words: a value, "at or before the
    first value" or "not within <where>"."""
    if value is None:
        return f"not within {where}"
    if value == "below range":
        return "at or before the first value"
    return f"{number(value, decimals)} {unit}"
