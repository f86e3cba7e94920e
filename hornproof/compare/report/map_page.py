"""The page of a two-parameter map: plain data for ``templates/map.html.j2`` from map.json,
and the page itself (``report.html`` beside ``map.json``; keys in
:mod:`hornproof.compare.output.map_json`)."""

from pathlib import Path

from ..output.map_json import MAP_SCHEMA, read_map_json
from .format import MISSING_VALUE, breakdown_words, crossing_text, number, quantity_rows
from .html import write_report

#: the three model errors, as the breakdown table names them
ERROR_NAMES = {"phase_approximation": "Phase approximation (closed form vs exact phase)",
               "aperture_model": "Aperture model (exact phase vs FDTD)",
               "total": "Closed form vs FDTD (total)"}


def breakdown_rows(document):
    """One row per error kind and y value: where along x it breaks down (an interval)."""
    x_unit, y = document["x"]["unit"], document["y"]
    rows = []
    breakdown = document.get("breakdown") or {}
    for kind in ("aperture_model", "total"):
        for row in breakdown.get(kind) or []:
            rows.append({"error": ERROR_NAMES[kind], "y": f"{number(row['y'], 1)} {y['unit']}",
                         "where": breakdown_words(row, x_unit)})
    analytic = breakdown.get("phase_approximation") or []
    mapped = [float(v) for v in (y.get("values") or [])]
    # the rows at the mapped values of the second parameter (the ones the terminal and the FDTD
    # points use), else every sixth row of the dense analytic grid
    chosen = [min(analytic, key=lambda row: abs(row["y"] - v)) for v in mapped] if analytic and mapped \
        else analytic[::max(1, len(analytic) // 6)]
    for row in chosen:
        rows.append({"error": ERROR_NAMES["phase_approximation"], "y": f"{number(row['y'], 1)} {y['unit']}",
                     "where": crossing_text(row["at"], x_unit) + " (analytic: no numerical uncertainty)"})
    return rows


def point_rows(document):
    """One row per FDTD point."""
    def value(v):
        return MISSING_VALUE if v is None else number(v, 2)

    rows = []
    for p in document["points"]:
        fdtd = value(p.get("fdtd")) + ("" if p.get("uncertainty") is None else f" ± {number(p['uncertainty'], 2)}")
        rows.append({"x": number(p["x"], 1), "y": number(p["y"], 1), "closed_form": value(p["closed_form"]),
                     "exact_phase": value(p["exact_phase"]), "fdtd": fdtd,
                     "phase": value(p["phase_approximation_error"]), "aperture": value(p.get("aperture_model_error")),
                     "total": value(p.get("total_error")), "ladder": p.get("convergence_status") or MISSING_VALUE,
                     "status": p["status"] + (f": {p['reason']}" if p.get("reason") else "")})
    return rows


def map_context(document):
    """Everything ``map.html.j2`` shows (figures and footer added by :func:`build_map_report`)."""
    x, y = document["x"], document["y"]
    estimate = document.get("estimate") or {}
    return {
        "title": document.get("title") or document.get("case") or "hornproof map",
        "subtitle": f"Map of {x['label']} × {y['label']} · {document['model']} · case {document['case']}",
        "frequency": number(document["frequency_ghz"]), "tolerance": number(document["tolerance"], 2),
        "x_label": f"{x['label']} ({x['unit']})", "y_label": f"{y['label']} ({y['unit']})",
        "breakdown_rows": breakdown_rows(document), "point_rows": point_rows(document),
        "failed": [f"{x['label']} = {number(p['x'], 1)}, {y['label']} = {number(p['y'], 1)}: {p['reason']}"
                   for p in document.get("failed_points") or []],
        "estimate": (f"estimated before running: about {estimate['seconds_total'] / 60:.1f} min of one process "
                     f"(±30 %)" if estimate else "no FDTD (analytic only)"),
        "warnings": [str(w) for w in document.get("warnings") or []],
        "solver": quantity_rows(document.get("solver") or {}),
    }


def figure_captions(document):
    tolerance = number(document["tolerance"], 2)
    underlay = "The analytic phase-approximation error is drawn underneath (lighter, dotted contour)."
    return {
        "map_phase_approximation_error": f"Closed form − exact phase over both parameters at full resolution; the "
                                         f"solid line is |error| = {tolerance} dB.",
        "map_aperture_model_error": "Exact phase − FDTD at the FDTD points (labels: error ± numerical uncertainty), "
                                    f"the breakdown contour |error| = {tolerance} dB (solid) and its uncertainty "
                                    "band (dashed), interpolated linearly between points. " + underlay,
        "map_total_error": "Closed form − FDTD at the FDTD points, contours as above. " + underlay,
    }


def build_map_report(map_dir):
    """Write ``report.html`` for a map folder; returns its path. ``InputError`` when map.json
    is missing, not JSON or of another schema."""
    folder = Path(map_dir)
    document = read_map_json(folder / "map.json")
    footer = f"schema {MAP_SCHEMA} · case hash {document.get('case_sha256', MISSING_VALUE)}"
    return write_report(folder, "map.html.j2", map_context(document), figure_captions(document), footer)
