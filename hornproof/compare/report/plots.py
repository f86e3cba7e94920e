"""Figures for the comparison: pattern overlays, band plots, convergence ladders, sweeps, S11.

Every function takes plain arrays, draws one figure with matplotlib's object API (no pyplot, no
global state; the Agg renderer), and writes it twice, as ``<path_stem>.png`` and
``<path_stem>.svg``, each through :func:`hornproof.atomic.atomic_path` (temporary name in the
same directory, then renamed), so a crash never leaves a half-written image. Each returns the two paths.

Inputs are SI except where the trade's convention is stored already in edge units: frequencies
in Hz (shown in GHz), pattern angles and flare angles in degrees (as ``ModelResult`` stores
cut angles), levels in dB/dBi.

The look (one colour per model, grid, legend, atomic saving) is in :mod:`.figure_style`;
numerical uncertainty is always a translucent band (or error bar) in the colour of the model
it belongs to.

The standard file stems that :mod:`hornproof.compare.report.html` looks for are listed in
:data:`STANDARD_STEMS`.
"""

import numpy as np

from ...units import GHZ
from .figure_style import (MODEL_COLOURS, MODEL_LABELS, MODEL_LINESTYLES, TOLERANCE_COLOUR,
                           float_array, legend_below, lower_first, minus_sign, new_figure, save_figure,
                           set_title)

#: File stems (without extension) in the order the HTML report shows them.
STANDARD_STEMS = (
    "pattern_h_plane",
    "pattern_e_plane",
    "directivity_vs_frequency",
    "convergence_ladder",
    "error_vs_parameter",
    "s11",
)


def plot_pattern_overlay(theta_deg, closed_form_dbi, exact_phase_dbi, fdtd_dbi, path_stem, *,
                         fdtd_uncertainty_db=None, plane="H", frequency=None, case_title="",
                         dynamic_range_db=40.0, unit="dBi"):
    """Principal-plane pattern of the three models, FDTD with its uncertainty band.

    Parameters
    ----------
    theta_deg : array_like [ntheta]
        Cut angle from boresight, degrees.
    closed_form_dbi, exact_phase_dbi, fdtd_dbi : array_like [ntheta] or None
        Directivity cuts, dBi (2D models: dB, and pass ``unit="dB"``). None omits a model.
    path_stem : str
        Output path without extension.
    fdtd_uncertainty_db : float or array_like [ntheta], optional
        Numerical uncertainty of the FDTD cut, dB; drawn as a band ± this.
    plane : {"H", "E"}
        Principal plane, for the title.
    frequency : float, optional
        Frequency of the cut, Hz (shown in GHz).
    case_title : str
        Case title, shown on the plot.
    dynamic_range_db : float
        Levels below (peak − this) are cut off the axis (default 40 dB).
    unit : str
        Unit of the directivity axis (default "dBi").

    Returns
    -------
    tuple of str
        (png_path, svg_path).
    """
    if plane not in ("H", "E"):
        raise ValueError(f"plane: must be 'H' or 'E', got {plane!r}")
    theta = float_array(theta_deg, "theta_deg")
    curves = {"closed_form": closed_form_dbi, "exact_phase": exact_phase_dbi, "fdtd": fdtd_dbi}
    curves = {k: float_array(v, k, theta.shape) for k, v in curves.items() if v is not None}
    if not curves:
        raise ValueError("closed_form_dbi, exact_phase_dbi, fdtd_dbi: give at least one cut")
    fig, ax = new_figure()
    peak = max(np.nanmax(v) for v in curves.values() if np.any(np.isfinite(v)))
    for key in ("closed_form", "exact_phase", "fdtd"):
        if key not in curves:
            continue
        ax.plot(theta, curves[key], MODEL_LINESTYLES[key], color=MODEL_COLOURS[key],
                linewidth=1.6 if key == "fdtd" else 1.4, label=MODEL_LABELS[key])
    if "fdtd" in curves and fdtd_uncertainty_db is not None:
        u = np.broadcast_to(np.asarray(fdtd_uncertainty_db, dtype=float), theta.shape)
        ax.fill_between(theta, curves["fdtd"] - u, curves["fdtd"] + u, color=MODEL_COLOURS["fdtd"],
                        alpha=0.18, linewidth=0, label="FDTD numerical uncertainty (±)")
    ax.set_ylim(peak - dynamic_range_db, peak + 3.0)
    ax.set_xlim(theta.min(), theta.max())
    ax.set_xlabel("Angle from boresight θ (deg)")
    ax.set_ylabel(f"Directivity ({unit})")
    plane_name = "H-plane (xz)" if plane == "H" else "E-plane (yz)"
    at = f" at {frequency / GHZ:.3f} GHz" if frequency is not None else ""
    set_title(ax, case_title, f"{plane_name} pattern{at}")
    legend_below(ax)
    return save_figure(fig, path_stem)


