"""After the run: S11 and the power bookkeeping at the feed, the far-field cuts and figures.

What each figure means is in :mod:`hornproof.sim.run`. Powers are in Meep units (relative);
only their ratios are used. Meep is imported inside the functions that read its monitors.
"""

import numpy as np

from ..analytic.pattern_metrics import cut_metrics, plane_features
from ..errors import RunError
from ..units import db10, db20
from .feed import axis_reflection, reflection_at_throat, vswr
from .gain import PEC_RADIATION_EFFICIENCY, gain, power_balance_error, realized_gain
from .layout import FAR_FIELD_DISTANCE
from .pattern import cut_directions, directivity, polarisation_split, radiation_intensity, sphere_directions, sphere_power
from .result import SimResult
from .range_gain import range_gain_dbi
from .surface import far_field_evaluator


def _cut_metrics(theta_deg, cuts_db):
    """HPBW, first null, sidelobe level per frequency (``analytic.pattern_metrics``)."""
    m = cut_metrics(theta_deg, np.asarray(cuts_db, dtype=float))
    return (np.asarray(m["hpbw_deg"], dtype=float), np.asarray(m["first_null_deg"], dtype=float),
            np.asarray(m["sll_db"], dtype=float))


def _mode_power(layout, reflection, meep_frequencies):
    """Net power of the fitted waves, (|A|² − |B|²) N / Z with Z = ωμ/β (TE) or 1 (TEM).

    N = ∫ e² over the guide cross-section (per unit length in 2D). Meep units (ε0 = μ0 = 1).
    """
    omega = 2 * np.pi * np.asarray(meep_frequencies)
    if layout.dims == 3:
        norm = layout.guide_a / 2 * layout.guide_b
        impedance = omega / reflection["beta"]
    elif layout.transverse == "h":
        norm = layout.guide_a / 2
        impedance = omega / reflection["beta"]
    else:
        norm = layout.guide_b
        impedance = np.ones_like(omega)
    return (np.abs(reflection["forward"]) ** 2 - np.abs(reflection["backward"]) ** 2) * norm / impedance


def feed_powers(sim, layout, meep_frequencies, mode_monitor, guide_flux, box_flux):
    """S11 at the throat and the powers of the run (Meep units), checked for a sound run.

    Returns a dict: ``reflection`` (``feed.reflection_at_throat``), ``s11``, ``incident``,
    ``reflected``, ``accepted`` (net power the guide carries towards the horn), ``radiated``
    (through the closed box) and ``mode`` (net power of the fitted waves).
    """
    import meep as mp  # lazy: Meep is slow to import

    reflection = reflection_at_throat(sim, layout, mode_monitor, meep_frequencies)
    s11 = reflection["s11"]
    gamma2 = np.abs(s11) ** 2
    p_net = np.array(mp.get_fluxes(guide_flux))
    p_box = np.array(mp.get_fluxes(box_flux))
    if not (np.all(np.isfinite(p_box)) and np.all(np.isfinite(p_net))):
        raise RunError("the FDTD run produced non-finite fields (diverged)")
    if np.any(p_net <= 0):
        raise RunError("no net power reached the horn at some band frequency (feed or band wrong)")
    with np.errstate(divide="ignore"):
        p_inc = p_net / (1 - gamma2)
    return {"reflection": reflection, "s11": s11, "incident": p_inc, "reflected": p_inc * gamma2,
            "accepted": p_net, "radiated": p_box,
            "mode": _mode_power(layout, reflection, meep_frequencies)}


def _model_cut_directions(theta, plane, dims):
    """Directions and Ludwig-3 co/cross vectors of a cut in Meep's axes (2D: the flared plane)."""
    directions, co, cross = cut_directions(theta, plane)
    if dims == 2:
        # flared plane → Meep (x, y): u → x, z → y; H-plane model: E along Meep z
        u = directions[:, 0] if plane == "h" else directions[:, 1]
        directions = np.stack([u, directions[:, 2], np.zeros_like(u)], axis=1)
        if plane == "h":
            co = np.tile([0.0, 0.0, 1.0], (theta.size, 1))
        else:
            co = np.stack([directions[:, 1], -directions[:, 0], np.zeros_like(u)], axis=1)
        cross = np.cross(directions, co)
    return directions, co, cross


