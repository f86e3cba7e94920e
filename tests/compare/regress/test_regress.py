"""hornproof regress: classification against baselines, exit codes, resume after a kill, MPI groups.

The runs use a fake runner (synthetic hornproof.result/1 summaries computed from the case, with
shifts and failures set through environment variables) and the real case-file loader. The
classification rule under test is hornproof's own decision (after the habit of the asv benchmark
tool): a change is a
regression only beyond the case's tolerance *and* beyond the combined numerical uncertainty
√(u_base² + u_new²); an edited case is "not comparable"; a failed run counts as a regression.
"""

import importlib.util
import json
import os
import re
import shutil
import signal
import subprocess
import sys
import time
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from hornproof import version
from hornproof.compare.case.casefile import load_case
from hornproof.compare.cli import main as cli
from hornproof.compare.regress import case_runs
from hornproof.compare.regress.classify import DEFAULT_TOLERANCES, classify_figure, tolerance_for
from hornproof.compare.regress.plan import estimate_case_cost, plan_process_groups

REPO = Path(__file__).resolve().parents[3]

CASE_TEMPLATE = """\
# Invented scenario for tests: an X-band H-plane sectoral horn.
format = 1
title = "test horn {name} (invented)"

[horn]
type = "h-sectoral"
waveguide = "WR-90"
aperture_a_mm = {aperture_a}
flare_length_mm = {flare}

[band]
f_min_ghz = 9.5
f_max_ghz = 10.5
points = 3

[fdtd]
dims = 2
cells_per_wavelength = [12, 16]

[checks]
directivity_db = 0.5
hpbw_deg = 2.0
"""

FAKE_RUNNER = '''\
"""Fake runner for hornproof regress tests: synthetic summaries, controlled by the environment."""
import json, math, os, sys, time
from pathlib import Path

from hornproof.errors import RunError


def meep_flux(case):
    """A tiny real Meep run (2D point source, flux through a line), sized by the case's aperture."""
    import meep as mp

    mp.verbosity(0)
    frequency = case.horn.aperture_a / 0.06  # 1.0 for a 60 mm aperture (Meep units)
    sources = [mp.Source(mp.GaussianSource(frequency, fwidth=0.5 * frequency), component=mp.Ez,
                         center=mp.Vector3())]
    sim = mp.Simulation(cell_size=mp.Vector3(2, 2), resolution=10, sources=sources,
                        boundary_layers=[mp.PML(0.4)])
    box = sim.add_flux(frequency, 0, 1, mp.FluxRegion(center=mp.Vector3(0.5, 0), size=mp.Vector3(0, 1)))
    sim.run(until=20)
    return float(mp.get_fluxes(box)[0])


def synthetic_result(case):
    frequencies = [float(f) / 1e9 for f in case.frequencies]
    shifts = json.loads(os.environ.get("FAKE_SHIFT", "{}"))
    flux = meep_flux(case) if os.environ.get("FAKE_MEEP") else 0.0
    u = float(os.environ.get("FAKE_UNCERTAINTY", "0.1"))
    wavelengths = [0.299792458 / f for f in frequencies]
    directivity = [10 * math.log10(4 * math.pi * case.horn.aperture_a * case.horn.aperture_b / w ** 2)
                   + shifts.get(case.name, 0.0) + flux for w in wavelengths]
    hpbw = [math.degrees(1.18 * w / case.horn.aperture_a) for w in wavelengths]
    key = "directivity_2d_db" if case.fdtd.dims == 2 else "directivity_dbi"
    return {"schema": "hornproof.result/1", "case": case.name, "case_sha256": case.sha256,
            "frequencies_ghz": frequencies,
            "models": {"fdtd": {key: directivity, "hpbw_h_deg": hpbw, "s11_db": [-20.0] * len(frequencies),
                                "uncertainty": {key: [u] * len(frequencies),
                                                "hpbw_h_deg": [0.2] * len(frequencies)}}},
            "solver": {"meep": "fake", "cells_per_wavelength": list(case.fdtd.cells_per_wavelength),
                       "seconds": 0.0}}


def runner(case, out_dir, *, force=False, progress=None):
    rank = os.environ.get("OMPI_COMM_WORLD_RANK", "serial")
    with open(os.environ["FAKE_LOG"], "a") as log:
        log.write(f"{case.name} {rank}\\n")
    if case.name in os.environ.get("FAKE_FAIL", "").split(","):
        raise RunError(f"{case.name}: diverged after 400 periods")
    if case.name == os.environ.get("FAKE_IDLE_SLOW"):
        time.sleep(float(os.environ.get("FAKE_SLEEP", "4")))  # slow without using the processor
    if case.name == os.environ.get("FAKE_SLOW"):
        # leave something that looks like a result in the run folder, then take long
        (Path(out_dir) / "result.json").write_text(json.dumps(synthetic_result(case)))
        time.sleep(float(os.environ.get("FAKE_SLEEP", "60")))
    result = synthetic_result(case)
    (Path(out_dir) / "result.json").write_text(json.dumps(result))
    (Path(out_dir) / "report.html").write_text("<html></html>")
    return result


if __name__ == "__main__":
    import resource
    from hornproof.compare.cli import main as cli
    from hornproof.compare.regress import case_runs
    case_runs.default_runner = lambda: runner
    code = cli.main(["regress"] + sys.argv[1:])
    usage = resource.getrusage(resource.RUSAGE_SELF)
    rank = os.environ.get("OMPI_COMM_WORLD_RANK", "serial")
    print(f"cpu-seconds rank {rank}: {usage.ru_utime + usage.ru_stime:.2f}", file=sys.stderr)
    sys.exit(code)
'''