def axis_values(values, name, unit_text=""):
    """A plot's x values as a float array; ``ValueError`` naming ``name`` unless non-empty 1-D."""
    array = float_array(values, name)
    if array.ndim != 1 or array.size == 0:
        raise ValueError(f"{name}: must be a non-empty 1-D array{unit_text}")
    return array


def _clip_to_values(ax, series, shape, margin_db=3.0):
    """Keep the values readable when an error bar is huge: the vertical axis spans the plotted
    values ± ``margin_db``; bars that run past it are marked with a note."""
    values = [np.asarray(v, dtype=float).reshape(shape) for v in series if v is not None]
    if not values:
        return
    stack = np.concatenate(values)
    stack = stack[np.isfinite(stack)]
    if stack.size == 0:
        return
    low, high = float(stack.min()) - margin_db, float(stack.max()) + margin_db
    current_low, current_high = ax.get_ylim()
    if current_low < low or current_high > high:
        ax.set_ylim(max(current_low, low), min(current_high, high))
        ax.annotate("error bars cut at the axis limits", xy=(0.99, 0.02), xycoords="axes fraction",
                    ha="right", va="bottom", fontsize=8, color="#555555")


def plot_directivity_vs_frequency(frequencies, closed_form_dbi, exact_phase_dbi, fdtd_dbi,
                                  path_stem, *, fdtd_uncertainty_db=None, fdtd_confident=None, case_title="",
                                  unit="dBi", quantity="Directivity"):
    """Directivity of the three models over the band, FDTD with error bars.

    Parameters
    ----------
    frequencies : array_like [nf]
        Band frequencies, Hz (shown in GHz).
    closed_form_dbi, exact_phase_dbi, fdtd_dbi : array_like [nf] or None
        Directivity, dBi. None omits a model.
    path_stem : str
        Output path without extension.
    fdtd_uncertainty_db : array_like [nf], optional
        FDTD numerical uncertainty, dB (error bars ±); NaN draws no bar.
    fdtd_confident : array_like of bool [nf], optional
        Whether each uncertainty is confident
        (:func:`hornproof.compare.numerics.confidence.confident_uncertainty`); the others are
        drawn as hollow markers with dashed bars and their own legend entry. Default: all
        confident.
    case_title : str
    unit, quantity : str
        Axis unit and name (e.g. "dB" and "2D directivity" for dims = 2).

    Returns
    -------
    tuple of str
    """
    f = axis_values(frequencies, "frequencies", " (Hz)")
    f_ghz = f / GHZ
    fig, ax = new_figure()
    markers = {"closed_form": "s", "exact_phase": "D", "fdtd": "o"}
    for key, values in (("closed_form", closed_form_dbi), ("exact_phase", exact_phase_dbi)):
        if values is None:
            continue
        ax.plot(f_ghz, float_array(values, key, f.shape), MODEL_LINESTYLES[key], marker=markers[key],
                markersize=4.5, color=MODEL_COLOURS[key], linewidth=1.4, label=MODEL_LABELS[key])
    if fdtd_dbi is not None:
        y = float_array(fdtd_dbi, "fdtd_dbi", f.shape)
        _fdtd_with_bars(ax, f_ghz, y, fdtd_uncertainty_db, fdtd_confident)
    _clip_to_values(ax, [closed_form_dbi, exact_phase_dbi, fdtd_dbi], f.shape)
    if f.size == 1:
        ax.set_xlim(f_ghz[0] - 0.5, f_ghz[0] + 0.5)
    ax.set_xlabel("Frequency (GHz)")
    ax.set_ylabel(f"{quantity} ({unit})")
    set_title(ax, case_title, f"{quantity} over the band")
    legend_below(ax)
    return save_figure(fig, path_stem)


