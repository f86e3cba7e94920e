"""The point pool: verified cache, resume after a kill, failed points, process groups.

These are checks of hornproof's own contract (its module docstring): a cached point is used only
when its schema, definition hash, figures hash and shape all match; anything else is recomputed
and the log says so. The solver is replaced by a fake ``runner`` (figures computed from the
horn's aperture, so a wrong reuse would show) to keep the tests fast; the real solver's figures
are covered by tests/compare/jobs/test_sweep.py.
"""

import json
import math
import os
import subprocess
import sys
import textwrap
from pathlib import Path

import numpy as np
import pytest

from hornproof.analytic.geometry import HornGeometry
from hornproof.compare.case.casefile import load_case
from hornproof.compare.jobs.point_pool import (POINT_KEY_LENGTH, POINT_SCHEMA, PointTask, every_point_failed,
                                               read_point, run_points)
from hornproof.errors import RunError
from hornproof.hashing import content_sha256
from hornproof.sim.settings import FdtdSettings

ROOT = Path(__file__).resolve().parents[3]
FREQUENCIES = np.array([9.5e9, 10e9])
LADDER = [12.0, 16.0]
SETTINGS = FdtdSettings(dims=3)


def horn(aperture_mm):
    return HornGeometry("h-sectoral", 22.86e-3, 10.16e-3, aperture_mm * 1e-3, 10.16e-3, 60e-3, 1e-3)


class FakeSolver:
    """Counts calls; directivity = aperture in mm / 10 (so each horn has its own figures)."""

    def __init__(self, fail=()):
        self.calls = []
        self.fail = set(fail)

    def __call__(self, horn, frequencies, settings, ladder, force):
        aperture_mm = round(horn.aperture_a * 1e3, 6)
        self.calls.append(aperture_mm)
        if aperture_mm in self.fail:
            raise RunError(f"the FDTD run diverged (fake, A = {aperture_mm} mm)")
        value = aperture_mm / 10
        return {"directivity": [value] * len(frequencies), "uncertainty": [0.1] * len(frequencies),
                "directivity_per_grid": [[value] * len(frequencies) for _ in ladder],
                "cells_per_wavelength": list(ladder), "seconds": [1.0] * len(ladder)}


def run(tmp_path, apertures, solver, log=None):
    tasks = [PointTask(horn(a), f"A = {a} mm", {"aperture_a_mm": a}, cost=a) for a in apertures]
    return run_points(tasks, frequencies=FREQUENCIES, settings=SETTINGS, ladder=LADDER,
                      points_dir=tmp_path / "points", log=log or (lambda m: None), runner=solver)


def test_finished_points_are_reused(tmp_path):
    first = FakeSolver()
    outcomes = run(tmp_path, [40, 60, 80], first)
    assert [o.status for o in outcomes] == ["computed"] * 3
    assert sorted(first.calls) == [40, 60, 80]
    assert first.calls == [80, 60, 40]  # most expensive first
    second = FakeSolver()
    again = run(tmp_path, [40, 60, 80], second)
    assert second.calls == []
    assert [o.status for o in again] == ["cached"] * 3
    assert [o.figures["directivity"][0] for o in again] == [4.0, 6.0, 8.0]
    written = json.loads(next((tmp_path / "points").glob("*.json")).read_text())
    assert written["schema"] == POINT_SCHEMA and len(written["definition_sha256"]) == 64
    assert written["figures_sha256"] == content_sha256(written["figures"])


def _only_file(tmp_path):
    (path,) = list((tmp_path / "points").glob("*.json"))
    return path


def _edit_value(path):
    document = json.loads(path.read_text())
    document["figures"]["directivity"][0] += 5.0  # a hand edit of +5 dB
    path.write_text(json.dumps(document))


def _wrong_length(path):
    document = json.loads(path.read_text())
    document["figures"]["directivity"] = document["figures"]["directivity"][:1]
    document["figures_sha256"] = content_sha256(document["figures"])  # even with a matching hash
    path.write_text(json.dumps(document))


