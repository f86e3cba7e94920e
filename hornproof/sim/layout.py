"""Where everything sits in the Meep cell of a horn model: ``Layout`` and ``plan_layout``.

Scaling (hidden inside ``sim``): one Meep length unit is the free-space wavelength at the top
band frequency, ``unit_length = c / f_max``. Meep frequencies are then ``f / f_max`` and the
Meep resolution (cells per unit length) equals ``cells_per_wavelength`` at ``f_max``.

Coordinates. 3D: Meep (x, y, z) = horn (x, y, z): axis z, throat at z = 0, aperture at
z = flare_length, H-plane xz, TE10 electric field along y. 2D (principal-plane model of a
sectoral horn): Meep x = the flared transverse coordinate (horn x for an H-plane sectoral horn,
horn y for an E-plane one), Meep y = horn z.

Meep is imported inside the functions that build Meep objects (``Layout.point``,
``Layout.size``, ``boundary_layers``), so a layout can be planned (and its resources estimated)
without Meep.
"""

from dataclasses import dataclass

import numpy as np

from ..analytic.waveguide import te10_guide_wavelength
from ..units import GHZ, SPEED_OF_LIGHT
from .grid_fit import whole_cells
from .walls import MIN_WALL_CELLS, wall_outline

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


def _checked_band(frequencies, cells_per_wavelength):
    """The band as a 1D float array (Hz); ``ValueError`` naming the parameter otherwise."""
    frequencies = np.atleast_1d(np.asarray(frequencies, dtype=float))
    if frequencies.size == 0 or not np.all(np.isfinite(frequencies)) or np.any(frequencies <= 0):
        raise ValueError("frequencies must be positive finite values in Hz")
    if not cells_per_wavelength or cells_per_wavelength <= 0:
        raise ValueError(f"cells_per_wavelength must be positive, got {cells_per_wavelength!r}")
    return frequencies


def _flared_plane(horn, settings):
    """"h" or "e" (the plane a 2D model keeps), None for dims = 3; ``ValueError`` otherwise."""
    if settings.dims not in (2, 3):
        raise ValueError(f"settings.dims must be 2 or 3, got {settings.dims!r}")
    if settings.dims == 3:
        return None
    if horn.kind == "h-sectoral":
        return "h"
    if horn.kind == "e-sectoral":
        return "e"
    raise ValueError("settings.dims = 2 models a sectoral horn; a pyramidal horn needs dims = 3")


def _longest_guide_wavelength(horn, f_min, tem):
    """Guide wavelength (m) in the feed at the lowest band frequency (TEM or TE10)."""
    if tem:
        return SPEED_OF_LIGHT / f_min  # TEM between parallel plates
    guide_wavelength = te10_guide_wavelength(f_min, horn.guide_a)
    if not np.isfinite(guide_wavelength):
        raise ValueError(f"frequencies: {f_min / GHZ:.4g} GHz is below the TE10 cutoff of the feed guide")
    return guide_wavelength


def _modelled_sizes(horn, unit, cell):
    """Guide, aperture, flare length and wall of the model in whole cells (Meep units): widths
    an even number of cells (mirror symmetry), lengths a whole number (``grid_fit.whole_cells``;
    ``grid_fit.fit_grid`` chooses the cell so that these land on the nominal sizes).

    Returns (guide_a, guide_b, aperture_a, aperture_b, flare_length, wall).
    """
    def width(size):
        return float(whole_cells(size / unit, cell, "width")) * cell

    a, b = width(horn.guide_a), width(horn.guide_b)
    big_a = max(a, width(horn.aperture_a))
    big_b = max(b, width(horn.aperture_b))
    if horn.kind == "h-sectoral":
        big_b = b
    if horn.kind == "e-sectoral":
        big_a = a
    length = float(whole_cells(horn.flare_length / unit, cell, "length")) * cell
    wall = max(MIN_WALL_CELLS, _cells(horn.wall_thickness / unit, cell)) * cell
    return a, b, big_a, big_b, length, wall


def plan_layout(horn, frequencies, settings, cells_per_wavelength):
    """Lay out the cell for ``horn`` at ``frequencies`` (Hz) and a grid density at f_max.

    Every metal face is put on a grid plane (see ``sim.walls.horn_geometry``): the modelled
    guide, aperture and flare length are the horn's rounded to whole cells, and the walls whole
    cells thick (at least ``MIN_WALL_CELLS``). Raises ``ValueError`` naming the parameter for a
    band the feed guide cannot carry or a 2D model asked of a pyramidal horn.
    """
    frequencies = _checked_band(frequencies, cells_per_wavelength)
    f_max = float(frequencies.max())
    f_min = float(frequencies.min())
    unit = SPEED_OF_LIGHT / f_max
    cell = 1.0 / cells_per_wavelength
    transverse = _flared_plane(horn, settings)
    guide_wl_min = _longest_guide_wavelength(horn, f_min, tem=settings.dims == 2 and transverse == "e")
    a, b, big_a, big_b, length, wall = _modelled_sizes(horn, unit, cell)
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
