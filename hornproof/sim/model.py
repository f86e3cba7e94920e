"""Geometry of a rectangular horn as Meep objects, and the layout of the computational cell.

Scaling (hidden inside ``sim``): one Meep length unit is the free-space wavelength at the top
band frequency, ``unit_length = c / f_max``. Meep frequencies are then ``f / f_max`` and the
Meep resolution (cells per unit length) equals ``cells_per_wavelength`` at ``f_max``.

Coordinates. 3D: Meep (x, y, z) = horn (x, y, z): axis z, throat at z = 0, aperture at
z = flare_length, H-plane xz, TE10 electric field along y. 2D (principal-plane model of a
sectoral horn): Meep x = the flared transverse coordinate (horn x for an H-plane sectoral horn,
horn y for an E-plane one), Meep y = horn z.

Walls are closed PEC slabs (``mp.metal``): four ``Block`` walls for the feed guide and four
``Prism`` walls for the flare. Each flare wall is extruded across the full outer size of the
horn so that neighbouring walls overlap at the corners (no gap at any edge); two vacuum
"trim" prisms then cut away the part of each extrusion that sticks out beyond the outer
surface of the crossing walls. The modelled wall thickness is the horn's, raised to at least
two cells (a thinner PEC wall lets fields through between grid points).
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


def plan_layout(horn, frequencies, settings, cells_per_wavelength):
    """Lay out the cell for ``horn`` at ``frequencies`` (Hz) and a grid density at f_max.

    Raises ``ValueError`` naming the parameter for a band the feed guide cannot carry or a
    2D model asked of a pyramidal horn.
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
    cutoff_ok = settings.dims == 2 and transverse == "e"
    guide_wl_min = te10_guide_wavelength(f_min, horn.guide_a)
    if not np.isfinite(guide_wl_min):
        if not cutoff_ok:
            raise ValueError(f"frequencies: {f_min / 1e9:.4g} GHz is below the TE10 cutoff of the feed guide")
    if cutoff_ok:
        guide_wl_min = SPEED_OF_LIGHT / f_min  # TEM between parallel plates
    a, b = horn.guide_a / unit, horn.guide_b / unit
    big_a, big_b = horn.aperture_a / unit, horn.aperture_b / unit
    length = horn.flare_length / unit
    wall = max(horn.wall_thickness / unit, MIN_WALL_CELLS * cell)
    wl_min = f_max / f_min  # free-space wavelength at f_min in Meep units
    pml = settings.pml_wavelengths * wl_min
    pml_back = 2.0 * pml  # guided waves near cutoff meet the PML at a grazing angle: double it
    padding = max(settings.padding_wavelengths, 4 * cell)
    feed = max(settings.feed_length_wavelengths * guide_wl_min / unit, 2 * FIT_MARGIN_WAVELENGTHS + 4 * cell)
    source_z = -feed
    fit_z = (source_z + FIT_MARGIN_WAVELENGTHS, -FIT_MARGIN_WAVELENGTHS)
    if fit_z[1] - fit_z[0] < 4 * cell:
        fit_z = (source_z + 0.25 * feed, -0.25 * feed)
    flux_z = 0.5 * (fit_z[0] + fit_z[1])
    slope_h = (big_a - a) / (2 * length)
    slope_e = (big_b - b) / (2 * length)
    wall_h = wall * np.hypot(1.0, slope_h)  # horizontal thickness of the sloped H-plane walls
    wall_e = wall * np.hypot(1.0, slope_e)
    outer = (big_a / 2 + wall_h, big_b / 2 + wall_e)
    if settings.dims == 3:
        box_half = (outer[0] + padding, outer[1] + padding)
        transverse_cell = tuple(2 * (h + padding + pml) for h in box_half)
    else:
        box_half = ((outer[0] if transverse == "h" else outer[1]) + padding,)
        transverse_cell = (2 * (box_half[0] + padding + pml),)
    box_z = (-padding, length + padding)
    z_low = source_z - SOURCE_TAIL_WAVELENGTHS - pml_back
    z_high = box_z[1] + padding + pml
    cell_size = transverse_cell + (z_high - z_low,)
    return Layout(
        dims=settings.dims, transverse=transverse, unit_length=unit, resolution=float(cells_per_wavelength),
        guide_a=a, guide_b=b, aperture_a=big_a, aperture_b=big_b, flare_length=length, wall=wall,
        pml=pml, pml_back=pml_back, padding=padding, source_z=source_z, fit_z=fit_z, flux_z=flux_z,
        box_half=box_half, box_z=box_z, cell_size=cell_size, cell_center_z=0.5 * (z_low + z_high),
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


def _wall_polygon(inner_throat, inner_aperture, thickness, length, overlap):
    """(u, z) outline of one flare wall on the +u side, from z = -overlap to the aperture."""
    return [(inner_throat, -overlap), (inner_throat, 0.0), (inner_aperture, length),
            (inner_aperture + thickness, length), (inner_throat + thickness, 0.0),
            (inner_throat + thickness, -overlap)]


def _trim_polygon(outer_throat, outer_aperture, far, length, overlap):
    return [(outer_throat, -overlap), (outer_throat, 0.0), (outer_aperture, length),
            (far, length), (far, -overlap)]


def horn_geometry(layout, *, guide_only=False, guide_end=None):
    """List of Meep objects: feed guide walls and flare walls (PEC), plus vacuum trims.

    ``guide_only`` builds a straight guide running from the back PML to ``guide_end`` (Meep
    units of horn z; default: through the whole cell), for feed checks without a horn.
    """
    import meep as mp

    lo = layout.cell_center_z - layout.cell_size[-1] / 2
    hi = layout.cell_center_z + layout.cell_size[-1] / 2
    cell = 1.0 / layout.resolution
    overlap = cell
    t = layout.wall
    end = (hi if guide_end is None else guide_end) if guide_only else overlap
    guide_len = end - lo
    zc = 0.5 * (lo + end)
    objects = []
    if layout.dims == 3:
        a, b = layout.guide_a, layout.guide_b
        for s in (-1, 1):
            objects.append(mp.Block(center=layout.point((s * (a / 2 + t / 2), 0), zc),
                                    size=mp.Vector3(t, b + 2 * t, guide_len), material=mp.metal))
            objects.append(mp.Block(center=layout.point((0, s * (b / 2 + t / 2)), zc),
                                    size=mp.Vector3(a + 2 * t, t, guide_len), material=mp.metal))
        if guide_only:
            return objects
        length = layout.flare_length
        big_a, big_b = layout.aperture_a, layout.aperture_b
        t_h = t * np.hypot(1.0, (big_a - a) / (2 * length))
        t_e = t * np.hypot(1.0, (big_b - b) / (2 * length))
        x_out, y_out = big_a / 2 + t_h, big_b / 2 + t_e
        far_x, far_y = x_out + 2 * cell, y_out + 2 * cell
        poly_h = _wall_polygon(a / 2, big_a / 2, t_h, length, overlap)
        poly_e = _wall_polygon(b / 2, big_b / 2, t_e, length, overlap)
        for s in (-1, 1):
            # H-plane walls (x sides), outline in xz, extruded along y across the full height
            verts = [layout.point((s * u, -y_out), z) for u, z in poly_h]
            objects.append(mp.Prism(verts, height=float(2 * y_out), axis=mp.Vector3(0, 1, 0), material=mp.metal))
            # E-plane walls (y sides), outline in yz, extruded along x across the full width
            verts = [layout.point((-x_out, s * u), z) for u, z in poly_e]
            objects.append(mp.Prism(verts, height=float(2 * x_out), axis=mp.Vector3(1, 0, 0), material=mp.metal))
        for s in (-1, 1):
            verts = [layout.point((-far_x, s * u), z)
                     for u, z in _trim_polygon(b / 2 + t_e, y_out, far_y, length, overlap)]
            objects.append(mp.Prism(verts, height=float(2 * far_x), axis=mp.Vector3(1, 0, 0), material=mp.air))
            verts = [layout.point((s * u, -far_y), z)
                     for u, z in _trim_polygon(a / 2 + t_h, x_out, far_x, length, overlap)]
            objects.append(mp.Prism(verts, height=float(2 * far_y), axis=mp.Vector3(0, 1, 0), material=mp.air))
        return objects
    # 2D: two parallel-plate walls in the flared plane
    width = layout.guide_a if layout.transverse == "h" else layout.guide_b
    big = layout.aperture_a if layout.transverse == "h" else layout.aperture_b
    for s in (-1, 1):
        objects.append(mp.Block(center=layout.point((s * (width / 2 + t / 2), 0), zc),
                                size=mp.Vector3(t, guide_len, mp.inf), material=mp.metal))
    if guide_only:
        return objects
    length = layout.flare_length
    t_u = t * np.hypot(1.0, (big - width) / (2 * length))
    poly = _wall_polygon(width / 2, big / 2, t_u, length, overlap)
    for s in (-1, 1):
        verts = [layout.point((s * u, 0), z) for u, z in poly]
        objects.append(mp.Prism(verts, height=mp.inf, material=mp.metal))
    return objects


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


def model_image(horn, settings, cells_per_wavelength, path, frequencies=None):
    """Write a PNG of the modelled metal in the two axial cuts (xz and yz; one cut in 2D).

    ``frequencies`` (Hz) sets the band used for the layout; by default the TE10 band of the
    guide, 1.25 to 1.9 times cutoff. Only the MPI master writes the file. Returns ``path``.
    """
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    import meep as mp

    if frequencies is None:
        f_c = SPEED_OF_LIGHT / (2 * horn.guide_a)
        frequencies = np.array([1.25 * f_c, 1.9 * f_c])
    layout = plan_layout(horn, frequencies, settings, cells_per_wavelength)
    sim = mp.Simulation(cell_size=mp.Vector3(*layout.cell_size), resolution=layout.resolution,
                        geometry=horn_geometry(layout), boundary_layers=boundary_layers(layout),
                        eps_averaging=False, dimensions=layout.dims)
    sim.init_sim()
    mm = layout.unit_length * 1e3
    cuts = []
    if layout.dims == 3:
        for name, size in (("H-plane cut (xz, y = 0)", mp.Vector3(layout.cell_size[0], 0, layout.cell_size[2])),
                           ("E-plane cut (yz, x = 0)", mp.Vector3(0, layout.cell_size[1], layout.cell_size[2]))):
            eps = sim.get_array(center=mp.Vector3(), size=size, component=mp.Dielectric)
            cuts.append((name, np.squeeze(eps), layout.cell_size[0 if "xz" in name else 1]))
    else:
        eps = sim.get_array(center=mp.Vector3(), size=mp.Vector3(*layout.cell_size), component=mp.Dielectric)
        cuts.append(("flared plane (2D model)", eps, layout.cell_size[0]))
    if mp.am_master():
        fig, axes = plt.subplots(1, len(cuts), figsize=(5 * len(cuts), 6), squeeze=False)
        z0 = layout.cell_center_z - layout.cell_size[-1] / 2
        for ax, (name, eps, width) in zip(axes[0], cuts):
            metal = (eps < 0).astype(float)
            extent = [z0 * mm, (z0 + layout.cell_size[-1]) * mm, -width / 2 * mm, width / 2 * mm]
            ax.imshow(metal, origin="lower", extent=extent, cmap="Greys", aspect="equal", interpolation="nearest")
            for edge in (layout.pml, ):
                ax.axhline(width / 2 * mm - edge * mm, color="tab:red", lw=0.6, ls="--")
                ax.axhline(-width / 2 * mm + edge * mm, color="tab:red", lw=0.6, ls="--")
            ax.axvline((z0 + layout.pml_back) * mm, color="tab:red", lw=0.6, ls="--")
            ax.axvline((z0 + layout.cell_size[-1] - layout.pml) * mm, color="tab:red", lw=0.6, ls="--")
            ax.axvline(layout.source_z * mm, color="tab:orange", lw=0.8, label="source")
            ax.axvline(layout.box_z[0] * mm, color="tab:blue", lw=0.6, label="near-to-far box")
            ax.axvline(layout.box_z[1] * mm, color="tab:blue", lw=0.6)
            ax.set_title(f"{name}\nwall modelled {layout.wall_thickness_m * 1e3:.3g} mm, "
                         f"{layout.resolution:g} cells/λ at f_max", fontsize=9)
            ax.set_xlabel("z (mm)")
            ax.set_ylabel("transverse (mm)")
        axes[0][0].legend(loc="upper left", fontsize=7)
        fig.tight_layout()
        fig.savefig(path, dpi=120)
        plt.close(fig)
    return path
