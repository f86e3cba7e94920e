"""The page of a verify run: plain data for ``templates/verify.html.j2`` from result.json.

The ``comparison`` block read here is produced by
:func:`hornproof.compare.numerics.verdict.comparison_block` (see :mod:`hornproof.compare.report.html`
for its keys). Numbers are formatted by :mod:`hornproof.compare.report.format`.
"""

import math

from ...units import GHZ
from ..numerics.confidence import confident_uncertainty
from ..numerics.figures import directivity_key
from ..numerics.verdict import COMPARED_FIGURES
from . import plots
from .range_shop_page import range_shop_captions, range_shop_context
from .range_shop_plots import write_tolerance_plot
from .verify_plots import confident_flags
from .feed_section import feed_context
from .format import CHECK_NAMES, MISSING_VALUE, number, quantity_rows, unit_decimals

#: verdict words shown to people (DISAGREES in capitals so it cannot be missed)
VERDICT_TEXT = {
    "agrees": "agrees",
    "disagrees": "DISAGREES",
    "unresolved": "unresolved",
    "missing": MISSING_VALUE,
    "no checks": "no checks requested",
}
MODEL_NAMES = {"closed_form": "closed form", "exact_phase": "exact phase", "fdtd": "FDTD"}


def ladder_status(comparison, metric_name):
    """Per-frequency ladder status text for the metric the convergence block belongs to."""
    convergence = comparison.get("convergence") or {}
    figure = COMPARED_FIGURES.get(metric_name, (None,))[0]
    if not convergence or convergence.get("figure") != figure:
        return None
    out = []
    for estimate in convergence.get("estimates") or []:
        status = str(estimate.get("status", MISSING_VALUE))
        if estimate.get("uncertainty_kind") == "spread-bound":
            status += " (spread bound)"
        flags = [f for f in estimate.get("flags") or [] if f != "spread-bound"]
        if flags:
            status += "; " + ", ".join(flags)
        out.append(status)
    return out


#: appended to an uncertainty that is not confident (no GCI from a healthy three-rung ladder)
NOT_CONFIDENT_MARK = " (not confident)"


def uncertainty_text(value, confident, digits=2):
    """An uncertainty for a table: the number, marked when it is not confident."""
    text = number(value, digits)
    return text if confident or value is None else text + NOT_CONFIDENT_MARK


def ladder_text(row, fallback=MISSING_VALUE):
    """The ladder cell of a row written by verify: ``"monotone: monotone ladder, observed order
    1.02"``; ``fallback`` for rows without one (older results)."""
    label, reason = row.get("ladder"), row.get("uncertainty_reason")
    if not label:
        return fallback
    if not reason or reason.replace(" ladder", "") == label:
        return str(label)  # "oscillatory: oscillatory ladder" says it twice
    return f"{label}: {reason}"


def verdict_rows(comparison):
    """One row per metric and frequency of the comparison block."""
    rows = []
    for metric in comparison.get("metrics", []):
        ladder = ladder_status(comparison, metric.get("metric")) or []
        digits = unit_decimals(metric.get("unit", ""))
        for i, row in enumerate(metric.get("per_frequency", [])):
            verdict = str(row.get("verdict", "missing"))
            fdtd = number(row.get("fdtd"), digits)
            if row.get("fdtd") is not None:
                fdtd += " ± " + uncertainty_text(row.get("fdtd_uncertainty"), row.get("uncertainty_confident", True),
                                                 digits)
            rows.append({
                "metric": metric.get("label", metric.get("metric", MISSING_VALUE)),
                "frequency": number(row.get("frequency_ghz")),
                "closed_form": number(row.get("closed_form"), digits),
                "exact_phase": number(row.get("exact_phase"), digits),
                "fdtd": fdtd, "difference": number(row.get("difference"), digits),
                "tolerance": number(metric.get("tolerance"), digits), "verdict": verdict,
                "verdict_text": VERDICT_TEXT.get(verdict, verdict),
                "phase_approximation_error": number(row.get("phase_approximation_error"), digits),
                "aperture_model_error": number(row.get("aperture_model_error"), digits),
                "unit": metric.get("unit", ""),
                "ladder": ladder_text(row, ladder[i] if i < len(ladder) else MISSING_VALUE),
            })
    return rows


def frequency_at(result, index):
    """Band frequency (GHz) of ``index``, or None."""
    f_ghz = result.get("frequencies_ghz") or []
    return f_ghz[index] if isinstance(index, int) and 0 <= index < len(f_ghz) else None


