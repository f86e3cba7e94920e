"""The page of a sweep: plain data for ``templates/sweep.html.j2`` from sweep.json.

``sweep.json`` (schema ``"hornproof.sweep/2"``, written by ``hornproof sweep``; see
:func:`hornproof.compare.jobs.sweep.sweep_document`)::

    {"schema": "hornproof.sweep/2", "case": "...", "title": "...", "case_sha256": "...",
     "parameter": {"name": "flare_half_angle_h_deg", "label": "H-plane flare half-angle",
                   "unit": "deg", "values": [...n...], "held_fixed": "flare length"},
     "frequency_ghz": 10.0, "tolerance": 0.5,
     "dims": 3, "label": "3D model of the real horn",          # the sweep's model
     "figure": {"name": "directivity_dbi", "label": "Directivity", "unit": "dBi"},
     "models": {"closed_form": [...n], "exact_phase": [...n], "fdtd": [...n] or null},
     "fdtd_uncertainty": [...n], "fdtd_confident_uncertainty": [...n],   # null: not confident
     "fdtd_disagreement_bound": [...n], "fdtd_ladder": [...n], "fdtd_uncertainty_reason": [...n],
     "errors": {"phase_approximation": [...n], "aperture_model": [...n] or null, "total": ...},
     "uncertainties": {...same keys...},
     "breakdown": {"phase_approximation": {"status", "earliest", "nominal", "latest", "reason",
                                           "holds", "past", "unknown"}, ...},   # numerics.breakdown
     "optimum": {"closed_form": {"value", "figure", "uncertainty", "range", "interior",
                                 "phase_error_h_wl", "phase_error_e_wl"}, "exact_phase": ..., "fdtd": ...},
     "dense": {"values": [...], "closed_form": [...], "exact_phase": [...]},   # analytic, dense
     "points": [{"value", "cells_per_wavelength", "seconds", "verdict", ...}],
     "principal_plane": {...the same model keys for the 2D model...} or null,
     "parting": {"difference": [...n], "interval": {...}, "largest": {...}} or null,
     "solver": {...}, "warnings": [...], "safety": "..."}

If ``error_vs_parameter.png`` is missing it is drawn from these arrays.
"""

from .format import MISSING_VALUE, breakdown_words, number, quantity_rows, step_decimals, unit_decimals

#: the three model errors of a sweep, as the breakdown table names them
ERROR_NAMES = {"phase_approximation": "Phase approximation (closed form vs exact phase)",
               "aperture_model": "Aperture model (exact phase vs FDTD)",
               "total": "Closed form vs FDTD (total)"}

#: the three models, as the optimum table names them
MODEL_NAMES = {"closed_form": "Closed form", "exact_phase": "Exact phase", "fdtd": "FDTD"}


def column(source, key, n):
    """``source[key]`` if it is a list of ``n`` values, else ``n`` missing values."""
    data = source.get(key) or [None] * n
    return data if len(data) == n else [None] * n


def sweep_rows(sweep, decimals):
    """One table row per swept value: the three models, the three errors and the FDTD ladder."""
    values = (sweep.get("parameter") or {}).get("values", [])
    n = len(values)
    models, errors = sweep.get("models") or {}, sweep.get("errors") or {}
    uncertainty = column(sweep, "fdtd_uncertainty", n)
    confident = column(sweep, "fdtd_confident_uncertainty", n)
    ladder = column(sweep, "fdtd_ladder", n)
    closed_form, exact_phase, fdtd = (column(models, k, n) for k in ("closed_form", "exact_phase", "fdtd"))
    phase, aperture, total = (column(errors, k, n) for k in ("phase_approximation", "aperture_model", "total"))
    digits = unit_decimals((sweep.get("figure") or {}).get("unit", ""))

    def fdtd_text(i):
        if fdtd[i] is None:
            return MISSING_VALUE
        mark = "" if uncertainty[i] is None or confident[i] is not None else "?"
        return number(fdtd[i], digits) + " ± " + number(uncertainty[i], digits) + mark

    return [{"parameter": number(x, decimals), "closed_form": number(closed_form[i], digits),
             "exact_phase": number(exact_phase[i], digits), "fdtd": fdtd_text(i),
             "ladder": ladder[i] or MISSING_VALUE,
             "phase_approximation_error": number(phase[i], digits),
             "aperture_model_error": number(aperture[i], digits),
             "total_error": number(total[i], digits)} for i, x in enumerate(values)]


