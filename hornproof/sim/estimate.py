"""Before a run: how many cells, how much memory, how many time steps, how long.

The model (state of Meep 1.25.0 from Debian, double precision, real fields)
---------------------------------------------------------------------------
* cells: ``n_i = round(size_i · resolution)`` along each of ``dims`` axes (the PML lies inside
  the cell), divided by ``symmetry_factor`` (Meep stores one half per mirror plane).
* memory = base + a · cells + b · pml_cells + c · surface_cells · n_frequencies, where
  a covers the field components (E, D, H, B share storage in vacuum: about 6 × 8 B) and the
  material arrays, b the PML's auxiliary fields, c the DFT fields on the near-to-far box
  (complex<double> tangential E and H per frequency) and ``base`` the imported Python + Meep.
* time steps: Meep's Courant number S = 0.5 gives dt = S / resolution in Meep units, i.e.
  dt = S / (resolution · c) seconds with ``resolution`` in cells per metre; steps = run time / dt.
* seconds = steps · (cells + w · pml_cells) / rate, with ``rate`` interior cell-steps per
  second for a 3D model on this machine (measured once, cached), w the extra cost of a PML
  cell, and a 2D cell costing a fixed fraction of a 3D one (3 field components instead of 6).

Calibration (measured here 2026-12-02 on the 2-core build machine, Meep 1.25.0, by building
empty vacuum cells with a Gaussian Ey point source, PML of 0 / 0.5 / 1 / 1.5 units, sizes
40³ … 120³ cells, near-to-far boxes with 10 / 40 / 100 frequencies; peak RSS from
``resource.getrusage`` after the first step, wall time of 81–121 steps; least-squares fit of
13 3D runs, worst residual 7 %)::

    3D: base 91.8 MB, a = 69.0 B/cell, b = 103.6 B/PML cell, c = 105.6 B per surface cell
        and frequency; 9.3 ns per interior cell-step, +13.5 ns per PML cell-step (w ≈ 1.45)
    2D: a ≈ 40 B/cell, b ≈ 20 B/PML cell, c ≈ 48 B per surface cell and frequency;
        3.1 ns per cell-step (0.34 of 3D), +2.4 ns per PML cell-step
    two mirror planes (Mirror X, Mirror Y) on a 80³ cell: 3.5× less field memory,
    3.85× less time (the estimate uses the nominal factor given by the caller)

Re-measured 02:33 UTC the same day as CPU time (``time.process_time``) under a load average
of 6 on 2 cores: 8.3–10.7 ns per interior 3D cell-step, 21–24 ns per cell-step in cells with
0.5–1 unit of PML (consistent with the figures above); 2D 3.4 ns, PML extra ≈ 6 ns (the 2D
PML weight is the least certain coefficient).

In the empty probes the DFT updates added little per step (100 near-to-far frequencies cost
+6 % time). A horn model from ``sim.layout`` / ``sim.walls`` steps slower than an empty cell (PEC walls, four
DFT monitors, a Python stop condition every step): :func:`estimate_for_layout` adds the
measured :data:`MODEL_TIME_FACTOR` and :data:`PER_STEP_OVERHEAD_SECONDS`. The near-to-far
transform after stepping is not in ``seconds``.

Check against ``hornproof.sim.run.simulate`` (bench/bench_sim.py --only memory, 2026-12-02,
invented WR-90 H-plane horn, 16 cells per wavelength): peak RSS at the end of stepping was
1.01 / 1.05 / 1.06 × this estimate (mirrors / none / none with 5 frequencies; 57 k – 273 k
cells); the post-processing afterwards (far-field evaluation) added a further 42–46 MiB,
hence :data:`POST_PROCESSING_BYTES` in ``peak_memory_bytes``.
"""

import dataclasses
import json
import math
import os
import time
from dataclasses import dataclass

from ..atomic import write_text_atomic
from ..errors import RunError
from ..units import SPEED_OF_LIGHT

__all__ = [
    "ResourceEstimate",
    "far_field_frequency_cost",
    "estimate_resources",
    "estimate_for_layout",
    "courant_timesteps",
    "check_fits",
    "available_memory_bytes",
    "stepping_rate",
    "measure_stepping_rate",
]

#: Meep's default Courant number (Meep docs, "Courant" parameter of Simulation: 0.5).
MEEP_COURANT = 0.5

