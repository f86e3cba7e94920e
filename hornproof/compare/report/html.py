"""The self-contained HTML report of a verify run (result.json) or of a sweep (sweep.json).

One file, ``report.html``, in the result folder: no external URLs, no scripts, every figure
embedded as a base64 PNG. Order: the verdicts first (what a reviewer needs), then the geometry
and solver settings, then the figures, then the RF-exposure caution
(:data:`hornproof.compare.output.safety.RF_EXPOSURE_CAUTION`). All text from the JSON is escaped with
``html.escape``. The file is written under a temporary name and renamed.

Inputs
======

``result.json`` (schema ``"hornproof.result/1"``; README.md "What you get", DEVELOPERS.md
"Conventions"). Keys read here:
``schema``, ``case``, ``title``, ``case_sha256``, ``frequencies_ghz``, ``geometry`` (flat dict;
the key suffix gives the unit: ``_mm``, ``_deg``, ``_wl``, ``_ghz``), ``models``, ``solver``
(flat dict), ``warnings`` (list of str), ``hornproof_version`` and the block below. Any other
schema string is refused with a hint (``InputError``).

The ``comparison`` block (produced by :func:`hornproof.compare.numerics.verdict.comparison_block`)::

    "comparison": {
      "model_checked": "closed_form",        # or "exact_phase": the model the verdict is about
      "reference": "fdtd",
      "overall": "agrees" | "disagrees" | "unresolved",
      "metrics": [
        {"metric": "directivity_db",         # a key of verdict.COMPARED_FIGURES
         "label": "Directivity",             # shown in the table
         "unit": "dB",                       # unit of values, differences and tolerance
         "tolerance": 0.5,
         "per_frequency": [
           {"frequency_ghz": 10.5,
            "closed_form": 17.9, "exact_phase": 17.6, "fdtd": 17.4,   # figure values (null ok)
            "fdtd_uncertainty": 0.2,         # absolute, same unit; null = unknown
            "difference": 0.5,               # model_checked − fdtd
            "phase_approximation_error": 0.3,  # closed_form − exact_phase
            "aperture_model_error": 0.2,       # exact_phase − fdtd
            "total_error": 0.5,                # closed_form − fdtd
            "verdict": "agrees" | "disagrees" | "unresolved" | "missing"}]}],
      "convergence": {                       # optional
        "figure": "directivity_dbi", "unit": "dBi",
        "cells_per_wavelength": [12, 16, 24],
        "values": [[...nf...], [...], [...]],  # [ngrid][nf], same order as the ladder
        "estimates": [ConvergenceEstimate.to_dict(), ...]}   # one per frequency
    }

Figures: the PNG files in the folder, in the order of :data:`plots.STANDARD_STEMS` (then any
other ``*.png`` alphabetically). If ``directivity_vs_frequency.png`` or ``s11.png`` are missing
they are drawn from result.json; ``convergence_ladder.png`` is drawn from the convergence block
(finest-grid frequency closest to the band centre).

``sweep.json`` (schema ``"hornproof.sweep/1"``, designed here for ``hornproof sweep``)::

    {"schema": "hornproof.sweep/1", "case": "...", "title": "...", "case_sha256": "...",
     "parameter": {"name": "flare_half_angle_h_deg", "label": "H-plane flare half-angle",
                   "unit": "deg", "values": [...n...]},
     "frequency_ghz": 10.5,                  # the frequency the sweep compares at
     "figure": {"name": "directivity_dbi", "label": "Directivity", "unit": "dB"},
     "tolerance": 0.5,                       # same unit as the figure differences
     "models": {"closed_form": [...n], "exact_phase": [...n], "fdtd": [...n] or null},
     "fdtd_uncertainty": [...n] or null,     # absolute, figure unit
     "errors": {"phase_approximation": [...n], "aperture_model": [...n] or null,
                "total": [...n] or null},    # as in the comparison block
     "uncertainties": {"phase_approximation": [...n], "aperture_model": [...n], "total": [...n]},
     "breakdown": {"phase_approximation": 15.8 | null | "below range",
                   "aperture_model": ..., "total": ...},   # verdict.breakdown_threshold
     "solver": {...}, "warnings": [...]}

If ``error_vs_parameter.png`` is missing it is drawn from these arrays.
"""

