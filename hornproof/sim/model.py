"""Geometry of a rectangular horn as Meep objects, and the layout of the computational cell.

Scaling (hidden inside ``sim``): one Meep length unit is the free-space wavelength at the top
band frequency, ``unit_length = c / f_max``. Meep frequencies are then ``f / f_max`` and the
Meep resolution (cells per unit length) equals ``cells_per_wavelength`` at ``f_max``.

Coordinates. 3D: Meep (x, y, z) = horn (x, y, z): axis z, throat at z = 0, aperture at
z = flare_length, H-plane xz, TE10 electric field along y. 2D (principal-plane model of a
sectoral horn): Meep x = the flared transverse coordinate (horn x for an H-plane sectoral horn,
horn y for an E-plane one), Meep y = horn z.

Walls are closed PEC (``mp.metal``) staircases on the grid, built as a solid minus its inside
(see ``horn_geometry`` for why every face sits on a grid plane). The modelled sizes are the
horn's rounded to whole cells; the wall thickness is the horn's rounded to whole cells and at
least two cells (a thinner PEC wall lets fields through between grid points).
"""

from dataclasses import dataclass

import numpy as np

from ..analytic.waveguide import te10_guide_wavelength
from ..units import SPEED_OF_LIGHT

#: fewest cells across a modelled wall
MIN_WALL_CELLS = 2.0
#: margin between the source and the start of the mode-fit window, and between the window end
#: and the throat, in wavelengths at f_max (lets evanescent higher modes die out)
FIT_MARGIN_WAVELENGTHS = 0.3
#: length of feed guide behind the source before the PML, in wavelengths at f_max
SOURCE_TAIL_WAVELENGTHS = 0.3
#: far-field evaluation distance, in Meep units (wavelengths at f_max)
FAR_FIELD_DISTANCE = 1.0e4


@dataclass(frozen=True)
class Layout:
    """Where everything sits in the Meep cell (all lengths in Meep units, see module doc).

    ``transverse`` names the flared plane for dims = 2 ("h" or "e"); None for dims = 3.
    """

    dims: int
    transverse: str
    unit_length: float  # metres per Meep unit
    resolution: float  # cells per Meep unit
    guide_a: float
    guide_b: float
    aperture_a: float
    aperture_b: float
    flare_length: float
    wall: float  # modelled wall thickness (normal to the wall)
    pml: float
    pml_back: float
    padding: float
    source_z: float
    fit_z: tuple  # (z_start, z_end) of the mode-fit window in the feed guide
    flux_z: float  # plane of the guide net-flux monitor
    box_half: tuple  # half sizes of the near-to-far box in the transverse directions
    box_z: tuple  # (z_back, z_front) of the near-to-far box
    cell_size: tuple  # (sx, sy, sz) for 3D, (sx, sy) for 2D
    cell_center_z: float

    @property
    def cell_size_m(self):
        return tuple(s * self.unit_length for s in self.cell_size)

    @property
    def wall_thickness_m(self):
        return self.wall * self.unit_length

    @property
    def guide_footprint_half(self):
        """Half sizes of the feed guide's outer cross-section (the hole in the box back face)."""
        if self.dims == 3:
            return (self.guide_a / 2 + self.wall, self.guide_b / 2 + self.wall)
        width = self.guide_a if self.transverse == "h" else self.guide_b
        return (width / 2 + self.wall,)

    def meep_frequency(self, frequency):
        """Band frequency (Hz) to Meep units."""
        return np.asarray(frequency, dtype=float) * self.unit_length / SPEED_OF_LIGHT

    def point(self, transverse, z):
        """Meep Vector3 of a point given horn transverse coordinates and axial z (Meep units)."""
        import meep as mp

        if self.dims == 3:
            return mp.Vector3(transverse[0], transverse[1], z - self.cell_center_z)
        return mp.Vector3(transverse[0], z - self.cell_center_z)

    def size(self, transverse, dz):
        import meep as mp

        if self.dims == 3:
            return mp.Vector3(transverse[0], transverse[1], dz)
        return mp.Vector3(transverse[0], dz)


def _cells(length, cell):
    """Nearest whole number of cells (at least 1) in ``length``."""
    return max(1, int(round(length / cell)))


def _even_cells(length, cell):
    n = int(np.ceil(length / cell - 1e-9))
    return n + (n % 2)


