"""The self-contained HTML report of a verify run (result.json) or of a sweep (sweep.json).

One file, ``report.html``, in the result folder: no external URLs, no scripts, every figure
embedded as a base64 PNG. Order: the verdicts first (what a reviewer needs), then the geometry
and solver settings, then the figures, then the RF-exposure caution
(:data:`hornproof.compare.output.safety.RF_EXPOSURE_CAUTION`). The page comes from the Jinja2
templates in ``templates/`` with autoescape on (:mod:`.render`); ``verify_page`` and
``sweep_page`` prepare the plain data they show, :mod:`.format` the numbers and words. The file
is written atomically (:mod:`hornproof.atomic`).

Inputs
======

``result.json`` (schema ``"hornproof.result/1"``; README.md "What you get", DEVELOPERS.md
"Conventions"). Keys read here:
``schema``, ``case``, ``title``, ``case_sha256``, ``frequencies_ghz``, ``geometry`` (flat dict;
the key suffix gives the unit: ``_mm``, ``_deg``, ``_wl``, ``_ghz``), ``models``, ``solver``
(flat dict), ``warnings`` (list of str), ``hornproof_version`` and the block below. Any other
schema string is refused with a hint (``InputError``, from
:func:`hornproof.compare.output.result_json.read_result_json`).

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
            "fdtd_uncertainty": 0.2,         # absolute, same unit, confident or not; null = none
            "uncertainty_confident": true,   # numerics.confidence.confident_uncertainty
            "ladder": "monotone",            # ladder health ("oscillatory", "2 rungs", ...)
            "uncertainty_reason": "monotone ladder, observed order 1.02",
            "difference": 0.5,               # model_checked − fdtd
            "phase_approximation_error": 0.3,  # closed_form − exact_phase
            "aperture_model_error": 0.2,       # exact_phase − fdtd
            "total_error": 0.5,                # closed_form − fdtd
            "verdict": "agrees" | "disagrees" | "unresolved" | "missing",
            "note": "..."}]}],               # optional: sidelobe/first-null rows where FDTD and
                                             # the model name different features (jobs.sidelobe_match)
      "convergence": {                       # optional
        "figure": "directivity_dbi", "unit": "dBi",
        "cells_per_wavelength": [12, 16, 24],
        "values": [[...nf...], [...], [...]],  # [ngrid][nf], same order as the ladder
        "estimates": [ConvergenceEstimate.to_dict(), ...],   # one per frequency
        "all_figures": {figure: [ConvergenceEstimate.to_dict(), ...]}},
      "extra_checks": [                      # written by jobs.verify: pattern RMS, S11
        {"check": "s11_db", "frequency_index": 0, "value": -20.3, "limit": -15.0,
         "uncertainty": 1.2, "uncertainty_confident": true, "ladder": "monotone",
         "uncertainty_reason": "...", "verdict": "agrees"}],
      "failed_checks": [...], "unresolved_checks": [...],
      "unresolved_reasons": {check: [reason, ...]}
    }

Figures: the PNG files in the folder, in the order of :data:`plots.STANDARD_STEMS` (then any
other ``*.png`` alphabetically). If ``directivity_vs_frequency.png`` or ``s11.png`` are missing
they are drawn from result.json; ``convergence_ladder.png`` is drawn from the convergence block
(finest-grid frequency closest to the band centre).

``sweep.json`` (schema ``"hornproof.sweep/2"``): see :mod:`hornproof.compare.report.sweep_page`.
"""

from pathlib import Path

from ..output.result_json import RESULT_SCHEMA, read_result_json
from ..output.safety import RF_EXPOSURE_CAUTION, RF_EXPOSURE_HEADING
from ..output.sweep_json import SWEEP_SCHEMA, read_sweep_json
from . import sweep_page, verify_page
from .embedded_figures import embedded_figures
from .format import MISSING_VALUE
from .render import render_page, write_page


def write_report(folder, template_name, context, captions, footer):
    """Render ``template_name`` with the page data, the folder's figures, the RF-exposure
    caution and ``footer``; write ``report.html`` into ``folder``; return its path."""
    context = dict(context, figures=embedded_figures(folder, captions), caution_heading=RF_EXPOSURE_HEADING,
                   caution=RF_EXPOSURE_CAUTION, footer=footer)
    return write_page(Path(folder) / "report.html", render_page(template_name, context))


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
        verify_page.render_missing_result_figures(folder, result)
    footer = (f"schema {RESULT_SCHEMA} · case hash {result.get('case_sha256', MISSING_VALUE)} · "
              f"hornproof {result.get('hornproof_version', MISSING_VALUE)}")
    return write_report(folder, "verify.html.j2", verify_page.verify_context(result),
                        verify_page.figure_captions(result), footer)


def build_sweep_report(sweep_dir, *, render_missing=True):
    """Write ``report.html`` for a sweep folder (``sweep.json``, schema ``hornproof.sweep/2``).

    Parameters
    ----------
    sweep_dir : str or os.PathLike
        Folder holding ``sweep.json`` and the figures.
    render_missing : bool
        Draw ``error_vs_parameter.png`` from sweep.json if it is missing (default True).

    Returns the path of the written report; raises ``InputError`` when sweep.json is missing,
    is not valid JSON or carries another schema version (with a hint).
    """
    folder = Path(sweep_dir)
    sweep = read_sweep_json(folder / "sweep.json")
    if render_missing:
        sweep_page.render_missing_sweep_figure(folder, sweep)
    footer = f"schema {SWEEP_SCHEMA} · case hash {sweep.get('case_sha256', MISSING_VALUE)}"
    return write_report(folder, "sweep.html.j2", sweep_page.sweep_context(sweep),
                        sweep_page.figure_captions(sweep), footer)