import base64
import html
import math
import os
import tempfile
from pathlib import Path

from ...units import GHZ
from . import plots
from ..output.result_json import RESULT_SCHEMA, read_result_json
from ..output.safety import RF_EXPOSURE_CAUTION, RF_EXPOSURE_HEADING
from ..output.sweep_json import SWEEP_SCHEMA, read_sweep_json


_VERDICT_TEXT = {
    "agrees": "agrees",
    "disagrees": "DISAGREES",
    "unresolved": "unresolved — needs finer cells",
    "missing": "no value",
    "no checks": "no checks requested",
}

_STYLE = """
body { font-family: "DejaVu Sans", Arial, sans-serif; margin: 2em auto; max-width: 72em;
       color: #222; line-height: 1.4; padding: 0 1em; }
h1 { font-size: 1.5em; margin-bottom: 0.1em; }
h3 { font-size: 1.0em; margin-top: 1.2em; }
h2 { font-size: 1.15em; border-bottom: 1px solid #bbb; padding-bottom: 0.15em; margin-top: 1.8em; }
.sub { color: #555; margin-top: 0; }
.overall { display: inline-block; padding: 0.3em 0.8em; border: 2px solid #444; font-weight: bold; }
table { border-collapse: collapse; margin: 0.6em 0; font-size: 0.92em; }
div.wide { overflow-x: auto; }
#verdicts { font-size: 0.85em; }
th, td { border: 1px solid #ccc; padding: 0.25em 0.6em; text-align: right; }
th { background: #f1f1ec; }
td.text, th.text { text-align: left; }
tr.v-disagrees td.verdict { font-weight: bold; text-decoration: underline; }
tr.v-unresolved td.verdict { font-style: italic; }
figure { margin: 1.2em 0; }
figure img { max-width: 100%; border: 1px solid #ddd; }
figcaption { color: #444; font-size: 0.9em; }
.caution { border-left: 4px solid #8a6d1d; background: #faf6ea; padding: 0.6em 1em; }
.warnings li { color: #6b4b00; }
footer { color: #666; font-size: 0.85em; margin-top: 2em; }
"""


def _esc(value):
    return html.escape(str(value), quote=True)


def _number(value, digits=3):
    if value is None:
        return "—"
    try:
        value = float(value)
    except (TypeError, ValueError):
        return _esc(value)
    if not math.isfinite(value):
        return "—"
    if round(value, digits) == 0:
        value = 0.0  # no "−0.000"
    return f"{value:.{digits}f}".replace("-", "\u2212")


def _write_atomic(path, text):
    directory = os.path.dirname(os.path.abspath(path))
    handle, temporary = tempfile.mkstemp(prefix=".tmp-", suffix=".html", dir=directory)
    try:
        with os.fdopen(handle, "w", encoding="utf-8") as fh:
            fh.write(text)
        os.chmod(temporary, 0o644)  # mkstemp makes 0600; a report is meant to be shared
        os.replace(temporary, path)
    except BaseException:
        if os.path.exists(temporary):
            os.remove(temporary)
        raise
    return path


_UNIT_SUFFIXES = (("_mm", "mm"), ("_deg", "deg"), ("_wl", "λ"), ("_ghz", "GHz"), ("_db", "dB"),
                  ("_dbi", "dBi"), ("_s", "s"))
_UNIT_KEYS = {"seconds": "s"}


def _key_label(key):
    if key in _UNIT_KEYS:
        return key, _UNIT_KEYS[key]
    for suffix, unit in _UNIT_SUFFIXES:
        if key.endswith(suffix):
            return key[: -len(suffix)].replace("_", " "), unit
    return key.replace("_", " "), ""


def _value_text(value):
    if value is None:
        return "—"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, int):
        return _esc(value)
    if isinstance(value, float):
        return _esc(f"{value:.6g}").replace("-", "\u2212") if math.isfinite(value) else "—"
    if isinstance(value, (list, tuple)):
        return ", ".join(_value_text(v) for v in value)
    if isinstance(value, dict):
        return "; ".join(f"{_esc(k)}: {_value_text(v)}" for k, v in value.items())
    return _esc(value)


