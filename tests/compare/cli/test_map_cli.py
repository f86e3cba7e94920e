"""``hornproof map``: options as documented, one-line refusals (exit 2) before anything runs.

hornproof's own contract (README.md "Commands": exit codes, one-line errors; the map's estimate
printed before anything runs and a refusal beyond ``--budget-hours`` unless ``--force``).
"""

import json
import os
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[3]
MAP_CASE = ROOT / "cases" / "map-h-flare.toml"


def run_cli(*args, cwd=ROOT):
    return subprocess.run([sys.executable, "-m", "hornproof.compare.cli.main", *args], capture_output=True,
                          text=True, cwd=cwd, timeout=180, env=dict(os.environ, MPLBACKEND="Agg"))


def error_lines(stderr):
    return [line for line in stderr.splitlines() if "error:" in line]


def test_map_help_lists_the_documented_options():
    text = run_cli("map", "--help").stdout
    readme = (ROOT / "README.md").read_text()
    for option in ("--analytic-only", "--budget-hours", "--out", "--json", "--force"):
        assert option in text and option in readme, option
    assert "hornproof map CASE" in readme


def test_analytic_only_map_of_the_shipped_case(tmp_path):
    done = run_cli("map", str(MAP_CASE), "--analytic-only", "--json", "--out", str(tmp_path / "out"))
    assert done.returncode == 0, done.stderr
    document = json.loads(done.stdout)
    assert document["schema"] == "hornproof.map/1" and document["analytic_only"]
    assert len(document["analytic"]["phase_approximation_error"]) == 60
    assert (tmp_path / "out" / "report.html").is_file()


def test_map_beyond_the_budget_is_refused_with_the_estimate_printed_first(tmp_path):
    done = run_cli("map", str(MAP_CASE), "--budget-hours", "0.001", "--out", str(tmp_path / "out"))
    assert done.returncode == 2, done.stderr
    assert "Traceback" not in done.stderr
    (line,) = error_lines(done.stderr)
    assert "map-h-flare.toml: map: estimated" in line and "--budget-hours" in line and "--force" in line
    assert done.stderr.index("whole map: about") < done.stderr.index("error:")
    assert not (tmp_path / "out").exists()  # nothing ran, nothing was written


def test_case_without_a_map_is_one_line(tmp_path):
    done = run_cli("map", str(ROOT / "cases" / "sweep-h-flare.toml"), "--out", str(tmp_path / "out"))
    assert done.returncode == 2
    (line,) = error_lines(done.stderr)
    assert "sweep-h-flare.toml: map: the case has no [map] table" in line


def test_bad_budget_is_refused(tmp_path):
    done = run_cli("map", str(MAP_CASE), "--budget-hours", "-1", "--out", str(tmp_path / "out"))
    assert done.returncode == 2 and "--budget-hours" in done.stderr and "Traceback" not in done.stderr


def test_out_that_is_a_file_is_refused_and_kept(tmp_path):
    decoy = tmp_path / "decoy.txt"  # a file made for this test
    decoy.write_text("keep me")
    done = run_cli("map", str(MAP_CASE), "--analytic-only", "--out", str(decoy))
    assert done.returncode == 2 and "not a folder" in done.stderr
    assert decoy.read_text() == "keep me"


def test_report_rebuilds_a_map_page_and_refuses_a_foreign_map_json(tmp_path):
    out = tmp_path / "out"
    assert run_cli("map", str(MAP_CASE), "--analytic-only", "--out", str(out)).returncode == 0
    (out / "report.html").unlink()
    done = run_cli("report", str(out))
    assert done.returncode == 0, done.stderr
    assert (out / "report.html").is_file() and "RF" in (out / "report.html").read_text()
    decoy = tmp_path / "decoy"  # a folder made for this test, holding a map.json of another schema
    decoy.mkdir()
    (decoy / "map.json").write_text('{"schema": "somebody.else/3"}')
    done = run_cli("report", str(decoy))
    # not hornproof's (no ownership marker): refused before its map.json is read (issue 11's rule)
    assert done.returncode == 2 and "not a published hornproof result folder" in done.stderr
    assert "Traceback" not in done.stderr
