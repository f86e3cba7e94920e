"""The closed near-to-far / flux surface around the horn and the Meep monitors on it.

The surface is a box around the antenna. A feed guide that leaves the box (it runs on into the
PML) would carry its backward wave out through the box as if it were radiated; its outer
footprint is therefore cut out of the back face, which is built from four strips (3D) or two
segments (2D) around that footprint. Everything the guide carries inside stays uncounted; the
currents on the outside of the guide wall behind the box are neglected (small when the
back radiation is weak).

Two far-field routes over the same surface (``FdtdSettings.farfield_method``): "meep", Meep's
near2far object and ``get_farfield`` point by point (``far_fields``; the full finite-distance
Green's function per surface sample per direction, in C++), and "fast", Yee-grid DFT slabs on
every face (``add_current_monitors``, ``current_sheets``) fed to the numpy far-zone transform
of :mod:`hornproof.sim.farfield_transform`. Both give E and H at
``sim.layout.FAR_FIELD_DISTANCE`` (``far_field_evaluator``), so the rest is shared.

Meep is imported inside the functions that call it (slow to import; ``ClosedSurface`` and
``closed_surface`` are plain geometry).
"""

from dataclasses import dataclass

import numpy as np

from .farfield_transform import face_current_sheets, fast_far_fields, slab_bounds, tangential_axes
from .layout import FAR_FIELD_DISTANCE

FARFIELD_METHODS = ("fast", "meep")


@dataclass(frozen=True)
class ClosedSurface:
    """An axis-aligned box (Meep coordinates) with an optional rectangular hole in its low-z face.

    ``centre`` and ``half`` are tuples of length ``dims``; the last entry is the axial
    direction (Meep z in 3D, Meep y in 2D). ``hole_half`` gives the transverse half sizes of
    the hole (centred on the axis), or None.
    """

    dims: int
    centre: tuple
    half: tuple
    hole_half: tuple = None

    def regions(self):
        """(centre, size, weight) of every face piece; weight is +1 / −1 for outward normals."""
        d = self.dims
        pieces = []
        for axis in range(d):
            for side in (-1, 1):
                centre = list(self.centre)
                size = [2 * h for h in self.half]
                centre[axis] += side * self.half[axis]
                size[axis] = 0.0
                if axis == d - 1 and side == -1 and self.hole_half is not None:
                    pieces += [(c, s, -1.0) for c, s in self._strips(centre)]
                else:
                    pieces.append((tuple(centre), tuple(size), float(side)))
        return pieces

    def _strips(self, face_centre):
        """Back face minus the hole: 4 strips in 3D, 2 segments in 2D."""
        d = self.dims
        z = face_centre[d - 1]
        hx = self.half[0]
        fx = self.hole_half[0]
        cx = self.centre[0]
        strips = []
        if d == 2:
            for s in (-1, 1):
                strips.append(((cx + s * (fx + hx) / 2, z), (hx - fx, 0.0)))
            return strips
        hy, fy = self.half[1], self.hole_half[1]
        cy = self.centre[1]
        for s in (-1, 1):
            strips.append(((cx + s * (fx + hx) / 2, cy, z), (hx - fx, 2 * hy, 0.0)))
            strips.append(((cx, cy + s * (fy + hy) / 2, z), (2 * fx, hy - fy, 0.0)))
        return strips


def closed_surface(layout):
    """The near-to-far / flux box of a horn model, the feed guide's footprint cut out behind."""
    z0, z1 = layout.box_z
    centre = (0.0,) * (layout.dims - 1) + (0.5 * (z0 + z1) - layout.cell_center_z,)
    half = tuple(layout.box_half) + (0.5 * (z1 - z0),)
    return ClosedSurface(layout.dims, centre, half, hole_half=layout.guide_footprint_half)


def farfield_method(settings):
    """``settings.farfield_method`` ("fast" or "meep"; "meep" when unset), checked."""
    method = getattr(settings, "farfield_method", "meep")
    if method not in FARFIELD_METHODS:
        raise ValueError(f"settings.farfield_method must be 'fast' or 'meep', got {method!r}")
    return method


