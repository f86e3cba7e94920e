"""Feed checks without a horn: a straight TE10 guide, matched (into the PML) or shorted.

The same source, mode monitor and S11 fit as ``simulate``; used by the tests to check the feed
against facts of the trade: a matched line reflects nothing, a short reflects everything with
S11 = −1 at the short's plane.
"""

import numpy as np

from ..analytic.geometry import HornGeometry
from .feed import add_guide_flux, add_mode_monitor, feed_source, guide_width, reflection_at_throat, source_band
from .layout import boundary_layers, plan_layout
from .walls import axial_block, horn_geometry, symmetries


def simulate_guide(guide_a, guide_b, frequencies, settings, cells_per_wavelength, termination="matched"):
    """S11 at z = 0 of a straight guide ``guide_a`` x ``guide_b`` (m) over ``frequencies`` (Hz).

    ``termination`` "matched": the guide runs on through the PML; "short": a PEC plate fills the
    guide from z = 0 on. Returns the dict of ``feed.reflection_at_throat`` plus ``net_power``
    (Meep units) and ``layout``.
    """
    import meep as mp  # lazy: Meep is slow to import

    if termination not in ("matched", "short"):
        raise ValueError(f"termination must be 'matched' or 'short', got {termination!r}")
    frequencies = np.atleast_1d(np.asarray(frequencies, dtype=float))
    kind = "e-sectoral" if settings.dims == 2 and settings.extra.get("plane") == "e" else "h-sectoral"
    # a stand-in horn only to lay out the cell; its flare is not built
    big_a, big_b = (1.5 * guide_a, guide_b) if kind == "h-sectoral" else (guide_a, 1.5 * guide_b)
    stand_in = HornGeometry(kind, guide_a, guide_b, big_a, big_b, guide_a, wall_thickness=1e-4)
    layout = plan_layout(stand_in, frequencies, settings, cells_per_wavelength)
    mp.verbosity(0)
    fm = layout.meep_frequency(frequencies)
    centre, width = source_band(fm)
    geometry = horn_geometry(layout, guide_only=True)
    if termination == "short":
        # a plate from the grid plane z = 0 on (a quarter cell over it, see walls.horn_geometry)
        q = 0.25 / layout.resolution
        half = (layout.guide_a / 2 + layout.wall, layout.guide_b / 2 + layout.wall) if layout.dims == 3 \
            else (guide_width(layout) / 2 + layout.wall,)
        geometry.append(axial_block(layout, [h + q for h in half], -q, 1.0, mp.metal))
    sim = mp.Simulation(cell_size=mp.Vector3(*layout.cell_size), resolution=layout.resolution, geometry=geometry,
                        boundary_layers=boundary_layers(layout), sources=[feed_source(layout, centre, width)],
                        symmetries=symmetries(layout, settings.use_symmetry), eps_averaging=False,
                        dimensions=layout.dims)
    monitor = add_mode_monitor(sim, layout, fm)
    flux = add_guide_flux(sim, layout, fm)
    decayed = mp.stop_when_dft_decayed(tol=settings.decay_by, minimum_run_time=10.0 / width + layout.cell_size[-1],
                                       maximum_run_time=10.0 / width + settings.max_time_periods / float(fm.min()))
    sim.run(until=decayed)
    out = reflection_at_throat(sim, layout, monitor, fm)
    out["net_power"] = np.array(mp.get_fluxes(flux))
    out["layout"] = layout
    sim.reset_meep()
    return out