# --- helpers -------------------------------------------------------------------------------------


@pytest.fixture
def workspace(tmp_path, monkeypatch):
    """A folder with cases/ (three horns), the fake runner, and the environment it reads."""
    cases = tmp_path / "cases"
    cases.mkdir()
    for name, aperture_a, flare in (("horn-a", 60.0, 80.0), ("horn-b", 70.0, 90.0), ("horn-c", 50.0, 70.0)):
        (cases / f"{name}.toml").write_text(CASE_TEMPLATE.format(name=name, aperture_a=aperture_a, flare=flare))
    driver = tmp_path / "fake_runner.py"
    driver.write_text(FAKE_RUNNER)
    spec = importlib.util.spec_from_file_location("fake_runner", driver)
    fake = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(fake)
    monkeypatch.chdir(tmp_path)
    monkeypatch.setenv("FAKE_LOG", str(tmp_path / "runs.log"))
    for name in ("FAKE_SHIFT", "FAKE_FAIL", "FAKE_SLOW", "FAKE_UNCERTAINTY", "FAKE_MEEP"):
        monkeypatch.delenv(name, raising=False)
    return {"root": tmp_path, "cases": cases, "driver": driver, "fake": fake, "log": tmp_path / "runs.log"}


def _main(argv, runner):
    """``hornproof regress ARGV`` in this process, cases run by ``runner``."""
    saved = case_runs.default_runner
    case_runs.default_runner = lambda: runner
    try:
        return cli.main(["regress", *argv])
    finally:
        case_runs.default_runner = saved


def _run(ws, *argv, capsys=None):
    code = _main(list(argv), ws["fake"].runner)
    out = capsys.readouterr() if capsys is not None else None
    return code, out


def _runs(ws):
    return ws["log"].read_text().split("\n")[:-1] if ws["log"].exists() else []


def _summary(ws):
    return json.loads((ws["root"] / "results" / "regress.json").read_text())


def _figure_status(ws, case, figure):
    for entry in _summary(ws)["cases"]:
        if entry["case"] == case:
            for f in entry["figures"]:
                if f["figure"] == figure:
                    return f["status"]
            return entry["status"]
    raise KeyError(case)


def _table(stdout):
    """The table block of the output: header line to the blank line after it."""
    lines = stdout.splitlines()
    start = next(i for i, line in enumerate(lines) if line.startswith("case "))
    end = lines.index("", start)
    return "\n".join(lines[start:end])


# --- the rule (pure functions) -----------------------------------------------------------------


FREQS = [9.0, 10.0, 11.0]


@pytest.mark.parametrize("shift, u, tolerance, expected", [
    (0.0, 0.1, 0.5, "unchanged"),
    (1e-12, 0.1, 0.5, "unchanged"),             # JSON round-trip size difference: equal
    (0.3, 0.1, 0.5, "within-noise"),            # inside the tolerance
    (0.6, 0.5, 0.5, "within-noise"),            # beyond tolerance 0.5 but within √2·0.5 = 0.707
    (0.6, 0.1, 0.5, "regressed"),               # beyond 0.5 and beyond √2·0.1 = 0.141
    (-0.6, 0.1, 0.5, "regressed"),              # a drop counts as well as a rise
    (0.3, 0.1, 0.2, "regressed"),               # beyond a tighter tolerance and beyond 0.141
    (0.3, None, 0.5, "within-noise"),           # no uncertainty given: tolerance alone decides
])
def test_classify_one_figure(shift, u, tolerance, expected):
    base = [15.0, 16.0, 17.0]
    new = [15.0, 16.0 + shift, 17.0]
    uncertainty = [u, u, u]
    verdict = classify_figure("directivity_dbi", base, uncertainty, new, uncertainty, FREQS, tolerance)
    assert verdict.status == expected
    if expected != "unchanged":
        assert verdict.at_frequency_ghz == 10.0
        assert (verdict.baseline_value, verdict.new_value) == (16.0, 16.0 + shift)
        assert verdict.max_change == pytest.approx(shift)
        assert verdict.noise == pytest.approx(2 ** 0.5 * (u or 0.0))


def test_classify_picks_the_regressed_frequency_not_the_largest_noisy_one():
    base = [10.0, 10.0, 10.0]
    new = [10.9, 10.6, 10.0]  # 0.9 within its large noise at 9 GHz; 0.6 beyond 0.5 and noise at 10 GHz
    verdict = classify_figure("sll_h_db", base, [1.0, 0.1, 0.1], new, [1.0, 0.1, 0.1], FREQS, 0.5)
    assert verdict.status == "regressed" and verdict.at_frequency_ghz == 10.0


