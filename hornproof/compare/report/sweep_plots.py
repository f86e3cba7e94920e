"""The figures of a sweep: model error and directivity against the swept parameter."""

import numpy as np

# hornproof.compare.report.plots imports matplotlib at its top; this module is imported only
# when a sweep folder is written (lazy for speed, see jobs.sweep.write_sweep_folder)
from . import plots
from .plots import axis_values
from .figure_style import (MODEL_COLOURS, TOLERANCE_COLOUR, TOTAL_ERROR_COLOUR, float_array, legend_below,
                           lower_first, new_figure, save_figure, set_title)


def _float_or_none(values):
    return None if values is None else np.array([np.nan if v is None else v for v in values], dtype=float)


def write_sweep_plots(folder, document):
    """error_vs_parameter and directivity_vs_parameter of a sweep document into ``folder``."""
    p = document["parameter"]
    errors, uncertainties = document["errors"], document["uncertainties"]

    plot_error_vs_parameter(
        _float_or_none(p["values"]), _float_or_none(errors["phase_approximation"]), _float_or_none(errors["aperture_model"]),
        folder / "error_vs_parameter", total_error=_float_or_none(errors.get("total")),
        phase_approximation_uncertainty=0.0,
        aperture_model_uncertainty=_float_or_none(uncertainties["aperture_model"]),
        total_uncertainty=_float_or_none(uncertainties.get("total")), tolerance=document["tolerance"],
        breakdown=document["breakdown"], parameter_label=p["label"], parameter_unit=p["unit"],
        error_label=f"{document['figure']['label']} error", error_unit="dB",
        case_title=f"{document['title']} — at {document['frequency_ghz']:.3g} GHz")
    plot_directivity_vs_parameter(folder / "directivity_vs_parameter", document)


def plot_directivity_vs_parameter(path_stem, document):
    """Each model's directivity against the swept parameter, FDTD with its uncertainty, and
    each model's peak."""
    p = document["parameter"]
    x = np.asarray(p["values"], dtype=float)
    fig, ax = new_figure()
    for name in ("closed_form", "exact_phase", "fdtd"):
        y = document["models"].get(name)
        if y is None:
            continue
        y = np.array([np.nan if v is None else v for v in y], dtype=float)
        ax.plot(x, y, "-o", markersize=4, color=plots.MODEL_COLOURS[name], label=plots.MODEL_LABELS[name])
        if name == "fdtd" and document.get("fdtd_uncertainty") is not None:
            u = np.array([np.nan if v is None else v for v in document["fdtd_uncertainty"]], dtype=float)
            if np.any(np.isfinite(u)):
                ax.errorbar(x, y, yerr=np.where(np.isfinite(u), u, 0), fmt="none",
                            ecolor=plots.MODEL_COLOURS[name], capsize=3, linewidth=1)
    for name, best in (document.get("optimum") or {}).items():
        if best and best.get("interior") and name in plots.MODEL_COLOURS:
            ax.axvline(best["value"], color=plots.MODEL_COLOURS[name], linestyle=":", linewidth=1.2,
                       label=f"{plots.MODEL_LABELS[name].split(' (')[0]} peak: {best['value']:.3g} {p['unit']}, "
                             f"S = {best['phase_error_h_wl']:.2f}, T = {best['phase_error_e_wl']:.2f} wl")
    ax.set_xlabel(f"{p['label']} ({p['unit']})")
    ax.set_ylabel(f"{document['figure']['label']} ({document['figure']['unit']})")
    ax.set_title(f"{document['title']}\n{document['figure']['label']} at {document['frequency_ghz']:.3g} GHz "
                 f"vs {p['label'].lower()} ({p['held_fixed']} fixed)", loc="left", fontsize=10)
    ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.16), ncol=1, fontsize=8, frameon=False)
    fig.subplots_adjust(bottom=0.38)
    plots.save_figure(fig, path_stem)


