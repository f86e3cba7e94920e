"""The figures of a two-parameter map: model error over both parameters, breakdown contours.

* ``map_phase_approximation_error`` — the analytic map at full resolution: closed form −
  exact phase (dB) filled, the contour |error| = tolerance drawn solid.
* ``map_aperture_model_error`` and ``map_total_error`` (when FDTD ran) — the same analytic
  map underneath, lighter, and on top the FDTD points coloured by their error (same colour
  scale), labelled "error ± uncertainty"; the breakdown contour |error| = tolerance
  interpolated over the FDTD points (linear within each cell of the coarse grid) and its
  uncertainty band, the contours |error| − u = tolerance and |error| + u = tolerance (dashed).
  Failed points are crossed out.

Colours: matplotlib's "PuOr" diverging map (purple = closed form / exact phase below the
reference, orange = above), symmetric about 0 dB; hornproof's choice.
"""

import numpy as np

# matplotlib is imported through figure_style; this module is imported only when a map folder
# is written (lazy, see jobs.map.write_map_folder)
from .figure_style import new_figure, save_figure

#: the colour map of every map figure (diverging, symmetric about zero error)
ERROR_COLOURS = "PuOr_r"

ERROR_TITLES = {"phase_approximation": "Phase-approximation error (closed form − exact phase)",
                "aperture_model": "Aperture-model error (exact phase − FDTD)",
                "total": "Total error (closed form − FDTD)"}


def _grid(values):
    return np.array([[np.nan if v is None else v for v in row] for row in values], dtype=float)


def _limits(*arrays, tolerance):
    finite = np.concatenate([np.abs(a[np.isfinite(a)]).ravel() for a in arrays] + [np.array([tolerance])])
    return float(max(np.max(finite), 2 * tolerance))


def _axes_labels(ax, document):
    x, y = document["x"], document["y"]
    ax.set_xlabel(f"{x['label']} ({x['unit']})")
    ax.set_ylabel(f"{y['label']} ({y['unit']})")


def _underlay(ax, document, limit, alpha):
    x, y = document["x"], document["y"]
    phase = _grid(document["analytic"]["phase_approximation_error"])
    mesh = ax.pcolormesh(np.asarray(x["analytic"]), np.asarray(y["analytic"]), phase, cmap=ERROR_COLOURS,
                         vmin=-limit, vmax=limit, shading="nearest", alpha=alpha)
    tolerance = document["tolerance"]
    if np.nanmax(np.abs(phase), initial=0) > tolerance and np.nanmin(np.abs(phase), initial=np.inf) < tolerance:
        ax.contour(np.asarray(x["analytic"]), np.asarray(y["analytic"]), np.abs(phase), levels=[tolerance],
                   colors="#222222", linewidths=1.4 if alpha == 1 else 0.8,
                   linestyles="solid" if alpha == 1 else "dotted")
    return mesh, phase


def _point_grid(document, key):
    xs, ys = document["x"]["values"], document["y"]["values"]
    grid = np.full((len(ys), len(xs)), np.nan)
    for p in document["points"]:
        value = p.get(key)
        if value is not None:
            grid[ys.index(p["y"]), xs.index(p["x"])] = value
    return np.asarray(xs, dtype=float), np.asarray(ys, dtype=float), grid


def _contour_if_crossed(ax, x, y, field, level, **style):
    """A contour of ``field`` at ``level`` when the field crosses it (x, y sorted)."""
    order_x, order_y = np.argsort(x), np.argsort(y)
    field = field[np.ix_(order_y, order_x)]
    finite = field[np.isfinite(field)]
    if len(x) < 2 or len(y) < 2 or finite.size == 0 or not (finite.min() < level < finite.max()):
        return False
    ax.contour(x[order_x], y[order_y], field, levels=[level], **style)
    return True


