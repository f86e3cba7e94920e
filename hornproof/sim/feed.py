"""TE10 feed: a current-sheet source shaped like the mode, and the split of the guide field into
the wave going towards the horn and the wave coming back (S11).

Meep here has no eigenmode solver, so the mode is written in closed form: TE10 of a guide of
width a has E_y ∝ cos(π x / a) across the guide (x measured from the guide axis), uniform in y.
In the 2D models the same profile is the TE1 mode of a parallel-plate guide with E out of the
plane (H-plane model); the E-plane model carries the uniform TEM mode between its plates.

Separating the two waves uses only the electric field, so it is free of the half-step offset
between E and H in the leap-frog scheme and of the grid's departure from the analytic
impedance: the DFT field is projected onto the mode profile at every grid plane z of a window
in the feed guide, giving a modal voltage V(z) = A e^{+iβz} + B e^{−iβz} (Meep's e^{−iωt}
time convention: A travels towards the horn, +z). Any two samples a
stride s apart satisfy V(z - s) + V(z + s) = 2 cos(β s) V(z) (the wave equation of the line);
a least-squares fit over the window gives the guide's *numerical* β, then A and B follow by
linear least squares. With z = 0 at the throat, S11 = B / A is referred to the throat plane.
"""

import numpy as np


def mode_profile(layout):
    """(component name, amplitude function of the source-relative position) of the feed mode."""
    if layout.dims == 3:
        a = layout.guide_a
        return "Ey", (lambda p: np.cos(np.pi * p.x / a))
    if layout.transverse == "h":
        a = layout.guide_a
        return "Ez", (lambda p: np.cos(np.pi * p.x / a))
    return "Ex", (lambda p: 1.0)


def mode_weights(layout, x):
    """Mode profile sampled at transverse positions ``x`` (Meep units, from the guide axis)."""
    x = np.asarray(x, dtype=float)
    if layout.dims == 2 and layout.transverse == "e":
        return np.where(np.abs(x) <= layout.guide_b / 2, 1.0, 0.0)
    a = layout.guide_a
    return np.where(np.abs(x) <= a / 2, np.cos(np.pi * x / a), 0.0)


def guide_width(layout):
    """Inner width of the feed guide across which the mode varies (Meep units)."""
    return layout.guide_b if (layout.dims == 2 and layout.transverse == "e") else layout.guide_a


def source_band(meep_frequencies):
    """(centre, width) of the Gaussian pulse that covers the band (Meep frequency units).

    The pulse is centred on the band and 1.5 times as wide as the band, at least a quarter of
    its centre frequency wide.
    """
    f_lo, f_hi = float(np.min(meep_frequencies)), float(np.max(meep_frequencies))
    centre = 0.5 * (f_lo + f_hi)
    width = max(1.5 * (f_hi - f_lo), 0.25 * centre)
    return centre, width


def feed_source(layout, centre_frequency, frequency_width):
    """Meep current sheet launching the feed mode (both ways; the backward half runs into the PML).

    Frequencies in Meep units.
    """
    import meep as mp

    name, amplitude = mode_profile(layout)
    component = getattr(mp, name)
    if layout.dims == 3:
        size = mp.Vector3(layout.guide_a, layout.guide_b, 0)
    else:
        size = mp.Vector3(guide_width(layout), 0)
    return mp.Source(mp.GaussianSource(centre_frequency, fwidth=frequency_width), component=component,
                     center=layout.point((0, 0), layout.source_z), size=size, amp_func=amplitude)


def add_mode_monitor(sim, layout, meep_frequencies):
    """DFT of the mode's E component on the axial plane (3D: y = 0) of the fit window."""
    import meep as mp

    name, _ = mode_profile(layout)
    z0, z1 = layout.fit_z
    width = guide_width(layout)
    if layout.dims == 3:
        where = mp.Volume(center=layout.point((0, 0), 0.5 * (z0 + z1)), size=mp.Vector3(width, 0, z1 - z0))
    else:
        where = mp.Volume(center=layout.point((0, 0), 0.5 * (z0 + z1)), size=mp.Vector3(width, z1 - z0))
    return sim.add_dft_fields([getattr(mp, name)], np.asarray(meep_frequencies), where=where)


