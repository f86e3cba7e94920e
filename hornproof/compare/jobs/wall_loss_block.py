"""The ``wall_loss`` block of a result, and gain = directivity − wall loss in ``models``.

With ``horn.wall_material`` in the case, the conductor loss of the feed guide and the flare
(:mod:`hornproof.analytic.wall_loss`) sets the radiation efficiency e_rad = 10^(−L/10), and
gain G = e_rad·D, realized gain G(1 − |S11|²) (IEEE Std 145-2013; :mod:`hornproof.sim.gain`).
In dB both are the PEC figures less L. The aperture models get a ``gain_dbi`` beside their
directivity; the 3D FDTD model's ``gain_dbi`` and ``realized_gain_dbi`` (computed on perfectly
conducting walls) are lowered by L, and the approximation's scale is added root-sum-square to
their uncertainty. A 2D FDTD model is left alone: its figures are per unit length of the flared
plane and the loss belongs to the 3D horn.

Without a wall material nothing changes (the walls are perfect conductors, G = D).
"""

import numpy as np

from ...analytic import closed_form, exact_phase
from ...analytic.wall_loss import horn_wall_loss
from ...sim.gain import gain
from ...units import db10

APPROXIMATION_NOTE = (
    "TE10 conductor attenuation (Pozar) of the feed guide; the flare as a stack of local "
    "rectangular guides a(z) x b(z), integrated along its length, flared walls with their 1/cos(psi) "
    "extra area; approximation_db is the loss with minus without that factor: a scale of the slice "
    "approximation, not a bound. Fails near a local cutoff and ignores higher modes.")


def wall_loss_of(case):
    """``analytic.wall_loss.WallLoss`` of the case's horn over its band, or None (PEC walls)."""
    if case.wall is None:
        return None
    return horn_wall_loss(case.horn, case.frequencies, case.wall.material,
                          feed_length=case.wall.feed_guide_length)


def wall_loss_block(case, loss):
    """The ``wall_loss`` block (JSON-ready, lists aligned with ``frequencies_ghz``)."""
    f = case.frequencies
    efficiency = loss.radiation_efficiency
    gains = {name: db10(gain(model.directivity(case.horn, f), efficiency)).tolist()
             for name, model in (("closed_form", closed_form), ("exact_phase", exact_phase))}
    return {
        "material": case.wall.material.summary(),
        "feed_guide_length_mm": case.wall.feed_guide_length * 1e3,
        "feed_guide_db_per_m": loss.feed_db_per_m.tolist(),
        "feed_guide_db": loss.feed_db.tolist(),
        "flare_db": loss.flare_db.tolist(),
        "flare_db_without_slant_factor": loss.flare_db_parallel.tolist(),
        "total_db": loss.total_db.tolist(),
        "approximation_db": loss.approximation_db.tolist(),
        "roughness_factor": loss.roughness_factor.tolist(),
        "roughness_model": "Hammerstad-Jensen (1980)" if case.wall.material.roughness_rms > 0 else None,
        "radiation_efficiency": efficiency.tolist(),
        "gain_3d_dbi": gains,
        "approximation": APPROXIMATION_NOTE,
    }


def apply_wall_loss(models, loss, dims):
    """Lower the gains of the ``models`` block (summary dicts, in place) by the wall loss.

    Aperture models of a 3D case get ``gain_dbi`` = directivity − L. The FDTD model of a 3D
    case gets ``gain_dbi`` and ``realized_gain_dbi`` lowered by L, ``radiation_efficiency`` set,
    and the approximation scale root-sum-square into those figures' uncertainty.
    """
    total = np.asarray(loss.total_db, dtype=float)
    if int(dims) != 3:
        return
    for name in ("closed_form", "exact_phase"):
        if name in models and "directivity_dbi" in models[name]:
            models[name]["gain_dbi"] = _shift(models[name]["directivity_dbi"], total)
    fdtd = models.get("fdtd")
    if not fdtd:
        return
    for key in ("gain_dbi", "realized_gain_dbi"):
        if key in fdtd:
            fdtd[key] = _shift(fdtd[key], total)
    fdtd["radiation_efficiency"] = loss.radiation_efficiency.tolist()
    fdtd["radiation_efficiency_note"] = "wall loss from analytic.wall_loss (see wall_loss); fields modelled on PEC walls"
    uncertainty = fdtd.get("uncertainty") or {}
    for key in ("gain_dbi", "realized_gain_dbi"):
        if key in uncertainty:
            uncertainty[key] = [None if u is None else float(np.hypot(u, a))
                                for u, a in zip(uncertainty[key], loss.approximation_db)]
    parts = fdtd.get("uncertainty_parts")
    if isinstance(parts, dict):
        parts["wall_loss_approximation_db"] = loss.approximation_db.tolist()


def _shift(values, loss_db):
    return [None if v is None else float(v) - float(d) for v, d in zip(values, loss_db)]