def test_figure_that_became_undefined_regresses():
    verdict = classify_figure("sll_h_db", [-13.0, -13.0, None], [0.1] * 3, [-13.0, None, None], [0.1] * 3,
                              FREQS, 1.0)
    assert verdict.status == "regressed" and "undefined" in verdict.reason


def test_tolerance_from_checks_and_fallback():
    checks = {"directivity_db": 0.5, "hpbw_deg": 2.0, "hpbw_e_deg": 3.0}
    assert tolerance_for("directivity_2d_db", checks) == (0.5, "directivity_db")
    assert tolerance_for("realized_gain_dbi", checks) == (0.5, "directivity_db")
    assert tolerance_for("hpbw_h_deg", checks) == (2.0, "hpbw_deg")
    assert tolerance_for("hpbw_e_deg", checks) == (3.0, "hpbw_e_deg")
    assert tolerance_for("s11_db", checks) == (DEFAULT_TOLERANCES["s11_db"], "default:s11_db")


def test_plan_balances_cases_over_groups():
    every = lambda plan, n: sorted(i for group in plan for i in group) == list(range(n))  # noqa: E731
    plan = plan_process_groups([1.0, 1.0], 2)
    assert plan == [[0], [1]]                          # two equal cases: one rank each
    plan = plan_process_groups([10.0, 0.1], 2)
    assert plan == [[0, 1]]                            # one case of nearly all the work: both ranks on it
    # the shipped quick suite's estimated shape: one 3D case about 6x all five 2D cases together;
    # measured here, two 1-rank groups beat one 2-rank group for it (see PARALLEL_EFFICIENCY_EXPONENT)
    assert plan_process_groups([877.0, 27.0, 17.0, 55.0, 23.0, 20.0], 2) == [[0], [1, 2, 3, 4, 5]]
    plan = plan_process_groups([4.0, 3.0, 2.0, 1.0], 2)
    assert len(plan) == 2 and every(plan, 4) and sorted(map(sorted, plan)) == [[0, 3], [1, 2]]
    assert plan_process_groups([1.0] * 5, 1) == [[0, 1, 2, 3, 4]]
    with pytest.raises(ValueError, match="world_size"):
        plan_process_groups([1.0], 0)
    # --ranks-per-case fixes the group count: one rank per case splits even a dominant case off
    assert plan_process_groups([10.0, 0.1], 2, ranks_per_case=1) == [[0], [1]]
    assert plan_process_groups([1.0, 1.0], 2, ranks_per_case=2) == [[0, 1]]
    assert plan_process_groups([1.0, 1.0], 2, ranks_per_case=5) == [[0, 1]]
    with pytest.raises(ValueError, match="ranks_per_case"):
        plan_process_groups([1.0], 2, ranks_per_case=0)


def test_case_cost_grows_with_size_and_dimension(workspace):
    small = load_case(workspace["cases"] / "horn-c.toml")
    big = load_case(workspace["cases"] / "horn-b.toml")
    assert estimate_case_cost(big) > estimate_case_cost(small) > 1.0
    assert estimate_case_cost(small.for_tier("quick")) < estimate_case_cost(small)


# --- whole runs, in process -----------------------------------------------------------------------


def test_new_then_update_then_unchanged_from_cache(workspace, capsys):
    code, out = _run(workspace, capsys=capsys)
    assert code == 0
    assert {f["status"] for c in _summary(workspace)["cases"] for f in c["figures"]} == {"new"}
    assert len(_runs(workspace)) == 3

    code, out = _run(workspace, "--update", capsys=capsys)
    assert code == 0 and len(_runs(workspace)) == 3  # results came from the cache
    stored = workspace["cases"] / "baselines" / "horn-a.quick.json"
    assert json.loads(stored.read_text())["schema"] == "hornproof.baseline/1"

    code, out = _run(workspace, capsys=capsys)
    assert code == 0 and len(_runs(workspace)) == 3
    assert {f["status"] for c in _summary(workspace)["cases"] for f in c["figures"]} == {"unchanged"}
    assert "3 case(s), tier quick:" in out.out


def test_shift_within_noise_and_beyond(workspace, capsys, monkeypatch):
    _run(workspace, "--update", capsys=capsys)
    # tolerance 0.5 dB (case), u = 0.1 dB on both sides: noise 0.14 dB
    monkeypatch.setenv("FAKE_SHIFT", json.dumps({"horn-a": 0.3, "horn-b": 0.8}))
    code, out = _run(workspace, "--fresh", capsys=capsys)
    assert code == 1
    assert _figure_status(workspace, "horn-a", "directivity_2d_db") == "within-noise"
    assert _figure_status(workspace, "horn-b", "directivity_2d_db") == "regressed"
    assert _figure_status(workspace, "horn-b", "hpbw_h_deg") == "unchanged"
    assert _figure_status(workspace, "horn-c", "directivity_2d_db") == "unchanged"
    # the output names the report of the regressed case, and only of it
    report_lines = [line for line in out.out.splitlines() if line.startswith("regressed:")]
    assert len(report_lines) == 1 and "horn-b" in report_lines[0]
    report = Path(report_lines[0].split("report ")[1])
    assert report.name == "report.html" and report.is_file()

    junit = ET.parse(workspace["root"] / "results" / "regress-quick.junit.xml").getroot()
    testcases = junit.findall("testsuite/testcase")
    figures = sum(len(c["figures"]) for c in _summary(workspace)["cases"])
    assert len(testcases) == figures + 3  # one per figure, plus one "run" per case
    failed = [(t.get("classname"), t.get("name")) for t in testcases if t.find("failure") is not None]
    assert failed == [("regress.quick.horn-b", "directivity_2d_db")]
    assert junit.get("failures") == "1" and junit.find("testsuite").get("tests") == str(len(testcases))