def _not_finite(path):
    text = path.read_text().replace('"uncertainty": [\n   0.1', '"uncertainty": [\n   "abc"', 1)
    path.write_text(text)


def _other_schema(path):
    document = json.loads(path.read_text())
    document["schema"] = "hornproof.point/99"
    path.write_text(json.dumps(document))


def _other_definition(path):
    document = json.loads(path.read_text())
    document["definition_sha256"] = "0" * 64
    path.write_text(json.dumps(document))


@pytest.mark.parametrize("spoil, said", [
    (_edit_value, "figures_sha256"),
    (_wrong_length, "figures.directivity: expected 2 values"),
    (_not_finite, "figures.uncertainty"),
    (_other_schema, "hornproof.point/99"),
    (_other_definition, "definition_sha256"),
    (lambda p: p.write_text("{}"), "schema"),
    (lambda p: p.write_text("[]"), "expected a JSON object"),
    (lambda p: p.write_text('"abc"'), "expected a JSON object"),
    (lambda p: p.write_bytes(os.urandom(64)), "not readable JSON"),
    (lambda p: p.write_text(""), "not readable JSON"),
    (lambda p: p.write_text('{"schema": "hornproof.point/1", "definition_sha256": 3, "figures": NaN}'),
     "definition_sha256"),
])
def test_a_spoiled_cache_file_is_recomputed_and_said_so(tmp_path, spoil, said):
    run(tmp_path, [60], FakeSolver())
    spoil(_only_file(tmp_path))
    messages, solver = [], FakeSolver()
    (outcome,) = run(tmp_path, [60], solver, log=messages.append)
    assert solver.calls == [60] and outcome.status == "computed"
    assert outcome.figures["directivity"] == [6.0, 6.0]
    assert any("not used" in m and said in m and "recomputing" in m for m in messages), messages
    # and the recomputed file is good again
    (again,) = run(tmp_path, [60], FakeSolver())
    assert again.status == "cached"


def test_read_point_without_a_file_is_no_problem(tmp_path):
    assert read_point(tmp_path / "missing.json", "0" * 64, 1, 1) == (None, None)


def test_a_failed_point_is_reported_and_the_others_finish(tmp_path):
    solver = FakeSolver(fail={60})
    messages = []
    outcomes = run(tmp_path, [40, 60, 80], solver, log=messages.append)
    assert [o.status for o in outcomes] == ["computed", "failed", "computed"]
    assert "diverged" in outcomes[1].reason and "\n" not in outcomes[1].reason
    assert outcomes[1].figures is None
    assert not every_point_failed(outcomes)
    assert any("failed" in m and "A = 60 mm" in m for m in messages)
    assert len(list((tmp_path / "points").glob("*.json"))) == 2  # a failure is not cached
    retry = FakeSolver()
    again = run(tmp_path, [40, 60, 80], retry)
    assert retry.calls == [60] and [o.status for o in again] == ["cached", "computed", "cached"]


def test_a_bug_in_the_solver_is_a_failed_point_not_a_crash(tmp_path):
    def broken(horn, frequencies, settings, ladder, force):
        raise ZeroDivisionError("division by zero")

    outcomes = run(tmp_path, [40, 60], broken)
    assert all(o.status == "failed" and o.reason.startswith("ZeroDivisionError") for o in outcomes)
    assert every_point_failed(outcomes)


def test_resume_after_a_kill_recomputes_only_the_unfinished(tmp_path):
    class Killed(BaseException):
        pass

    class KilledAfterTwo(FakeSolver):
        def __call__(self, *args):
            if len(self.calls) == 2:
                raise Killed()  # like SIGTERM: not an Exception, so the pool does not catch it
            return super().__call__(*args)

    first = KilledAfterTwo()
    with pytest.raises(Killed):
        run(tmp_path, [40, 50, 60, 70], first)
    files = list((tmp_path / "points").iterdir())
    assert len(files) == 2 and all(f.suffix == ".json" and not f.name.startswith(".") for f in files)
    second = FakeSolver()
    outcomes = run(tmp_path, [40, 50, 60, 70], second)
    assert sorted(second.calls) == [40, 50]  # the two cheapest were not reached
    assert [o.status for o in outcomes] == ["computed", "computed", "cached", "cached"]


