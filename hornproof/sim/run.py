"""The full-wave run: ``simulate(horn, frequencies, settings, cells_per_wavelength)``.

One broadband Gaussian pulse covers the band; every band frequency is taken from the DFT
monitors of the same run, which stops once the DFT fields have settled
(``stop_when_dft_decayed`` with ``settings.decay_by``) or at the cap
``settings.max_time_periods`` (then ``RunError``).

Figures returned (per band frequency):

* directivity D = 4π U / P_rad, P_rad the power through the closed near-to-far box;
* gain G = 4π U / P_accepted with P_accepted = P_inc − P_refl, the net power the feed guide
  carries towards the horn (G = D for PEC walls, up to the power-balance error);
* realized gain 4π U / P_inc = G (1 − |S11|²);
* S11 at the throat plane (z = 0) and VSWR;
* co- and cross-polar principal-plane cuts (Ludwig's third definition, E along y).

In 2D (``settings.dims == 2``, sectoral horns) the flared plane alone is modelled and the
directivity is the 2D one, D₂ = 2π U′ / P′ per unit length. What the 2D model leaves out:
the H-plane model (E out of plane) is a parallel-plate horn of infinite height — it has the
TE10 cutoff and guide wavelength right but no E-plane aperture, no E-plane edge diffraction
and no fields leaking round the narrow walls; the E-plane model (E in plane) carries a TEM
wave between infinite plates, so it misses the TE10 dispersion (guide wavelength, wave
impedance, cutoff) and the cos(πx/a) taper of the H-plane. Neither gives a 3D directivity.
"""

import time
from dataclasses import dataclass, field, fields

import numpy as np

from ..analytic.model_result import ModelResult
from ..analytic.pattern_metrics import cut_metrics
from ..errors import RunError
from ..units import db10, db20
from . import farfield as ff
from . import feed as fd
from . import model as md

#: bytes of memory per grid cell (fields, PML auxiliaries, material) — a rough planning figure
BYTES_PER_CELL = 120.0
#: refuse (unless forced) runs needing more than this much memory
MEMORY_LIMIT_BYTES = 16 * 2**30


@dataclass
class SimResult(ModelResult):
    """One FDTD run over the band: a ``ModelResult`` (name ``"fdtd"``) plus run metadata.

    Arrays [nf] unless stated; cuts [nf, nθ] in dBi (dB of D₂ for dims = 2), NaN where a 2D
    model has no such plane. ``run`` holds the metadata (see ``simulate``). ``full_pattern``
    is None or a dict with ``theta_deg``, ``phi_deg`` and ``directivity_dbi`` [nf, nθ, nφ].
    """

    run: dict = field(default_factory=dict)
    full_pattern: dict = None

    def to_model_result(self):
        """The plain ``ModelResult`` part, with the run metadata as its attributes."""
        names = [f.name for f in fields(ModelResult) if f.name != "attributes"]
        return ModelResult(**{k: getattr(self, k) for k in names}, attributes=dict(self.run))


def _cut_metrics(theta_deg, cuts_db):
    """HPBW, first null, sidelobe level per frequency (``analytic.pattern_metrics``)."""
    m = cut_metrics(theta_deg, np.asarray(cuts_db, dtype=float))
    return (np.asarray(m["hpbw_deg"], dtype=float), np.asarray(m["first_null_deg"], dtype=float),
            np.asarray(m["sll_db"], dtype=float))


def estimated_cells(layout, use_symmetry=True):
    """Grid cells of the model (after the mirror planes, which Meep exploits)."""
    cells = float(np.prod([s * layout.resolution for s in layout.cell_size]))
    if use_symmetry:
        cells /= 2 ** (2 if layout.dims == 3 else 1)
    return cells


def _source_band(meep_frequencies):
    f_lo, f_hi = float(np.min(meep_frequencies)), float(np.max(meep_frequencies))
    centre = 0.5 * (f_lo + f_hi)
    width = max(1.5 * (f_hi - f_lo), 0.25 * centre)
    return centre, width


def _stop_condition(settings, layout, source_end, f_min_meep, component, probe, progress, state):
    """DFT-convergence stop with a time cap, a divergence check and progress reports."""
    import meep as mp

    transit = sum(layout.cell_size)
    minimum = source_end + transit
    cap = minimum + settings.max_time_periods / f_min_meep
    state["time_cap"] = cap
    decayed = mp.stop_when_dft_decayed(tol=settings.decay_by, minimum_run_time=minimum, maximum_run_time=cap)

    def until(sim):
        state["steps"] += 1
        if state["steps"] % 200 == 0:
            value = sim.get_field_point(component, probe)
            if not np.isfinite(value) or abs(value) > 1e30:
                raise RunError(f"the FDTD run diverged (field {value!r} at t = {sim.meep_time():.4g})")
            if progress is not None:
                progress({"stage": "stepping", "meep_time": sim.meep_time(), "time_cap": cap,
                          "elapsed_s": time.monotonic() - state["t0"]})
        return decayed(sim)

    return until