def extra_check_rows(result):
    """Checks outside the figure table (main-lobe pattern RMS, S11), as written by ``verify``:
    ``check``, ``frequency_index``, ``value``, ``uncertainty``, ``limit``, ``verdict``."""
    rows = []
    for row in (result.get("comparison") or {}).get("extra_checks") or []:
        verdict = str(row.get("verdict", "missing"))
        check = str(row.get("check", MISSING_VALUE))
        rows.append({"check": CHECK_NAMES.get(check, check.replace("_", " ")),
                     "frequency": number(frequency_at(result, row.get("frequency_index"))),
                     "value": number(row.get("value"), 2),
                     "uncertainty": uncertainty_text(row.get("uncertainty"), row.get("uncertainty_confident", True)),
                     "limit": number(row.get("limit"), 2), "verdict": verdict,  # all in dB
                     "ladder": ladder_text(row),
                     "verdict_text": VERDICT_TEXT.get(verdict, verdict)})
    return rows


def pattern_error_rows(result):
    """Main-lobe pattern error per plane, model and frequency: ``comparison.pattern_error =
    {"window_db": -10, "planes": {plane: {model: PatternError.to_dict() + "uncertainty_db"}}}``."""
    block = (result.get("comparison") or {}).get("pattern_error") or {}
    rows = []
    for plane, by_model in (block.get("planes") or {}).items():
        for model, entry in (by_model or {}).items():
            rms = entry.get("rms_db") or []
            missing = [None] * len(rms)
            estimates = entry.get("estimates") or missing
            for i, value in enumerate(rms):
                sure = estimates[i] is None or confident_uncertainty(estimates[i])[0] is not None
                rows.append({"plane": plane.replace("_", "-").replace("h-", "H-").replace("e-", "E-"),
                             "model": MODEL_NAMES.get(model, model.replace("_", " ")).capitalize(),
                             "frequency": number(frequency_at(result, i)), "rms": number(value, 2),
                             "uncertainty": uncertainty_text((entry.get("uncertainty_db") or missing)[i], sure),
                             "worst": number((entry.get("worst_db") or missing)[i], 2),
                             "worst_angle": number((entry.get("worst_angle_deg") or missing)[i], 1)})
    return rows


def horn_3d_rows(result):
    """A 2D case's directivity per frequency: the 2D model's (dB, a ratio of per-unit-length quantities: closed form,
    exact phase, FDTD) beside the 3D horn's aperture models (dBi, ``result.json``'s ``horn_3d``
    block). Empty for a 3D case."""
    block = result.get("horn_3d") or {}
    if not block:
        return []
    models = result.get("models") or {}

    def value(model, key, i):
        values = (model or {}).get(key) or []
        return number(values[i] if i < len(values) else None, 2)

    return [{"frequency": number(f_ghz),
             "closed_form_2d": value(models.get("closed_form"), "directivity_2d_db", i),
             "exact_phase_2d": value(models.get("exact_phase"), "directivity_2d_db", i),
             "fdtd_2d": value(models.get("fdtd"), "directivity_2d_db", i),
             "closed_form_3d": value(block.get("closed_form"), "directivity_dbi", i),
             "exact_phase_3d": value(block.get("exact_phase"), "directivity_dbi", i)}
            for i, f_ghz in enumerate(result.get("frequencies_ghz") or [])]


def centre_index(f_ghz):
    """Index of the band frequency closest to the geometric band centre (where the pattern and
    ladder figures are drawn)."""
    centre = (min(f_ghz) * max(f_ghz)) ** 0.5
    return min(range(len(f_ghz)), key=lambda i: abs(f_ghz[i] - centre))


