"""The command line: exit codes, one-line errors, the predict JSON schema, --help per command.

The contract checked here is hornproof's own (README.md "Commands": exit codes 0/1/2/3, one-line
errors without a traceback, `hornproof.result/1` with every list aligned with `frequencies_ghz`).
"""

import json
import subprocess
import sys
from pathlib import Path

import pytest

from hornproof.compare.cli.main import main
from hornproof.version import VERSION, build_version

ROOT = Path(__file__).resolve().parents[3]
DEMO = ROOT / "cases" / "demo-h-sectoral.toml"


def run_cli(*args):
    return subprocess.run([sys.executable, "-m", "hornproof.compare.cli.main", *args], capture_output=True,
                          text=True, cwd=ROOT, timeout=120)


def test_predict_json_follows_the_result_schema(capsys):
    assert main(["predict", str(DEMO), "--json"]) == 0
    summary = json.loads(capsys.readouterr().out)
    assert summary["schema"] == "hornproof.result/1"
    # the one version string every output records: release plus source digest
    assert summary["hornproof_version"] == build_version()
    assert summary["hornproof_version"].startswith(VERSION + "+src.")
    nf = len(summary["frequencies_ghz"])
    assert nf == 5
    for key in ("apex_h_mm", "apex_e_mm", "flare_half_angle_h_deg", "flare_half_angle_e_deg",
                "phase_error_h_wl", "phase_error_e_wl"):
        assert key in summary["geometry"]
    for model in ("closed_form", "exact_phase"):
        figures = summary["models"][model]
        for key, values in figures.items():
            if isinstance(values, list):
                assert len(values) == nf, (model, key)
    # geometry of the demo horn by hand: R_h = L A / (A - a) = 90 * 90 / (90 - 22.86) mm
    assert summary["geometry"]["apex_h_mm"] == pytest.approx(90 * 90 / (90 - 22.86), abs=1e-5)


def test_predict_table_for_people(capsys):
    assert main(["predict", str(DEMO)]) == 0
    out = capsys.readouterr().out
    assert "closed form" in out and "exact path" in out
    assert "IEEE C95.1-2019" in out


@pytest.mark.parametrize("args, code", [
    (["predict", "no-such-case.toml"], 2),
    (["predict", str(ROOT / "tests" / "compare" / "malformed")], 2),
    (["verify", str(DEMO), "--cells-per-wavelength", "2,3"], 2),
    (["design", "gain", "--gain-dbi", "1", "--frequency-ghz", "10", "--waveguide", "WR-90"], 2),
    (["design", "gain", "--gain-dbi", "20", "--frequency-ghz", "10", "--waveguide", "WR-9000"], 2),
    (["report", "/nonexistent-folder"], 2),
])
def test_bad_input_is_one_line_and_exit_2(args, code):
    done = run_cli(*args)
    assert done.returncode == code, done.stderr
    lines = [line for line in done.stderr.splitlines() if line.strip() and "Warning" not in line
             and "subnormal" not in line and "setattr" not in line and "return self" not in line]
    assert "Traceback" not in done.stderr
    # exactly one error line (argparse also prints its usage block before it)
    assert sum("error:" in line for line in lines) == 1
    assert "error:" in lines[-1]


def test_bad_case_error_names_file_and_key(tmp_path):
    case = tmp_path / "bad.toml"
    case.write_text(DEMO.read_text().replace("aperture_a_mm = 90.0", "aperture_a_mm = -5.0"))
    done = run_cli("predict", str(case))
    assert done.returncode == 2
    assert "bad.toml" in done.stderr and "aperture_a_mm" in done.stderr
    assert "Traceback" not in done.stderr


@pytest.mark.parametrize("command", ["predict", "simulate", "verify", "sweep", "regress", "design", "report"])
def test_help_of_every_command(command):
    done = run_cli(command, "--help")
    assert done.returncode == 0
    assert "usage" in done.stdout


def test_design_writes_a_case_that_loads(tmp_path, capsys):
    from hornproof.compare.case.casefile import load_case

    target = tmp_path / "designed.toml"
    assert main(["design", "gain", "--gain-dbi", "20", "--frequency-ghz", "10", "--waveguide", "WR-90",
                 "--write-case", str(target)]) == 0
    case = load_case(target)
    assert case.horn.kind == "pyramidal"
    # realizability by construction: one axial flare length in both planes; the designed horn's
    # closed-form directivity at the design frequency is the target (the design's own contract)
    from hornproof.analytic.predict import predict

    d = predict(case.horn, [10e9])["closed_form"].directivity_dbi[0]
    assert d == pytest.approx(20.0, abs=0.01)
    # the written case's ladder is the one verify picks: at least six cells across the guide
    # height b on the coarsest rung (the reviewer saw 3.6 cells with the old fixed 10/14/20)
    from hornproof.units import SPEED_OF_LIGHT

    wavelength = SPEED_OF_LIGHT / max(case.frequencies)
    assert min(case.fdtd.cells_per_wavelength) * case.horn.guide_b / wavelength >= 5.99
    assert len(case.fdtd.cells_per_wavelength) == 3
    # a second write refuses to overwrite (never lose data)
    assert main(["design", "gain", "--gain-dbi", "20", "--frequency-ghz", "10", "--waveguide", "WR-90",
                 "--write-case", str(target)]) == 2