def simulate(horn, frequencies, settings, cells_per_wavelength, *, progress=None, force=False):
    """Build and run the Meep model of ``horn`` over ``frequencies`` (Hz).

    Parameters
    ----------
    horn : HornGeometry
    frequencies : array of float
        Band frequencies, Hz; all above the TE10 cutoff of the feed guide.
    settings : FdtdSettings
    cells_per_wavelength : float
        Grid density at the top band frequency.
    progress : callable or None
        Called now and then with a dict: ``stage``, ``meep_time``, ``time_cap``, ``elapsed_s``.
    force : bool
        Run even when the memory estimate exceeds ``MEMORY_LIMIT_BYTES``.

    Returns
    -------
    SimResult
        ``run`` metadata: wall_thickness_modelled_m, wall_thickness_requested_m,
        cells_per_wavelength, resolution_cells_per_m, grid_step_m, cell_size_m, grid_cells,
        seconds_total, seconds_stepping, meep_version, symmetry, timesteps, meep_time,
        time_cap, mpi_processes, cells_across_guide_b, warnings (list of one-line strings,
        e.g. a staircase that may reflect coherently), modelled_guide_a_m, modelled_guide_b_m,
        modelled_aperture_a_m, modelled_aperture_b_m, modelled_flare_length_m (sizes as
        rounded to whole cells), layout (dict).
    """
    t_start = time.monotonic()
    frequencies = np.atleast_1d(np.asarray(frequencies, dtype=float))
    layout = md.plan_layout(horn, frequencies, settings, cells_per_wavelength)
    try:
        from .estimate import check_fits, estimate_for_layout
    except ImportError:
        cells = estimated_cells(layout, settings.use_symmetry)
        if cells * BYTES_PER_CELL > MEMORY_LIMIT_BYTES and not force:
            raise RunError(f"the model needs about {cells * BYTES_PER_CELL / 2**30:.1f} GiB "
                           f"({cells:.3g} cells); lower cells_per_wavelength or force the run")
    else:
        check_fits(estimate_for_layout(layout, frequencies.size, use_symmetry=settings.use_symmetry), force)
    try:
        import meep as mp
    except ImportError as exc:  # pragma: no cover - depends on the machine
        raise RunError("Meep is not importable (Debian python3-meep-mpi-default): run scripts/bootstrap") from exc
    mp.verbosity(0)
    fm = layout.meep_frequency(frequencies)
    centre, width = _source_band(fm)
    source = fd.feed_source(layout, centre, width)
    sym = md.symmetries(layout, settings.use_symmetry)
    sim = mp.Simulation(cell_size=mp.Vector3(*layout.cell_size), resolution=layout.resolution,
                        geometry=md.horn_geometry(layout), boundary_layers=md.boundary_layers(layout),
                        sources=[source], symmetries=sym, eps_averaging=False, dimensions=layout.dims)
    mode_monitor = fd.add_mode_monitor(sim, layout, fm)
    guide_flux = fd.add_guide_flux(sim, layout, fm)
    surface = closed_surface(layout)
    near2far, box_flux = _far_field_monitors(sim, surface, fm, settings)
    name, _ = fd.mode_profile(layout)
    state = {"steps": 0, "t0": time.monotonic()}
    until = _stop_condition(settings, layout, 10.0 / width, float(fm.min()), getattr(mp, name),
                            layout.point((0, 0), layout.source_z), progress, state)
    t_step = time.monotonic()
    sim.run(until=until)
    seconds_stepping = time.monotonic() - t_step
    if sim.meep_time() >= state["time_cap"] - 1e-9:
        raise RunError(f"the DFT fields did not settle to {settings.decay_by:g} within "
                       f"{settings.max_time_periods:g} periods of f_min; raise max_time_periods or decay_by")
    t_far = time.monotonic()
    result = _post_process(sim, layout, settings, frequencies, fm, mode_monitor, guide_flux, near2far, box_flux)
    seconds_post = time.monotonic() - t_far
    result.run.update({
        "farfield_method": _farfield_method(settings),
        "seconds_post_processing": seconds_post,
        "wall_thickness_modelled_m": layout.wall_thickness_m,
        "wall_thickness_requested_m": float(horn.wall_thickness),
        "cells_per_wavelength": float(cells_per_wavelength),
        "resolution_cells_per_m": layout.resolution / layout.unit_length,
        "grid_step_m": layout.unit_length / layout.resolution,
        "cell_size_m": layout.cell_size_m,
        "grid_cells": estimated_cells(layout, use_symmetry=False),
        "seconds_stepping": seconds_stepping,
        "seconds_total": time.monotonic() - t_start,
        "meep_version": mp.__version__,
        "symmetry": [f"Mirror({'XYZ'[s.direction]}, phase={s.phase.real:+g})" for s in sym],
        "timesteps": int(state["steps"]),
        "meep_time": float(sim.meep_time()),
        "time_cap": float(state["time_cap"]),
        "mpi_processes": int(mp.count_processors()),
        "cells_across_guide_b": horn.guide_b / layout.unit_length * layout.resolution,
        "warnings": md.staircase_warnings(layout, fm),
        # the model rounds every size to whole cells (faces on grid planes; see sim.model)
        "modelled_guide_a_m": layout.guide_a * layout.unit_length,
        "modelled_guide_b_m": layout.guide_b * layout.unit_length,
        "modelled_aperture_a_m": layout.aperture_a * layout.unit_length,
        "modelled_aperture_b_m": layout.aperture_b * layout.unit_length,
        "modelled_flare_length_m": layout.flare_length * layout.unit_length,
        "layout": {"unit_length_m": layout.unit_length, "source_z_m": layout.source_z * layout.unit_length,
                   "box_z_m": tuple(z * layout.unit_length for z in layout.box_z),
                   "pml_m": layout.pml * layout.unit_length},
    })
    if progress is not None:
        progress({"stage": "done", "meep_time": sim.meep_time(), "time_cap": state["time_cap"],
                  "elapsed_s": time.monotonic() - t_start})
    sim.reset_meep()
    return result


