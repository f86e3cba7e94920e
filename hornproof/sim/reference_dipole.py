"""A Hertzian (point) dipole in free space, through the same near-to-far and power code as the
horn model: the full-wave chain's check against a textbook antenna.

Facts checked against (any antenna text, e.g. C. A. Balanis, *Antenna Theory*, 3rd ed., §4.2):
an infinitesimal dipole has the pattern sin²θ about its axis and directivity exactly 1.5.
"""

import time

import numpy as np

from .farfield_transform import fast_far_fields
from .pattern import directivity, radiation_intensity, sphere_directions, sphere_power
from .surface import ClosedSurface, add_current_monitors, add_surface_monitors, current_sheets, far_fields


def dipole_pattern(cells_per_wavelength, theta_deg=None, *, box_half_wavelengths=0.5,
                   padding_wavelengths=0.5, pml_wavelengths=1.0, use_symmetry=True, decay_by=1e-6,
                   farfield_methods=("fast",)):
    """Directivity of a z-directed point dipole (Ez source) at one frequency, over θ from its axis.

    Lengths in wavelengths (Meep unit = λ). ``farfield_methods``: one or both of "fast" (numpy
    far-zone transform) and "meep" (Meep's get_farfield), each with its own monitors in the same
    run; the first gives the main figures. Returns a dict: ``theta_deg``, ``directivity``
    (linear, in the xz plane), ``radiated_power`` (box flux, Meep units), ``sphere_power``
    (∮U dΩ over a 5-degree grid; should equal the box flux), ``seconds``, and
    ``by_method`` {method: {"directivity", "sphere_power"}}.
    """
    import meep as mp  # lazy: Meep is slow to import

    mp.verbosity(0)
    t0 = time.monotonic()
    theta_deg = np.arange(0.0, 181.0, 5.0) if theta_deg is None else np.asarray(theta_deg, dtype=float)
    half = box_half_wavelengths
    size = 2 * (half + padding_wavelengths + pml_wavelengths)
    symmetry = [mp.Mirror(mp.X, phase=+1), mp.Mirror(mp.Y, phase=+1), mp.Mirror(mp.Z, phase=-1)] if use_symmetry else []
    source = mp.Source(mp.GaussianSource(1.0, fwidth=0.3), component=mp.Ez, center=mp.Vector3())
    sim = mp.Simulation(cell_size=mp.Vector3(size, size, size), resolution=cells_per_wavelength,
                        boundary_layers=[mp.PML(pml_wavelengths)], sources=[source], symmetries=symmetry)
    surface = ClosedSurface(3, (0.0, 0.0, 0.0), (half, half, half))
    near2far, flux = add_surface_monitors(sim, surface, [1.0])
    monitors = add_current_monitors(sim, surface, [1.0]) if "fast" in farfield_methods else None
    sim.run(until_after_sources=mp.stop_when_dft_decayed(tol=decay_by, minimum_run_time=10))
    power = np.array(mp.get_fluxes(flux))
    r = 1.0e4
    th = np.radians(theta_deg)
    directions = np.stack([np.sin(th), np.zeros_like(th), np.cos(th)], axis=1)
    grid_t = np.arange(0.0, 181.0, 5.0)
    grid_p = np.arange(0.0, 360.0, 15.0)
    dirs, _, _ = sphere_directions(grid_t, grid_p)
    by_method = {}
    for method in farfield_methods:
        if method == "fast":
            sheets = current_sheets(sim, monitors, 1, 3)
            far = lambda d: fast_far_fields(sheets, d, [1.0], r, 3)  # noqa: E731
        elif method == "meep":
            far = lambda d: far_fields(sim, near2far, [mp.Vector3(*(r * x)) for x in d], 1)  # noqa: E731
        else:
            raise ValueError(f"farfield_methods: unknown method {method!r} (use 'fast' or 'meep')")
        e, h = far(directions)
        cut_directivity = directivity(radiation_intensity(e, h, directions, r), power)[0]
        e, h = far(dirs)
        u = radiation_intensity(e, h, dirs, r).reshape(1, grid_t.size, grid_p.size)
        by_method[method] = {"directivity": cut_directivity,
                             "sphere_power": float(sphere_power(u, grid_t, grid_p)[0])}
    sim.reset_meep()
    main = by_method[farfield_methods[0]]
    return {"theta_deg": theta_deg, "directivity": main["directivity"], "radiated_power": float(power[0]),
            "sphere_power": main["sphere_power"], "seconds": time.monotonic() - t0, "by_method": by_method}
