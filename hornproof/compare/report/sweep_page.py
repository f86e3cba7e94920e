"""The page of a sweep: plain data for ``templates/sweep.html.j2`` from sweep.json.

``sweep.json`` (schema ``"hornproof.sweep/1"``, written by ``hornproof sweep``)::

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

from .sweep_plots import plot_error_vs_parameter
from .format import MISSING_VALUE, number, quantity_rows, step_decimals, unit_decimals
from .verify_page import floats

#: the three model errors of a sweep, as the breakdown table names them
ERROR_NAMES = {"phase_approximation": "Phase approximation (closed form vs exact phase)",
               "aperture_model": "Aperture model (exact phase vs FDTD)",
               "total": "Closed form vs FDTD (total)"}


def breakdown_text(value, unit, decimals):
    """Where a model error breaks down, in words."""
    if value is None:
        return "none within the swept range"
    if value == "below range":
        return "already beyond tolerance at the first swept value"
    return f"{number(value, decimals)} {unit}"


def column(source, key, n):
    """``source[key]`` if it is a list of ``n`` values, else ``n`` missing values."""
    data = source.get(key) or [None] * n
    return data if len(data) == n else [None] * n


def sweep_rows(sweep, decimals):
    """One table row per swept value: the three models and the three errors."""
    values = (sweep.get("parameter") or {}).get("values", [])
    n = len(values)
    models, errors = sweep.get("models") or {}, sweep.get("errors") or {}
    uncertainty = column(sweep, "fdtd_uncertainty", n)
    closed_form, exact_phase, fdtd = (column(models, k, n) for k in ("closed_form", "exact_phase", "fdtd"))
    phase, aperture, total = (column(errors, k, n) for k in ("phase_approximation", "aperture_model", "total"))
    digits = unit_decimals((sweep.get("figure") or {}).get("unit", ""))
    return [{"parameter": number(x, decimals), "closed_form": number(closed_form[i], digits),
             "exact_phase": number(exact_phase[i], digits),
             "fdtd": number(fdtd[i], digits) + ("" if fdtd[i] is None else " ± " + number(uncertainty[i], digits)),
             "phase_approximation_error": number(phase[i], digits),
             "aperture_model_error": number(aperture[i], digits),
             "total_error": number(total[i], digits)} for i, x in enumerate(values)]


def sweep_context(sweep):
    """Everything ``sweep.html.j2`` shows, as plain data (figures and footer added by the caller)."""
    parameter = sweep.get("parameter") or {}
    unit = parameter.get("unit", "")
    decimals = step_decimals(parameter.get("values") or [], unit)
    figure = sweep.get("figure") or {}
    breakdown = sweep.get("breakdown") or {}
    label = parameter.get("label", parameter.get("name", MISSING_VALUE))
    return {
        "title": sweep.get("title") or sweep.get("case") or "hornproof sweep",
        "subtitle": f"Sweep of {label} · case {sweep.get('case', MISSING_VALUE)}",
        "figure_label": figure.get("label", "Figure"), "figure_unit": figure.get("unit", ""),
        "frequency": number(sweep.get("frequency_ghz")), "tolerance": number(sweep.get("tolerance"), 2),
        "parameter_label": label, "parameter_unit": unit,
        "breakdown_rows": [{"error": name, "where": breakdown_text(breakdown[key], unit, decimals)}
                           for key, name in ERROR_NAMES.items() if key in breakdown],
        "sweep_rows": sweep_rows(sweep, decimals),
        "warnings": [str(w) for w in sweep.get("warnings") or []],
        "solver": quantity_rows(sweep.get("solver") or {}),
    }


def figure_captions(sweep):
    """Captions that say what each sweep figure draws."""
    errors = sweep.get("errors") or {}
    drawn = [name for key, name in (("phase_approximation", "phase-approximation"),
                                    ("aperture_model", "aperture-model"), ("total", "total"))
             if errors.get(key) is not None]
    return {"error_vs_parameter": (f"Magnitude of the {', '.join(drawn)} errors against the swept parameter, "
                                   "with their numerical uncertainty, the tolerance and each breakdown."),
            "directivity_vs_parameter": "The three models against the swept parameter, FDTD with its "
                                        "numerical uncertainty."}


def render_missing_sweep_figure(folder, sweep):
    """Draw ``error_vs_parameter.png`` from sweep.json if it is not there yet."""
    path = folder / "error_vs_parameter"
    if path.with_suffix(".png").exists():
        return
    parameter = sweep.get("parameter", {})
    values = parameter.get("values")
    errors = sweep.get("errors", {}) or {}
    if not values or all(errors.get(k) is None for k in ("phase_approximation", "aperture_model", "total")):
        return
    uncertainties = sweep.get("uncertainties", {}) or {}

    def array(source, key):
        data = source.get(key)
        return None if data is None else floats(data)

    figure = sweep.get("figure", {}) or {}
    plot_error_vs_parameter(
        floats(values), array(errors, "phase_approximation"), array(errors, "aperture_model"), path,
        total_error=array(errors, "total"),
        phase_approximation_uncertainty=array(uncertainties, "phase_approximation") or 0.0,
        aperture_model_uncertainty=array(uncertainties, "aperture_model"),
        total_uncertainty=array(uncertainties, "total"),
        tolerance=sweep.get("tolerance"), breakdown=sweep.get("breakdown"),
        parameter_label=parameter.get("label", parameter.get("name", "parameter")),
        parameter_unit=parameter.get("unit", ""),
        error_label=f"{figure.get('label', 'Figure')} error", error_unit=figure.get("unit", "dB"),
        case_title=sweep.get("title") or sweep.get("case", ""))