def figure_captions(result):
    """Captions that say what each standard figure of this result actually draws."""
    f_ghz = result.get("frequencies_ghz") or []
    ladder = (result.get("solver") or {}).get("cells_per_wavelength") or []
    at = f" at {number(f_ghz[centre_index(f_ghz)])} GHz" if f_ghz else ""
    band = ("; shaded: at each angle, the largest difference between the finest FDTD grid and the "
            "coarser grids of the ladder" if len(ladder) > 1 else "")
    captions = {f"pattern_{p.lower()}_plane": f"{p}-plane pattern of the three models{at}{band}."
                for p in ("H", "E")}
    models = result.get("models") or {}
    stored = (models.get("fdtd") or {}).get("uncertainty") or {}
    has_bars = any(v is not None for values in stored.values() for v in (values or []))
    quantity = "2D directivity" if result.get("dims") == 2 else "Directivity"
    captions["directivity_vs_frequency"] = (
        f"{quantity} over the band" + ("; bars: FDTD numerical uncertainty — solid with filled markers where it "
                                        "is a confident GCI, dashed with hollow markers where the ladder gives "
                                        "no confident uncertainty (such a row can only disagree beyond the "
                                        "ladder's spread, else it is unresolved)." if has_bars else "."))
    captions["s11"] = ("Input reflection |S11| (dB) at the feed guide, FDTD model, with the grid ladder's "
                       "uncertainty as bars where the ladder gave one (S11 converges worst of all figures).")
    captions["model"] = "The modelled metal on the finest grid, as the FDTD solver sees it."
    for plane, letter in (("h", "H"), ("e", "E")):
        captions[f"phase_centre_{plane}"] = (
            f"Phase centre of the {letter}-plane over the band, mm behind the aperture plane (towards the "
            "throat): least-squares fit of the co-polar far-field phase over the main lobe; FDTD with its "
            "ladder uncertainty (hollow markers and dashed bars: not confident).")
    convergence = (result.get("comparison") or {}).get("convergence") or {}
    estimates = convergence.get("estimates") or []
    if f_ghz and len(estimates) == len(f_ghz):
        estimate = estimates[centre_index(f_ghz)]
        parts = [f"FDTD grid convergence{at}"]
        if plots.ladder_draws_extrapolation(estimate):
            parts.append("the Richardson-extrapolated value")
        if estimate.get("uncertainty") is not None:
            parts.append("the GCI band" if estimate.get("uncertainty_kind") == "gci"
                         else "a bound from the ladder spread (not an error estimate)")
        captions["convergence_ladder"] = (parts[0] + (", with " + " and ".join(parts[1:]) if parts[1:] else "")
                                          + ". The band is the ladder's part only; the verdict table's uncertainty "
                                          "adds the power-balance and grid-fit terms (root-sum-square).")
    captions.update(range_shop_captions(result))
    return captions


def verify_context(result):
    """Everything ``verify.html.j2`` shows, as plain data (figures and footer added by the caller)."""
    comparison = result.get("comparison") or {}
    overall = comparison.get("overall")
    f_ghz = [f for f in result.get("frequencies_ghz") or [] if f is not None]
    block = comparison.get("pattern_error") or {}
    return {
        "title": result.get("title") or result.get("case") or "hornproof result",
        "subtitle": (f"Case {result.get('case', MISSING_VALUE)} · band {number(min(f_ghz) if f_ghz else math.nan)}–"
                     f"{number(max(f_ghz) if f_ghz else math.nan)} GHz"),
        "overall": VERDICT_TEXT.get(overall, overall) if overall else None,
        "checked_model": MODEL_NAMES.get(comparison.get("model_checked", "closed_form"), "closed form"),
        "verdict_rows": verdict_rows(comparison), "missing": MISSING_VALUE,
        "extra_checks": extra_check_rows(result), "pattern_error_rows": pattern_error_rows(result),
        "pattern_window": number(block.get("window_db"), 1),
        "horn_3d_rows": horn_3d_rows(result),
        "warnings": [str(w) for w in result.get("warnings") or []],
        "geometry": quantity_rows(result.get("geometry") or {}),
        "solver": quantity_rows({key: value for key, value in (result.get("solver") or {}).items()
                                 if key not in SOLVER_KEYS_IN_OWN_TABLES}),
        "grid_fit": grid_fit_table(result),
        "refinement": refinement_text(result),
        "feed": feed_context(result),
        **range_shop_context(result),  # wall loss, finite range, tolerances (templates/range_shop.html.j2)
    }


#: solver keys shown in their own tables (grid fit) or sentences (refinement), not as a dump
SOLVER_KEYS_IN_OWN_TABLES = ("grid_fit", "nominal_cells_per_wavelength", "modelled_sizes_mm", "refinement")
#: defining sizes in the order a reader expects them
SIZE_ORDER = ("guide_a", "guide_b", "aperture_a", "aperture_b", "flare_length")
SIZE_NAMES = {"guide_a": "a", "guide_b": "b", "aperture_a": "A", "aperture_b": "B", "flare_length": "L"}


