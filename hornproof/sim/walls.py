"""The horn's metal as Meep objects: the staircased flare walls, the feed guide and the mirror planes.

Walls are closed PEC (``mp.metal``) staircases on the grid, built as a solid minus its inside
(see ``horn_geometry`` for why every face sits on a grid plane). The modelled sizes are the
horn's rounded to whole cells (``sim.layout.plan_layout``); the wall thickness is the horn's
rounded to whole cells and at least two cells (a thinner PEC wall lets fields through between
grid points). Coordinates and Meep units as in :mod:`hornproof.sim.layout`.

Meep is imported inside the functions that build Meep objects, so the staircase arithmetic
(``wall_outline``, ``staircase_warnings``) and the layout planning import without Meep.
"""

import numpy as np

#: fewest cells across a modelled wall
MIN_WALL_CELLS = 2.0


def wall_outline(a, b, big_a, big_b, length, wall, cell):
    """Staircase of the flare: per layer of one cell in z, inner and outer half-widths.

    Inner half-widths follow the straight flare at the layer's mid-plane, rounded to whole
    cells; the wall is ``wall`` thick normal to the sloped wall (so wider horizontally),
    rounded up to whole cells. Returns a dict of arrays over the layers: ``z0`` (layer start),
    ``inner_x``, ``outer_x``, ``inner_y``, ``outer_y`` (Meep units).
    """
    n = int(round(length / cell))
    mid = (np.arange(n) + 0.5) * cell
    out = {"z0": np.arange(n) * cell}
    for name, small, big in (("x", a, big_a), ("y", b, big_b)):
        slope = (big - small) / (2 * length)
        inner = np.round((small / 2 + slope * mid) / cell) * cell
        thick = max(MIN_WALL_CELLS, np.ceil(wall * np.hypot(1.0, slope) / cell - 1e-9)) * cell
        out["inner_" + name] = np.maximum.accumulate(inner)
        out["outer_" + name] = out["inner_" + name] + thick
    return out


def staircase_warnings(layout, meep_frequencies):
    """Warnings about the staircase of the flare walls at these band frequencies (Meep units).

    A straight flare rounded to whole cells steps by one cell every Δ / slope along z: a
    periodic corrugation. When twice that period lies between the free-space wavelength and
    the throat's guide wavelength at a band frequency, the steps reflect coherently (Bragg
    condition, as in a corrugated line) — seen here as S11 near −1 dB and +0.4 dB of
    directivity on a 7 λ horn at 12 cells per wavelength, gone at 16. Returns a list of
    one-line strings (empty when clear).
    """
    cell = 1.0 / layout.resolution
    out = []
    planes = [("H-plane", layout.guide_a, layout.aperture_a)]
    if layout.dims == 3 or layout.transverse == "e":
        planes.append(("E-plane", layout.guide_b, layout.aperture_b))
    if layout.dims == 2:
        planes = [planes[0]] if layout.transverse == "h" else [planes[-1]]
    for name, small, big in planes:
        slope = (big - small) / (2 * layout.flare_length)
        if slope <= 0:
            continue
        period = cell / slope
        for f in np.atleast_1d(meep_frequencies):
            wl = 1.0 / f
            cutoff = 1.0 / (2 * layout.guide_a)
            guide_wl = 1.0 / np.sqrt(max(f**2 - cutoff**2, 1e-12)) if not (layout.dims == 2 and layout.transverse == "e") else wl
            if 0.9 * wl <= 2 * period <= 1.05 * guide_wl:
                out.append(f"{name} wall staircase steps every {period:.3g} wavelengths (at f_max): close to half "
                           f"a guide wavelength at {f:.3g} f_max, so the steps may reflect coherently; "
                           f"use more cells per wavelength")
                break
    return out


def axial_block(layout, half, z0, z1, material):
    """Block from its transverse half sizes and axial extent (horn z, Meep units)."""
    import meep as mp

    if layout.dims == 3:
        size = mp.Vector3(2 * half[0], 2 * half[1], z1 - z0)
    else:
        size = mp.Vector3(2 * half[0], z1 - z0, mp.inf)
    return mp.Block(center=layout.point((0, 0), 0.5 * (z0 + z1)), size=size, material=material)