def test_same_shift_with_large_uncertainty_is_noise(workspace, capsys, monkeypatch):
    monkeypatch.setenv("FAKE_UNCERTAINTY", "0.5")
    _run(workspace, "--update", capsys=capsys)
    monkeypatch.setenv("FAKE_SHIFT", json.dumps({"horn-b": 0.6}))  # > 0.5 dB, < √2·0.5 = 0.71 dB
    code, _ = _run(workspace, "--fresh", capsys=capsys)
    assert code == 0
    assert _figure_status(workspace, "horn-b", "directivity_2d_db") == "within-noise"


def test_edited_case_is_not_comparable_never_regressed(workspace, capsys, monkeypatch):
    _run(workspace, "--update", capsys=capsys)
    path = workspace["cases"] / "horn-a.toml"
    path.write_text(path.read_text().replace("aperture_a_mm = 60.0", "aperture_a_mm = 75.0"))
    code, out = _run(workspace, capsys=capsys)
    assert code == 0
    entry = next(c for c in _summary(workspace)["cases"] if c["case"] == "horn-a")
    assert entry["status"] == "not-comparable"
    assert {f["status"] for f in entry["figures"]} == {"not-comparable"}
    assert entry["baseline_case_sha256"] != entry["case_sha256"]
    assert "regressed" not in out.out
    assert _runs(workspace).count("horn-a serial") == 2  # the edited case ran again (new key)


def test_missing_baseline_is_new(workspace, capsys):
    _run(workspace, "--update", capsys=capsys)
    (workspace["cases"] / "baselines" / "horn-c.quick.json").unlink()
    code, _ = _run(workspace, capsys=capsys)
    assert code == 0
    assert _figure_status(workspace, "horn-c", "directivity_2d_db") == "new"
    assert _figure_status(workspace, "horn-a", "directivity_2d_db") == "unchanged"


def test_runner_failure_is_failed_and_exits_1(workspace, capsys, monkeypatch):
    monkeypatch.setenv("FAKE_FAIL", "horn-b")
    code, out = _run(workspace, capsys=capsys)
    assert code == 1
    entry = next(c for c in _summary(workspace)["cases"] if c["case"] == "horn-b")
    assert entry["status"] == "failed" and "diverged" in entry["reason"]
    assert "failed: horn-b" in out.out
    junit = ET.parse(workspace["root"] / "results" / "regress-quick.junit.xml").getroot()
    run_case = [t for t in junit.iter("testcase") if t.get("classname") == "regress.quick.horn-b"]
    assert len(run_case) == 1 and run_case[0].find("failure").get("type") == "run-failed"
    # the failed run is not cached: the next run tries it again (and succeeds), the others are cached
    monkeypatch.delenv("FAKE_FAIL")
    code, _ = _run(workspace, capsys=capsys)
    assert code == 0 and _runs(workspace) == ["horn-a serial", "horn-b serial", "horn-c serial", "horn-b serial"]
    assert (workspace["root"] / "results" / "horn-b").is_dir()


def test_bug_in_runner_is_failed_not_a_crash(workspace, capsys):
    def broken(case, out_dir, *, force=False, progress=None):
        raise ZeroDivisionError("division by zero")

    code = _main([], broken)
    out = capsys.readouterr()
    assert code == 1 and "ZeroDivisionError" in out.err
    assert {c["status"] for c in _summary(workspace)["cases"]} == {"failed"}


def test_tiers_have_their_own_baselines_and_cache(workspace, capsys):
    _run(workspace, "--update", "--tier", "quick", "cases/horn-a.toml", capsys=capsys)
    code, _ = _run(workspace, "--tier", "full", "cases/horn-a.toml", capsys=capsys)
    assert code == 0 and _figure_status(workspace, "horn-a", "directivity_2d_db") == "new"
    assert len(list((workspace["root"] / "results" / "horn-a").iterdir())) == 2
    assert not (workspace["cases"] / "baselines" / "horn-a.full.json").exists()


def test_baselines_option_puts_them_elsewhere(workspace, capsys):
    code, _ = _run(workspace, "--update", "--baselines", "elsewhere", "cases", capsys=capsys)
    assert code == 0
    assert sorted(p.name for p in (workspace["root"] / "elsewhere").iterdir()) == [
        "horn-a.quick.json", "horn-b.quick.json", "horn-c.quick.json"]
    assert not (workspace["cases"] / "baselines").exists()