#: S11 frequencies of the dense band: a DFT on the guide axis is cheap (one line of the feed
#: guide), so S11 is read at this many points across [f_min, f_max] of the same run
DENSE_BAND_POINTS = 101


def dense_band(frequencies, points=DENSE_BAND_POINTS):
    """``points`` frequencies (Hz) evenly over [min, max] of the band; None for a one-frequency band."""
    f = np.asarray(frequencies, dtype=float)
    if f.size < 2 or not f.max() > f.min():
        return None
    return np.linspace(f.min(), f.max(), int(points))


def add_axis_mode_monitor(sim, layout, meep_frequencies):
    """DFT of the mode's E component on the guide axis over the fit window (a line: cheap with
    many frequencies). On the axis the TE10 (or TE1 / TEM) field is the modal voltage times the
    profile's peak; the symmetric higher modes are evanescent in the window (its margins)."""
    import meep as mp

    name, _ = mode_profile(layout)
    z0, z1 = layout.fit_z
    size = mp.Vector3(0, 0, z1 - z0) if layout.dims == 3 else mp.Vector3(0, z1 - z0)
    where = mp.Volume(center=layout.point((0, 0), 0.5 * (z0 + z1)), size=size)
    return sim.add_dft_fields([getattr(mp, name)], np.asarray(meep_frequencies), where=where)


def axis_reflection(sim, layout, monitor, meep_frequencies):
    """S11 at the throat from the axis line monitor (``add_axis_mode_monitor``): dict of arrays
    ``s11``, ``beta``, ``fit_residual`` [nf], as :func:`reflection_at_throat`."""
    import meep as mp

    name, _ = mode_profile(layout)
    component = getattr(mp, name)
    freqs = np.asarray(meep_frequencies, dtype=float)
    x, y, z, _ = sim.get_array_metadata(dft_cell=monitor)
    axial = np.asarray(z if layout.dims == 3 else y, dtype=float).ravel() + layout.cell_center_z
    cutoff = 0.0 if (layout.dims == 2 and layout.transverse == "e") else 1.0 / (2 * guide_width(layout))
    out = {k: [] for k in ("s11", "beta", "fit_residual")}
    for i, f in enumerate(freqs):
        line = np.asarray(sim.get_dft_array(monitor, component, i)).ravel()
        estimate = 1.0 / np.sqrt(max(f**2 - cutoff**2, 1e-6 * f**2))
        forward, backward, beta, residual = fit_travelling_waves(line, axial, estimate)
        out["s11"].append(backward / forward)
        out["beta"].append(beta)
        out["fit_residual"].append(residual)
    return {k: np.array(v) for k, v in out.items()}


def add_guide_flux(sim, layout, meep_frequencies):
    """Net power flux through the feed guide's cross-section (towards the horn)."""
    import meep as mp

    # The plane reaches well into the walls: the staircased guide is up to a cell wider than
    # its nominal a x b, and a plane cut at the nominal size would miss part of the power
    # (fields inside PEC are zero, so the overreach adds nothing).
    reach = 1.6 * layout.wall
    if layout.dims == 3:
        size = mp.Vector3(layout.guide_a + reach, layout.guide_b + reach, 0)
    else:
        size = mp.Vector3(guide_width(layout) + reach, 0)
    region = mp.FluxRegion(center=layout.point((0, 0), layout.flux_z), size=size)
    return sim.add_flux(np.asarray(meep_frequencies), region)


def modal_voltage(sim, layout, monitor, n_frequencies):
    """V(z) of the feed mode over the fit window: array [nf, nz] and the z positions (Meep units).

    V(z) = ∫ E(x, z) e(x) dx / ∫ e(x)² dx, the projection on the mode profile e(x).
    """
    import meep as mp

    name, _ = mode_profile(layout)
    component = getattr(mp, name)
    x, y, z, weights = sim.get_array_metadata(dft_cell=monitor)
    x = np.asarray(x)
    transverse = x if layout.dims == 3 else np.asarray(x)
    axial = np.asarray(z if layout.dims == 3 else y) + layout.cell_center_z
    e = mode_weights(layout, transverse)
    weights = np.squeeze(np.asarray(weights))
    norm = np.sum(e[:, None] ** 2 * weights, axis=0)
    voltages = []
    for i in range(n_frequencies):
        field = np.squeeze(sim.get_dft_array(monitor, component, i))
        field = field.reshape(weights.shape)
        voltages.append(np.sum(field * e[:, None] * weights, axis=0) / norm)
    return np.array(voltages), axial