def horn_geometry(layout, *, guide_only=False):
    """List of Meep blocks: the feed guide and the staircased flare, metal then vacuum.

    Meep, with no smoothing, decides "metal or not" separately at each field component's own
    grid point. A face that does not sit on a grid plane then zeroes a normal E component
    inside the guide while the tangential components next to it stay free — an artificial
    loading that made the TE10 guide carry a wave *slower* than light (β > k; seen here at
    some resolutions). So every face is put a quarter cell off a grid plane: metal blocks
    reach a quarter cell beyond their whole-cell outline, vacuum blocks stop a quarter cell
    short of it. Then exactly the tangential E on the outline plane is zero and the normal E
    half a cell inside is free, as for a PEC wall on that plane (checked by the TE10 β test).

    The horn is built as layers one cell long in z: a metal block out to the outer surface
    and a vacuum block carving the inside; vacuum blocks come last and each reaches a quarter
    cell past the layer's front plane, so the step faces between layers are metal only where
    the narrower layer's wall is. Corners are closed by construction (solid minus inside).
    ``guide_only`` builds just a straight guide through the whole cell.
    """
    import meep as mp

    cell = 1.0 / layout.resolution
    q = 0.25 * cell
    lo = layout.cell_center_z - layout.cell_size[-1] / 2 - cell
    hi = layout.cell_center_z + layout.cell_size[-1] / 2 + cell
    a, b, t = layout.guide_a, layout.guide_b, layout.wall
    if layout.dims == 3:
        inner_g, outer_g = (a / 2, b / 2), (a / 2 + t, b / 2 + t)
    else:
        width = a if layout.transverse == "h" else b
        inner_g, outer_g = (width / 2,), (width / 2 + t,)
    end = hi if guide_only else 0.0
    metal = [axial_block(layout, [h + q for h in outer_g], lo, end + q, mp.metal)]
    vacuum = [axial_block(layout, [h - q for h in inner_g], lo, end + q, mp.air)]
    if guide_only:
        return metal + vacuum
    walls = wall_outline(layout.guide_a, layout.guide_b, layout.aperture_a, layout.aperture_b,
                         layout.flare_length, layout.wall, cell)
    if layout.dims == 3:
        keys = (("inner_x", "inner_y"), ("outer_x", "outer_y"))
    else:
        axis = "x" if layout.transverse == "h" else "y"
        keys = (("inner_" + axis,), ("outer_" + axis,))
    rows = [tuple(walls[k][i] for k in keys[0] + keys[1]) for i in range(walls["z0"].size)]
    start = 0
    n_t = len(keys[0])
    for i in range(1, len(rows) + 1):
        if i < len(rows) and np.allclose(rows[i], rows[start]):
            continue
        z0 = walls["z0"][start]
        z1 = walls["z0"][i - 1] + cell
        inner, outer = rows[start][:n_t], rows[start][n_t:]
        metal.append(axial_block(layout, [h + q for h in outer], z0 - q, z1 + q, mp.metal))
        vacuum.append(axial_block(layout, [h - q for h in inner], z0 + q, z1 + q, mp.air))
        start = i
    return metal + vacuum


def symmetries(layout, enabled=True):
    """Mirror planes of the TE10 excitation of a symmetric horn (empty when disabled).

    3D, E along y: the field is even in x (``Mirror(X, phase=+1)``) and Ey is even in y, which
    Meep, transforming E as a vector, writes as ``Mirror(Y, phase=-1)``. 2D H-plane (Ez):
    even, ``Mirror(X, +1)``. 2D E-plane (E along the Meep x axis, uniform): ``Mirror(X, -1)``.
    """
    import meep as mp

    if not enabled:
        return []
    if layout.dims == 3:
        return [mp.Mirror(mp.X, phase=+1), mp.Mirror(mp.Y, phase=-1)]
    if layout.transverse == "h":
        return [mp.Mirror(mp.X, phase=+1)]
    return [mp.Mirror(mp.X, phase=-1)]