def test_unknown_baseline_version_exits_2_before_running(workspace, capsys):
    _run(workspace, "--update", capsys=capsys)
    path = workspace["cases"] / "baselines" / "horn-b.quick.json"
    data = json.loads(path.read_text())
    data["schema"] = "hornproof.baseline/7"
    path.write_text(json.dumps(data))
    before = len(_runs(workspace))
    code, out = _run(workspace, "--fresh", capsys=capsys)
    assert code == 2
    error_lines = out.err.strip().splitlines()
    assert len(error_lines) == 1 and "horn-b.quick.json" in error_lines[0] and "schema" in error_lines[0]
    assert len(_runs(workspace)) == before  # nothing ran


@pytest.mark.parametrize("content, key", [
    ("format = 1\n[horn]\ntype = 'h-sectoral'\nwaveguide = 'WR-90'\n", "horn.aperture_a_mm"),
    ("format = 1\n[horn\n", "horn-bad.toml"),
])
def test_bad_case_file_exits_2_with_one_line(workspace, capsys, content, key):
    (workspace["cases"] / "horn-bad.toml").write_text(content)
    code, out = _run(workspace, capsys=capsys)
    assert code == 2
    lines = out.err.strip().splitlines()
    assert len(lines) == 1 and "horn-bad.toml" in lines[0] and key in lines[0]
    assert not _runs(workspace)
    assert not (workspace["root"] / "results" / "regress.json").exists()


def test_missing_case_path_exits_2(workspace, capsys):
    code, out = _run(workspace, "cases/nope.toml", capsys=capsys)
    assert code == 2 and "cases/nope.toml: no such case file" in out.err


# --- kill and resume (subprocess) ---------------------------------------------------------------


def _subprocess_env(ws, **extra):
    env = dict(os.environ)
    env.update({"FAKE_LOG": str(ws["log"]), "PYTHONPATH": str(REPO)})
    for name in ("FAKE_SHIFT", "FAKE_FAIL", "FAKE_SLOW", "FAKE_MEEP", "FAKE_IDLE_SLOW", "FAKE_SLEEP"):
        env.pop(name, None)
    env.update(extra)
    return env


def _wait_for(predicate, timeout):
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        if predicate():
            return True
        time.sleep(0.05)
    return False