def closed_surface(layout):
    """The near-to-far / flux box of a horn model, the feed guide's footprint cut out behind."""
    z0, z1 = layout.box_z
    centre = (0.0,) * (layout.dims - 1) + (0.5 * (z0 + z1) - layout.cell_center_z,)
    half = tuple(layout.box_half) + (0.5 * (z1 - z0),)
    return ff.ClosedSurface(layout.dims, centre, half, hole_half=layout.guide_footprint_half)


def _farfield_method(settings):
    method = getattr(settings, "farfield_method", "meep")
    if method not in ("fast", "meep"):
        raise ValueError(f"settings.farfield_method must be 'fast' or 'meep', got {method!r}")
    return method


def _far_field_monitors(sim, surface, meep_frequencies, settings):
    """(far-field monitors, box flux). "meep": one near2far object (``ff.far_fields``);
    "fast": Yee-grid DFT slabs on the same faces for the numpy transform (``ff.fast_far_fields``).
    The box flux (P_rad) is Meep's in both cases."""
    import meep as mp

    if _farfield_method(settings) == "meep":
        return ff.add_surface_monitors(sim, surface, meep_frequencies)
    monitors = ff.add_current_monitors(sim, surface, meep_frequencies)
    flux = sim.add_flux(np.asarray(meep_frequencies, dtype=float),
                        *[mp.FluxRegion(center=mp.Vector3(*c), size=mp.Vector3(*s), weight=w)
                          for c, s, w in surface.regions()])
    return monitors, flux


def _far_field_evaluator(sim, monitors, meep_frequencies, dims):
    """A function directions [nd, 3] -> (E, H) [nf, nd, 3] at ``md.FAR_FIELD_DISTANCE``."""
    import meep as mp

    r = md.FAR_FIELD_DISTANCE
    nf = len(meep_frequencies)
    if isinstance(monitors, list):
        sheets = ff.current_sheets(sim, monitors, nf, dims)
        return lambda directions: ff.fast_far_fields(sheets, directions, meep_frequencies, r, dims)
    return lambda directions: ff.far_fields(sim, monitors, [mp.Vector3(*(r * d)) for d in directions], nf)


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