def plan_layout(horn, frequencies, settings, cells_per_wavelength):
    """Lay out the cell for ``horn`` at ``frequencies`` (Hz) and a grid density at f_max.

    Every metal face is put on a grid plane (see ``horn_geometry``): the modelled guide, aperture
    and flare length are the horn's rounded to whole cells, and the walls whole cells thick
    (at least ``MIN_WALL_CELLS``). Raises ``ValueError`` naming the parameter for a band the feed
    guide cannot carry or a 2D model asked of a pyramidal horn.
    """
    frequencies = np.atleast_1d(np.asarray(frequencies, dtype=float))
    if frequencies.size == 0 or not np.all(np.isfinite(frequencies)) or np.any(frequencies <= 0):
        raise ValueError("frequencies must be positive finite values in Hz")
    if not cells_per_wavelength or cells_per_wavelength <= 0:
        raise ValueError(f"cells_per_wavelength must be positive, got {cells_per_wavelength!r}")
    f_max = float(frequencies.max())
    f_min = float(frequencies.min())
    unit = SPEED_OF_LIGHT / f_max
    cell = 1.0 / cells_per_wavelength
    if settings.dims not in (2, 3):
        raise ValueError(f"settings.dims must be 2 or 3, got {settings.dims!r}")
    transverse = None
    if settings.dims == 2:
        if horn.kind == "h-sectoral":
            transverse = "h"
        elif horn.kind == "e-sectoral":
            transverse = "e"
        else:
            raise ValueError("settings.dims = 2 models a sectoral horn; a pyramidal horn needs dims = 3")
    tem = settings.dims == 2 and transverse == "e"
    if tem:
        guide_wl_min = SPEED_OF_LIGHT / f_min  # TEM between parallel plates
    else:
        guide_wl_min = te10_guide_wavelength(f_min, horn.guide_a)
        if not np.isfinite(guide_wl_min):
            raise ValueError(f"frequencies: {f_min / 1e9:.4g} GHz is below the TE10 cutoff of the feed guide")
    # modelled sizes: half-widths and lengths in whole cells
    a = 2 * _cells(horn.guide_a / unit / 2, cell) * cell
    b = 2 * _cells(horn.guide_b / unit / 2, cell) * cell
    big_a = max(a, 2 * _cells(horn.aperture_a / unit / 2, cell) * cell)
    big_b = max(b, 2 * _cells(horn.aperture_b / unit / 2, cell) * cell)
    if horn.kind == "h-sectoral":
        big_b = b
    if horn.kind == "e-sectoral":
        big_a = a
    length = _cells(horn.flare_length / unit, cell) * cell
    wall = max(MIN_WALL_CELLS, _cells(horn.wall_thickness / unit, cell)) * cell
    wl_min = f_max / f_min  # free-space wavelength at f_min in Meep units
    pml = settings.pml_wavelengths * wl_min
    pml_back = 2.0 * pml  # guided waves near cutoff meet the PML at a grazing angle: double it
    padding = max(settings.padding_wavelengths, 4 * cell)
    feed = max(settings.feed_length_wavelengths * guide_wl_min / unit, 2 * FIT_MARGIN_WAVELENGTHS + 4 * cell)
    source_z = -_cells(feed, cell) * cell
    fit_z = (source_z + FIT_MARGIN_WAVELENGTHS, -FIT_MARGIN_WAVELENGTHS)
    if fit_z[1] - fit_z[0] < 4 * cell:
        fit_z = (source_z + 0.25 * feed, -0.25 * feed)
    flux_z = (round(0.5 * (fit_z[0] + fit_z[1]) / cell) + 0.5) * cell
    walls = wall_outline(a, b, big_a, big_b, length, wall, cell)
    outer = (walls["outer_x"].max(), walls["outer_y"].max())
    if settings.dims == 3:
        box_half = (outer[0] + padding, outer[1] + padding)
        transverse_cell = tuple(_even_cells(2 * (h + padding + pml), cell) * cell for h in box_half)
    else:
        box_half = ((outer[0] if transverse == "h" else outer[1]) + padding,)
        transverse_cell = (_even_cells(2 * (box_half[0] + padding + pml), cell) * cell,)
    box_z = (-padding, length + padding)
    z_low = np.floor((source_z - SOURCE_TAIL_WAVELENGTHS - pml_back) / cell) * cell
    n_z = _even_cells(box_z[1] + padding + pml - z_low, cell)
    cell_size = transverse_cell + (n_z * cell,)
    # Meep's grid planes sit at whole cells from the cell centre when the count is even; a centre
    # a whole number of cells from z = 0 keeps the throat and every layer on a grid plane
    return Layout(
        dims=settings.dims, transverse=transverse, unit_length=unit, resolution=float(cells_per_wavelength),
        guide_a=a, guide_b=b, aperture_a=big_a, aperture_b=big_b, flare_length=length, wall=wall,
        pml=pml, pml_back=pml_back, padding=padding, source_z=source_z, fit_z=fit_z, flux_z=flux_z,
        box_half=box_half, box_z=box_z, cell_size=cell_size, cell_center_z=z_low + n_z * cell / 2,
    )


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


def boundary_layers(layout):
    """PML on every side; twice as thick behind the feed (see ``plan_layout``)."""
    import meep as mp

    axis_z = mp.Z if layout.dims == 3 else mp.Y
    layers = [mp.PML(layout.pml, direction=mp.X)]
    if layout.dims == 3:
        layers.append(mp.PML(layout.pml, direction=mp.Y))
    layers += [mp.PML(layout.pml, direction=axis_z, side=mp.High),
               mp.PML(layout.pml_back, direction=axis_z, side=mp.Low)]
    return layers


def _block(layout, half, z0, z1, material):
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
    metal = [_block(layout, [h + q for h in outer_g], lo, end + q, mp.metal)]
    vacuum = [_block(layout, [h - q for h in inner_g], lo, end + q, mp.air)]
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
        metal.append(_block(layout, [h + q for h in outer], z0 - q, z1 + q, mp.metal))
        vacuum.append(_block(layout, [h - q for h in inner], z0 + q, z1 + q, mp.air))
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