# Calibration coefficients (see the module notes for how and when they were measured).
BASE_MEMORY_BYTES = 91.8e6
MEMORY_PER_CELL = {3: 69.0, 2: 40.0}
MEMORY_PER_PML_CELL = {3: 103.6, 2: 20.0}
MEMORY_PER_SURFACE_CELL_FREQUENCY = {3: 105.6, 2: 48.0}
PML_TIME_WEIGHT = {3: 13.5 / 9.3, 2: 2.4 / 3.1}
TIME_FRACTION_OF_3D = {3: 1.0, 2: 0.34}
#: horn models step slower than the empty calibration cells (PEC walls, four DFT monitors)
#: and pay a Python stop-condition call per step: stepping CPU time of simulate (bench_sim
#: --only stepping, 2026-12-02, 1073 and 1685 steps, 21 k and 62 k stored cells) fitted as
#: 1.24 × the empty-cell figure + 0.19 ms per step (two points: an exact fit, not a check)
MODEL_TIME_FACTOR = 1.24
PER_STEP_OVERHEAD_SECONDS = 1.9e-4
#: extra resident memory of simulate's post-processing, measured by bench_sim (see notes)
POST_PROCESSING_BYTES = 46 * 2**20
#: interior 3D cell-steps per second measured here (1 / 9.3 ns); used when no cache exists
DEFAULT_STEPPING_RATE = 1.0 / 9.3e-9

CACHE_FILE = os.path.join(os.path.expanduser("~"), ".cache", "hornproof", "stepping_rate.json")


@dataclass(frozen=True)
class ResourceEstimate:
    """Predicted size and cost of one run.

    Attributes
    ----------
    cells : int
        Grid cells stored (after symmetry), PML included.
    memory_bytes : float
        Resident memory of the process while stepping (Python, Meep, fields, DFT), bytes.
    timesteps : int
    seconds : float
        Stepping time, s (near-to-far transform and set-up not included).
    pml_cells : int
        Of ``cells``, those inside the PML.
    post_processing_bytes : float
        Further memory taken after stepping (far-field evaluation), bytes.
    """

    cells: int
    memory_bytes: float
    timesteps: int
    seconds: float
    pml_cells: int = 0
    post_processing_bytes: float = POST_PROCESSING_BYTES

    @property
    def peak_memory_bytes(self):
        """Peak of the whole run: stepping memory plus the post-processing's."""
        return self.memory_bytes + self.post_processing_bytes


def courant_timesteps(run_time, resolution_cells_per_m, courant=MEEP_COURANT):
    """Number of time steps to cover ``run_time`` seconds of simulated time.

    dt = S · Δx / c with Δx = 1 / resolution (Meep's dt = S / resolution in its units).

    Parameters
    ----------
    run_time : float
        Simulated time, s.
    resolution_cells_per_m : float
        Cells per metre.
    courant : float
        Courant number S (Meep default 0.5; stable in 3D for S < 1/√3).
    """
    if not run_time >= 0:
        raise ValueError("run_time: must be >= 0 s")
    if not resolution_cells_per_m > 0:
        raise ValueError("resolution_cells_per_m: must be > 0")
    dt = courant / (resolution_cells_per_m * SPEED_OF_LIGHT)
    return int(math.ceil(run_time / dt - 1e-9))


def _grid_counts(cell_size_xyz_m, resolution, dims):
    sizes = list(cell_size_xyz_m)[:dims]
    if len(sizes) != dims or any(not (s > 0) for s in sizes):
        raise ValueError(f"cell_size_xyz_m: need {dims} positive sizes, got {cell_size_xyz_m!r}")
    return [max(1, int(round(s * resolution))) for s in sizes]


