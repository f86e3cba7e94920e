"""regress runs a case's map in the full tier (hornproof's own contract, regress/map_runs.py):
after the verify run of the case, in the ``map/`` folder of the same result entry, as one job
inside the case's process group; never in the quick tier, never for a case without a map."""

from pathlib import Path

from hornproof.compare.case.casefile import load_case
from hornproof.compare.regress.map_runs import MAP_FOLDER, with_map
from hornproof.sim.mpi import SerialWorld

ROOT = Path(__file__).resolve().parents[3]


class Recorder:
    def __init__(self):
        self.calls = []

    def verify(self, case, out_dir, *, force, progress):
        self.calls.append(("verify", case.tier, Path(out_dir)))
        return {"schema": "hornproof.result/1"}

    def map(self, case, out_dir, *, force, world):
        self.calls.append(("map", case.tier, Path(out_dir), isinstance(world, SerialWorld), force))


def test_full_tier_runs_the_map_after_verify(tmp_path):
    recorder = Recorder()
    runner = with_map(recorder.verify, recorder.map)
    case = load_case(ROOT / "cases" / "map-h-flare.toml").for_tier("full")
    summary = runner(case, tmp_path / "entry", force=True, progress=None)
    assert summary == {"schema": "hornproof.result/1"}
    assert recorder.calls == [("verify", "full", tmp_path / "entry"),
                              ("map", "full", tmp_path / "entry" / MAP_FOLDER, True, True)]


def test_quick_tier_and_cases_without_a_map_run_verify_only(tmp_path):
    recorder = Recorder()
    runner = with_map(recorder.verify, recorder.map)
    runner(load_case(ROOT / "cases" / "map-h-flare.toml").for_tier("quick"), tmp_path, force=False, progress=None)
    runner(load_case(ROOT / "cases" / "sweep-h-flare.toml").for_tier("full"), tmp_path, force=False, progress=None)
    assert [call[0] for call in recorder.calls] == ["verify", "verify"]
