"""The figures of a sweep: signed model errors with their breakdown intervals, the models'
directivity with each optimum, and (when the sweep ran both) the 3D against the 2D
aperture-model error."""

import numpy as np

# hornproof.compare.report.plots imports matplotlib at its top; this module is imported only
# when a sweep folder is written (lazy for speed, see jobs.sweep.write_sweep_folder)
from . import plots
from .figure_style import (MODEL_COLOURS, TOLERANCE_COLOUR, TOTAL_ERROR_COLOUR, legend_below, lower_first,
                           new_figure, save_figure, set_title)
from .format import breakdown_words

#: the errors of a sweep: (key, colour key, label, line style)
ERROR_SERIES = (
    ("phase_approximation", "closed_form", "Phase-approximation error (closed form − exact phase)", "-"),
    ("aperture_model", "fdtd", "Aperture-model error (exact phase − FDTD)", "-"),
    ("total", "total", "Total error (closed form − FDTD)", ":"),
)


def floats(values):
    """A float array from a JSON list (null -> NaN), or None."""
    return None if values is None else np.array([np.nan if v is None else v for v in values], dtype=float)


def _colour(key):
    return TOTAL_ERROR_COLOUR if key == "total" else MODEL_COLOURS[key]


def write_sweep_plots(folder, document):
    """error_vs_parameter, directivity_vs_parameter and (3D beside 2D) aperture_error_3d_vs_2d."""
    plot_error_vs_parameter(folder / "error_vs_parameter", document)
    plot_directivity_vs_parameter(folder / "directivity_vs_parameter", document)
    if document.get("principal_plane") and document["principal_plane"].get("models", {}).get("fdtd") is not None:
        plot_principal_plane_parting(folder / "aperture_error_3d_vs_2d", document)


def _draw_tolerance(ax, tolerance):
    """The ± tolerance as two horizontal lines (one legend entry)."""
    if tolerance is None:
        return
    for sign in (1, -1):
        ax.axhline(sign * float(tolerance), color=TOLERANCE_COLOUR, linestyle="-.", linewidth=1.1,
                   label=f"Tolerance ± {float(tolerance):g} dB" if sign > 0 else None)


def _draw_points(ax, x, y, u, confident, colour, *, markersize, dash_unconfident=False):
    """FDTD points with their uncertainty bars: filled where the uncertainty is confident, hollow
    where it is not (and, with ``dash_unconfident``, its bar dashed). Returns the confident mask."""
    sure = np.isfinite(confident) if confident is not None else np.zeros(x.shape, bool)
    if u is not None and np.any(np.isfinite(u)):
        for mask, style in ((sure, "-"), (~sure, "--" if dash_unconfident else "-")):
            bars = ax.errorbar(x[mask], y[mask], yerr=np.where(np.isfinite(u), u, 0.0)[mask], fmt="none",
                               ecolor=colour, capsize=3, linewidth=1)
            for line in bars[2]:
                line.set_linestyle(style)
    ax.plot(x[sure], y[sure], "o", color=colour, markersize=markersize)
    ax.plot(x[~sure], y[~sure], "o", markerfacecolor="white", markeredgecolor=colour, markersize=markersize)
    return sure


def _draw_interval(ax, interval, colour, label, x_range):
    """Shade a breakdown interval: solid from its earliest to its latest edge; hatched from the
    earliest edge to the end of the sweep when unresolved ("below range" = the first value)."""
    if not isinstance(interval, dict):
        return
    x_min, x_max = x_range
    earliest, latest = (x_min if edge == "below range" else edge
                        for edge in (interval.get("earliest"), interval.get("latest")))
    if interval.get("status") == "breaks" and isinstance(earliest, (int, float)) and isinstance(latest, (int, float)):
        if latest - earliest > 0:
            ax.axvspan(earliest, latest, color=colour, alpha=0.16, linewidth=0, label=label)
        else:
            ax.axvline(latest, color=colour, linestyle=(0, (1, 2)), linewidth=1.6, label=label)
    elif interval.get("status") == "unresolved" and isinstance(earliest, (int, float)):
        ax.axvspan(earliest, x_max, facecolor="none", edgecolor=colour, hatch="///", alpha=0.5, linewidth=0,
                   label=label)
    else:
        ax.plot([], [], " ", label=label)


def plot_error_vs_parameter(path_stem, document):
    """The signed model errors against the swept parameter, each FDTD point with its uncertainty
    (hollow where it is not confident), the ± tolerance, and each error's breakdown interval.

    The phase-approximation error is drawn from the dense analytic evaluation (no numerical
    uncertainty); a sign change stays visible (errors are signed, the tolerance band is ±)."""
    p = document["parameter"]
    unit = p["unit"]
    x = floats(p["values"])
    fig, ax = new_figure(height=5.0)
    errors, uncertainties = document.get("errors") or {}, document.get("uncertainties") or {}
    confident = floats(document.get("fdtd_confident_uncertainty"))
    dense = document.get("dense") or {}
    for key, colour_key, label, style in ERROR_SERIES:
        e = floats(errors.get(key))
        if e is None:
            continue
        colour = _colour(colour_key)
        if key == "phase_approximation" and dense.get("values"):
            ax.plot(floats(dense["values"]), floats(dense["closed_form"]) - floats(dense["exact_phase"]),
                    style, color=colour, linewidth=1.5, label=label)
            ax.plot(x, e, "o", color=colour, markersize=3.5)
        else:
            ax.plot(x, e, style, color=colour, linewidth=1.4, label=label)
            _draw_points(ax, x, e, floats(uncertainties.get(key)), confident, colour, markersize=5)
        interval = (document.get("breakdown") or {}).get(key)
        words = breakdown_words(interval, unit)
        _draw_interval(ax, interval, colour, f"Breakdown, {label.split(' (')[0].lower()}: {words}",
                       (np.nanmin(x), np.nanmax(x)))
    _draw_tolerance(ax, document.get("tolerance"))
    ax.axhline(0.0, color="#bdbdbd", linewidth=0.8)
    if confident is not None and np.any(~np.isfinite(confident)):
        ax.plot([], [], "o", markerfacecolor="white", markeredgecolor="#555555",
                label="Hollow: no confident uncertainty (bar = the ladder's bound or spread)")
    ax.set_xlabel(f"{p['label']} ({unit})")
    ax.set_ylabel(f"{document['figure']['label']} error (dB)")
    set_title(ax, document.get("title", ""), f"Model errors against {lower_first(p['label'])} at "
                                             f"{document['frequency_ghz']:.3g} GHz — {document.get('label', '')}")
    legend_below(ax, ncol=1)
    return save_figure(fig, path_stem)