@pytest.mark.parametrize("signum", [signal.SIGTERM, signal.SIGKILL])
def test_killed_run_resumes_and_gives_the_same_table(workspace, signum):
    ws = workspace
    command = [sys.executable, str(ws["driver"]), "--results", "results"]
    process = subprocess.Popen(command, cwd=ws["root"], env=_subprocess_env(ws, FAKE_SLOW="horn-b"),
                               stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    try:
        assert _wait_for(lambda: len(_runs(ws)) >= 2, 30), "the second case never started"
        time.sleep(0.3)  # inside the slow case, its partial result.json written
        process.send_signal(signum)
        process.communicate(timeout=30)
    finally:
        if process.poll() is None:
            process.kill()
    assert process.returncode != 0
    assert _runs(ws) == ["horn-a serial", "horn-b serial"]
    case_b = ws["root"] / "results" / "horn-b"
    finished_b = [p for p in case_b.iterdir() if not p.name.startswith(".")]
    assert finished_b == []  # the interrupted case left no entry that reads as a result
    if signum == signal.SIGTERM:
        assert list(case_b.iterdir()) == []  # and SIGTERM even cleaned its partial folder

    resumed = subprocess.run(command, cwd=ws["root"], env=_subprocess_env(ws), capture_output=True, text=True,
                             timeout=60)
    assert resumed.returncode == 0, resumed.stderr
    assert _runs(ws) == ["horn-a serial", "horn-b serial", "horn-b serial", "horn-c serial"]
    assert "1 from cache, 2 to run" in resumed.stderr

    shutil.rmtree(ws["root"] / "results")
    uninterrupted = subprocess.run(command, cwd=ws["root"], env=_subprocess_env(ws), capture_output=True, text=True,
                                   timeout=60)
    assert uninterrupted.returncode == 0
    assert _table(resumed.stdout) == _table(uninterrupted.stdout)


# --- MPI process groups ---------------------------------------------------------------------------


@pytest.mark.fullwave
@pytest.mark.skipif(shutil.which("mpirun") is None, reason="needs mpirun (openmpi-bin)")
def test_mpirun_two_groups_give_the_serial_table(workspace):
    ws = workspace
    (ws["cases"] / "horn-c.toml").unlink()
    command = [sys.executable, str(ws["driver"]), "--results", "results", "--fresh"]
    serial = subprocess.run(command, cwd=ws["root"], env=_subprocess_env(ws), capture_output=True, text=True,
                            timeout=120)
    assert serial.returncode == 0, serial.stderr
    ws["log"].unlink()
    mpi = ["mpirun", "--allow-run-as-root", "--oversubscribe", "-np", "2"]
    parallel = subprocess.run(mpi + command, cwd=ws["root"], env=_subprocess_env(ws), capture_output=True,
                              text=True, timeout=300)
    assert parallel.returncode == 0, parallel.stderr
    # two equal cases on two ranks: one process group each, so each case ran once, on its own rank
    runs = sorted(line.split() for line in _runs(ws))
    assert [name for name, _ in runs] == ["horn-a", "horn-b"] and {rank for _, rank in runs} == {"0", "1"}
    assert _table(parallel.stdout) == _table(serial.stdout)
    assert parallel.stdout.count("case  ") == 1  # only rank 0 printed the table
    assert "on 2 ranks" in parallel.stderr


def test_json_option_prints_the_summary(workspace, capsys):
    def chatty(case, out_dir, *, force=False, progress=None):
        print("Using MPI version 3.1, 1 processes")  # what Meep prints on import
        return workspace["fake"].runner(case, out_dir)

    code = _main(["--json"], chatty)
    out = capsys.readouterr()
    assert code == 0 and "Using MPI" in out.err
    document = json.loads(out.out)
    assert document["schema"] == "hornproof.regress/1"
    assert document == _summary(workspace)
    assert [c["case"] for c in document["cases"]] == ["horn-a", "horn-b", "horn-c"]


MPIRUN = ["mpirun", "--allow-run-as-root", "--oversubscribe", "-np", "2"]


@pytest.mark.fullwave
@pytest.mark.skipif(shutil.which("mpirun") is None, reason="needs mpirun (openmpi-bin)")
def test_mpirun_with_a_failing_case_and_more_cases_than_groups(workspace):
    ws = workspace
    (ws["cases"] / "horn-d.toml").write_text(CASE_TEMPLATE.format(name="horn-d", aperture_a=60.0, flare=80.0))
    command = [sys.executable, str(ws["driver"]), "--results", "results", "--fresh"]
    env = _subprocess_env(ws, FAKE_FAIL="horn-c")
    serial = subprocess.run(command, cwd=ws["root"], env=env, capture_output=True, text=True, timeout=120)
    assert serial.returncode == 1
    ws["log"].unlink()
    parallel = subprocess.run(MPIRUN + command, cwd=ws["root"], env=env, capture_output=True, text=True,
                              timeout=300)
    assert parallel.returncode == 1, parallel.stderr
    # four cases of similar size on two ranks: two groups of one rank, two cases each
    runs = sorted(line.split() for line in _runs(ws))
    assert [name for name, _ in runs] == ["horn-a", "horn-b", "horn-c", "horn-d"]
    assert sorted(rank for _, rank in runs) == ["0", "0", "1", "1"]
    assert _table(parallel.stdout) == _table(serial.stdout)
    entry = next(c for c in _summary(ws)["cases"] if c["case"] == "horn-c")
    assert entry["status"] == "failed" and "diverged" in entry["reason"]


@pytest.mark.fullwave
@pytest.mark.skipif(shutil.which("mpirun") is None, reason="needs mpirun (openmpi-bin)")
def test_mpirun_real_meep_runs_inside_process_groups(workspace):
    # Each fake run does a tiny real Meep simulation; baselines recorded serially must be matched
    # by the runs made inside the MPI process groups.
    ws = workspace
    (ws["cases"] / "horn-c.toml").unlink()
    env = _subprocess_env(ws, FAKE_MEEP="1")
    command = [sys.executable, str(ws["driver"]), "--results", "results"]
    serial = subprocess.run(command + ["--update"], cwd=ws["root"], env=env, capture_output=True, text=True,
                            timeout=300)
    assert serial.returncode == 0, serial.stderr
    parallel = subprocess.run(MPIRUN + command + ["--fresh"], cwd=ws["root"], env=env, capture_output=True,
                              text=True, timeout=300)
    assert parallel.returncode == 0, parallel.stderr
    statuses = {f["status"] for c in _summary(ws)["cases"] for f in c["figures"]}
    assert statuses == {"unchanged"}
    base = json.loads((ws["cases"] / "baselines" / "horn-a.quick.json").read_text())
    plain = ws["fake"].synthetic_result(load_case(ws["cases"] / "horn-a.toml").for_tier("quick"))
    key = "directivity_2d_db"
    assert base["figures"][key]["values"][0] != pytest.approx(plain["models"]["fdtd"][key][0], abs=1e-6)


def test_malformed_or_foreign_results_are_failed_runs(workspace, capsys):
    fake = workspace["fake"]

    def misaligned(case, out_dir, *, force=False, progress=None):
        result = fake.synthetic_result(case)
        result["models"]["fdtd"]["hpbw_h_deg"] = [1.0]  # 1 value for 3 frequencies
        return result

    def other_case(case, out_dir, *, force=False, progress=None):
        return {**fake.synthetic_result(case), "case_sha256": "0" * 64}

    code = _main(["cases/horn-a.toml"], misaligned)
    capsys.readouterr()
    entry = _summary(workspace)["cases"][0]
    assert code == 1 and entry["status"] == "failed" and "models.fdtd.hpbw_h_deg" in entry["reason"]

    code = _main(["--fresh", "cases/horn-b.toml"], other_case)
    capsys.readouterr()
    entry = _summary(workspace)["cases"][0]
    assert code == 1 and entry["status"] == "failed" and "case_sha256" in entry["reason"]
    # neither result entered the cache: both cases run again next time
    assert not [p for p in (workspace["root"] / "results" / "horn-a").iterdir() if not p.name.startswith(".")]
    assert not [p for p in (workspace["root"] / "results" / "horn-b").iterdir() if not p.name.startswith(".")]


def test_source_digest_follows_code_changes(tmp_path):
    package = tmp_path / "pkg"
    (package / "sub").mkdir(parents=True)
    (package / "a.py").write_text("x = 1\n")
    (package / "sub" / "b.py").write_text("y = 2\n")
    first = version.source_digest(package)
    (package / "__pycache__").mkdir()
    (package / "__pycache__" / "a.cpython-311.py").write_text("junk")
    (package / "notes.txt").write_text("not code")
    assert version.source_digest(package) == first
    (package / "sub" / "b.py").write_text("y = 3\n")
    assert version.source_digest(package) != first
    assert version.build_version().startswith(version.VERSION + "+src.")


def test_unusable_results_folder_or_case_name_exits_2(workspace, capsys):
    (workspace["root"] / "afile").write_text("x")
    code, out = _run(workspace, "--results", "afile", capsys=capsys)
    assert code == 2 and "afile: --results" in out.err and len(out.err.strip().splitlines()) == 1
    shutil.copy(workspace["cases"] / "horn-a.toml", workspace["cases"] / ".hidden.toml")
    code, out = _run(workspace, "cases/.hidden.toml", capsys=capsys)
    assert code == 2 and ".hidden.toml" in out.err and len(out.err.strip().splitlines()) == 1
    assert not _runs(workspace)


def test_two_cases_with_one_name_exit_2(workspace, capsys):
    other = workspace["root"] / "other"
    other.mkdir()
    shutil.copy(workspace["cases"] / "horn-a.toml", other / "horn-a.toml")
    code, out = _run(workspace, "cases", "other", capsys=capsys)
    assert code == 2 and "other/horn-a.toml: name: 'horn-a'" in out.err


# --- with the real runner (verify + Meep) -------------------------------------------------------

REAL_CASE = """\
# Invented scenario for tests: a small X-band E-plane sectoral horn (2D in the quick tier).
format = 1
title = "small E-plane horn for regress tests (invented)"

[horn]
type = "e-sectoral"
waveguide = "WR-90"
aperture_b_mm = {aperture_b}
flare_length_mm = 40.0

[band]
f_min_ghz = 9.5
f_max_ghz = 10.5
points = 2

[fdtd]
dims = 3
cells_per_wavelength = [10, 12]

[checks]
directivity_db = 0.7
"""


@pytest.fixture
def real_cases(tmp_path):
    cases = tmp_path / "cases"
    cases.mkdir()
    for name, aperture_b in (("real-a", 30.0), ("real-b", 34.0)):
        (cases / f"{name}.toml").write_text(REAL_CASE.format(aperture_b=aperture_b))
    return tmp_path


def _cli(root, *argv, mpi=False, timeout=600):
    command = [sys.executable, "-m", "hornproof.compare.cli.main", "regress", *argv]
    env = dict(os.environ, PYTHONPATH=str(REPO))
    return subprocess.run((MPIRUN if mpi else []) + command, cwd=root, env=env, capture_output=True, text=True,
                          timeout=timeout)


@pytest.mark.fullwave
def test_real_runs_repeat_exactly_through_the_command_line(real_cases):
    first = _cli(real_cases, "--update")
    assert first.returncode == 0, first.stderr
    again = _cli(real_cases, "--fresh")
    assert again.returncode == 0, again.stdout + again.stderr
    document = json.loads((real_cases / "results" / "regress.json").read_text())
    assert {f["status"] for c in document["cases"] for f in c["figures"]} == {"unchanged"}
    assert all((real_cases / c["report"]).is_file() for c in document["cases"])
    root = ET.parse(real_cases / "results" / "regress-quick.junit.xml").getroot()
    # per case a "run" and a "verdict" testcase, then one per figure
    assert root.get("failures") == "0" and int(root.get("tests")) == 2 * 2 + sum(len(c["figures"])
                                                                                 for c in document["cases"])
    # the quick tier runs one grid: no confident uncertainty, so verify's verdict is unresolved
    # (or there were no checks) and an unresolved one is shown as skipped
    verdicts = [t for t in root.iter("testcase") if t.get("name") == "verdict"]
    assert len(verdicts) == 2
    for testcase in verdicts:
        skipped = testcase.find("skipped")
        assert (skipped is not None and skipped.get("message").startswith("unresolved: ")) or \
            testcase.find("system-out").text == "verdict: no checks"


@pytest.mark.fullwave
@pytest.mark.skipif(shutil.which("mpirun") is None, reason="needs mpirun (openmpi-bin)")
def test_real_runs_under_mpirun_give_the_serial_table(real_cases):
    serial = _cli(real_cases, "--update")
    assert serial.returncode == 0, serial.stderr
    parallel = _cli(real_cases, "--fresh", mpi=True)
    assert parallel.returncode == 0, parallel.stdout + parallel.stderr
    assert "on 2 ranks" in parallel.stderr
    serial_again = _cli(real_cases)  # from the cache the parallel run just filled
    assert _table(parallel.stdout) == _table(serial_again.stdout)
    document = json.loads((real_cases / "results" / "regress.json").read_text())
    assert {f["status"] for c in document["cases"] for f in c["figures"]} == {"unchanged"}


@pytest.mark.fullwave
@pytest.mark.skipif(shutil.which("mpirun") is None, reason="needs mpirun (openmpi-bin)")
def test_rank_that_finished_early_does_not_spin(workspace):
    # A blocking MPI barrier busy-polls a core (Open MPI's default; seen here: 5.0 CPU seconds in a
    # 6 s wait). The rank whose group finished first must sleep while it waits for the others.
    ws = workspace
    (ws["cases"] / "horn-c.toml").unlink()
    env = _subprocess_env(ws, FAKE_IDLE_SLOW="horn-b", FAKE_SLEEP="4")
    command = [sys.executable, str(ws["driver"]), "--results", "results", "--fresh", "--ranks-per-case", "1"]
    done = subprocess.run(MPIRUN + command, cwd=ws["root"], env=env, capture_output=True, text=True, timeout=300)
    assert done.returncode == 0, done.stderr
    # mpirun may join the two ranks' stderr lines, so search the text, not line by line
    ranks = {rank: float(seconds) for rank, seconds in
             re.findall(r"cpu-seconds rank (\d+): (\d+\.\d\d)", done.stderr)}
    waiting = [rank for name, rank in (line.split() for line in _runs(ws)) if name == "horn-a"][0]
    assert set(ranks) == {"0", "1"}
    assert ranks[waiting] < 2.0, ranks  # start-up costs about 0.6 s; spinning would add about 4 s


def test_cache_only_runs_nothing(workspace, capsys):
    _run(workspace, "cases/horn-a.toml", capsys=capsys)
    code, out = _run(workspace, "--cache-only", capsys=capsys)
    assert code == 1 and len(_runs(workspace)) == 1
    statuses = {c["case"]: c["status"] for c in _summary(workspace)["cases"]}
    assert statuses == {"horn-a": "new", "horn-b": "failed", "horn-c": "failed"}
    assert "--cache-only" in next(c for c in _summary(workspace)["cases"] if c["case"] == "horn-b")["reason"]
    code, out = _run(workspace, "--cache-only", "--fresh", capsys=capsys)
    assert code == 2 and "exclude each other" in out.err


@pytest.mark.parametrize("option", ["--junit", "--summary"])
def test_report_target_that_is_a_folder_exits_2_naming_the_option(workspace, capsys, option):
    (workspace["root"] / "reports").mkdir()
    code, out = _run(workspace, option, "reports", capsys=capsys)
    lines = out.err.strip().splitlines()
    assert code == 2 and len(lines) == 1
    assert f"reports: {option}: is a folder" in lines[0]
    assert not _runs(workspace)  # refused before any run


@pytest.mark.parametrize("option", ["--junit", "--summary"])
def test_foreign_report_file_is_never_overwritten(workspace, capsys, option):
    foreign = workspace["root"] / "notes.txt"
    foreign.write_text("someone's notes\n")
    code, out = _run(workspace, option, "notes.txt", capsys=capsys)
    lines = out.err.strip().splitlines()
    assert code == 2 and len(lines) == 1 and f"notes.txt: {option}: the file exists" in lines[0]
    assert foreign.read_text() == "someone's notes\n" and not _runs(workspace)


def test_own_report_files_are_replaced_by_the_next_run(workspace, capsys):
    (workspace["root"] / "out").mkdir()  # a named folder must exist: hornproof makes only its own
    argv = ("--junit", "out/suite.xml", "--summary", "out/suite.json", "cases/horn-a.toml")
    assert _run(workspace, *argv, capsys=capsys)[0] == 0
    assert json.loads((workspace["root"] / "out" / "suite.json").read_text())["baselines_updated"] == []
    assert _run(workspace, "--update", *argv, capsys=capsys)[0] == 0  # the second run's own content
    second = json.loads((workspace["root"] / "out" / "suite.json").read_text())
    assert second["schema"] == "hornproof.regress/1"
    assert second["baselines_updated"] == ["cases/baselines/horn-a.quick.json"]
    assert ET.parse(workspace["root"] / "out" / "suite.xml").getroot().get("name") == "hornproof regress (quick)"


def test_one_version_string_in_summary_baseline_and_junit(workspace, capsys):
    assert _run(workspace, "--update", "cases/horn-a.toml", capsys=capsys)[0] == 0
    build = version.build_version()
    assert _summary(workspace)["hornproof_version"] == build
    stored = json.loads((workspace["cases"] / "baselines" / "horn-a.quick.json").read_text())
    assert stored["hornproof_version"] == build
    junit = ET.parse(workspace["root"] / "results" / "regress-quick.junit.xml").getroot()
    properties = {p.get("name"): p.get("value") for p in junit.iter("property")}
    assert properties["hornproof_version"] == build


def test_full_disk_during_a_case_run_is_one_line_and_exit_3(workspace, capsys):
    # A full disk simulated: the runner's write fails with ENOSPC (POSIX errno.h). README: exit 3
    # when the run fails for want of resources; one line per failed case, no traceback.
    import errno as errno_module

    def full_disk_runner(case, out_dir, **kwargs):
        raise OSError(errno_module.ENOSPC, os.strerror(errno_module.ENOSPC), str(out_dir / "fields.h5"))

    code = _main(["cases/horn-a.toml"], full_disk_runner)
    err = capsys.readouterr().err
    assert code == 3
    assert "Traceback" not in err and "no space left on the device" in err
    assert sum("run failed" in line for line in err.splitlines()) == 1