# --- output paths: checked before any run, never losing the user's files -----------------

def test_out_folder_that_is_not_a_result_is_refused_and_kept(tmp_path):
    work = tmp_path / "mywork"
    work.mkdir()
    (work / "notes.txt").write_text("thesis")
    done = run_cli("verify", str(DEMO), "--out", str(work))
    assert done.returncode == 2
    assert "not a hornproof result folder" in done.stderr and "--out" in done.stderr
    assert (work / "notes.txt").read_text() == "thesis"
    assert sorted(p.name for p in work.iterdir()) == ["notes.txt"]


@pytest.mark.parametrize("command", [["simulate", str(DEMO)], ["verify", str(DEMO)],
                                     ["sweep", str(ROOT / "cases" / "sweep-h-flare.toml"), "--analytic-only"]])
def test_out_that_is_a_file_is_refused(tmp_path, command):
    target = tmp_path / "afile"
    target.write_text("keep me")
    done = run_cli(*command, "--out", str(target))
    assert done.returncode == 2 and "not a folder" in done.stderr
    assert target.read_text() == "keep me"


def test_write_case_into_a_missing_folder_is_one_line(tmp_path):
    done = run_cli("design", "gain", "--gain-dbi", "20", "--frequency-ghz", "10", "--waveguide", "WR-90",
                   "--write-case", str(tmp_path / "no" / "such" / "x.toml"))
    assert done.returncode == 2 and "Traceback" not in done.stderr
    assert "--write-case" in done.stderr


def test_debug_is_accepted_after_the_command():
    assert run_cli("predict", str(DEMO), "--debug").returncode == 0


def test_help_matches_the_documented_options():
    # README.md's commands table names these options; --help must offer them
    expected = {
        "predict": ["--json", "--equivalent"],
        "simulate": ["--cells-per-wavelength", "--out", "--json", "--image", "--force"],
        "verify": ["--cells-per-wavelength", "--target-uncertainty", "--budget", "--range-m", "--out", "--json",
                   "--force"],
        "sweep": ["--cells-per-wavelength", "--dims", "--analytic-only", "--out"],
        "regress": ["--tier", "--update", "--junit", "--baselines", "--fresh"],
        "report": [],
        "exposure": ["--power-w", "--gain-dbi", "--json"],
    }
    readme = (ROOT / "README.md").read_text()
    for command, options in expected.items():
        text = run_cli(command, "--help").stdout
        for option in options:
            assert option in text, (command, option)
            assert option in readme, (command, option)


@pytest.mark.fullwave
def test_sigterm_during_verify_leaves_nothing_behind(tmp_path):
    import os
    import signal
    import time

    out = tmp_path / "o"
    proc = subprocess.Popen([sys.executable, "-m", "hornproof.compare.cli.main", "verify", str(DEMO),
                             "--out", str(out)], cwd=ROOT, stdout=subprocess.DEVNULL,
                            stderr=subprocess.PIPE, text=True, env=dict(os.environ, MPLBACKEND="Agg"))
    # wait until the second grid runs, then terminate
    deadline = time.monotonic() + 120
    seen = ""
    while time.monotonic() < deadline and "grid 2/3" not in seen:
        line = proc.stderr.readline()
        if not line:
            break
        seen += line
    assert "grid 2/3" in seen
    proc.send_signal(signal.SIGTERM)
    _, err = proc.communicate(timeout=60)
    assert proc.returncode == 143, err
    assert "terminated" in err and "Traceback" not in err
    assert list(tmp_path.iterdir()) == []


def test_verify_exit_status_disagrees_wins_over_unresolved():
    # the documented exit statuses of verify (README "Commands"): 1 beats 4, 4 beats 0
    from hornproof.compare.cli.verify import exit_status
    assert exit_status({"failed_checks": ["hpbw_h_deg"], "unresolved_checks": ["directivity_db"]}) == 1
    assert exit_status({"failed_checks": [], "unresolved_checks": ["directivity_db"]}) == 4
    assert exit_status({"failed_checks": [], "unresolved_checks": []}) == 0


def test_verify_help_documents_exit_status_4(capsys):
    from hornproof.compare.cli.main import main as cli_main
    with pytest.raises(SystemExit):
        cli_main(["verify", "--help"])
    text = capsys.readouterr().out
    assert "exit status" in text and "4 no check disagrees but one is unresolved" in " ".join(text.split())
