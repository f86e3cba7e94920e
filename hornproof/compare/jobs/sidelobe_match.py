"""Like-for-like sidelobe comparison: FDTD read at the checked model's first-sidelobe angle.

FDTD and an aperture model need not name the same first sidelobe: where one cut has a shoulder
(a filled null, :mod:`hornproof.analytic.pattern_metrics`) and the other a null, or where
their first sidelobes lie more than half a beamwidth apart
(:func:`~hornproof.analytic.pattern_metrics.same_sidelobe_feature`), their sidelobe levels
describe different lobes and their difference says nothing about the model. There the FDTD
level is read on the FDTD cut at the angles where the checked model has its first sidelobe
(both sides, the higher one, relative to the FDTD peak), on every grid of the ladder, so that
its numerical uncertainty comes from the same ladder procedure as every other figure. The row
of the comparison says so (``note``). A first null that only one side has is not compared
(the row stays "missing") and says why.
"""

import numpy as np

from ...analytic.pattern_metrics import cut_metrics, level_at_angle, same_sidelobe_feature
from ..numerics.convergence import grid_convergence

__all__ = ["matched_sidelobes", "add_feature_notes"]

#: plane -> (cut attribute of a ModelResult, sidelobe metric, first-null metric)
PLANES = {"h": ("h_plane_dbi", "sll_h_db", "first_null_h_deg"),
          "e": ("e_plane_dbi", "sll_e_db", "first_null_e_deg")}


def _describe(edge, sidelobe_deg):
    if edge in ("null", "shoulder"):
        where = f" (first sidelobe at {sidelobe_deg:.1f}°)" if np.isfinite(sidelobe_deg) else ""
        return f"a {edge}{where}"
    return f"no main-lobe edge ({edge})" if edge else "no cut"


def _level_at_model_sidelobe(result, attribute, model_metrics, i):
    """FDTD level (dB relative to its own peak) at the model's sidelobe angles, the higher side."""
    theta = np.asarray(result.theta_deg, dtype=float)
    cut = np.asarray(getattr(result, attribute), dtype=float)[i]
    angles = [model_metrics[f"first_sidelobe_{side}_deg"][i] for side in ("left", "right")]
    angles = [a for a in angles if np.isfinite(a)]
    if not angles:
        return np.nan
    peak = cut_metrics(theta, cut)["peak_db"]
    levels = level_at_angle(theta, cut, angles) - peak
    return float(np.nanmax(levels)) if np.any(np.isfinite(levels)) else np.nan


def matched_sidelobes(models, sim_results, ladder, model_checked, formal_order):
    """FDTD sidelobe levels to compare with ``model_checked``, and the notes of each row.

    Parameters
    ----------
    models : dict of ModelResult
        The analytic models (``analytic.predict``).
    sim_results : list of SimResult
        One per grid of ``ladder``.
    ladder : list of float
        Cells per wavelength of each grid.
    model_checked : str
        The model the verdict is about; its sidelobe angles are used.
    formal_order : float
        Order assumed where the ladder cannot give one (as for every FDTD figure).

    Returns
    -------
    dict
        ``{"values": {metric: {i: value}}, "uncertainty": {metric: {i: value}},
        "notes": {metric: {i: text}}}``, i the frequency index: the FDTD value (dB, NaN if the
        cut has no sample there) and its uncertainty (NaN = unknown) to compare instead, for the
        sidelobe metrics where the features differ, and a note per affected row (sidelobe and
        first-null metrics).
    """
    model = models[model_checked]
    finest = int(np.argmax(ladder))
    nf = len(model.frequencies)
    out = {"values": {}, "uncertainty": {}, "notes": {}}
    for attribute, sll_metric, null_metric in PLANES.values():
        model_cut = np.asarray(getattr(model, attribute), dtype=float)
        fdtd_cut = np.asarray(getattr(sim_results[finest], attribute), dtype=float)
        if np.all(np.isnan(model_cut)) or np.all(np.isnan(fdtd_cut)):
            continue
        mm = cut_metrics(model.theta_deg, model_cut)
        fm = cut_metrics(sim_results[finest].theta_deg, fdtd_cut)
        differ = [i for i in range(nf)
                  if mm["main_lobe_edge"][i] in ("null", "shoulder")
                  and not same_sidelobe_feature(fm["main_lobe_edge"][i], fm["first_sidelobe_deg"][i],
                                                mm["main_lobe_edge"][i], mm["first_sidelobe_deg"][i],
                                                mm["hpbw_deg"][i])]
        for i in range(nf):
            if fm["main_lobe_edge"][i] in ("null", "shoulder") and mm["main_lobe_edge"][i] not in ("null", "shoulder"):
                out["notes"].setdefault(sll_metric, {})[i] = (
                    f"sidelobe not compared: FDTD has {_describe(fm['main_lobe_edge'][i], fm['first_sidelobe_deg'][i])}, "
                    f"{model_checked} {_describe(mm['main_lobe_edge'][i], np.nan)}")
            if fm["main_lobe_edge"][i] != mm["main_lobe_edge"][i]:
                out["notes"].setdefault(null_metric, {})[i] = (
                    f"first null not compared: FDTD has {_describe(fm['main_lobe_edge'][i], np.nan)}, "
                    f"{model_checked} {_describe(mm['main_lobe_edge'][i], np.nan)} at the main-lobe edge")
        if not differ:
            continue
        per_grid = np.full((len(sim_results), nf), np.nan)
        for g, result in enumerate(sim_results):
            for i in differ:
                per_grid[g, i] = _level_at_model_sidelobe(result, attribute, mm, i)
        uncertainty = np.full(nf, np.nan)
        found = [None] * nf
        if len(ladder) > 1:
            found = grid_convergence(per_grid, cells_per_wavelength=ladder, formal_order=formal_order)
            uncertainty = np.array([e.uncertainty for e in found], dtype=float)
        out["values"][sll_metric] = {i: float(per_grid[finest, i]) for i in differ}
        out["uncertainty"][sll_metric] = {i: float(uncertainty[i]) for i in differ}
        out.setdefault("estimates", {})[sll_metric] = {i: None if found[i] is None else found[i].to_dict()
                                                       for i in differ}
        for i in differ:
            out["notes"].setdefault(sll_metric, {})[i] = (
                f"FDTD has {_describe(fm['main_lobe_edge'][i], fm['first_sidelobe_deg'][i])}, {model_checked} "
                f"{_describe(mm['main_lobe_edge'][i], mm['first_sidelobe_deg'][i])}: different lobes, so the "
                f"FDTD value is its level at {model_checked}'s first-sidelobe angle")
    return out


def add_feature_notes(block, notes):
    """Put each note into its row of the ``comparison`` block (key ``note``)."""
    for metric in block["metrics"]:
        for i, text in notes.get(metric["metric"], {}).items():
            metric["per_frequency"][i]["note"] = text