def _post_process(sim, layout, settings, frequencies, fm, mode_monitor, guide_flux, near2far, box_flux):
    import meep as mp

    nf = fm.size
    reflection = fd.reflection_at_throat(sim, layout, mode_monitor, fm)
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
    p_refl = p_inc * gamma2
    p_mode = _mode_power(layout, reflection, fm)

    step = settings.pattern_step_deg
    theta = np.arange(-180.0, 180.0 + step / 2, step)
    theta = theta[theta <= 180.0 + 1e-9]
    r = md.FAR_FIELD_DISTANCE
    cuts = {}
    far_field = _far_field_evaluator(sim, near2far, fm, layout.dims)
    boresight = int(np.argmin(np.abs(theta)))
    planes = ("h", "e") if layout.dims == 3 else (layout.transverse,)
    for plane in planes:
        directions, co, cross = ff.cut_directions(theta, plane)
        if layout.dims == 2:
            # flared plane → Meep (x, y): u → x, z → y; H-plane model: E along Meep z
            u = directions[:, 0] if plane == "h" else directions[:, 1]
            directions = np.stack([u, directions[:, 2], np.zeros_like(u)], axis=1)
            if plane == "h":
                co = np.tile([0.0, 0.0, 1.0], (theta.size, 1))
            else:
                co = np.stack([directions[:, 1], -directions[:, 0], np.zeros_like(u)], axis=1)
            cross = np.cross(directions, co)
        e, h = far_field(directions)
        intensity = ff.radiation_intensity(e, h, directions, r, dims=layout.dims)
        co_frac, cross_frac = ff.polarisation_split(e, co, cross)
        d_total = ff.directivity(intensity, p_box, dims=layout.dims)
        cuts[plane] = {"total": d_total, "co": d_total * co_frac, "cross": d_total * cross_frac}
    main = cuts["h"] if "h" in cuts else cuts["e"]
    d_boresight = main["total"][:, boresight]
    gain = d_boresight * p_box / p_net
    realized = d_boresight * p_box / p_inc

    nan_cut = np.full((nf, theta.size), np.nan)
    h_cut = db10(cuts["h"]["co"]) if "h" in cuts else nan_cut
    e_cut = db10(cuts["e"]["co"]) if "e" in cuts else nan_cut
    h_x = db10(cuts["h"]["cross"]) if "h" in cuts else nan_cut
    e_x = db10(cuts["e"]["cross"]) if "e" in cuts else nan_cut
    nan_f = np.full(nf, np.nan)
    hpbw_h, null_h, sll_h = _cut_metrics(theta, h_cut) if "h" in cuts else (nan_f,) * 3
    hpbw_e, null_e, sll_e = _cut_metrics(theta, e_cut) if "e" in cuts else (nan_f,) * 3
    extra = {
        "gain_dbi": db10(gain),
        "realized_gain_dbi": db10(realized),
        "s11_db": db20(s11),
        "s11_real": np.real(s11),
        "s11_imag": np.imag(s11),
        "vswr": fd.vswr(s11),
        "incident_power": p_inc,
        "reflected_power": p_refl,
        "accepted_power": p_net,
        "radiated_power": p_box,
        "power_balance_error": (p_box - p_net) / p_net,
        "mode_power_error": (p_mode - p_net) / p_net,
        "mode_fit_residual": reflection["fit_residual"],
        "guide_beta_per_m": reflection["beta"] / layout.unit_length,
        "h_plane_cross_dbi": h_x,
        "e_plane_cross_dbi": e_x,
    }
    result = SimResult(
        name="fdtd", dims=layout.dims, frequencies=frequencies, theta_deg=theta,
        h_plane_dbi=h_cut, e_plane_dbi=e_cut, directivity_dbi=db10(d_boresight),
        hpbw_h_deg=hpbw_h, hpbw_e_deg=hpbw_e, first_null_h_deg=null_h, first_null_e_deg=null_e,
        sll_h_db=sll_h, sll_e_db=sll_e, extra=extra,
        run={"power_units": "Meep units (relative); ratios are meaningful"},
    )
    if settings.full_pattern_step_deg and layout.dims == 3:
        result.full_pattern = _full_pattern(far_field, settings.full_pattern_step_deg, p_box)
        result.extra["sphere_power_ratio"] = result.full_pattern["sphere_power_ratio"]
    return result


def _full_pattern(far_field, step_deg, p_box):
    """Directivity on a (θ, φ) grid and ∮U dΩ / P_box (a power check of the far field)."""
    theta = np.arange(0.0, 180.0 + step_deg / 2, step_deg)
    theta = theta[theta <= 180.0 + 1e-9]
    phi = np.arange(0.0, 360.0 - 1e-9, step_deg)
    directions, co, cross = ff.sphere_directions(theta, phi)
    r = md.FAR_FIELD_DISTANCE
    e, h = far_field(directions)
    nf = e.shape[0]
    intensity = ff.radiation_intensity(e, h, directions, r).reshape(nf, theta.size, phi.size)
    co_frac, _ = ff.polarisation_split(e, co, cross)
    d = ff.directivity(intensity, p_box)
    return {"theta_deg": theta, "phi_deg": phi, "directivity_dbi": db10(d),
            "co_polar_dbi": db10(d * co_frac.reshape(d.shape)),
            "sphere_power_ratio": ff.sphere_power(intensity, theta, phi) / p_box}