def _key_value_table(mapping):
    if not mapping:
        return "<p>Not recorded.</p>"
    rows = []
    for key, value in mapping.items():
        label, unit = _key_label(str(key))
        rows.append(f"<tr><th class='text'>{_esc(label)}</th><td class='text'>{_value_text(value)}</td>"
                    f"<td class='text'>{_esc(unit)}</td></tr>")
    return "<table><tr><th class='text'>Quantity</th><th class='text'>Value</th>" \
           "<th class='text'>Unit</th></tr>" + "".join(rows) + "</table>"


_CAPTIONS = {
    "pattern_h_plane": "H-plane pattern of the three models; shaded: FDTD numerical uncertainty.",
    "pattern_e_plane": "E-plane pattern of the three models; shaded: FDTD numerical uncertainty.",
    "directivity_vs_frequency": "Directivity over the band; bars: FDTD numerical uncertainty.",
    "convergence_ladder": "FDTD grid convergence near the band centre, with the extrapolated value "
                          "and the uncertainty band.",
    "error_vs_parameter": "Model errors against the swept parameter, with tolerance and breakdown.",
    "s11": "Input reflection |S11| of the FDTD model.",
}

_VERDICT_RULE = (
    "<p class='sub'>agrees: |difference| ≤ tolerance + uncertainty, with the uncertainty no "
    "larger than the tolerance · DISAGREES: |difference| − uncertainty &gt; tolerance · "
    "unresolved: the uncertainty exceeds the tolerance and the difference does not clear it · "
    "uncertainty: FDTD grid-convergence uncertainty (GCI, or a bound from the ladder spread "
    "when the ladder is not monotonic).</p>"
)


def _ladder_status(comparison, metric_name):
    """Per-frequency ladder status text for the metric the convergence block belongs to."""
    from ..numerics.verdict import COMPARED_FIGURES

    conv = comparison.get("convergence") or {}
    figure = COMPARED_FIGURES.get(metric_name, (None,))[0]
    if not conv or conv.get("figure") != figure:
        return None
    out = []
    for estimate in conv.get("estimates") or []:
        status = str(estimate.get("status", "?"))
        if estimate.get("uncertainty_kind") == "spread-bound":
            status += " (spread bound)"
        flags = [f for f in estimate.get("flags") or [] if f != "spread-bound"]
        if flags:
            status += "; " + ", ".join(flags)
        out.append(status)
    return out


def _verdict_table(comparison):
    checked = comparison.get("model_checked", "closed_form")
    checked_name = "closed form" if checked == "closed_form" else "exact phase"
    head = (
        "<tr><th class='text'>Metric</th><th>Frequency (GHz)</th><th>Closed form</th>"
        "<th>Exact phase</th><th>FDTD ± uncertainty</th>"
        f"<th>Difference ({_esc(checked_name)} − FDTD)</th><th>Tolerance</th>"
        "<th class='text'>Verdict</th><th>Phase-approximation error (closed form − exact phase)</th>"
        "<th>Aperture-model error (exact phase − FDTD)</th><th class='text'>Unit</th>"
        "<th class='text'>FDTD grid ladder</th></tr>"
    )
    rows = []
    for metric in comparison.get("metrics", []):
        label = metric.get("label", metric.get("metric", "?"))
        unit = metric.get("unit", "")
        tolerance = metric.get("tolerance")
        ladder = _ladder_status(comparison, metric.get("metric"))
        for i, row in enumerate(metric.get("per_frequency", [])):
            status = ladder[i] if ladder and i < len(ladder) else "—"
            verdict = str(row.get("verdict", "missing"))
            fdtd = _number(row.get("fdtd"))
            if row.get("fdtd") is not None:
                fdtd += " ± " + _number(row.get("fdtd_uncertainty"))
            rows.append(
                f"<tr class='v-{_esc(verdict)}'><td class='text'>{_esc(label)}</td>"
                f"<td>{_number(row.get('frequency_ghz'))}</td>"
                f"<td>{_number(row.get('closed_form'))}</td><td>{_number(row.get('exact_phase'))}</td>"
                f"<td>{fdtd}</td><td>{_number(row.get('difference'))}</td>"
                f"<td>{_number(tolerance)}</td>"
                f"<td class='text verdict'>{_esc(_VERDICT_TEXT.get(verdict, verdict))}</td>"
                f"<td>{_number(row.get('phase_approximation_error'))}</td>"
                f"<td>{_number(row.get('aperture_model_error'))}</td>"
                f"<td class='text'>{_esc(unit)}</td><td class='text'>{_esc(status)}</td></tr>"
            )
    if not rows:
        return "<p>No comparison in this result (analytic prediction or FDTD only).</p>"
    return ("<div class='wide'><table id='verdicts'>" + head + "".join(rows) + "</table></div>"
            + _VERDICT_RULE)