def principal_cuts(far_field, layout, theta, radiated_power):
    """Directivity (linear) on the principal-plane cuts the model has.

    Returns {plane: {"total", "co", "cross"}}, each [nf, nθ]; planes "h" and "e" in 3D, the
    flared plane alone in 2D.
    """
    cuts = {}
    planes = ("h", "e") if layout.dims == 3 else (layout.transverse,)
    for plane in planes:
        directions, co, cross = _model_cut_directions(theta, plane, layout.dims)
        e, h = far_field(directions)
        intensity = radiation_intensity(e, h, directions, FAR_FIELD_DISTANCE, dims=layout.dims)
        co_frac, cross_frac = polarisation_split(e, co, cross)
        d_total = directivity(intensity, radiated_power, dims=layout.dims)
        cuts[plane] = {"total": d_total, "co": d_total * co_frac, "cross": d_total * cross_frac}
    return cuts


def _pattern_theta(step_deg):
    """θ from −180 to 180 degrees in ``step_deg`` steps (the principal-plane cut grid)."""
    theta = np.arange(-180.0, 180.0 + step_deg / 2, step_deg)
    return theta[theta <= 180.0 + 1e-9]


def _extra_figures(powers, layout, d_boresight, h_cross, e_cross):
    """The FDTD-only figures of the result (``ModelResult.extra``).

    Gain and realized gain follow their definitions (:mod:`hornproof.sim.gain`) from the
    directivity, the radiation efficiency (1: PEC walls, no wall loss modelled) and S11, so
    G ≤ D and realized gain ≤ G by construction; the power-balance error is reported beside
    them and never scales them (it is numerical error on a lossless model).
    """
    p_inc, p_net, p_box = powers["incident"], powers["accepted"], powers["radiated"]
    s11 = powers["s11"]
    g = gain(d_boresight, PEC_RADIATION_EFFICIENCY)
    return {
        "gain_dbi": db10(g),
        "realized_gain_dbi": db10(realized_gain(g, s11)),
        "s11_db": db20(s11),
        "s11_real": np.real(s11),
        "s11_imag": np.imag(s11),
        "vswr": vswr(s11),
        "incident_power": p_inc,
        "reflected_power": powers["reflected"],
        "accepted_power": p_net,
        "radiated_power": p_box,
        "power_balance_error": power_balance_error(p_box, p_inc, powers["reflected"]),
        "mode_power_error": (powers["mode"] - p_net) / p_net,
        "mode_fit_residual": powers["reflection"]["fit_residual"],
        "guide_beta_per_m": powers["reflection"]["beta"] / layout.unit_length,
        "h_plane_cross_dbi": h_cross,
        "e_plane_cross_dbi": e_cross,
    }


