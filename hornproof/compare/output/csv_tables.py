"""CSV exports of a verify result: the band table, the dense S11 band and every pattern cut.

Plain comma-separated text (RFC 4180 quoting by Python's ``csv`` module), one header line whose
column names carry their units in brackets — ``frequency [GHz]``, ``fdtd directivity_dbi [dBi]``,
``theta [deg]`` — so a spreadsheet or another tool reads them without this package. Missing
values are empty cells. Files (in the result folder's ``csv/``):

* ``band.csv`` — one row per band frequency: every per-frequency figure of every model
  (closed_form, exact_phase, fdtd) and the FDTD uncertainty of each figure that has one;
* ``dense_s11.csv`` — the dense S11 band of the finest grid: real, imaginary, dB, VSWR;
* ``cut_<plane>_<model>.csv`` — one row per angle, one column per frequency: directivity in
  dBi of the H-plane and E-plane co-polar cuts (``h_plane``, ``e_plane``) of each model and,
  for 3D models, the 45° cut's co- and cross-polar directivity (``d45_co``, ``d45_cross``;
  the aperture models' 45° cross-polar cut is the E-field equivalent's, see
  ``jobs.feed_figures``).
"""

import csv
import io

import numpy as np

from ...atomic import write_text_atomic
from ...units import GHZ

#: key suffix -> unit written in the header
SUFFIX_UNITS = (("_dbi", "dBi"), ("_db", "dB"), ("_deg", "deg"), ("_mm", "mm"), ("_pct", "%"), ("_ghz", "GHz"),
                ("_wl", "wavelengths"), ("_hz", "Hz"), ("_m", "m"))
MODELS = ("closed_form", "exact_phase", "fdtd")


def unit_of(key):
    """The unit a result key carries in its suffix ("1" when none: a ratio or a count)."""
    for suffix, unit in SUFFIX_UNITS:
        if key.endswith(suffix):
            return unit
    return "1"


def _cell(value):
    if value is None:
        return ""
    try:
        value = float(value)
    except (TypeError, ValueError):
        return str(value)
    return repr(value) if np.isfinite(value) else ""


def csv_text(header, rows):
    """CSV text of a header and rows (numbers in full precision, missing values empty)."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(header)
    for row in rows:
        writer.writerow([_cell(v) for v in row])
    return buffer.getvalue()


def _per_frequency(values, nf):
    return isinstance(values, list) and len(values) == nf and not any(isinstance(v, (list, dict)) for v in values)


def band_table(summary):
    """(header, rows) of ``band.csv`` from a ``hornproof.result/1`` summary."""
    freqs = summary.get("frequencies_ghz") or []
    nf = len(freqs)
    header = ["frequency [GHz]"]
    columns = []
    models = summary.get("models") or {}
    for model in MODELS:
        for key, values in (models.get(model) or {}).items():
            if _per_frequency(values, nf):
                header.append(f"{model} {key} [{unit_of(key)}]")
                columns.append(values)
    uncertainty = (models.get("fdtd") or {}).get("uncertainty") or {}
    for key, values in uncertainty.items():
        if _per_frequency(values, nf) and key != "directivity_db":
            header.append(f"fdtd_uncertainty {key} [{unit_of(key)}]")
            columns.append(values)
    rows = [[f] + [column[i] for column in columns] for i, f in enumerate(freqs)]
    return header, rows


def dense_table(dense):
    """(header, rows) of ``dense_s11.csv`` from ``SimResult.dense_band``."""
    s11 = np.asarray(dense["s11"], dtype=complex)
    magnitude = np.abs(s11)
    with np.errstate(divide="ignore"):
        db = 20 * np.log10(magnitude)
        swr = np.where(magnitude < 1, (1 + magnitude) / (1 - magnitude), np.inf)
    header = ["frequency [GHz]", "s11_real [1]", "s11_imag [1]", "s11 [dB]", "vswr [1]"]
    rows = zip(np.asarray(dense["frequencies_hz"], dtype=float) / GHZ, s11.real, s11.imag, db, swr)
    return header, [list(r) for r in rows]


def cut_table(theta_deg, cuts_dbi, frequencies_hz):
    """(header, rows) of one cut file: θ then one column per frequency (dBi)."""
    cuts = np.atleast_2d(np.asarray(cuts_dbi, dtype=float))
    header = ["theta [deg]"] + [f"{f / GHZ:.6g} GHz [dBi]" for f in frequencies_hz]
    rows = [[t] + list(cuts[:, j]) for j, t in enumerate(np.asarray(theta_deg, dtype=float))]
    return header, rows


def _db(values):
    with np.errstate(divide="ignore"):
        return 10 * np.log10(np.abs(np.asarray(values)) ** 2)


def cut_tables(models, finest, feed_fields=None):
    """{file stem: (header, rows)} of every cut: principal planes of each model, 45° cuts."""
    out = {}
    sources = dict(models or {})
    if finest is not None:
        sources["fdtd"] = finest
    for name in MODELS:
        model = sources.get(name)
        if model is None:
            continue
        for plane in ("h_plane", "e_plane"):
            cut = np.asarray(getattr(model, f"{plane}_dbi"), dtype=float)
            if not np.all(np.isnan(cut)):
                out[f"cut_{plane}_{name}"] = cut_table(model.theta_deg, cut, model.frequencies)
    diagonal = {}
    if finest is not None and getattr(finest, "feed_pattern", None) is not None:
        diagonal["fdtd"] = (finest.feed_pattern, finest.feed_pattern)
    for name, field in ((feed_fields or {}).get("aperture") or {}).items():
        diagonal[name] = (field, (feed_fields.get("aperture_cross") or {}).get(name, field))
    frequencies = finest.frequencies if finest is not None else next(iter(sources.values())).frequencies
    for name, (field, cross_field) in diagonal.items():
        out[f"cut_d45_co_{name}"] = cut_table(field["theta_deg"], _db(field["cuts"]["d45"][0]), frequencies)
        out[f"cut_d45_cross_{name}"] = cut_table(cross_field["theta_deg"], _db(cross_field["cuts"]["d45"][1]),
                                                 frequencies)
    return out


def write_csv_tables(folder, summary, finest=None, models=None, feed_fields=None):
    """Write ``csv/`` into ``folder`` (module notes); returns the list of files written."""
    target = folder / "csv"
    target.mkdir(exist_ok=True)
    tables = {"band": band_table(summary)}
    if finest is not None and getattr(finest, "dense_band", None) is not None:
        tables["dense_s11"] = dense_table(finest.dense_band)
    tables.update(cut_tables(models, finest, feed_fields))
    written = []
    for stem, (header, rows) in tables.items():
        path = target / f"{stem}.csv"
        write_text_atomic(path, csv_text(header, rows), encoding="utf-8")
        written.append(path)
    return written