def _fdtd_with_bars(ax, f_ghz, y, uncertainty, confident):
    """The FDTD curve; error bars solid where the uncertainty is confident, dashed with hollow
    markers where it is not (so a bar never looks more trustworthy than it is)."""
    colour = MODEL_COLOURS["fdtd"]
    if uncertainty is None:
        ax.plot(f_ghz, y, "-", marker="o", markersize=5, color=colour, linewidth=1.6, label=MODEL_LABELS["fdtd"])
        return
    err = np.nan_to_num(float_array(uncertainty, "fdtd_uncertainty_db", y.shape), nan=0.0)
    sure = np.ones(y.shape, dtype=bool) if confident is None else np.asarray(confident, dtype=bool).reshape(y.shape)
    ax.plot(f_ghz, y, "-", color=colour, linewidth=1.6)
    if np.any(sure):
        ax.errorbar(f_ghz[sure], y[sure], yerr=err[sure], fmt="o", markersize=5, color=colour, ecolor=colour,
                    elinewidth=1.2, capsize=4, linestyle="none",
                    label=MODEL_LABELS["fdtd"] + " ± confident numerical uncertainty")
    if np.any(~sure):
        bars = ax.errorbar(f_ghz[~sure], y[~sure], yerr=err[~sure], fmt="o", markersize=6, color=colour,
                           markerfacecolor="white", ecolor=colour, elinewidth=1.2, capsize=4, linestyle="none",
                           label=MODEL_LABELS["fdtd"] + ": uncertainty not confident (see the ladder column)")
        for line in bars[2]:
            line.set_linestyle("--")


def _estimate_field(estimate, name):
    if estimate is None:
        return float("nan")
    value = estimate.get(name) if isinstance(estimate, dict) else getattr(estimate, name)
    return float("nan") if value is None else float(value)


def ladder_draws_extrapolation(estimate):
    """True when :func:`plot_convergence_ladder` draws the Richardson-extrapolated value for
    ``estimate`` (a finite value from a ladder that is neither oscillatory nor divergent)."""
    if estimate is None:
        return False
    status = estimate.get("status") if isinstance(estimate, dict) else estimate.status
    return bool(np.isfinite(_estimate_field(estimate, "extrapolated_value"))
                and status not in ("oscillatory", "divergent"))


def plot_convergence_ladder(cells_per_wavelength, values, path_stem, *, estimate=None,
                            quantity="Directivity", unit="dBi", frequency=None, case_title=""):
    """A convergence ladder against cell size, with the extrapolated value and GCI band.

    The horizontal axis is the cell size in wavelengths, h/λ = 1/(cells per wavelength), so
    the continuum limit is at 0 (where the Richardson-extrapolated value is drawn); each point
    is labelled with its cells per wavelength.

    Parameters
    ----------
    cells_per_wavelength : array_like [ngrid]
        The ladder, cells per wavelength.
    values : array_like [ngrid]
        The figure on each grid, figure units.
    path_stem : str
    estimate : ConvergenceEstimate or dict, optional
        From :mod:`hornproof.compare.numerics.convergence` (or its ``to_dict()``): status, fine value,
        extrapolated value, uncertainty and flags are drawn and written on the plot.
    quantity, unit : str
        Name and unit of the figure.
    frequency : float, optional
        Hz (shown in GHz).
    case_title : str

    Returns
    -------
    tuple of str
    """
    cpw = float_array(cells_per_wavelength, "cells_per_wavelength")
    phi = float_array(values, "values", cpw.shape)
    if cpw.ndim != 1 or cpw.size == 0 or np.any(cpw <= 0):
        raise ValueError("cells_per_wavelength: must be a non-empty 1-D array of positive numbers")
    order = np.argsort(-cpw)
    cpw, phi = cpw[order], phi[order]
    h = 1.0 / cpw
    fig, ax = new_figure()
    colour = MODEL_COLOURS["fdtd"]
    ax.plot(h, phi, "-o", color=colour, markersize=6, linewidth=1.4, label="FDTD on each grid")
    status = "no estimate"
    status_line = "Ladder: no estimate given"
    if estimate is not None:
        status = estimate.get("status") if isinstance(estimate, dict) else estimate.status
        flags = estimate.get("flags", []) if isinstance(estimate, dict) else estimate.flags
        fine = _estimate_field(estimate, "fine_value")
        ext = _estimate_field(estimate, "extrapolated_value")
        u = _estimate_field(estimate, "uncertainty")
        kind = estimate.get("uncertainty_kind") if isinstance(estimate, dict) else estimate.uncertainty_kind
        p = _estimate_field(estimate, "observed_order")
        used = _estimate_field(estimate, "order_used")
        fs = _estimate_field(estimate, "safety_factor")
        if np.isfinite(u) and np.isfinite(fine):
            band_label = ("GCI band on the finest grid (±)" if kind == "gci"
                          else "Bound from the ladder spread (±), not an error estimate")
            ax.fill_between([0.0, h[0]], [fine - u] * 2, [fine + u] * 2, color=colour, alpha=0.16,
                            linewidth=0, label=band_label)
        if ladder_draws_extrapolation(estimate):
            ax.plot([0.0, h[0]], [ext, phi[0]], ":", color=MODEL_COLOURS["exact_phase"], linewidth=1.2)
            ax.plot([0.0], [ext], marker="*", markersize=12, color=MODEL_COLOURS["exact_phase"],
                    linestyle="none",
                    label="Richardson-extrapolated value (h → 0"
                          + (f", order {used:g})" if np.isfinite(used) else ")"))
        first = f"Ladder: {status}"
        if np.isfinite(p):
            first += f" · observed order p = {p:.2f}"
        if np.isfinite(used) and not (np.isfinite(p) and abs(used - p) < 1e-12):
            first += f" · order used {used:g}"
        shown = [flag for flag in flags if flag != "spread-bound"]  # said in the second line
        if shown:
            first += " (" + ", ".join(shown) + ")"
        second = ""
        if np.isfinite(u):
            second = f"ladder part of the uncertainty ± {u:.3g} {unit}"
            second += f", safety factor {fs:g}" if kind == "gci" and np.isfinite(fs) else " (spread bound)"
        status_line = first + ("\n" + second if second else "")
    ax.set_xlim(0.0, h.max() * 1.12)
    ax.set_xlabel("Cell size h/λ (= 1 / cells per wavelength)")
    ax.set_ylabel(f"{quantity} ({unit})")
    for hi, yi, ci in zip(h, phi, cpw):
        ax.annotate(f"{ci:g} cells/λ", xy=(hi, yi), xytext=(0, 8), textcoords="offset points",
                    ha="center", fontsize=8, color=colour)
    at = f" at {frequency / GHZ:.3f} GHz" if frequency is not None else ""
    set_title(ax, case_title, f"Grid convergence of {lower_first(quantity)}{at}\n{status_line}")
    legend_below(ax)
    return save_figure(fig, path_stem)


