"""What a feed engineer reads off a horn: phase centres, the 45° cut, beamwidths, edge taper and
the efficiencies of a focus-fed paraboloid — for both aperture models and every FDTD rung.

Every figure is made the same way from a *feed field* — complex Ludwig-3 co- and cross-polar
far fields (e^{+jωt}, |co|² + |cross|² = directivity) on the H (φ = 0°), E (90°) and diagonal
(45°) cuts and on one quadrant of the sphere, about a known point on the axis:

* FDTD: ``SimResult.feed_pattern`` (``sim.postprocess.feed_pattern``), about the Meep origin;
* aperture models: ``closed_form.pattern`` / ``exact_phase.pattern`` with ``components=True``,
  about the centre of the aperture plane, with the case's aperture equivalent (Huygens by
  default). The Huygens equivalent has no Ludwig-3 cross-polar field at all
  (``analytic.cross_polar``), so the aperture models' 45° cross-polar level is taken from the
  E-field equivalent, and the result says so.

The figures (per frequency, keys of ``models.<model>`` in result.json):

* ``phase_centre_h_mm`` / ``phase_centre_e_mm`` — least-squares phase centre of the co-polar cut
  over the main lobe down to the ``[feed] phase_centre_level_db`` window (−10 dB), as the
  distance *behind the aperture plane* (positive towards the throat), mm; the distance from the
  throat is the flare length minus it; ``phase_ripple_h_deg`` / ``_e_deg`` the RMS phase left;
* ``beamwidth_10db_h_deg`` / ``_e_deg`` and, with ``[feed] beamwidth_level_db``,
  ``beamwidth_level_h_deg`` / ``_e_deg``; ``beam_asymmetry_10db_deg`` = E − H at −10 dB;
* ``cross_polar_45_db`` (peak cross-polar level in the 45° cut relative to the co-polar peak,
  over the co-polar main lobe down to −20 dB) and ``cross_polar_45_angle_deg``;
* with a reflector in ``[feed]``: ``edge_taper_h_db`` / ``_e_db`` (feed pattern at ±θ₀ relative
  to boresight, without the space attenuation), ``spillover_efficiency_pct``,
  ``taper_efficiency_pct``, ``polarisation_efficiency_pct``, ``phase_efficiency_pct``,
  ``reflector_efficiency_pct`` (their product) with the feed at its best axial position
  ``reflector_focus_mm`` (behind the aperture; ``analytic.reflector_efficiency.best_focus``).

FDTD values get their ladder uncertainty from :mod:`.ladder` (these keys are in its
``LADDER_FIGURES``), and those with a ``[checks]`` key (``numerics.figures``) their verdicts
from verify's comparison like every other figure.
"""

import numpy as np

from ...analytic import closed_form, exact_phase
from ...analytic.beam_level import beamwidth_at_level
from ...analytic.cross_polar import ludwig3, peak_cross_polar
from ...analytic.phase_centre import phase_centres
from ...analytic.reflector_efficiency import (best_focus, edge_taper_db, reflector_efficiencies,
                                              space_attenuation_db)
from ...sim.postprocess import FEED_SPHERE_PHI_DEG, FEED_SPHERE_THETA_STEP_DEG
from ...units import SPEED_OF_LIGHT
from ..case.feed_table import STANDARD_BEAMWIDTH_LEVEL_DB, FeedSpec
from ..numerics.confidence import confident_uncertainty, ladder_health

#: per-frequency feed figures that get a ladder (grid-convergence) uncertainty
FEED_LADDER_FIGURES = (
    "phase_centre_h_mm", "phase_centre_e_mm", "beamwidth_10db_h_deg", "beamwidth_10db_e_deg",
    "beamwidth_level_h_deg", "beamwidth_level_e_deg", "beam_asymmetry_10db_deg", "cross_polar_45_db",
    "edge_taper_h_db", "edge_taper_e_db", "spillover_efficiency_pct", "taper_efficiency_pct",
    "polarisation_efficiency_pct", "phase_efficiency_pct", "reflector_efficiency_pct", "reflector_focus_mm",
)

