"""Resource estimate: grid counts and time steps against Meep itself, memory against a
fresh Meep process's peak RSS, MemAvailable against the kernel's own totals."""

import json
import math
import os
import subprocess
import sys

import pytest

from hornproof.errors import RunError
from hornproof.sim.estimate import (
    DEFAULT_STEPPING_RATE,
    ResourceEstimate,
    available_memory_bytes,
    check_fits,
    courant_timesteps,
    estimate_resources,
    stepping_rate,
)
from hornproof.units import SPEED_OF_LIGHT


def test_cells_and_pml_cells_by_hand():
    # 0.1 × 0.06 × 0.08 m at 250 cells/m: 25 × 15 × 20 cells; PML 0.008 m = 2 cells a side
    # leaves 21 × 11 × 16 inside (arithmetic)
    estimate = estimate_resources((0.1, 0.06, 0.08), 250.0, 3, 0, 0, 1, 0,
                                  pml_thickness_m=0.008)
    assert estimate.cells == 25 * 15 * 20
    assert estimate.pml_cells == 25 * 15 * 20 - 21 * 11 * 16
    two_mirrors = estimate_resources((0.1, 0.06, 0.08), 250.0, 3, 0, 0, 4, 0)
    assert two_mirrors.cells == math.ceil(25 * 15 * 20 / 4)
    flat = estimate_resources((0.1, 0.06, 123.0), 250.0, 2, 0, 0, 1, 0)
    assert flat.cells == 25 * 15  # z ignored in 2D


@pytest.mark.parametrize("bad", [dict(dims=1), dict(resolution_cells_per_m=0),
                                 dict(symmetry_factor=0.5), dict(cell_size_xyz_m=(0.1, -1, 1))])
def test_bad_arguments_name_the_parameter(bad):
    arguments = dict(cell_size_xyz_m=(0.1, 0.1, 0.1), resolution_cells_per_m=100, dims=3,
                     n_frequencies=1, n_farfield_points_or_surface_cells=0, symmetry_factor=1,
                     steps=10)
    arguments.update(bad)
    with pytest.raises(ValueError, match=next(iter(bad))):
        estimate_resources(**arguments)


def test_courant_step_by_hand():
    # dt = S·Δx/c (Courant condition, S = 0.5 is Meep's default): Δx = 1 mm → dt = 1.668 ps;
    # 1 ns of simulated time is 599.6 → 600 steps
    assert courant_timesteps(1e-9, 1000.0) == math.ceil(1e-9 / (0.5 * 1e-3 / SPEED_OF_LIGHT))
    assert courant_timesteps(1e-9, 1000.0) == 600


def test_check_fits_refuses_too_big_unless_forced():
    estimate = ResourceEstimate(cells=10, memory_bytes=30 * 2**30 - 2**20, timesteps=1,
                                seconds=1.0, post_processing_bytes=2**20)
    with pytest.raises(RunError, match=r"needs 30\.0 GiB, 2\.0 GiB available; use --force"):
        check_fits(estimate, available=2 * 2**30)
    assert RunError.exit_code == 3  # the command-line contract: 3 = the run failed
    assert check_fits(estimate, force=True, available=2 * 2**30) == 2 * 2**30
    assert check_fits(estimate, available=64 * 2**30) == 64 * 2**30
    # the decision uses the peak (stepping + post-processing), not the stepping part alone
    with pytest.raises(RunError):
        check_fits(estimate, available=30 * 2**30 - 2**19)


@pytest.mark.skipif(not os.path.exists("/proc/meminfo"), reason="Linux only")
def test_mem_available_is_within_physical_memory():
    # Linux proc(5): MemAvailable is an estimate of memory available without swapping, so it
    # lies between 0 and the physical memory (sysconf _SC_PHYS_PAGES · _SC_PAGE_SIZE).
    available = available_memory_bytes()
    physical = os.sysconf("SC_PHYS_PAGES") * os.sysconf("SC_PAGE_SIZE")
    assert 0 < available <= physical


def test_meminfo_parsing(tmp_path):
    # proc(5) format: "MemAvailable:   12345 kB" (kB means KiB there)
    meminfo = tmp_path / "meminfo"
    meminfo.write_text("MemTotal:  100 kB\nMemFree: 10 kB\nMemAvailable:   2048 kB\n")
    assert available_memory_bytes(str(meminfo)) == 2048 * 1024
    assert available_memory_bytes(str(tmp_path / "absent")) is None