def plot_s11(frequencies, s11_db, path_stem, *, case_title="", guide_level_db=-10.0, uncertainty_db=None):
    """Reflection coefficient magnitude |S11| (dB) over the band, FDTD.

    Parameters
    ----------
    frequencies : array_like [nf]
        Hz (shown in GHz).
    s11_db : array_like [nf]
        20 log10 |S11|, dB.
    path_stem : str
    case_title : str
    guide_level_db : float or None
        A horizontal guide line (default −10 dB, a common matching target — common practice).
    uncertainty_db : array_like [nf], optional
        The ladder's uncertainty of |S11| (dB), drawn as error bars (NaN: none); S11 converges
        worst of all figures, so it is never drawn without it when a ladder gave one.

    Returns
    -------
    tuple of str
    """
    f = float_array(frequencies, "frequencies")
    s = float_array(s11_db, "s11_db", f.shape)
    if f.ndim != 1 or f.size == 0:
        raise ValueError("frequencies: must be a non-empty 1-D array (Hz)")
    fig, ax = new_figure(height=3.8)
    ax.plot(f / GHZ, s, "-o", color=MODEL_COLOURS["fdtd"], markersize=4, linewidth=1.6,
            label="|S11| at the feed guide, FDTD (Meep)")
    if uncertainty_db is not None:
        u = float_array(uncertainty_db, "uncertainty_db", f.shape)
        if np.any(np.isfinite(u)):
            ax.errorbar(f / GHZ, s, yerr=np.where(np.isfinite(u), u, 0.0), fmt="none", color=MODEL_COLOURS["fdtd"],
                        capsize=3, linewidth=1, label="± numerical uncertainty (grid ladder)")
    if guide_level_db is not None:
        ax.axhline(guide_level_db, color=TOLERANCE_COLOUR, linestyle="-.", linewidth=1.1,
                   label=minus_sign(f"{guide_level_db:g} dB guide line"))
    lowest = s if uncertainty_db is None else s - np.nan_to_num(float_array(uncertainty_db, "uncertainty_db", f.shape))
    finite = lowest[np.isfinite(lowest)]  # the axis holds the error bars too
    low = min(finite.min() if finite.size else -30.0, guide_level_db or 0.0)
    ax.set_ylim(low - 5.0, 0.0)
    if f.size == 1:
        ax.set_xlim(f[0] / GHZ - 0.5, f[0] / GHZ + 0.5)
    ax.set_xlabel("Frequency (GHz)")
    ax.set_ylabel("|S11| (dB)")
    set_title(ax, case_title, "Input reflection over the band")
    legend_below(ax)
    return save_figure(fig, path_stem)