def optimum_rows(sweep, unit):
    """One row per model: where it peaks, the range that could hold the peak, S and T there."""
    rows = []
    for key, best in (sweep.get("optimum") or {}).items():
        if not best:
            continue
        spread = best.get("range") or [best["value"], best["value"]]
        rows.append({"model": MODEL_NAMES.get(key, key), "value": f"{number(best['value'], 1)} {unit}",
                     "range": f"{number(spread[0], 1)}–{number(spread[1], 1)} {unit}"
                              + ("" if best.get("bounded", True) else " (some points unbounded)"),
                     "figure": number(best.get("figure"), 2) + ("" if best.get("uncertainty") in (None, 0.0)
                                                                 else " ± " + number(best["uncertainty"], 2)),
                     "phase_errors": f"S = {number(best.get('phase_error_h_wl'), 3)}, "
                                     f"T = {number(best.get('phase_error_e_wl'), 3)}",
                     "edge": "" if best.get("interior") else "at the edge of the sweep"})
    return rows


def breakdown_rows(block, unit, decimals):
    """One row per model error: its breakdown interval in words."""
    breakdown = (block or {}).get("breakdown") or {}
    return [{"error": name, "where": breakdown_words(breakdown[key], unit, decimals)}
            for key, name in ERROR_NAMES.items() if key in breakdown]


def sweep_context(sweep):
    """Everything ``sweep.html.j2`` shows, as plain data (figures and footer added by the caller)."""
    parameter = sweep.get("parameter") or {}
    unit = parameter.get("unit", "")
    decimals = step_decimals(parameter.get("values") or [], unit)
    figure = sweep.get("figure") or {}
    label = parameter.get("label", parameter.get("name", MISSING_VALUE))
    principal = sweep.get("principal_plane")
    parted = sweep.get("parting") or {}
    largest = parted.get("largest") or {}
    return {
        "title": sweep.get("title") or sweep.get("case") or "hornproof sweep",
        "subtitle": f"Sweep of {label} · case {sweep.get('case', MISSING_VALUE)}",
        "model_label": (sweep.get("label") or MISSING_VALUE) if (sweep.get("models") or {}).get("fdtd")
                       else "analytic models only (no FDTD run; the full-wave model would be the "
                            + (sweep.get("label") or MISSING_VALUE) + ")",
        "principal_only": sweep.get("dims") == 2,
        "figure_label": figure.get("label", "Figure"), "figure_unit": figure.get("unit", ""),
        "frequency": number(sweep.get("frequency_ghz")), "tolerance": number(sweep.get("tolerance"), 2),
        "parameter_label": label, "parameter_unit": unit,
        "breakdown_rows": breakdown_rows(sweep, unit, decimals),
        "principal_label": principal.get("label") if principal else None,
        "principal_rows": breakdown_rows(principal, unit, decimals) if principal else [],
        "parting": (breakdown_words(parted.get("interval"), unit, decimals).replace("breaks", "differ beyond the tolerance")
                    + (f"; largest difference {largest['difference']:+.2f} dB at {number(largest['value'], decimals)} {unit}"
                       if largest else "")) if parted else None,
        "optimum_rows": optimum_rows(sweep, unit),
        "sweep_rows": sweep_rows(sweep, decimals),
        "warnings": [str(w) for w in sweep.get("warnings") or []],
        "solver": quantity_rows({k: v for k, v in (sweep.get("solver") or {}).items() if k != "seconds_per_point"}),
    }


def figure_captions(sweep):
    """Captions that say what each sweep figure draws."""
    if not (sweep.get("models") or {}).get("fdtd"):
        return {"error_vs_parameter": "Phase-approximation error (closed form − exact phase) against the swept "
                                      "parameter on a dense analytic grid, the ± tolerance and its breakdown "
                                      "(analytic models only: no FDTD was run).",
                "directivity_vs_parameter": "The two analytic models against the swept parameter (dense grid) "
                                            "and each one's peak (no FDTD was run)."}
    return {"error_vs_parameter": "Signed model errors against the swept parameter: FDTD points with their "
                                  "numerical uncertainty (hollow: not confident), the ± tolerance, and each "
                                  "error's breakdown interval (shaded; hatched where unresolved).",
            "directivity_vs_parameter": "The three models against the swept parameter (analytic models on a "
                                        "dense grid), FDTD with its numerical uncertainty (hollow, dashed: not "
                                        "confident), and each model's peak.",
            "aperture_error_3d_vs_2d": "The aperture-model error seen by the 3D model of the real horn and by "
                                       "the 2D principal-plane first look, and where the two part."}


def render_missing_sweep_figure(folder, sweep):
    """Draw ``error_vs_parameter.png`` from sweep.json if it is not there yet."""
    # lazy: matplotlib only when a figure is missing
    from .sweep_plots import plot_error_vs_parameter

    path = folder / "error_vs_parameter"
    if path.with_suffix(".png").exists() or not (sweep.get("parameter") or {}).get("values"):
        return
    plot_error_vs_parameter(path, sweep)