def _frequency_at(result, index):
    f_ghz = result.get("frequencies_ghz") or []
    return f_ghz[index] if isinstance(index, int) and 0 <= index < len(f_ghz) else None


def _extra_checks_table(result):
    """Checks outside the figure table (e.g. pattern RMS, return loss), if the result has any.

    Rows as written by ``verify``: ``check``, ``frequency_index``, ``value``, ``uncertainty``,
    ``limit``, ``verdict``.
    """
    rows = (result.get("comparison") or {}).get("extra_checks") or []
    if not rows:
        return ""
    body = "".join(
        f"<tr class='v-{_esc(r.get('verdict', 'missing'))}'><td class='text'>{_esc(r.get('check', '?'))}</td>"
        f"<td>{_number(_frequency_at(result, r.get('frequency_index')))}</td>"
        f"<td>{_number(r.get('value'))}</td><td>{_number(r.get('uncertainty'))}</td>"
        f"<td>{_number(r.get('limit'))}</td>"
        f"<td class='text verdict'>{_esc(_VERDICT_TEXT.get(r.get('verdict'), r.get('verdict')))}</td></tr>"
        for r in rows)
    return ("<h3>Further checks</h3><table id='extra-checks'><tr><th class='text'>Check</th>"
            "<th>Frequency (GHz)</th><th>Value (dB)</th><th>Uncertainty (dB)</th><th>Limit (dB)</th>"
            "<th class='text'>Verdict</th></tr>" + body + "</table>")


def _pattern_error_table(result):
    """Main-lobe pattern error per plane and model, if the result has it.

    Expected: ``comparison.pattern_error = {"window_db": -10, "planes": {plane: {model:
    PatternError.to_dict() + "uncertainty_db": [nf]}}}``.
    """
    block = (result.get("comparison") or {}).get("pattern_error") or {}
    planes = block.get("planes") or {}
    rows = []
    for plane, by_model in planes.items():
        for model, entry in (by_model or {}).items():
            rms = entry.get("rms_db") or []
            for i, value in enumerate(rms):
                worst = (entry.get("worst_db") or [None] * len(rms))[i]
                angle = (entry.get("worst_angle_deg") or [None] * len(rms))[i]
                unc = (entry.get("uncertainty_db") or [None] * len(rms))[i]
                rows.append(f"<tr><td class='text'>{_esc(plane.replace('_', '-'))}</td>"
                            f"<td class='text'>{_esc(model.replace('_', ' '))}</td>"
                            f"<td>{_number(_frequency_at(result, i))}</td><td>{_number(value)}</td>"
                            f"<td>{_number(unc)}</td><td>{_number(worst)}</td><td>{_number(angle, 1)}</td></tr>")
    if not rows:
        return ""
    window = _number(block.get("window_db"), 1)
    return (f"<h3>Pattern error over the main lobe (down to {window} dB below the FDTD peak), "
            "model − FDTD</h3><table id='pattern-error'><tr><th class='text'>Plane</th>"
            "<th class='text'>Model</th><th>Frequency (GHz)</th><th>RMS (dB)</th>"
            "<th>Uncertainty (dB)</th><th>Worst (dB)</th><th>at θ (deg)</th></tr>"
            + "".join(rows) + "</table>")


