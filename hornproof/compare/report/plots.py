# Size exception (~470 lines, over the ~400 guide): one idea, the comparison figures sharing one
# look (colours, legend, atomic save); jobs/ and tests call these functions by this module name,
# so a split into style + figure modules waits for the jobs room to settle.
"""Figures for the comparison: pattern overlays, band plots, convergence ladders, sweeps, S11.

Every function takes plain arrays, draws one figure with matplotlib's object API (no pyplot, no
global state; the Agg renderer), and writes it twice, as ``<path_stem>.png`` and
``<path_stem>.svg``, each through :func:`hornproof.atomic.atomic_path` (temporary name in the
same directory, then renamed), so a crash never leaves a half-written image. Each returns the two paths.

Inputs are SI except where the trade's convention is stored already in edge units: frequencies
in Hz (shown in GHz), pattern angles and flare angles in degrees (as ``ModelResult`` stores
cut angles), levels in dB/dBi.

The look is hornproof's own: white background, light grid, no top/right frame, one fixed
colour per model (:data:`MODEL_COLOURS`) used in every figure; numerical uncertainty is always
a translucent band (or error bar) in the colour of the model it belongs to.

The standard file stems that :mod:`hornproof.compare.report.html` looks for are listed in
:data:`STANDARD_STEMS`.
"""

import os

import numpy as np
from matplotlib.figure import Figure

from ...atomic import atomic_path
from ...units import GHZ

#: One colour per model, used in every figure.
MODEL_COLOURS = {
    "closed_form": "#2a7f62",   # pine green
    "exact_phase": "#c0762f",   # copper
    "fdtd": "#34418f",          # indigo
}
#: Legend labels a reviewer can read without the code.
MODEL_LABELS = {
    "closed_form": "Closed form (quadratic phase, Fresnel integrals)",
    "exact_phase": "Exact-phase aperture integral",
    "fdtd": "FDTD (Meep)",
}
MODEL_LINESTYLES = {"closed_form": "--", "exact_phase": "-.", "fdtd": "-"}
TOLERANCE_COLOUR = "#7a7a7a"
TOTAL_ERROR_COLOUR = "#3b3b3b"  # the total error is no model's: a neutral dark grey
GRID_COLOUR = "#e2e2e2"

#: File stems (without extension) in the order the HTML report shows them.
STANDARD_STEMS = (
    "pattern_h_plane",
    "pattern_e_plane",
    "directivity_vs_frequency",
    "convergence_ladder",
    "error_vs_parameter",
    "s11",
)


def _new_figure(width=7.2, height=4.4):
    fig = Figure(figsize=(width, height), dpi=110, facecolor="white")
    ax = fig.add_subplot(1, 1, 1)
    ax.grid(True, color=GRID_COLOUR, linewidth=0.8)
    ax.set_axisbelow(True)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    return fig, ax


def save_figure(fig, path_stem):
    """Write ``fig`` as ``<path_stem>.png`` and ``<path_stem>.svg`` atomically.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
    path_stem : str or os.PathLike
        Output path without extension; its directory must exist.

    Returns
    -------
    tuple of str
        (png_path, svg_path).
    """
    path_stem = os.fspath(path_stem)
    directory = os.path.dirname(os.path.abspath(path_stem))
    if not os.path.isdir(directory):
        raise ValueError(f"path_stem: directory {directory!r} does not exist")
    written = []
    for fmt in ("png", "svg"):
        final = f"{path_stem}.{fmt}"
        metadata = {"Date": None} if fmt == "svg" else None  # reproducible SVG bytes
        with atomic_path(final) as temporary:
            fig.savefig(temporary, format=fmt, bbox_inches="tight", metadata=metadata)
        written.append(final)
    return tuple(written)


def _finite(values, name, shape=None):
    array = np.asarray(values, dtype=float)
    if shape is not None and array.shape != shape:
        raise ValueError(f"{name}: shape {array.shape} does not match {shape}")
    return array


def _lower_first(text):
    """'Directivity' -> 'directivity', but 'H-plane flare' and '2D directivity' stay."""
    if len(text) > 1 and (text[1] in "-_" or text[1].isupper() or text[0].isdigit()):
        return text
    return text[:1].lower() + text[1:]


def _title(ax, case_title, what):
    ax.set_title(f"{case_title}\n{what}", fontsize=10.5, loc="left")


def _legend(ax, ncol=2):
    """Legend under the axes, clear of the data (the figure is cropped tight around it)."""
    legend = ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.15), ncol=ncol,
                       fontsize=8.3, frameon=False, handlelength=2.6, columnspacing=1.6)
    return legend