def estimate_resources(cell_size_xyz_m, resolution_cells_per_m, dims, n_frequencies,
                       n_farfield_points_or_surface_cells, symmetry_factor, steps, *,
                       pml_thickness_m=0.0, rate=None):
    """Cells, memory, time steps and stepping time of one Meep run.

    Parameters
    ----------
    cell_size_xyz_m : sequence of float
        Computational cell size (x, y, z) in metres, PML included (z ignored for dims = 2).
    resolution_cells_per_m : float
        Grid cells per metre.
    dims : {2, 3}
    n_frequencies : int
        Frequencies on the near-to-far box (DFT).
    n_farfield_points_or_surface_cells : int
        Grid cells on the near-to-far surface (all faces); 0 if none.
    symmetry_factor : float
        1 without mirror planes, 2 per mirror plane (4 for TE10's two).
    steps : int
        Time steps (see :func:`courant_timesteps`).
    pml_thickness_m : float or sequence of (float, float)
        PML thickness, m (inside ``cell_size_xyz_m``): one value for every side, or a
        (low side, high side) pair per axis.
    rate : float, optional
        Interior 3D cell-steps per second; default :func:`stepping_rate`.

    Returns
    -------
    ResourceEstimate
    """
    if dims not in (2, 3):
        raise ValueError(f"dims: expected 2 or 3, got {dims!r}")
    if not resolution_cells_per_m > 0:
        raise ValueError("resolution_cells_per_m: must be > 0")
    if not symmetry_factor >= 1:
        raise ValueError("symmetry_factor: must be >= 1")
    if n_frequencies < 0 or n_farfield_points_or_surface_cells < 0 or steps < 0:
        raise ValueError("n_frequencies, n_farfield_points_or_surface_cells, steps: must be >= 0")
    counts = _grid_counts(cell_size_xyz_m, resolution_cells_per_m, dims)
    if isinstance(pml_thickness_m, (int, float)):
        sides = [(float(pml_thickness_m),) * 2] * dims
    else:
        sides = [tuple(float(t) for t in pair) for pair in pml_thickness_m][:dims]
        if len(sides) != dims or any(len(pair) != 2 for pair in sides):
            raise ValueError(f"pml_thickness_m: need one value or {dims} (low, high) pairs")
    if any(t < 0 for pair in sides for t in pair):
        raise ValueError("pml_thickness_m: must be >= 0")
    inner = [max(0, n - sum(int(round(t * resolution_cells_per_m)) for t in pair))
             for n, pair in zip(counts, sides)]
    total = math.prod(counts)
    pml = total - math.prod(inner)
    cells = int(math.ceil(total / symmetry_factor))
    pml_cells = int(math.ceil(pml / symmetry_factor))
    surface = n_farfield_points_or_surface_cells / symmetry_factor
    memory = (BASE_MEMORY_BYTES + MEMORY_PER_CELL[dims] * cells
              + MEMORY_PER_PML_CELL[dims] * pml_cells
              + MEMORY_PER_SURFACE_CELL_FREQUENCY[dims] * surface * n_frequencies)
    rate = stepping_rate() if rate is None else rate
    work = steps * (cells + PML_TIME_WEIGHT[dims] * pml_cells) * TIME_FRACTION_OF_3D[dims]
    return ResourceEstimate(cells=cells, memory_bytes=float(memory), timesteps=int(steps),
                            seconds=float(work / rate), pml_cells=pml_cells)


def estimate_for_layout(layout, n_frequencies, use_symmetry=True, steps=0, rate=None):
    """:func:`estimate_resources` for a ``sim.layout.Layout`` (duck-typed).

    Reads ``dims``, ``unit_length`` (m per Meep unit), ``resolution`` (cells per Meep unit),
    ``cell_size_m``, ``pml``, ``pml_back`` (behind the feed, low z), ``box_half`` and
    ``box_z`` (the closed near-to-far box, Meep units). The near-to-far box and the flux box
    on the same surface each store tangential DFT fields, so the surface counts twice.
    Time: the empty-cell figure × :data:`MODEL_TIME_FACTOR` + :data:`PER_STEP_OVERHEAD_SECONDS`
    per step.
    Mirror planes: two in 3D, one in 2D (TE10 symmetry), when ``use_symmetry``.
    """
    unit = layout.unit_length
    resolution = layout.resolution / unit
    dims = layout.dims
    sides = [2 * h * unit for h in layout.box_half] + [(layout.box_z[1] - layout.box_z[0]) * unit]
    if dims == 3:
        area = 2 * (sides[0] * sides[1] + sides[0] * sides[2] + sides[1] * sides[2])
        surface = 2 * area * resolution**2
    else:
        surface = 2 * 2 * (sides[0] + sides[1]) * resolution
    pml = layout.pml * unit
    pml_sides = [(pml, pml)] * (dims - 1) + [(getattr(layout, "pml_back", layout.pml) * unit, pml)]
    symmetry = (4 if dims == 3 else 2) if use_symmetry else 1
    empty = estimate_resources(layout.cell_size_m, resolution, dims, n_frequencies, int(surface),
                               symmetry, steps, pml_thickness_m=pml_sides, rate=rate)
    seconds = empty.seconds * MODEL_TIME_FACTOR + steps * PER_STEP_OVERHEAD_SECONDS
    return dataclasses.replace(empty, seconds=seconds)