def _figure_html(png_path):
    data = base64.b64encode(Path(png_path).read_bytes()).decode("ascii")
    stem = Path(png_path).stem
    caption = _CAPTIONS.get(stem, stem.replace("_", " "))
    return (f"<figure><img alt='{_esc(stem.replace('_', ' '))}' src='data:image/png;base64,{data}'>"
            f"<figcaption>{_esc(caption)}</figcaption></figure>")


def _figures_html(folder):
    pngs = sorted(p for p in Path(folder).glob("*.png") if not p.name.startswith("."))
    ranked = sorted(pngs, key=lambda p: (plots.STANDARD_STEMS.index(p.stem)
                                         if p.stem in plots.STANDARD_STEMS else len(plots.STANDARD_STEMS),
                                         p.name))
    if not ranked:
        return "<p>No figures in this folder.</p>"
    return "".join(_figure_html(p) for p in ranked)


def _floats(values):
    return [math.nan if v is None else float(v) for v in values]


def _render_missing_result_figures(folder, result):
    """Draw the band figures that only need result.json, if they are not there yet."""
    folder = Path(folder)
    f_ghz = result.get("frequencies_ghz") or []
    if not f_ghz:
        return
    frequencies = [g * GHZ for g in f_ghz]
    models = result.get("models", {})
    title = result.get("title") or result.get("case", "")
    key = "directivity_2d_db" if result.get("dims") == 2 else "directivity_dbi"
    unit = "dB" if key == "directivity_2d_db" else "dBi"
    if not (folder / "directivity_vs_frequency.png").exists():
        curves = {m: models.get(m, {}).get(key) for m in ("closed_form", "exact_phase", "fdtd")}
        if any(c is not None for c in curves.values()):
            stored = models.get("fdtd", {}).get("uncertainty", {}) or {}
            unc = stored.get(key, stored.get("directivity_db"))
            plots.plot_directivity_vs_frequency(
                frequencies, *[None if c is None else _floats(c) for c in curves.values()],
                folder / "directivity_vs_frequency",
                fdtd_uncertainty_db=None if unc is None else _floats(unc), case_title=title,
                unit=unit, quantity="2D directivity" if unit == "dB" else "Directivity")
    s11 = models.get("fdtd", {}).get("s11_db")
    if s11 is not None and not (folder / "s11.png").exists():
        plots.plot_s11(frequencies, _floats(s11), folder / "s11", case_title=title)
    conv = (result.get("comparison") or {}).get("convergence")
    if conv and not (folder / "convergence_ladder.png").exists():
        try:
            cpw = conv["cells_per_wavelength"]
            values = conv["values"]
            estimates = conv["estimates"]
        except (KeyError, TypeError):
            return
        centre = (min(f_ghz) * max(f_ghz)) ** 0.5
        j = min(range(len(f_ghz)), key=lambda i: abs(f_ghz[i] - centre))
        column = [row[j] for row in values]
        if all(v is not None for v in column) and len(estimates) > j:
            plots.plot_convergence_ladder(cpw, _floats(column), folder / "convergence_ladder",
                                          estimate=estimates[j], frequency=f_ghz[j] * GHZ,
                                          unit=conv.get("unit", unit), case_title=title)


def _page(title, subtitle, sections, footer):
    body = "".join(f"<section><h2>{_esc(h)}</h2>{content}</section>" for h, content in sections)
    return (
        "<!DOCTYPE html>\n<html lang='en'><head><meta charset='utf-8'>"
        f"<title>{_esc(title)}</title><style>{_STYLE}</style></head><body>"
        f"<h1>{_esc(title)}</h1><p class='sub'>{subtitle}</p>{body}"
        f"<footer>{footer}</footer></body></html>\n"
    )


def _caution_html():
    return f"<div class='caution'><p>{_esc(RF_EXPOSURE_CAUTION)}</p></div>"


def _warnings_html(warnings):
    if not warnings:
        return ""
    return "<ul class='warnings'>" + "".join(f"<li>{_esc(w)}</li>" for w in warnings) + "</ul>"