def test_stepping_rate_cache(tmp_path):
    cache = tmp_path / "rate.json"
    assert stepping_rate(str(cache)) == DEFAULT_STEPPING_RATE
    cache.write_text("{corrupt")
    assert stepping_rate(str(cache)) == DEFAULT_STEPPING_RATE
    cache.write_text(json.dumps({"cell_steps_per_second": 1.5e7}))
    assert stepping_rate(str(cache)) == 1.5e7


# --- against Meep -------------------------------------------------------------------------------
PROBE = r"""
import json, resource, sys, time
import meep as mp
mp.verbosity(0)
size, res, pml, nf, until = json.loads(sys.argv[1])
sim = mp.Simulation(cell_size=mp.Vector3(*size), resolution=res, boundary_layers=[mp.PML(pml)],
                    sources=[mp.Source(mp.GaussianSource(1.0, fwidth=0.5), component=mp.Ey,
                                       center=mp.Vector3())])
sim.init_sim()
h = [s - 2 * pml - 0.2 for s in size]
surface = 0
if nf:
    regions = []
    for axis in range(3):
        for sign in (1, -1):
            c = [0, 0, 0]; c[axis] = sign * h[axis] / 2
            sz = list(h); sz[axis] = 0
            regions.append(mp.Near2FarRegion(center=mp.Vector3(*c), size=mp.Vector3(*sz), weight=sign))
            face = [round(x * res) for i, x in enumerate(h) if i != axis]
            surface += face[0] * face[1]
    sim.add_near2far(1.0, 0.4, nf, *regions)
sim.run(until=until)
def peak_rss():
    # VmHWM: the peak resident set of this process image. Not ru_maxrss: Linux carries the
    # high-water mark of the forked parent's image across exec into it, so a probe started from a
    # big test process (a full suite run here: 284 MB) reported the parent's size, not its own
    for line in open("/proc/self/status"):
        if line.startswith("VmHWM:"):
            return int(line.split()[1]) * 1024
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024
gv = sim.fields.gv
print(json.dumps({"grid": [gv.nx(), gv.ny(), gv.nz()], "dt": sim.fields.dt,
                  "steps": round(sim.meep_time() / sim.fields.dt), "surface": surface,
                  "rss": peak_rss()}))
"""


def _probe(size, res, pml, nf, until):
    # a plain serial Meep process, without the MPI launcher variables an earlier test may have
    # left in this process's environment
    env = {k: v for k, v in os.environ.items() if not k.startswith(("OMPI_", "PMIX_", "PMI_", "HYDRA_"))}
    env.update(OMPI_ALLOW_RUN_AS_ROOT="1", OMPI_ALLOW_RUN_AS_ROOT_CONFIRM="1")
    out = subprocess.run([sys.executable, "-c", PROBE, json.dumps([size, res, pml, nf, until])],
                         capture_output=True, text=True, timeout=120, check=True, env=env).stdout
    # Meep prints "Elapsed run time" at exit even at verbosity 0: take our JSON line
    return json.loads(next(line for line in out.splitlines() if line.startswith("{")))


@pytest.mark.fullwave
def test_grid_and_steps_match_meep():
    # Meep units: length unit 1 m here, so resolution is cells per metre and time unit 1 m/c
    size, res = (1.3, 0.9, 1.1), 20
    measured = _probe(size, res, 0.2, 0, 2.0)
    estimate = estimate_resources(size, res, 3, 0, 0, 1, 0, pml_thickness_m=0.2)
    assert estimate.cells == math.prod(measured["grid"])
    # Meep: dt = Courant / resolution with Courant 0.5 (Meep's documented default)
    assert measured["dt"] == pytest.approx(0.5 / res, rel=1e-12)
    assert courant_timesteps(2.0 / SPEED_OF_LIGHT, res) == measured["steps"]


@pytest.mark.fullwave
def test_memory_estimate_against_meep_peak_rss():
    # A cell shape and size not among the calibration runs, with PML and a near-to-far box.
    # Tolerance 30 %: the calibration fit's worst residual was 7 %; page-allocation noise and
    # library versions add more. (Full-suite runs once measured 25–70 % above the estimate: the
    # probe read ru_maxrss, which Linux carries over from the forked test process; it now reads
    # its own VmHWM, 176 MB against 167 MB estimated, whatever the parent's size.)
    size, res, pml, nf = (3.4, 2.6, 3.0), 24, 0.5, 20
    measured = _probe(size, res, pml, nf, 0.2)
    estimate = estimate_resources(size, res, 3, nf, measured["surface"], 1, 0,
                                  pml_thickness_m=pml)
    assert estimate.memory_bytes == pytest.approx(measured["rss"], rel=0.30)