def fit_travelling_waves(voltage, z, guide_wavelength_estimate):
    """Split V(z) into A e^{+iβz} + B e^{−iβz} with β fitted from the samples.

    Parameters
    ----------
    voltage : complex array [nz]
        Modal voltage on uniformly spaced planes ``z`` (any length unit).
    z : float array [nz]
    guide_wavelength_estimate : float
        Rough guide wavelength in the unit of ``z``; only chooses the stride (about λ_g / 6).

    Returns
    -------
    forward, backward, beta, residual
        Complex amplitudes of the +z and −z waves referred to z = 0 (Meep's e^{−iωt}
        convention: the +z wave is e^{+iβz}), the fitted β (rad per unit of z), and the
        relative rms residual of the fit (a health figure; ~1e-3 or less for a clean window).

    Notes
    -----
    The recurrence V(z−s) + V(z+s) = 2 cos(βs) V(z) holds for any superposition of the two
    waves of one mode with propagation constant β (transmission-line equations).
    """
    voltage = np.asarray(voltage, dtype=complex)
    z = np.asarray(z, dtype=float)
    step = float(np.mean(np.diff(z)))
    n = voltage.size
    stride = int(np.clip(round(guide_wavelength_estimate / (6 * step)), 1, max(1, (n - 1) // 3)))
    centre = voltage[stride:n - stride]
    pair = voltage[:n - 2 * stride] + voltage[2 * stride:]
    cos_beta_s = np.real(np.vdot(centre, pair) / (2 * np.vdot(centre, centre)))
    beta = float(np.arccos(np.clip(cos_beta_s, -1.0, 1.0)) / (stride * step))
    # Meep's time dependence is e^{-iωt}: the wave towards +z is e^{+iβz}
    basis = np.stack([np.exp(1j * beta * z), np.exp(-1j * beta * z)], axis=1)
    (forward, backward), *_ = np.linalg.lstsq(basis, voltage, rcond=None)
    residual = float(np.linalg.norm(basis @ np.array([forward, backward]) - voltage) / np.linalg.norm(voltage))
    return complex(forward), complex(backward), beta, residual


def reflection_at_throat(sim, layout, monitor, meep_frequencies):
    """S11 at the throat plane (z = 0) for every band frequency, from the mode monitor.

    Returns a dict of arrays [nf]: ``s11`` (complex), ``forward``, ``backward`` (modal
    amplitudes), ``beta`` (numerical, rad per Meep unit) and ``fit_residual``.
    """
    freqs = np.asarray(meep_frequencies, dtype=float)
    voltages, z = modal_voltage(sim, layout, monitor, freqs.size)
    width = guide_width(layout)
    out = {k: [] for k in ("s11", "forward", "backward", "beta", "fit_residual")}
    for i, f in enumerate(freqs):
        cutoff = 0.0 if (layout.dims == 2 and layout.transverse == "e") else 1.0 / (2 * width)
        estimate = 1.0 / np.sqrt(max(f**2 - cutoff**2, 1e-6 * f**2))
        forward, backward, beta, residual = fit_travelling_waves(voltages[i], z, estimate)
        out["s11"].append(backward / forward)
        out["forward"].append(forward)
        out["backward"].append(backward)
        out["beta"].append(beta)
        out["fit_residual"].append(residual)
    return {k: np.array(v) for k, v in out.items()}


def vswr(s11):
    """Voltage standing-wave ratio (1 + |Γ|) / (1 − |Γ|) (inf for |Γ| ≥ 1)."""
    g = np.abs(np.asarray(s11))
    with np.errstate(divide="ignore"):
        return np.where(g < 1, (1 + g) / (1 - g), np.inf)