def build_report(result_dir, *, render_missing=True):
    """Write ``report.html`` for a verify result folder.

    Parameters
    ----------
    result_dir : str or os.PathLike
        Folder holding ``result.json`` (schema ``hornproof.result/1``) and the figures.
    render_missing : bool
        Draw the band, S11 and convergence figures from result.json if their PNGs are missing
        (default True; they are written into the folder).

    Returns
    -------
    str
        Path of the written report.

    Raises
    ------
    InputError
        No result.json, invalid JSON, or another schema version (with a hint).
    """
    folder = Path(result_dir)
    result = read_result_json(folder / "result.json")
    if render_missing:
        _render_missing_result_figures(folder, result)
    comparison = result.get("comparison") or {}
    title = result.get("title") or result.get("case") or "hornproof result"
    overall = comparison.get("overall")
    checked = comparison.get("model_checked", "closed_form").replace("_", " ")
    if overall:
        verdict_intro = (f"<p>Overall verdict on the {_esc(checked)} model, judged against FDTD "
                         "with each metric's tolerance and the FDTD numerical uncertainty: "
                         f"<span class='overall'>{_esc(_VERDICT_TEXT.get(overall, overall))}"
                         "</span></p>")
    else:
        verdict_intro = ""
    verdicts = (verdict_intro + _verdict_table(comparison) + _extra_checks_table(result)
                + _pattern_error_table(result) + _warnings_html(result.get("warnings")))
    subtitle = (f"Case {_esc(result.get('case', '?'))} · band "
                f"{_number(min(result.get('frequencies_ghz') or [math.nan]))}–"
                f"{_number(max(result.get('frequencies_ghz') or [math.nan]))} GHz")
    sections = [
        ("Verdicts", verdicts),
        ("Geometry", _key_value_table(result.get("geometry") or {})),
        ("Solver settings", _key_value_table(result.get("solver") or {})),
        ("Figures", _figures_html(folder)),
        (RF_EXPOSURE_HEADING, _caution_html()),
    ]
    footer = (f"schema {_esc(RESULT_SCHEMA)} · case hash {_esc(result.get('case_sha256', '?'))} · "
              f"hornproof {_esc(result.get('hornproof_version', '?'))}")
    return str(_write_atomic(folder / "report.html", _page(title, subtitle, sections, footer)))


def _breakdown_text(value, unit):
    if value is None:
        return "none within the swept range"
    if value == "below range":
        return "already beyond tolerance at the first swept value"
    return f"{_number(value)} {_esc(unit)}"


def _sweep_table(sweep):
    parameter = sweep.get("parameter", {})
    values = parameter.get("values", [])
    models = sweep.get("models", {}) or {}
    errors = sweep.get("errors", {}) or {}
    unc = sweep.get("fdtd_uncertainty") or [None] * len(values)
    unit = (sweep.get("figure") or {}).get("unit", "")

    def column(source, key):
        data = source.get(key) or [None] * len(values)
        return data if len(data) == len(values) else [None] * len(values)

    cf, ep, fd = column(models, "closed_form"), column(models, "exact_phase"), column(models, "fdtd")
    pe, ae, te = column(errors, "phase_approximation"), column(errors, "aperture_model"), column(errors, "total")
    head = (f"<tr><th>{_esc(parameter.get('label', parameter.get('name', 'parameter')))} "
            f"({_esc(parameter.get('unit', ''))})</th><th>Closed form</th><th>Exact phase</th>"
            "<th>FDTD ± uncertainty</th><th>Phase-approximation error</th>"
            "<th>Aperture-model error</th><th>Total error</th><th class='text'>Unit</th></tr>")
    rows = []
    for i, x in enumerate(values):
        fdtd = _number(fd[i]) + ("" if fd[i] is None else " ± " + _number(unc[i] if i < len(unc) else None))
        rows.append(f"<tr><td>{_number(x)}</td><td>{_number(cf[i])}</td><td>{_number(ep[i])}</td>"
                    f"<td>{fdtd}</td><td>{_number(pe[i])}</td><td>{_number(ae[i])}</td>"
                    f"<td>{_number(te[i])}</td><td class='text'>{_esc(unit)}</td></tr>")
    return "<table id='sweep'>" + head + "".join(rows) + "</table>"