def test_cache_file_name_is_the_point_key(tmp_path):
    run(tmp_path, [60], FakeSolver())
    path = _only_file(tmp_path)
    assert len(path.stem) == POINT_KEY_LENGTH
    assert json.loads(path.read_text())["definition_sha256"].startswith(path.stem)


POOL_SCRIPT = """\
import json, sys
import numpy as np
from hornproof.sim import mpi
from hornproof.analytic.geometry import HornGeometry
from hornproof.compare.case.casefile import load_case
from hornproof.compare.jobs.point_pool import PointTask, run_points
from hornproof.sim.settings import FdtdSettings

def fake(horn, frequencies, settings, ladder, force):
    if round(horn.aperture_a * 1e3) == 70:
        raise ValueError("fake failure")
    return {{"directivity": [horn.aperture_a * 100], "uncertainty": [None], "directivity_per_grid": [[1.0]],
            "cells_per_wavelength": [12.0], "rank": mpi.rank()}}

tasks = [PointTask(HornGeometry("h-sectoral", 22.86e-3, 10.16e-3, a * 1e-3, 10.16e-3, 60e-3, 1e-3), str(a), cost=a)
         for a in (40, 50, 60, 70)]
outcomes = run_points(tasks, frequencies=[10e9], settings=FdtdSettings(dims=3), ladder=[12.0],
                      points_dir=sys.argv[1], runner=fake, log=lambda m: None)
with open(f"{{sys.argv[2]}}.{{mpi.rank()}}", "w") as handle:  # Meep silences the stdout of ranks > 0
    json.dump({{"rank": mpi.rank(), "status": [o.status for o in outcomes],
               "ranks": [o.figures and o.figures.get("rank") for o in outcomes]}}, handle)
"""


@pytest.mark.fullwave  # starts MPI and Meep (a few seconds), no FDTD run
def test_points_are_spread_over_process_groups_under_mpirun(tmp_path):
    from hornproof.sim.mpi import launch_environment, mpirun_command

    script = tmp_path / "pool.py"
    script.write_text(textwrap.dedent(POOL_SCRIPT.format()))
    command = mpirun_command(2, [sys.executable, str(script), str(tmp_path / "points"), str(tmp_path / "out")])
    done = subprocess.run(command, capture_output=True, text=True, timeout=180, cwd=ROOT, env=launch_environment())
    assert done.returncode == 0, done.stderr[-2000:]
    lines = [json.loads(path.read_text()) for path in sorted(tmp_path.glob("out.*"))]
    assert sorted(line["rank"] for line in lines) == [0, 1]
    for line in lines:  # every rank gets every outcome
        assert line["status"] == ["computed", "computed", "computed", "failed"]
    ranks = lines[0]["ranks"]
    assert set(ranks[:3]) == {0, 1}, ranks  # both groups ran points
    assert len(list((tmp_path / "points").glob("*.json"))) == 3