#: the aperture equivalent whose 45° cross-polar level the aperture models report
CROSS_POLAR_EQUIVALENT = "e-field"

#: the 45° cross-polar peak is looked for over the co-polar main lobe down to this level (dB):
#: where the feed illuminates (beyond it an aperture model's cross-polar level is an artefact
#: of its equivalent, e.g. the E-field equivalent's rising (1 − cosθ) towards 90°)
CROSS_POLAR_WINDOW_DB = -20.0

#: cut grid of the aperture models' feed fields (the FDTD's is its own pattern step)
APERTURE_CUT_THETA_DEG = np.arange(-180.0, 180.0 + 1e-9, 0.5)


def _signed_cut(theta_deg, phi_deg):
    """(|θ|, φ) of a signed cut at azimuth φ: negative θ is the same cut at φ + 180°."""
    theta = np.asarray(theta_deg, dtype=float)
    return np.abs(theta), np.where(theta >= 0, phi_deg, phi_deg + 180.0)


def aperture_feed_field(horn, frequencies, model="exact_phase", equivalent="huygens",
                        theta_deg=APERTURE_CUT_THETA_DEG, sphere=True):
    """The feed field of an aperture model (module notes), about the aperture centre.

    ``model`` "closed_form" or "exact_phase". Returns a dict shaped like
    ``sim.postprocess.feed_pattern``'s.
    """
    module = {"closed_form": closed_form, "exact_phase": exact_phase}[model]
    f = np.atleast_1d(np.asarray(frequencies, dtype=float))
    cuts = {}
    for name, phi in (("h", 0.0), ("e", 90.0), ("d45", 45.0)):
        theta, phi_deg = _signed_cut(theta_deg, phi)
        rows = [ludwig3(*module.pattern(horn, fi, theta, phi_deg, equivalent=equivalent, components=True),
                        np.radians(phi_deg)) for fi in f]
        cuts[name] = (np.array([r[0] for r in rows]), np.array([r[1] for r in rows]))
    out = {"theta_deg": np.asarray(theta_deg, dtype=float), "cuts": cuts,
           "phase_reference_z_m": float(horn.flare_length), "equivalent": equivalent}
    if sphere:
        s_theta = np.arange(0.0, 180.0 + 1e-9, FEED_SPHERE_THETA_STEP_DEG)
        s_phi = np.asarray(FEED_SPHERE_PHI_DEG)
        th, ph = np.meshgrid(s_theta, s_phi, indexing="ij")
        rows = [ludwig3(*module.pattern(horn, fi, th, ph, equivalent=equivalent, components=True), np.radians(ph))
                for fi in f]
        out.update(sphere_theta_deg=s_theta, sphere_phi_deg=s_phi,
                   sphere=(np.array([r[0] for r in rows]), np.array([r[1] for r in rows])))
    return out


def _db(values):
    with np.errstate(divide="ignore"):
        return 20 * np.log10(np.abs(values))


def feed_figures(field, frequencies, horn, spec=None, cross_field=None):
    """The per-frequency feed figures (module notes) of one feed field: {key: array [nf]}.

    ``cross_field`` (optional) supplies the 45° cut for the cross-polar figures instead of
    ``field`` (the aperture models' E-field equivalent).
    """
    spec = spec or FeedSpec()
    f = np.atleast_1d(np.asarray(frequencies, dtype=float))
    k = 2 * np.pi * f / SPEED_OF_LIGHT
    theta = field["theta_deg"]
    z_ref = field["phase_reference_z_m"]
    length = float(horn.flare_length)
    out = {}
    for plane in ("h", "e"):
        co = field["cuts"][plane][0]
        found = phase_centres(theta, co, k, level_db=spec.phase_centre_level_db)
        out[f"phase_centre_{plane}_mm"] = (length - (z_ref + found["displacement_m"])) * 1e3
        out[f"phase_ripple_{plane}_deg"] = found["ripple_rms_deg"]
        cut_db = _db(co)
        out[f"beamwidth_10db_{plane}_deg"] = beamwidth_at_level(theta, cut_db, STANDARD_BEAMWIDTH_LEVEL_DB)
        if spec.beamwidth_level_db is not None:
            out[f"beamwidth_level_{plane}_deg"] = beamwidth_at_level(theta, cut_db, spec.beamwidth_level_db)
        if spec.has_reflector:
            out[f"edge_taper_{plane}_db"] = edge_taper_db(theta, cut_db, np.degrees(spec.half_angle_rad))
    out["beam_asymmetry_10db_deg"] = out["beamwidth_10db_e_deg"] - out["beamwidth_10db_h_deg"]
    diagonal = (cross_field or field)
    level, angle = peak_cross_polar(diagonal["theta_deg"], *diagonal["cuts"]["d45"],
                                    main_lobe_db=CROSS_POLAR_WINDOW_DB)
    out["cross_polar_45_db"] = level
    out["cross_polar_45_angle_deg"] = angle
    if spec.has_reflector and "sphere" in field:
        out.update(_efficiencies(field, k, spec.half_angle_rad, z_ref, length))
    return {key: np.asarray(value, dtype=float) for key, value in out.items()}


