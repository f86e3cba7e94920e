"""The figures of a sweep folder: model error and directivity against the swept parameter
(drawn with :mod:`hornproof.compare.report.plots`)."""

import numpy as np

# hornproof.compare.report.plots imports matplotlib at its top; this module is imported only
# when a sweep folder is written (lazy for speed, see jobs.sweep.write_sweep_folder)
from . import plots
from .figure_style import new_figure


def _float_or_none(values):
    return None if values is None else np.array([np.nan if v is None else v for v in values], dtype=float)


def write_sweep_plots(folder, document):
    """error_vs_parameter and directivity_vs_parameter of a sweep document into ``folder``."""
    p = document["parameter"]
    errors, uncertainties = document["errors"], document["uncertainties"]

    plots.plot_error_vs_parameter(
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