def _render_missing_sweep_figure(folder, sweep):
    path = Path(folder) / "error_vs_parameter"
    if path.with_suffix(".png").exists():
        return
    parameter = sweep.get("parameter", {})
    values = parameter.get("values")
    errors = sweep.get("errors", {}) or {}
    if not values or errors.get("phase_approximation") is None and errors.get("aperture_model") is None:
        return
    unc = sweep.get("uncertainties", {}) or {}

    def arr(source, key):
        data = source.get(key)
        return None if data is None else _floats(data)

    figure = sweep.get("figure", {}) or {}
    plots.plot_error_vs_parameter(
        _floats(values), arr(errors, "phase_approximation"), arr(errors, "aperture_model"), path,
        phase_approximation_uncertainty=arr(unc, "phase_approximation") or 0.0,
        aperture_model_uncertainty=arr(unc, "aperture_model"),
        tolerance=sweep.get("tolerance"), breakdown=sweep.get("breakdown"),
        parameter_label=parameter.get("label", parameter.get("name", "parameter")),
        parameter_unit=parameter.get("unit", ""),
        error_label=f"{figure.get('label', 'Figure')} error", error_unit=figure.get("unit", "dB"),
        case_title=sweep.get("title") or sweep.get("case", ""))


def build_sweep_report(sweep_dir, *, render_missing=True):
    """Write ``report.html`` for a sweep folder (``sweep.json``, schema ``hornproof.sweep/1``).

    Parameters
    ----------
    sweep_dir : str or os.PathLike
        Folder holding ``sweep.json`` and the figures.
    render_missing : bool
        Draw ``error_vs_parameter.png`` from sweep.json if it is missing (default True).

    Returns
    -------
    str
        Path of the written report.

    Raises
    ------
    InputError
        No sweep.json, invalid JSON, or another schema version (with a hint).
    """
    folder = Path(sweep_dir)
    sweep = read_sweep_json(folder / "sweep.json")
    if render_missing:
        _render_missing_sweep_figure(folder, sweep)
    parameter = sweep.get("parameter", {})
    unit = parameter.get("unit", "")
    figure = sweep.get("figure", {}) or {}
    breakdown = sweep.get("breakdown", {}) or {}
    names = {"phase_approximation": "Phase approximation (closed form vs exact phase)",
             "aperture_model": "Aperture model (exact phase vs FDTD)",
             "total": "Closed form vs FDTD (total)"}
    rows = "".join(
        f"<tr><td class='text'>{_esc(names[k])}</td><td class='text'>{_breakdown_text(breakdown[k], unit)}</td></tr>"
        for k in names if k in breakdown)
    summary = (
        f"<p>{_esc(figure.get('label', 'Figure'))} compared at {_number(sweep.get('frequency_ghz'))} GHz; "
        f"a model breaks down where |error| minus its numerical uncertainty first exceeds "
        f"{_number(sweep.get('tolerance'))} {_esc(figure.get('unit', ''))} (linear interpolation "
        "between swept values).</p>"
        "<table id='breakdown'><tr><th class='text'>Model error</th>"
        f"<th class='text'>Breakdown {_esc(parameter.get('label', parameter.get('name', '')))}</th></tr>"
        f"{rows}</table>"
    )
    sections = [
        ("Breakdown", summary + _warnings_html(sweep.get("warnings"))),
        ("Swept values", _sweep_table(sweep)),
        ("Solver settings", _key_value_table(sweep.get("solver") or {})),
        ("Figures", _figures_html(folder)),
        (RF_EXPOSURE_HEADING, _caution_html()),
    ]
    title = sweep.get("title") or sweep.get("case") or "hornproof sweep"
    subtitle = (f"Sweep of {_esc(parameter.get('label', parameter.get('name', '?')))} · case "
                f"{_esc(sweep.get('case', '?'))}")
    footer = f"schema {_esc(SWEEP_SCHEMA)} · case hash {_esc(sweep.get('case_sha256', '?'))}"
    return str(_write_atomic(folder / "report.html", _page(title, subtitle, sections, footer)))