def post_process(sim, layout, settings, frequencies, meep_frequencies, monitors):
    """The ``SimResult`` of a finished run.

    ``monitors`` is a dict: ``mode`` and ``guide_flux`` (``sim.feed``), ``far_field`` and
    ``box_flux`` (``sim.surface.add_far_field_monitors``); optionally ``dense_mode``, a tuple
    (axis monitor over the dense band followed by the band frequencies, dense Hz, dense Meep
    frequencies) for S11 over the dense band (``feed.dense_band``, ``feed.axis_reflection``).
    """
    nf = meep_frequencies.size
    powers = feed_powers(sim, layout, meep_frequencies, monitors["mode"], monitors["guide_flux"],
                         monitors["box_flux"])
    p_box = powers["radiated"]
    theta = _pattern_theta(settings.pattern_step_deg)
    far_field = far_field_evaluator(sim, monitors["far_field"], meep_frequencies, layout.dims)
    cuts = principal_cuts(far_field, layout, theta, p_box)
    main = cuts["h"] if "h" in cuts else cuts["e"]
    d_boresight = main["total"][:, int(np.argmin(np.abs(theta)))]
    nan_cut = np.full((nf, theta.size), np.nan)
    h_cut = db10(cuts["h"]["co"]) if "h" in cuts else nan_cut
    e_cut = db10(cuts["e"]["co"]) if "e" in cuts else nan_cut
    h_cross = db10(cuts["h"]["cross"]) if "h" in cuts else nan_cut
    e_cross = db10(cuts["e"]["cross"]) if "e" in cuts else nan_cut
    nan_f = np.full(nf, np.nan)
    hpbw_h, null_h, sll_h = _cut_metrics(theta, h_cut) if "h" in cuts else (nan_f,) * 3
    hpbw_e, null_e, sll_e = _cut_metrics(theta, e_cut) if "e" in cuts else (nan_f,) * 3
    result = SimResult(
        name="fdtd", dims=layout.dims, frequencies=frequencies, theta_deg=theta,
        h_plane_dbi=h_cut, e_plane_dbi=e_cut, directivity_dbi=db10(d_boresight),
        hpbw_h_deg=hpbw_h, hpbw_e_deg=hpbw_e, first_null_h_deg=null_h, first_null_e_deg=null_e,
        sll_h_db=sll_h, sll_e_db=sll_e, extra=_extra_figures(powers, layout, d_boresight, h_cross, e_cross),
        run={"power_units": "Meep units (relative); ratios are meaningful",
             "radiation_efficiency": PEC_RADIATION_EFFICIENCY,
             "radiation_efficiency_note": "PEC walls, no wall loss modelled: gain = directivity"},
    )
    result.extra.update(plane_features(theta, h_cut, e_cut))  # main-lobe edge flags, sidelobe angles
    if "dense_mode" in monitors:
        monitor, dense_hz, dense_meep = monitors["dense_mode"]
        found = axis_reflection(sim, layout, monitor, np.concatenate([dense_meep, meep_frequencies]))
        n = len(dense_meep)
        result.dense_band = {"frequencies_hz": np.asarray(dense_hz, dtype=float), "s11": found["s11"][:n],
                             "fit_residual": found["fit_residual"][:n],
                             # the axis read-out against the full-plane projection at the band frequencies
                             "band_check_abs": np.abs(found["s11"][n:] - powers["s11"])}
    if layout.dims == 3:
        result.feed_pattern = feed_pattern(far_field, layout, meep_frequencies, theta, p_box)
    distances = (settings.extra or {}).get("range_distances_m")
    if distances and layout.dims == 3:  # [range] of the case: the gain a probe at R would infer
        result.extra["range_gain_dbi"] = range_gain_dbi(sim, monitors["far_field"], layout, meep_frequencies,
                                                        p_box, distances)
        result.run["range_distances_m"] = [float(d) for d in distances]  # extra holds per-frequency arrays
    if settings.full_pattern_step_deg and layout.dims == 3:
        result.full_pattern = full_pattern(far_field, settings.full_pattern_step_deg, p_box)
        result.extra["sphere_power_ratio"] = result.full_pattern["sphere_power_ratio"]
    return result


def full_pattern(far_field, step_deg, radiated_power):
    """Directivity on a (θ, φ) grid and ∮U dΩ / P_box (a power check of the far field)."""
    theta = np.arange(0.0, 180.0 + step_deg / 2, step_deg)
    theta = theta[theta <= 180.0 + 1e-9]
    phi = np.arange(0.0, 360.0 - 1e-9, step_deg)
    directions, co, cross = sphere_directions(theta, phi)
    e, h = far_field(directions)
    nf = e.shape[0]
    intensity = radiation_intensity(e, h, directions, FAR_FIELD_DISTANCE).reshape(nf, theta.size, phi.size)
    co_frac, _ = polarisation_split(e, co, cross)
    d = directivity(intensity, radiated_power)
    return {"theta_deg": theta, "phi_deg": phi, "directivity_dbi": db10(d),
            "co_polar_dbi": db10(d * co_frac.reshape(d.shape)),
            "sphere_power_ratio": sphere_power(intensity, theta, phi) / radiated_power}