def add_surface_monitors(sim, surface, meep_frequencies):
    """Near-to-far and flux monitors on the same closed surface. Returns (near2far, flux)."""
    import meep as mp

    freqs = np.asarray(meep_frequencies, dtype=float)
    n2f_regions, flux_regions = [], []
    for centre, size, weight in surface.regions():
        c, s = mp.Vector3(*centre), mp.Vector3(*size)
        n2f_regions.append(mp.Near2FarRegion(center=c, size=s, weight=weight))
        flux_regions.append(mp.FluxRegion(center=c, size=s, weight=weight))
    return sim.add_near2far(freqs, *n2f_regions), sim.add_flux(freqs, *flux_regions)


def far_fields(sim, near2far, points, n_frequencies):
    """Far E and H at Meep points: complex arrays [nf, npoints, 3] each."""
    e = np.empty((n_frequencies, len(points), 3), dtype=complex)
    h = np.empty_like(e)
    for j, p in enumerate(points):
        ff = np.asarray(sim.get_farfield(near2far, p)).reshape(n_frequencies, 6)
        e[:, j, :] = ff[:, :3]
        h[:, j, :] = ff[:, 3:]
    return e, h


def _meep_component(name):
    import meep as mp

    return getattr(mp, name[0].upper() + name[1])


def add_current_monitors(sim, surface, meep_frequencies):
    """DFT monitors (Yee grid) of the tangential fields on every face piece of ``surface``.

    Each monitor is a slab a fraction of a cell thick around its face (and as much wider), so
    Meep keeps every Yee sample whose interpolation or quadrature weight on the face is non-zero.
    Returns a list of (centre, size, weight, dft_fields, component names).
    """
    import meep as mp

    freqs = np.asarray(meep_frequencies, dtype=float)
    step = 1.0 / sim.resolution
    monitors = []
    for centre, size, weight in surface.regions():
        normal_axis = next(a for a in range(surface.dims) if size[a] == 0.0)
        names = [kind + "xyz"[axis] for axis in tangential_axes(normal_axis) for kind in "eh"]
        bounds = [slab_bounds(centre, size, a, step) for a in range(surface.dims)]
        dft = sim.add_dft_fields([_meep_component(n) for n in names], freqs,
                                 center=mp.Vector3(*[0.5 * (lo + hi) for lo, hi in bounds]),
                                 size=mp.Vector3(*[hi - lo for lo, hi in bounds]), yee_grid=True)
        monitors.append((centre, size, weight, dft, names))
    return monitors


def current_sheets(sim, monitors, n_frequencies, dims):
    """Read the monitors of ``add_current_monitors`` into CurrentSheet lists (all faces)."""
    step = 1.0 / sim.resolution
    sheets = []
    for centre, size, weight, dft, names in monitors:
        arrays = {}
        for name in names:
            per_f = [np.asarray(sim.get_dft_array(dft, _meep_component(name), i)) for i in range(n_frequencies)]
            if any(a.size == 0 or a.ndim != dims for a in per_f):
                continue  # component absent from this model (e.g. Ey, Hz of an Ez-polarised 2D run)
            arrays[name] = np.stack(per_f)
        sheets += face_current_sheets(arrays, centre, size, weight, dims, step)
    return sheets




def add_far_field_monitors(sim, surface, meep_frequencies, method):
    """(far-field monitors, box flux) for ``method``. "meep": one near2far object (``far_fields``);
    "fast": Yee-grid DFT slabs on the same faces for the numpy transform (``fast_far_fields``).
    The box flux (P_rad) is Meep's in both cases."""
    import meep as mp

    if method == "meep":
        return add_surface_monitors(sim, surface, meep_frequencies)
    monitors = add_current_monitors(sim, surface, meep_frequencies)
    flux = sim.add_flux(np.asarray(meep_frequencies, dtype=float),
                        *[mp.FluxRegion(center=mp.Vector3(*c), size=mp.Vector3(*s), weight=w)
                          for c, s, w in surface.regions()])
    return monitors, flux


def far_field_evaluator(sim, monitors, meep_frequencies, dims):
    """A function directions [nd, 3] -> (E, H) [nf, nd, 3] at ``FAR_FIELD_DISTANCE``.

    ``monitors`` as ``add_far_field_monitors`` returned them (a list: the "fast" route).
    """
    import meep as mp

    r = FAR_FIELD_DISTANCE
    nf = len(meep_frequencies)
    if isinstance(monitors, list):
        sheets = current_sheets(sim, monitors, nf, dims)
        return lambda directions: fast_far_fields(sheets, directions, meep_frequencies, r, dims)
    return lambda directions: far_fields(sim, monitors, [mp.Vector3(*(r * d)) for d in directions], nf)