def grid_fit_table(result):
    """{"sizes": [column names], "rows": [...]}: per rung, the nominal and fitted cells per
    wavelength, the worst size residual and each defining size as modelled (residual)."""
    fits = (result.get("solver") or {}).get("grid_fit") or []
    if not fits:
        return None
    sizes = [name for name in SIZE_ORDER if any(name in (fit.get("sizes") or {}) for fit in fits)]
    walls = (result.get("solver") or {}).get("wall_thickness_modelled_mm") or []
    rows = []
    for index, fit in enumerate(fits):
        cells = []
        for name in sizes:
            size = (fit.get("sizes") or {}).get(name)
            cells.append(MISSING_VALUE if size is None else
                         f"{number(size['modelled_mm'], 2)} ({size['cells']} cells, {number(size['residual_percent'], 2)} %)")
        rows.append({"nominal": number(fit.get("nominal_cells_per_wavelength"), 1),
                     "fitted": number(fit.get("cells_per_wavelength"), 2),
                     "worst": number(fit.get("worst_residual_percent"), 2), "sizes": cells,
                     "wall": number(walls[index], 2) if isinstance(walls, list) and index < len(walls) else MISSING_VALUE})
    nominal = fits[0].get("sizes") or {}
    headers = [f"{SIZE_NAMES[name]} = {number(nominal[name]['nominal_mm'], 2)} mm" if name in nominal else SIZE_NAMES[name]
               for name in sizes]
    return {"sizes": headers, "rows": rows}


def refinement_text(result):
    """One sentence on the refinement to a target uncertainty, or None when none was asked."""
    refinement = (result.get("solver") or {}).get("refinement")
    if not refinement:
        return None
    budget = refinement.get("budget_seconds")
    return (f"Refinement to ±{number(refinement.get('target_uncertainty_db'), 2)} dB"
            + ("" if budget is None else f" within {number(budget, 0)} s") + f": {refinement.get('stopped')}.")


def floats(values):
    """JSON numbers (None for missing) as floats (NaN for missing)."""
    return [math.nan if v is None else float(v) for v in values]


def render_missing_result_figures(folder, result):
    """Draw the band, S11 and convergence figures that only need result.json, if not there yet."""
    f_ghz = result.get("frequencies_ghz") or []
    if not f_ghz:
        return
    frequencies = [g * GHZ for g in f_ghz]
    models = result.get("models", {})
    title = result.get("title") or result.get("case", "")
    key = directivity_key(result.get("dims") or 3)
    unit = "dB" if key == "directivity_2d_db" else "dBi"
    if not (folder / "directivity_vs_frequency.png").exists():
        curves = [models.get(m, {}).get(key) for m in ("closed_form", "exact_phase", "fdtd")]
        if any(c is not None for c in curves):
            stored = models.get("fdtd", {}).get("uncertainty", {}) or {}
            uncertainty = stored.get(key, stored.get("directivity_db"))
            all_estimates = ((result.get("comparison") or {}).get("convergence") or {}).get("all_figures") or {}
            plots.plot_directivity_vs_frequency(
                frequencies, *[None if c is None else floats(c) for c in curves],
                folder / "directivity_vs_frequency",
                fdtd_uncertainty_db=None if uncertainty is None else floats(uncertainty),
                fdtd_confident=confident_flags(all_estimates.get(key), len(f_ghz)) if key in all_estimates else None,
                case_title=title,
                unit=unit, quantity="2D directivity" if unit == "dB" else "Directivity")
    if result.get("tolerance") and not (folder / "tolerance.png").exists():
        write_tolerance_plot(folder, result)
    s11 = models.get("fdtd", {}).get("s11_db")
    if s11 is not None and not (folder / "s11.png").exists():
        stored = (models.get("fdtd", {}).get("uncertainty") or {}).get("s11_db")
        plots.plot_s11(frequencies, floats(s11), folder / "s11", case_title=title,
                       uncertainty_db=None if stored is None else floats(stored))
    convergence = (result.get("comparison") or {}).get("convergence")
    if convergence and not (folder / "convergence_ladder.png").exists():
        try:
            ladder, values = convergence["cells_per_wavelength"], convergence["values"]
            estimates = convergence["estimates"]
        except (KeyError, TypeError):
            return
        j = centre_index(f_ghz)
        column = [row[j] for row in values]
        if all(v is not None for v in column) and len(estimates) > j:
            plots.plot_convergence_ladder(ladder, floats(column), folder / "convergence_ladder",
                                          estimate=estimates[j], frequency=f_ghz[j] * GHZ,
                                          unit=convergence.get("unit", unit), case_title=title)