def _minus(text):
    """Typographic minus sign for numbers written into labels."""
    return text.replace("-", "\u2212")


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
    theta = _finite(theta_deg, "theta_deg")
    curves = {"closed_form": closed_form_dbi, "exact_phase": exact_phase_dbi, "fdtd": fdtd_dbi}
    curves = {k: _finite(v, k, theta.shape) for k, v in curves.items() if v is not None}
    if not curves:
        raise ValueError("closed_form_dbi, exact_phase_dbi, fdtd_dbi: give at least one cut")
    fig, ax = _new_figure()
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
    _title(ax, case_title, f"{plane_name} pattern{at}")
    _legend(ax)
    return save_figure(fig, path_stem)


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
                                  path_stem, *, fdtd_uncertainty_db=None, case_title="",
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
    case_title : str
    unit, quantity : str
        Axis unit and name (e.g. "dB" and "2D directivity" for dims = 2).

    Returns
    -------
    tuple of str
    """
    f = _finite(frequencies, "frequencies")
    if f.ndim != 1 or f.size == 0:
        raise ValueError("frequencies: must be a non-empty 1-D array (Hz)")
    f_ghz = f / GHZ
    fig, ax = _new_figure()
    markers = {"closed_form": "s", "exact_phase": "D", "fdtd": "o"}
    for key, values in (("closed_form", closed_form_dbi), ("exact_phase", exact_phase_dbi)):
        if values is None:
            continue
        ax.plot(f_ghz, _finite(values, key, f.shape), MODEL_LINESTYLES[key], marker=markers[key],
                markersize=4.5, color=MODEL_COLOURS[key], linewidth=1.4, label=MODEL_LABELS[key])
    if fdtd_dbi is not None:
        y = _finite(fdtd_dbi, "fdtd_dbi", f.shape)
        err = None
        if fdtd_uncertainty_db is not None:
            err = np.nan_to_num(_finite(fdtd_uncertainty_db, "fdtd_uncertainty_db", f.shape), nan=0.0)
        ax.errorbar(f_ghz, y, yerr=err, fmt="o", markersize=5, color=MODEL_COLOURS["fdtd"],
                    ecolor=MODEL_COLOURS["fdtd"], elinewidth=1.2, capsize=4, linestyle="-",
                    linewidth=1.6,
                    label=MODEL_LABELS["fdtd"] + (" ± numerical uncertainty" if err is not None else ""))
    _clip_to_values(ax, [closed_form_dbi, exact_phase_dbi, fdtd_dbi], f.shape)
    if f.size == 1:
        ax.set_xlim(f_ghz[0] - 0.5, f_ghz[0] + 0.5)
    ax.set_xlabel("Frequency (GHz)")
    ax.set_ylabel(f"{quantity} ({unit})")
    _title(ax, case_title, f"{quantity} over the band")
    _legend(ax)
    return save_figure(fig, path_stem)


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
    cpw = _finite(cells_per_wavelength, "cells_per_wavelength")
    phi = _finite(values, "values", cpw.shape)
    if cpw.ndim != 1 or cpw.size == 0 or np.any(cpw <= 0):
        raise ValueError("cells_per_wavelength: must be a non-empty 1-D array of positive numbers")
    order = np.argsort(-cpw)
    cpw, phi = cpw[order], phi[order]
    h = 1.0 / cpw
    fig, ax = _new_figure()
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
            second = f"uncertainty ± {u:.3g} {unit}"
            second += f", safety factor {fs:g}" if kind == "gci" and np.isfinite(fs) else " (spread bound)"
        status_line = first + ("\n" + second if second else "")
    ax.set_xlim(0.0, h.max() * 1.12)
    ax.set_xlabel("Cell size h/λ (= 1 / cells per wavelength)")
    ax.set_ylabel(f"{quantity} ({unit})")
    for hi, yi, ci in zip(h, phi, cpw):
        ax.annotate(f"{ci:g} cells/λ", xy=(hi, yi), xytext=(0, 8), textcoords="offset points",
                    ha="center", fontsize=8, color=colour)
    at = f" at {frequency / GHZ:.3f} GHz" if frequency is not None else ""
    _title(ax, case_title, f"Grid convergence of {_lower_first(quantity)}{at}\n{status_line}")
    _legend(ax)
    return save_figure(fig, path_stem)


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
    x = _finite(parameter_values, "parameter_values")
    if x.ndim != 1 or x.size == 0:
        raise ValueError("parameter_values: must be a non-empty 1-D array")
    order = np.argsort(x)
    x = x[order]
    fig, ax = _new_figure(height=4.8)
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
        e = np.abs(_finite(err, key + "_error", order.shape))[order]
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
    _title(ax, case_title, f"Model error against {_lower_first(parameter_label)}")
    _legend(ax, ncol=1)
    return save_figure(fig, path_stem)


def plot_s11(frequencies, s11_db, path_stem, *, case_title="", guide_level_db=-10.0):
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

    Returns
    -------
    tuple of str
    """
    f = _finite(frequencies, "frequencies")
    s = _finite(s11_db, "s11_db", f.shape)
    if f.ndim != 1 or f.size == 0:
        raise ValueError("frequencies: must be a non-empty 1-D array (Hz)")
    fig, ax = _new_figure(height=3.8)
    ax.plot(f / GHZ, s, "-o", color=MODEL_COLOURS["fdtd"], markersize=4, linewidth=1.6,
            label="|S11| at the feed guide, FDTD (Meep)")
    if guide_level_db is not None:
        ax.axhline(guide_level_db, color=TOLERANCE_COLOUR, linestyle="-.", linewidth=1.1,
                   label=_minus(f"{guide_level_db:g} dB guide line"))
    finite = s[np.isfinite(s)]
    low = min(finite.min() if finite.size else -30.0, guide_level_db or 0.0)
    ax.set_ylim(low - 5.0, 0.0)
    if f.size == 1:
        ax.set_xlim(f[0] / GHZ - 0.5, f[0] / GHZ + 0.5)
    ax.set_xlabel("Frequency (GHz)")
    ax.set_ylabel("|S11| (dB)")
    _title(ax, case_title, "Input reflection over the band")
    _legend(ax)
    return save_figure(fig, path_stem)