def _efficiencies(field, k, half_angle, z_ref, length):
    """Reflector efficiencies (%) with the feed at its best axial position, per frequency."""
    s_theta, s_phi = field["sphere_theta_deg"], field["sphere_phi_deg"]
    co, cross = field["sphere"]
    names = ("spillover", "taper", "polarisation", "phase", "aperture")
    out = {name: np.empty(len(k)) for name in names}
    focus = np.empty(len(k))
    for i, kk in enumerate(k):
        d = best_focus(s_theta, s_phi, co[i], kk, half_angle, quadrant=True)
        shift = np.exp(-1j * kk * d * np.cos(np.radians(s_theta)))[:, None]
        eff = reflector_efficiencies(s_theta, s_phi, co[i] * shift, cross[i], half_angle, quadrant=True)
        for name in names:
            out[name][i] = eff[name]
        focus[i] = (length - (z_ref + d)) * 1e3
    return {"spillover_efficiency_pct": 100 * out["spillover"], "taper_efficiency_pct": 100 * out["taper"],
            "polarisation_efficiency_pct": 100 * out["polarisation"], "phase_efficiency_pct": 100 * out["phase"],
            "reflector_efficiency_pct": 100 * out["aperture"], "reflector_focus_mm": focus}


def _jsonable(values):
    arr = np.asarray(values, dtype=float)
    return [float(v) if np.isfinite(v) else None for v in arr]


def add_feed_figures(case, summary_models, sim_results, equivalent="huygens"):
    """Put the feed figures into the aperture models' summaries and every FDTD rung's ``extra``.

    Call before the FDTD ladder's convergence is computed (``verify.fdtd_model_block``) so the
    FDTD figures get their ladder uncertainty. 3D cases only (a 2D model has no 45° cut or
    sphere); returns the aperture models' feed fields (for the exports), or {} for 2D.
    """
    if int(case.fdtd.dims) != 3:
        return {}
    spec = case.feed or FeedSpec()
    fields = {}
    cross_fields = {}
    for name in ("closed_form", "exact_phase"):
        fields[name] = aperture_feed_field(case.horn, case.frequencies, name, equivalent,
                                           sphere=spec.has_reflector)
        cross_fields[name] = fields[name] if equivalent == CROSS_POLAR_EQUIVALENT else \
            aperture_feed_field(case.horn, case.frequencies, name, CROSS_POLAR_EQUIVALENT, sphere=False)
        figures = feed_figures(fields[name], case.frequencies, case.horn, spec, cross_fields[name])
        summary_models[name].update({key: _jsonable(value) for key, value in figures.items()})
    for result in sim_results:
        if getattr(result, "feed_pattern", None) is None:
            continue
        result.extra.update(feed_figures(result.feed_pattern, case.frequencies, case.horn, spec))
    return {"aperture": fields, "aperture_cross": cross_fields}