def plot_phase_approximation_map(path_stem, document):
    """The analytic phase-approximation error over both parameters at full resolution."""
    fig, ax = new_figure(7.2, 5.2)
    phase = _grid(document["analytic"]["phase_approximation_error"])
    limit = _limits(phase, tolerance=document["tolerance"])
    mesh, _ = _underlay(ax, document, limit, 1.0)
    fig.colorbar(mesh, ax=ax, label="closed form − exact phase (dB)")
    _axes_labels(ax, document)
    ax.set_title(f"{document['title']}\n{ERROR_TITLES['phase_approximation']} at {document['frequency_ghz']:.3g} GHz; "
                 f"solid line: |error| = {document['tolerance']:g} dB", loc="left", fontsize=9)
    return save_figure(fig, path_stem)


def plot_fdtd_error_map(path_stem, document, kind):
    """One FDTD-based error (``aperture_model`` or ``total``) at the FDTD points over the analytic map."""
    tolerance = document["tolerance"]
    x, y, error = _point_grid(document, f"{kind}_error")
    _, _, uncertainty = _point_grid(document, "uncertainty")
    fig, ax = new_figure(7.2, 5.2)
    phase = _grid(document["analytic"]["phase_approximation_error"])
    limit = _limits(phase, error, tolerance=tolerance)
    _underlay(ax, document, limit, 0.35)
    magnitude = np.abs(error)
    u = np.where(np.isfinite(uncertainty), uncertainty, np.nan)
    drawn = []
    if _contour_if_crossed(ax, x, y, magnitude, tolerance, colors="#000000", linewidths=1.6):
        drawn.append(f"solid: |error| = {tolerance:g} dB")
    band = [_contour_if_crossed(ax, x, y, magnitude - u, tolerance, colors="#000000", linewidths=1.0,
                                linestyles="dashed"),
            _contour_if_crossed(ax, x, y, magnitude + u, tolerance, colors="#000000", linewidths=1.0,
                                linestyles="dashed")]
    if any(band):
        drawn.append("dashed: |error| ∓ uncertainty = tolerance")
    points = ax.scatter(*np.meshgrid(x, y), c=error, cmap=ERROR_COLOURS, vmin=-limit, vmax=limit, s=90,
                        edgecolors="#111111", linewidths=0.8, zorder=3)
    for p in document["points"]:
        if p["status"] == "failed":
            ax.plot(p["x"], p["y"], marker="x", color="#b00000", markersize=12, zorder=4)
            ax.annotate("failed", (p["x"], p["y"]), textcoords="offset points", xytext=(6, 6), fontsize=7)
            continue
        value = p.get(f"{kind}_error")
        if value is None:
            continue
        text = f"{value:+.2f}" + ("" if p.get("uncertainty") is None else f" ± {p['uncertainty']:.2f}")
        ax.annotate(text, (p["x"], p["y"]), textcoords="offset points", xytext=(7, 6), fontsize=7, zorder=5,
                    bbox={"boxstyle": "round,pad=0.15", "facecolor": "white", "edgecolor": "none", "alpha": 0.8})
    fig.colorbar(points, ax=ax, label=f"{ERROR_TITLES[kind].split(' (')[0].lower()} (dB)")
    _axes_labels(ax, document)
    _room_for_labels(ax, x, y)
    note = "; ".join(drawn) if drawn else f"no contour: the points do not cross {tolerance:g} dB"
    ax.set_title(f"{document['title']}\n{ERROR_TITLES[kind]} at {document['frequency_ghz']:.3g} GHz "
                 f"({document['model'].split(' (')[0]})\n{note}", loc="left", fontsize=8)
    return save_figure(fig, path_stem)


def _room_for_labels(ax, x, y):
    """Axis limits a little beyond the FDTD points, so markers and their labels stay inside."""
    for values, setter, low, high in ((x, ax.set_xlim, 0.06, 0.22), (y, ax.set_ylim, 0.08, 0.12)):
        span = float(np.max(values) - np.min(values)) or 1.0
        setter(float(np.min(values)) - low * span, float(np.max(values)) + high * span)


def write_map_plots(folder, document):
    """Every map figure of ``document`` into ``folder``."""
    plot_phase_approximation_map(folder / "map_phase_approximation_error", document)
    if not document.get("analytic_only"):
        for kind in ("aperture_model", "total"):
            plot_fdtd_error_map(folder / f"map_{kind}_error", document, kind)