def far_field_frequency_cost(layout, n_frequencies, use_symmetry=True, available=None):
    """What one more far-field (gain) frequency costs, and how many would fit in memory.

    Each band frequency stores tangential DFT fields on the whole near-to-far and flux box
    (the ``c`` term of the model); the dense S11 band does not (it lives on one plane of the
    feed guide). Returns (bytes per extra frequency, largest number of far-field frequencies
    whose peak memory fits in ``available`` bytes, or None when ``available`` is unknown).
    """
    base = estimate_for_layout(layout, n_frequencies, use_symmetry)
    step = estimate_for_layout(layout, n_frequencies + 1, use_symmetry).memory_bytes - base.memory_bytes
    if available is None or step <= 0:
        return step, None
    spare = available - base.peak_memory_bytes
    return step, int(max(0, n_frequencies + spare // step))


def available_memory_bytes(meminfo="/proc/meminfo"):
    """``MemAvailable`` from /proc/meminfo in bytes (Linux kernel ≥ 3.14), or None."""
    try:
        with open(meminfo) as handle:
            for line in handle:
                if line.startswith("MemAvailable:"):
                    value, unit = line.split()[1:3]
                    return int(value) * {"kB": 1024}.get(unit, 1)
    except OSError:
        return None
    return None


def check_fits(estimate, force=False, *, available=None):
    """Raise ``RunError`` if the run's peak memory (stepping + post-processing) exceeds what
    is available (unless ``force``).

    Parameters
    ----------
    estimate : ResourceEstimate
    force : bool
        Run anyway.
    available : float, optional
        Bytes available; default ``MemAvailable`` from /proc/meminfo (unknown: no check).

    Returns
    -------
    float or None
        The available bytes used for the decision.
    """
    available = available_memory_bytes() if available is None else available
    if available is None or force:
        return available
    if estimate.peak_memory_bytes > available:
        raise RunError(f"needs {estimate.peak_memory_bytes / 2**30:.1f} GiB, "
                       f"{available / 2**30:.1f} GiB available; use --force to run anyway")
    return available


# --- stepping rate of this machine ------------------------------------------------------------
def measure_stepping_rate(size=3.0, resolution=16, pml=0.5, until=3.0):
    """Time a tiny empty 3D Meep run and return interior cell-steps per CPU second.

    The PML cells are weighted as in :func:`estimate_resources`, so the result is comparable
    with :data:`DEFAULT_STEPPING_RATE`. Meep units (lengths in arbitrary units).
    """
    import meep as mp

    mp.verbosity(0)
    simulation = mp.Simulation(
        cell_size=mp.Vector3(size, size, size), resolution=resolution,
        boundary_layers=[mp.PML(pml)],
        sources=[mp.Source(mp.GaussianSource(1.0, fwidth=0.5), component=mp.Ey,
                           center=mp.Vector3())])
    simulation.run(until=1.0 / resolution)  # allocate the fields before timing
    # CPU time, not wall time: on a shared machine the wall clock also counts other people's
    # jobs; serial Meep (Debian's build has no OpenMP) uses one core, so CPU ≈ idle wall time
    start_time, start = simulation.meep_time(), time.process_time()
    simulation.run(until=until)
    wall = time.process_time() - start
    steps = round((simulation.meep_time() - start_time) / simulation.fields.dt)
    n = int(round(size * resolution))
    inner = max(0, n - 2 * int(round(pml * resolution)))
    cells, pml_cells = n**3, n**3 - inner**3
    simulation.reset_meep()
    return steps * (cells + PML_TIME_WEIGHT[3] * pml_cells) / wall


def stepping_rate(cache_file=None, measure=False):
    """Interior 3D cell-steps per second on this machine.

    Read from the cache (``~/.cache/hornproof/stepping_rate.json``); with ``measure=True``
    and no cache, measure once (about a second) and store it atomically. Otherwise fall back
    to :data:`DEFAULT_STEPPING_RATE` (the build machine's rate).
    """
    cache_file = cache_file or CACHE_FILE
    try:
        with open(cache_file) as handle:
            rate = float(json.load(handle)["cell_steps_per_second"])
        if rate > 0 and math.isfinite(rate):
            return rate
    except (OSError, ValueError, KeyError, TypeError):
        pass
    if not measure:
        return DEFAULT_STEPPING_RATE
    rate = measure_stepping_rate()
    try:
        os.makedirs(os.path.dirname(cache_file), exist_ok=True)
        write_text_atomic(cache_file, json.dumps({
            "cell_steps_per_second": rate,
            "measured": time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime()),
            "what": "interior 3D cell-steps per second of an empty Meep cell with PML"}) + "\n")
    except OSError:
        pass
    return rate
