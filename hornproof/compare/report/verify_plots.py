"""The figures of a verify result folder: pattern overlays, directivity over the band, the
convergence ladder and S11 (drawn by :mod:`hornproof.compare.report.plots`)."""

import numpy as np

# hornproof.compare.report.plots imports matplotlib at its top: it is imported by the one caller,
# verify.publish, only when a result folder is written (lazy for speed)
from . import plots
from ..numerics.confidence import confident_uncertainty
from ..numerics.figures import directivity_key
from ..numerics.metrics import band_centre_index, interpolate_cut


def write_pattern_overlays(folder, case, models, sim_results, ladder):
    """pattern_h_plane / pattern_e_plane: both analytic models over the finest FDTD cut at the
    band centre, with the ladder's pointwise spread as a band."""
    unit = "dB" if int(case.fdtd.dims) == 2 else "dBi"
    finest = sim_results[int(np.argmax(ladder))]
    freqs = np.asarray(case.frequencies, dtype=float)
    centre = band_centre_index(freqs)
    for plane, attribute, letter in (("h_plane", "h_plane_dbi", "H"), ("e_plane", "e_plane_dbi", "E")):
        cut = np.asarray(getattr(finest, attribute), dtype=float)
        if np.all(np.isnan(cut[centre])):
            continue
        theta = np.asarray(finest.theta_deg, dtype=float)
        band = None
        if len(sim_results) > 1:
            # pointwise spread of the ladder's cuts: a plain, visible band (documented in the report)
            stack = np.array([interpolate_cut(theta, np.asarray(r.theta_deg), getattr(r, attribute))[centre]
                              for r in sim_results])
            band = np.nanmax(np.abs(stack - cut[centre]), axis=0)
        closed_form, exact_phase = (
            interpolate_cut(theta, models[name].theta_deg, getattr(models[name], attribute))[centre]
            for name in ("closed_form", "exact_phase"))
        plots.plot_pattern_overlay(
            theta, closed_form, exact_phase, cut[centre], folder / f"pattern_{plane}", fdtd_uncertainty_db=band,
            plane=letter, frequency=freqs[centre], case_title=case.title or case.name, unit=unit)


def confident_flags(estimates, nf):
    """[nf] bools: is each frequency's uncertainty confident (``confident_uncertainty``)?"""
    estimates = list(estimates or []) + [None] * nf
    return [confident_uncertainty(estimates[i])[0] is not None for i in range(nf)]


def write_verify_plots(folder, case, summary, models, sim_results, ladder, convergence):
    """Every figure of a verify run into ``folder`` (PNG + SVG each)."""
    uncertainty, estimates, _ = convergence
    write_pattern_overlays(folder, case, models, sim_results, ladder)
    dims = int(case.fdtd.dims)
    unit = "dB" if dims == 2 else "dBi"
    quantity = "2D directivity" if dims == 2 else "Directivity"
    freqs = np.asarray(case.frequencies, dtype=float)
    centre = band_centre_index(freqs)
    key = directivity_key(dims)
    title = case.title or case.name
    fdtd = summary["models"]["fdtd"]
    plots.plot_directivity_vs_frequency(
        freqs, summary["models"]["closed_form"][key], summary["models"]["exact_phase"][key], fdtd[key],
        folder / "directivity_vs_frequency",
        fdtd_uncertainty_db=[np.nan if v is None else v for v in uncertainty.get(key, [None] * len(freqs))],
        fdtd_confident=confident_flags(estimates.get(key), len(freqs)), case_title=title, unit=unit,
        quantity=quantity)
    if len(ladder) > 1 and key in estimates:
        column = [np.nan if row[centre] is None else row[centre]
                  for row in summary["comparison"]["convergence"]["values"]]
        plots.plot_convergence_ladder(ladder, column, folder / "convergence_ladder", estimate=estimates[key][centre],
                                      quantity=quantity, unit=unit, frequency=freqs[centre], case_title=title)
    write_phase_centre_plots(folder, summary, estimates, title)
    if fdtd.get("s11_db") is not None:
        plots.plot_s11(freqs, [np.nan if v is None else v for v in fdtd["s11_db"]], folder / "s11", case_title=title,
                       uncertainty_db=[np.nan if v is None else v
                                       for v in (fdtd.get("uncertainty") or {}).get("s11_db", [None] * len(freqs))])


def write_phase_centre_plots(folder, summary, estimates, title):
    """phase_centre_h / phase_centre_e: each plane's phase centre (mm behind the aperture) over
    the band, both aperture models and FDTD with its ladder uncertainty (3D cases with feed
    figures only)."""
    freqs = np.asarray(summary["frequencies_ghz"], dtype=float) * 1e9
    models = summary["models"]
    uncertainty = models["fdtd"].get("uncertainty") or {}
    for plane, letter in (("h", "H"), ("e", "E")):
        key = f"phase_centre_{plane}_mm"
        if models["fdtd"].get(key) is None:
            continue
        column = lambda values: [np.nan if v is None else v for v in values]  # noqa: E731
        plots.plot_directivity_vs_frequency(
            freqs, column(models["closed_form"][key]), column(models["exact_phase"][key]), column(models["fdtd"][key]),
            folder / f"phase_centre_{plane}", fdtd_uncertainty_db=column(uncertainty.get(key, [None] * len(freqs))),
            fdtd_confident=confident_flags(estimates.get(key), len(freqs)), case_title=title, unit="mm",
            quantity=f"Phase centre behind aperture, {letter}-plane")