def plot_directivity_vs_parameter(path_stem, document):
    """Each model's directivity against the swept parameter (the analytic ones dense), FDTD with
    its uncertainty, and each model's peak (FDTD: the range that could hold it)."""
    p = document["parameter"]
    x = floats(p["values"])
    fig, ax = new_figure()
    dense = document.get("dense") or {}
    for name in ("closed_form", "exact_phase", "fdtd"):
        y = floats(document["models"].get(name))
        if y is None:
            continue
        if name != "fdtd" and dense.get("values"):
            ax.plot(floats(dense["values"]), floats(dense[name]), plots.MODEL_LINESTYLES[name],
                    color=plots.MODEL_COLOURS[name], label=plots.MODEL_LABELS[name])
            ax.plot(x, y, "o", markersize=3.5, color=plots.MODEL_COLOURS[name])
            continue
        colour = plots.MODEL_COLOURS[name]
        ax.plot(x, y, "-", color=colour, label=plots.MODEL_LABELS[name])
        confident = floats(document.get("fdtd_confident_uncertainty"))
        sure = _draw_points(ax, x, y, floats(document.get("fdtd_uncertainty")), confident, colour, markersize=4.5,
                            dash_unconfident=True)
        if np.any(~sure):
            ax.plot([], [], "o", markerfacecolor="white", markeredgecolor=colour,
                    label="Hollow, dashed bar: no confident uncertainty (the ladder's bound or spread)")
    for name, best in (document.get("optimum") or {}).items():
        if not best or name not in plots.MODEL_COLOURS:
            continue
        colour = plots.MODEL_COLOURS[name]
        short = plots.MODEL_LABELS[name].split(" (")[0]
        text = (f"{short} peak: {best['value']:.3g} {p['unit']}, S = {best['phase_error_h_wl']:.2f}, "
                f"T = {best['phase_error_e_wl']:.2f} wl" + ("" if best.get("interior") else " (sweep edge)"))
        if name == "fdtd" and best.get("range") and best["range"][1] > best["range"][0]:
            ax.axvspan(*best["range"], color=colour, alpha=0.08, linewidth=0,
                       label=f"FDTD peak could be anywhere in {best['range'][0]:.3g}–{best['range'][1]:.3g} {p['unit']}")
        ax.axvline(best["value"], color=colour, linestyle=":", linewidth=1.2, label=text)
    ax.set_xlabel(f"{p['label']} ({p['unit']})")
    ax.set_ylabel(f"{document['figure']['label']} ({document['figure']['unit']})")
    set_title(ax, document.get("title", ""), f"{document['figure']['label']} at {document['frequency_ghz']:.3g} GHz "
                                             f"vs {lower_first(p['label'])} ({p['held_fixed']} fixed)")
    legend_below(ax, ncol=1)
    return save_figure(fig, path_stem)


def plot_principal_plane_parting(path_stem, document):
    """The aperture-model error of the 3D model of the real horn beside the 2D principal-plane
    model's, each with its uncertainty, and where the two part."""
    p = document["parameter"]
    x = floats(p["values"])
    fig, ax = new_figure()
    for block, colour, label in ((document, MODEL_COLOURS["fdtd"], "3D model of the real horn"),
                                 (document["principal_plane"], "#8a5a9e", "2D principal-plane model")):
        e = floats(block["errors"]["aperture_model"])
        u = floats(block["uncertainties"]["aperture_model"])
        ax.errorbar(x, e, yerr=np.where(np.isfinite(u), u, 0.0), fmt="-o", color=colour, capsize=3,
                    markersize=4, linewidth=1.3, label=f"Aperture-model error, {label}")
    _draw_tolerance(ax, document.get("tolerance"))
    parted = document.get("parting") or {}
    _draw_interval(ax, parted.get("interval"), "#8a5a9e",
                   "Where 3D and 2D part: " + breakdown_words(parted.get("interval"), p["unit"]).replace(
                       "breaks", "differ beyond the tolerance"), (np.nanmin(x), np.nanmax(x)))
    ax.set_xlabel(f"{p['label']} ({p['unit']})")
    ax.set_ylabel("Aperture-model error (dB)")
    set_title(ax, document.get("title", ""), "What the 2D first look says of the aperture model, and the 3D truth")
    legend_below(ax, ncol=1)
    return save_figure(fig, path_stem)
