"""predict(horn, frequencies): both analytic models over a band, as ModelResults.

The entry point of the analytic side (DEVELOPERS.md, "Interfaces between the packages").
"""

import numpy as np

from ..units import db10
from .. import units
from . import closed_form
from . import exact_phase
from .line_source import check_equivalent, check_frequency, flared_line_source
from .model_result import ModelResult
from .pattern_metrics import cut_metrics, plane_features

__all__ = ["predict", "DEFAULT_THETA_DEG"]

#: default cut grid: −180…180° in 0.5° steps (721 angles)
DEFAULT_THETA_DEG = np.linspace(-180.0, 180.0, 721)


def _result(name, dims, f, theta, h_cut, e_cut, directivity, extra, attributes):
    h_db, e_db = db10(h_cut), db10(e_cut)
    mh, me = cut_metrics(theta, h_db), cut_metrics(theta, e_db)
    return ModelResult(
        name=name, dims=dims, frequencies=f, theta_deg=theta,
        h_plane_dbi=h_db, e_plane_dbi=e_db, directivity_dbi=db10(directivity),
        hpbw_h_deg=mh["hpbw_deg"], hpbw_e_deg=me["hpbw_deg"],
        first_null_h_deg=mh["first_null_deg"], first_null_e_deg=me["first_null_deg"],
        sll_h_db=mh["sll_db"], sll_e_db=me["sll_db"],
        extra={**extra, **plane_features(theta, h_db, e_db)}, attributes=attributes,
    )


def predict(horn, frequencies, *, theta_deg=None, equivalent="huygens", dims=3):
    """Closed-form and exact-phase predictions for ``horn`` over ``frequencies``.

    Parameters
    ----------
    horn : HornGeometry
    frequencies : array_like
        Hz, shape [nf] (a scalar is taken as one frequency).
    theta_deg : array_like, optional
        Cut angles, degrees (default −180…180 in 0.5° steps).
    equivalent : {"huygens", "e-field"}
        Aperture equivalent for the patterns (boresight directivity does not depend on it).
    dims : {3, 2}
        3: the horn in 3D (directivity in dBi). 2: the 2D line-source counterpart of a
        sectoral horn's flared plane (2D directivity in dB; the other plane's cut is NaN);
        ValueError for a pyramidal horn.

    Returns
    -------
    dict
        ``{"closed_form": ModelResult, "exact_phase": ModelResult}``. The closed form uses
        the axial apex distances (``phase_reference="axial"``); the exact-phase model the exact
        path without the amplitude factor. ``extra`` holds per-frequency
        ``aperture_efficiency`` (D λ²/(4π A B), or D₂/(k w) in 2D) and the phase errors
        (``phase_error_h_wl``/``phase_error_e_wl``: quadratic S, T; ``edge_path_h_wl``/
        ``edge_path_e_wl``: exact edge path), in wavelengths.
    """
    if dims not in (2, 3):
        raise ValueError(f"dims must be 2 or 3, got {dims!r}")
    check_equivalent(equivalent)
    f = np.atleast_1d(check_frequency(frequencies, "frequencies"))
    if f.ndim != 1:
        raise ValueError(f"frequencies must be one-dimensional, got shape {f.shape}")
    theta = DEFAULT_THETA_DEG if theta_deg is None else np.atleast_1d(np.asarray(theta_deg, dtype=float))
    if theta.ndim != 1 or not np.all(np.isfinite(theta)):
        raise ValueError("theta_deg must be a one-dimensional array of finite angles in degrees")
    wl = units.wavelength(f)
    phase_errors = {
        "phase_error_h_wl": horn.phase_error_h(f) * np.ones_like(f),
        "phase_error_e_wl": horn.phase_error_e(f) * np.ones_like(f),
        "edge_path_h_wl": horn.exact_edge_path_h(f) * np.ones_like(f),
        "edge_path_e_wl": horn.exact_edge_path_e(f) * np.ones_like(f),
    }
    cf_attrs = {"equivalent": equivalent, "phase_reference": "axial", "phase_law": "quadratic"}
    ep_attrs = {"equivalent": equivalent, "phase_law": "exact", "amplitude_factor": False}

    if dims == 3:
        area = horn.aperture_a * horn.aperture_b
        out = {}
        for name, model, attrs in (("closed_form", closed_form, cf_attrs), ("exact_phase", exact_phase, ep_attrs)):
            h_cut, e_cut = model.principal_plane_cuts(horn, f, theta, equivalent=equivalent)
            d = model.directivity(horn, f)
            extra = {"aperture_efficiency": d * wl**2 / (4 * np.pi * area), **phase_errors}
            out[name] = _result(name, 3, f, theta, h_cut, e_cut, d, extra, attrs)
        return out

    plane, line = flared_line_source(horn)  # raises for pyramidal
    keep = {k: v for k, v in phase_errors.items() if k.endswith(f"_{plane}_wl")}
    nan_cut = np.full((f.size, theta.size), np.nan)
    out = {}
    for name, model, attrs in (("closed_form", closed_form, cf_attrs), ("exact_phase", exact_phase, ep_attrs)):
        _, cut = model.flared_plane_cut_2d(horn, f, theta, equivalent=equivalent)
        d2 = model.directivity_2d(horn, f)
        extra = {"aperture_efficiency": d2 * wl / (2 * np.pi * line.width), **keep}
        h_cut, e_cut = (cut, nan_cut) if plane == "h" else (nan_cut, cut)
        out[name] = _result(name, 2, f, theta, h_cut, e_cut, d2, extra, {**attrs, "plane": plane})
    return out