def plot_error_vs_parameter(parameter_values, phase_approximation_error, aperture_model_error,
                            path_stem, *, total_error=None, phase_approximation_uncertainty=0.0,
                            aperture_model_uncertainty=None, total_uncertainty=None, tolerance=None,
                            breakdown=None, parameter_label="Flare half-angle", parameter_unit="deg",
                            error_label="Directivity error", error_unit="dB", case_title=""):
    """Magnitude of the model errors over a sweep, with bands, tolerance and breakdown.

    Parameters
    ----------
    parameter_values : array_like [n]
        Swept parameter, in ``parameter_unit`` (default: flare half-angle in degrees).
    phase_approximation_error, aperture_model_error, total_error : array_like [n] or None
        Closed form − exact phase, exact phase − FDTD and closed form − FDTD, figure units;
        |error| is drawn. None omits a curve.
    path_stem : str
    phase_approximation_uncertainty, aperture_model_uncertainty, total_uncertainty : float or array_like [n]
        Numerical uncertainty of each error (band ±, clipped at 0).
    tolerance : float, optional
        Accepted |error|, drawn as a horizontal line.
    breakdown : dict, optional
        ``{"phase_approximation": value, "aperture_model": value, "total": value}`` from
        :func:`hornproof.compare.numerics.verdict.breakdown_threshold`; a number draws a vertical
        line (its value in the legend, one decimal), ``None`` / ``"below range"`` are written in
        the legend.
    parameter_label, parameter_unit, error_label, error_unit, case_title : str

    Returns
    -------
    tuple of str
    """
    x = axis_values(parameter_values, "parameter_values")
    order = np.argsort(x)
    x = x[order]
    fig, ax = new_figure(height=4.8)
    series = (
        ("phase_approximation", phase_approximation_error, phase_approximation_uncertainty, "closed_form",
         "Phase-approximation error |closed form − exact phase|", "phase approximation"),
        ("aperture_model", aperture_model_error, aperture_model_uncertainty, "fdtd",
         "Aperture-model error |exact phase − FDTD|", "aperture model"),
        ("total", total_error, total_uncertainty, "total",
         "Total error |closed form − FDTD|", "total"),
    )
    breakdown = breakdown or {}
    for key, err, unc, colour_key, label, name in series:
        if err is None:
            continue
        e = np.abs(float_array(err, key + "_error", order.shape))[order]
        colour = TOTAL_ERROR_COLOUR if colour_key == "total" else MODEL_COLOURS[colour_key]
        style = ":" if key == "total" else "-"
        ax.plot(x, e, style, marker="o", color=colour, markersize=4, linewidth=1.5, label=label)
        if unc is not None:
            u = np.broadcast_to(np.asarray(unc, dtype=float), order.shape)[order]
            if np.any(u > 0):
                ax.fill_between(x, np.clip(e - u, 0, None), e + u, color=colour, alpha=0.12,
                                linewidth=0, label=label.split(" |")[0] + ": numerical uncertainty (±)")
        where = breakdown.get(key)
        if isinstance(where, (int, float)) and np.isfinite(where):
            ax.axvline(where, color=colour, linestyle=(0, (1, 2)), linewidth=1.6,
                       label=f"Breakdown of the {name}: {where:.1f} {parameter_unit}")
        elif key in breakdown:
            text = "beyond tolerance from the first value" if where == "below range" else "none in range"
            ax.plot([], [], " ", label=f"Breakdown of the {name}: {text}")
    if tolerance is not None:
        ax.axhline(float(tolerance), color=TOLERANCE_COLOUR, linestyle="-.", linewidth=1.2,
                   label=f"Tolerance {float(tolerance):g} {error_unit}")
    ax.set_ylim(bottom=0.0)
    ax.set_xlabel(f"{parameter_label} ({parameter_unit})")
    ax.set_ylabel(f"|{error_label}| ({error_unit})")
    set_title(ax, case_title, f"Model error against {lower_first(parameter_label)}")
    legend_below(ax, ncol=1)
    return save_figure(fig, path_stem)