#: the (θ, φ) grid of the feed pattern: θ 0…180° in this step, φ one quadrant (the horn is
#: symmetric about both principal planes, so the quadrant holds the whole sphere)
FEED_SPHERE_THETA_STEP_DEG = 1.0
FEED_SPHERE_PHI_DEG = (0.0, 15.0, 30.0, 45.0, 60.0, 75.0, 90.0)


def _feed_amplitudes(e, co, cross, meep_frequencies, radiated_power):
    """Ludwig-3 amplitudes with |g|² = D, phase about the Meep origin, in the e^{+jωt} convention.

    Meep's far field at r carries e^{+ikr} (e^{−iωt}); that factor is removed, the amplitude
    scaled by r √(4π / P_rad), and the result conjugated to e^{+jωt} (as the aperture models).
    """
    k = 2 * np.pi * np.asarray(meep_frequencies, dtype=float)
    r = FAR_FIELD_DISTANCE
    scale = (r * np.sqrt(4 * np.pi / np.asarray(radiated_power, dtype=float)) * np.exp(-1j * k * r))[:, None]
    g_co = scale * np.einsum("fpk,pk->fp", e, co)
    g_x = scale * np.einsum("fpk,pk->fp", e, cross)
    return np.conj(g_co), np.conj(g_x)


def feed_pattern(far_field, layout, meep_frequencies, theta, radiated_power):
    """Complex co- and cross-polar far fields for the feed figures (3D models only).

    Returns a dict: ``theta_deg`` [nθ] and ``cuts`` {"h", "e", "d45"} -> (co, cross) complex
    [nf, nθ] on the signed cut (φ = 0°, 90°, 45°; negative θ is φ + 180°), ``sphere_theta_deg``,
    ``sphere_phi_deg`` (one quadrant) and ``sphere`` (co, cross) [nf, nθ, nφ];
    ``phase_reference_z_m``, the horn axial coordinate (throat at 0) of the phase reference.
    Amplitudes are scaled so that |co|² + |cross|² is the directivity (Ludwig's third
    definition, E along y; e^{+jωt}, far field ∝ g e^{−jkr}/r).
    """
    cuts = {}
    for name, phi in (("h", 0.0), ("e", 90.0), ("d45", 45.0)):
        directions, co, cross = sphere_directions(theta, [phi])
        e, _ = far_field(directions)
        cuts[name] = _feed_amplitudes(e, co, cross, meep_frequencies, radiated_power)
    sphere_theta = np.arange(0.0, 180.0 + 1e-9, FEED_SPHERE_THETA_STEP_DEG)
    sphere_phi = np.asarray(FEED_SPHERE_PHI_DEG)
    directions, co, cross = sphere_directions(sphere_theta, sphere_phi)
    e, _ = far_field(directions)
    shape = (e.shape[0], sphere_theta.size, sphere_phi.size)
    g_co, g_x = _feed_amplitudes(e, co, cross, meep_frequencies, radiated_power)
    return {"theta_deg": np.asarray(theta, dtype=float), "cuts": cuts,
            "sphere_theta_deg": sphere_theta, "sphere_phi_deg": sphere_phi,
            "sphere": (g_co.reshape(shape), g_x.reshape(shape)),
            "phase_reference_z_m": layout.cell_center_z * layout.unit_length,
            "convention": "exp(+j omega t); |co|^2 + |cross|^2 = directivity; Ludwig 3, E along y"}