def aperture_cut_fields(case, equivalent="huygens"):
    """The aperture models' feed fields on the cuts only (no sphere), for the CSV exports:
    {"aperture": {model: field}, "aperture_cross": {model: field of the E-field equivalent}};
    {} for a 2D case."""
    if int(case.fdtd.dims) != 3:
        return {}
    out = {"aperture": {}, "aperture_cross": {}}
    for name in ("closed_form", "exact_phase"):
        out["aperture"][name] = aperture_feed_field(case.horn, case.frequencies, name, equivalent, sphere=False)
        out["aperture_cross"][name] = out["aperture"][name] if equivalent == CROSS_POLAR_EQUIVALENT else \
            aperture_feed_field(case.horn, case.frequencies, name, CROSS_POLAR_EQUIVALENT, sphere=False)
    return out


def feed_block(case, summary, equivalent="huygens"):
    """The ``feed`` block of result.json: what was computed and how, and a table per figure.

    ``{"spec": FeedSpec.to_dict(), "conventions": {...}, "space_attenuation_db", "figures":
    {key: {"closed_form": [nf], "exact_phase": [nf], "fdtd": [nf], "fdtd_uncertainty": [nf],
    "fdtd_confident": [nf], "fdtd_ladder": [nf]}}}`` (the last two when the figure has a ladder);
    None for a 2D case.
    """
    if int(case.fdtd.dims) != 3:
        return None
    spec = case.feed or FeedSpec()
    models = summary["models"]
    uncertainty = models.get("fdtd", {}).get("uncertainty", {})
    estimates = ((summary.get("comparison") or {}).get("convergence") or {}).get("all_figures") or {}
    figures = {}
    for key in FEED_LADDER_FIGURES + ("phase_ripple_h_deg", "phase_ripple_e_deg", "cross_polar_45_angle_deg"):
        if not any(key in models.get(m, {}) for m in ("closed_form", "exact_phase", "fdtd")):
            continue
        figures[key] = {m: models.get(m, {}).get(key) for m in ("closed_form", "exact_phase", "fdtd")}
        figures[key]["fdtd_uncertainty"] = uncertainty.get(key)
        if key in estimates:
            figures[key]["fdtd_confident"] = [confident_uncertainty(e)[0] is not None if e else False
                                              for e in estimates[key]]
            figures[key]["fdtd_ladder"] = [ladder_health(e) for e in estimates[key]]
    length_mm = float(case.horn.flare_length) * 1e3
    for plane in ("h", "e"):
        key = f"phase_centre_{plane}_mm"
        if key in figures:
            figures[f"phase_centre_from_throat_{plane}_mm"] = {
                m: [None if v is None else length_mm - v for v in (figures[key][m] or [])] or None
                for m in ("closed_form", "exact_phase", "fdtd")}
            for extra in ("fdtd_uncertainty", "fdtd_confident", "fdtd_ladder"):
                if extra in figures[key]:
                    figures[f"phase_centre_from_throat_{plane}_mm"][extra] = figures[key][extra]
    block = {
        "spec": spec.to_dict(),
        "flare_length_mm": length_mm,
        "conventions": {
            "phase_centre": "distance behind the aperture plane, positive towards the throat (mm); "
                            "from the throat = flare length minus it",
            "phase_centre_window_db": spec.phase_centre_level_db,
            "cross_polarisation": "Ludwig's third definition (IEEE Trans. AP-21, 1973), E along y; "
                                  "peak over the 45° cut's co-polar main lobe down to "
                                  f"{CROSS_POLAR_WINDOW_DB:g} dB, relative to the co-polar peak",
            "aperture_equivalent": equivalent,
            "aperture_cross_polar_equivalent": CROSS_POLAR_EQUIVALENT,
            "aperture_cross_polar_note": "The Huygens aperture equivalent has no Ludwig-3 cross-polar field; "
                                         "the aperture models' 45° cross-polar level is the E-field equivalent's",
            "efficiencies": "focus-fed paraboloid, geometric optics, integrated over the (θ, φ) pattern "
                            "(one quadrant, both principal planes symmetric), feed at its best axial position",
            "edge_taper": "feed pattern at the rim angle relative to boresight; add space_attenuation_db "
                          "for the illumination at the rim",
        },
        "figures": figures,
    }
    if spec.has_reflector:
        block["space_attenuation_db"] = float(space_attenuation_db(spec.half_angle_rad))
    return block