def test_a_sweep_lists_a_failed_point_and_goes_on(tmp_path, monkeypatch):
    # the sweep's FDTD points go through the pool: a failing point is listed with its reason,
    # its FDTD figure is missing (NaN -> null) and the other points are kept
    from hornproof.compare.cli.sweep import format_sweep
    from hornproof.compare.jobs import sweep

    case_file = tmp_path / "sweep.toml"
    case_file.write_text((ROOT / "cases" / "sweep-h-flare.toml").read_text().replace(
        "values = [10, 15, 20, 25, 30, 35, 40, 45, 50, 55]", "values = [10, 20, 30]"))
    case = load_case(case_file)

    def fake(pcase, force):  # a sweep point is a whole case (jobs/sweep_point.py)
        if round(math.degrees(pcase.horn.flare_half_angle_h)) == 20:
            raise RunError("the FDTD run diverged (fake)")
        return {"directivity": [10.0], "uncertainty": [0.1], "confident_uncertainty": [0.1],
                "disagreement_bound": [0.1], "ladder": ["monotone"], "uncertainty_reason": ["fake"],
                "cells_per_wavelength": [20.0, 28.0, 40.0], "seconds": [1.0] * 3}

    monkeypatch.setattr(sweep, "point_figures", fake)
    doc = sweep.run_sweep(case, tmp_path / "out", log=lambda m: None)
    assert doc["models"]["fdtd"] == [10.0, None, 10.0]
    assert doc["failed_points"] == [{"value": 20.0, "dims": 2, "reason": "the FDTD run diverged (fake)"}]
    assert "FDTD failed at 20 deg (2D): the FDTD run diverged (fake)" in format_sweep(doc)

    def broken(pcase, force):
        raise RunError("out of memory (fake)")

    monkeypatch.setattr(sweep, "point_figures", broken)
    with pytest.raises(RunError, match="every FDTD point of the sweep failed"):
        sweep.run_sweep(case, tmp_path / "out2", log=lambda m: None)
    assert (tmp_path / "out2" / "sweep.json").is_file()  # written before the exit status 3


@pytest.mark.fullwave
def test_a_pool_point_equals_verify_of_the_same_horn(tmp_path):
    # hornproof's contract: a sweep or map point is the same computation as verify of that horn
    # on the same ladder — same directivity, same uncertainty (ladder GCI, power balance and
    # grid-fit residual, root-sum-square) — so sweep/map figures can be checked with verify
    from hornproof.compare.jobs.point_pool import run_point
    from hornproof.compare.jobs.verify import verify_case

    case_file = tmp_path / "one.toml"
    case_file.write_text("# Invented scenario for a test.\nformat = 1\ntitle = \"one horn\"\n[horn]\n"
                         "type = \"h-sectoral\"\nwaveguide = \"WR-90\"\naperture_a_mm = 60.0\nflare_length_mm = 60.0\n"
                         "[band]\nf_min_ghz = 10.0\nf_max_ghz = 10.0\npoints = 1\n[fdtd]\ndims = 2\n"
                         "cells_per_wavelength = [10, 13, 17]\n[checks]\ndirectivity_db = 0.5\n")
    case = load_case(case_file)
    summary = verify_case(case, tmp_path / "verify", progress=None)
    point = run_point(case.horn, case.frequencies, case.fdtd, list(case.fdtd.cells_per_wavelength), False)
    fdtd = summary["models"]["fdtd"]
    assert point["directivity"] == pytest.approx(fdtd["directivity_2d_db"], abs=1e-12)
    assert point["uncertainty"] == pytest.approx(fdtd["uncertainty"]["directivity_2d_db"], abs=1e-9)


def test_a_point_with_its_own_definition_and_run(tmp_path):
    # a caller whose point is a whole case hands the pool its own definition and run
    runs = []

    def run_case(force):
        runs.append(force)
        return {"directivity": [12.5], "uncertainty": [None], "ladder": ["monotone"]}

    def tasks(value):
        return [PointTask(horn(60), "own point", definition={"case": "x", "value": value}, run=run_case, rungs=None)]

    common = dict(frequencies=[10e9], settings=SETTINGS, ladder=LADDER, points_dir=tmp_path / "points",
                  log=lambda m: None, runner=FakeSolver())
    (first,) = run_points(tasks(1), **common)
    assert first.status == "computed" and first.figures["directivity"] == [12.5] and runs == [False]
    (again,) = run_points(tasks(1), **common)
    assert again.status == "cached" and runs == [False]
    (other,) = run_points(tasks(2), **common)  # another definition: another point
    assert other.status == "computed" and runs == [False, False]
    path = next(p for p in (tmp_path / "points").glob("*.json")
                if json.loads(p.read_text())["definition_sha256"] == content_sha256({"case": "x", "value": 1}))
    document = json.loads(path.read_text())
    document["figures"]["directivity"] = [99.0]
    path.write_text(json.dumps(document))
    messages = []
    (edited,) = run_points(tasks(1), **dict(common, log=messages.append))
    assert edited.status == "computed" and any("figures_sha256" in m for m in messages)