def test_pml_per_side_by_hand():
    # 20 × 20 × 40 cells at 100 cells/m; PML 0.02 m (2 cells) on x and y both sides, and on z
    # 0.04 m (4 cells) low + 0.02 m (2 cells) high: inside 16 × 16 × 34 (arithmetic)
    estimate = estimate_resources((0.2, 0.2, 0.4), 100.0, 3, 0, 0, 1, 0,
                                  pml_thickness_m=[(0.02, 0.02), (0.02, 0.02), (0.04, 0.02)])
    assert estimate.pml_cells == 20 * 20 * 40 - 16 * 16 * 34
    with pytest.raises(ValueError, match="pml_thickness_m"):
        estimate_resources((0.2, 0.2, 0.4), 100.0, 3, 0, 0, 1, 0, pml_thickness_m=[(0.1, 0.1)])


@pytest.mark.fullwave
def test_layout_estimate_counts_the_cells_meep_builds():
    # the physics side's layout of a small invented WR-90 horn; Meep's own grid is the reference
    layout_module = pytest.importorskip("hornproof.sim.layout")
    import numpy as np

    from hornproof.analytic.geometry import HornGeometry
    from hornproof.sim.estimate import estimate_for_layout
    from hornproof.sim.settings import FdtdSettings

    horn = HornGeometry("h-sectoral", 22.86e-3, 10.16e-3, 45e-3, 10.16e-3, 40e-3, 1e-3)
    layout = layout_module.plan_layout(horn, np.array([10e9]), FdtdSettings(), 8.0)
    script = ("import json, sys, meep as mp\nmp.verbosity(0)\n"
              "size, res = json.loads(sys.argv[1])\n"
              "s = mp.Simulation(cell_size=mp.Vector3(*size), resolution=res)\ns.init_sim()\n"
              "g = s.fields.gv\nprint(json.dumps([g.nx(), g.ny(), g.nz()]))\n")
    out = subprocess.run([sys.executable, "-c", script,
                          json.dumps([list(layout.cell_size), layout.resolution])],
                         capture_output=True, text=True, timeout=120, check=True).stdout
    grid = json.loads(next(line for line in out.splitlines() if line.startswith("[")))
    assert estimate_for_layout(layout, 1, use_symmetry=False).cells == math.prod(grid)


@pytest.mark.fullwave
def test_stepping_rate_measured_once_and_cached(tmp_path):
    cache = tmp_path / "hornproof" / "rate.json"
    rate = stepping_rate(str(cache), measure=True)
    # plausibility band for one CPU core (common practice: 1e6–1e9 cell updates per second
    # for a 3D FDTD code; this machine's default is 1.1e8)
    assert 1e6 < rate < 1e9
    stored = json.loads(cache.read_text())
    assert stored["cell_steps_per_second"] == rate
    assert stepping_rate(str(cache), measure=True) == rate  # read back, not measured again


def test_far_field_frequency_cost_is_the_surface_term_of_the_model():
    # the memory model's c term (module notes): one more frequency stores tangential DFT fields
    # on the near-to-far and flux surfaces, c × surface cells; "fits" counts down from the
    # available memory (arithmetic of the model itself, an internal check)
    import numpy as np

    from hornproof.analytic.geometry import HornGeometry
    from hornproof.sim.estimate import estimate_for_layout, far_field_frequency_cost
    from hornproof.sim.layout import plan_layout
    from hornproof.sim.settings import FdtdSettings

    horn = HornGeometry("pyramidal", 22.86e-3, 10.16e-3, 80e-3, 60e-3, 70e-3, 1e-3)  # invented test horn
    layout = plan_layout(horn, np.array([9.5e9, 10.5e9]), FdtdSettings(), 16.0)
    step, none = far_field_frequency_cost(layout, 3)
    assert none is None and step > 0
    five = estimate_for_layout(layout, 5).memory_bytes - estimate_for_layout(layout, 3).memory_bytes
    assert 2 * step == pytest.approx(five, rel=1e-9)
    base = estimate_for_layout(layout, 3).peak_memory_bytes
    _, fitting = far_field_frequency_cost(layout, 3, available=base + 10.5 * step)
    assert fitting == 13
