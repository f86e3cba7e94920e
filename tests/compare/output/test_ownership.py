"""Output paths: hornproof writes, replaces or deletes only what it can prove it made.

The rules checked are hornproof's own (README.md "Output folders and files"): a folder is
replaceable only when empty or marked ``hornproof.folder/1`` by a run of the same kind holding
only the entries the marker lists; no missing parent is created for a path the user named; one
run per output (a second is refused at once); leftovers of killed runs are cleared by the next
run of the same output; ``report`` builds only from published results. Every refusal is tested
with decoy files made here, never a system path.
"""

import errno
import io
import contextlib
import json
import os
from pathlib import Path

import pytest

from hornproof.compare.cli.main import main
from hornproof.compare.output.folders import (
    check_output_folder,
    check_replaceable_file,
    claimed_output_folder,
    publish_folder,
    under_result_root,
)
from hornproof.compare.output.output_lock import lock_path, output_lock
from hornproof.compare.output.ownership import (
    MARKER_NAME,
    STAGING_SENTINEL,
    is_published_result,
    ownership_problem,
    read_marker,
    write_marker,
)
from hornproof.errors import InputError

ROOT = Path(__file__).resolve().parents[3]
DEMO = ROOT / "cases" / "demo-h-sectoral.toml"
SWEEP = ROOT / "cases" / "sweep-h-flare.toml"


def _cli(*argv):
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(list(argv))
    return code, out.getvalue(), err.getvalue()


def _one_error_line(err):
    """The one error line (progress lines may precede it); no traceback."""
    lines = [line for line in err.strip().splitlines() if line.startswith("hornproof: error:")]
    assert len(lines) == 1 and err.strip().splitlines()[-1] == lines[0], err
    assert "Traceback" not in err
    return lines[0]


def _published(tmp_path, name, kind, files=("result.json",)):
    def write(staging):
        for file in files:
            (staging / file).write_text('{"schema": "hornproof.result/1"}')
    return publish_folder(tmp_path / name, write, kind=kind)


def test_published_folder_carries_its_marker_and_no_sentinel(tmp_path):
    folder = _published(tmp_path, "out", "verify", ("result.json", "report.html"))
    marker = read_marker(folder)
    assert marker == {"kind": "verify", "entries": ["report.html", "result.json"]}
    assert not (folder / STAGING_SENTINEL).exists()
    assert json.loads((folder / MARKER_NAME).read_text())["schema"] == "hornproof.folder/1"
    assert is_published_result(folder)
    assert not [p for p in tmp_path.iterdir() if p.name != "out"]  # no staging left beside it


def test_foreign_folder_is_refused_and_untouched(tmp_path):
    decoy = tmp_path / "mine"
    decoy.mkdir()
    (decoy / "report.html").write_text("my own report")
    (decoy / "points").mkdir()  # the audit's case: a folder with an entry named points
    for kind in ("verify", "simulate", "sweep"):
        with pytest.raises(InputError, match="not a hornproof result folder"):
            check_output_folder(decoy, "--out", kind=kind)
    assert (decoy / "report.html").read_text() == "my own report"


def test_user_file_added_to_a_result_folder_makes_it_not_ours(tmp_path):
    folder = _published(tmp_path, "out", "simulate")
    (folder / "notes.txt").write_text("keep me")
    assert "did not write ('notes.txt')" in ownership_problem(folder, "simulate")
    with pytest.raises(InputError, match="notes.txt"):
        check_output_folder(folder, "--out", kind="simulate")
    assert (folder / "notes.txt").read_text() == "keep me"


def test_a_result_of_another_command_is_not_replaced(tmp_path):
    folder = _published(tmp_path, "v", "verify", ("result.json", "report.html", "model.png"))
    with pytest.raises(InputError, match="holds a hornproof verify result, not a simulate result"):
        check_output_folder(folder, "--out", kind="simulate")
    assert sorted(p.name for p in folder.iterdir()) == sorted([MARKER_NAME, "result.json", "report.html",
                                                               "model.png"])
    assert check_output_folder(folder, "--out", kind="verify") == folder  # same kind: replaceable


def test_forged_or_corrupt_marker_is_not_trusted(tmp_path):
    for content in ("{", "[]", '{"schema": "other/1", "kind": "verify", "entries": []}',
                    '{"schema": "hornproof.folder/1", "kind": "rm -rf", "entries": []}',
                    '{"schema": "hornproof.folder/1", "kind": "verify", "entries": "x"}'):
        folder = tmp_path / f"f{abs(hash(content))}"
        folder.mkdir()
        (folder / MARKER_NAME).write_text(content)
        (folder / "precious.txt").write_text("x")
        assert read_marker(folder) is None
        with pytest.raises(InputError):
            check_output_folder(folder, "--out", kind="verify")


def test_missing_parent_of_a_named_path_is_not_created(tmp_path):
    target = tmp_path / "no" / "such" / "out"
    with pytest.raises(InputError, match="does not exist"):
        check_output_folder(target, "--out", kind="verify")
    assert not (tmp_path / "no").exists()
    with pytest.raises(InputError, match="does not exist"):
        check_replaceable_file(tmp_path / "no" / "x.json", "--summary", lambda p: True, "x")
    assert not (tmp_path / "no").exists()
    # hornproof's own default result root may be made
    assert check_output_folder(target, "the default result folder", kind="verify", create_parents=True) == target
    assert target.parent.is_dir() and not target.exists()


def test_folders_under_the_result_root_may_be_made(tmp_path, monkeypatch):
    # README quick start: scripts/demo writes to results/demo on a fresh clone
    monkeypatch.chdir(tmp_path)
    assert under_result_root("results/demo") and under_result_root("results/a/b/c")
    assert not under_result_root("results") and not under_result_root("elsewhere/x")
    assert not under_result_root("results/../elsewhere")
    code, _, err = _cli("regress", str(DEMO), "--cache-only", "--junit", "results/nightly/suite.junit.xml")
    assert code == 1 and (tmp_path / "results" / "nightly" / "suite.junit.xml").is_file(), err  # 1: no cache


def test_a_symbolic_link_as_output_is_refused(tmp_path):
    real = tmp_path / "real.json"
    real.write_text("{}")
    link = tmp_path / "link.json"
    link.symlink_to(real)
    with pytest.raises(InputError, match="symbolic link"):
        check_replaceable_file(link, "--junit", lambda p: True, "x")
    assert real.read_text() == "{}"


def test_second_run_on_one_output_is_refused_while_the_first_holds_it(tmp_path):
    out = tmp_path / "out"
    with output_lock(out, "--out"):
        assert lock_path(out).exists()
        with pytest.raises(InputError, match="another hornproof run is writing this folder"):
            with claimed_output_folder(out, "--out", "verify"):
                pass
    assert not lock_path(out).exists()  # removed when the run ends
    with claimed_output_folder(out, "--out", "verify"):  # free again
        pass


def test_leftovers_of_killed_runs_are_cleared_by_the_next_run(tmp_path):
    out = tmp_path / "out"
    # a killed run's staging folder: sentinel, and even a complete result.json in it
    killed = tmp_path / ".out.partial-k1ll3d"
    killed.mkdir()
    (killed / STAGING_SENTINEL).touch()
    (killed / "result.json").write_text('{"schema": "hornproof.result/1"}')
    empty = tmp_path / ".out.partial-empty1"
    empty.mkdir()
    image = tmp_path / ".out.model-1234.png"
    image.write_bytes(b"png")
    # a user's folder that happens to have such a name but no sentinel: not ours, kept
    lookalike = tmp_path / ".out.partial-users"
    lookalike.mkdir()
    (lookalike / "data.csv").write_text("1,2")
    other = tmp_path / ".other.partial-abc"  # another output's leftover: not this run's business
    other.mkdir()
    (other / STAGING_SENTINEL).touch()
    told = []
    with claimed_output_folder(out, "--out", "verify", tell=told.append):
        pass
    assert not killed.exists() and not empty.exists() and not image.exists()
    assert (lookalike / "data.csv").read_text() == "1,2" and other.exists()
    assert len(told) == 3 and all("leftover of a killed run" in line for line in told)


def test_report_refuses_a_staging_leftover_holding_a_complete_result(tmp_path):
    killed = tmp_path / ".out.partial-k1ll3d"
    killed.mkdir()
    (killed / STAGING_SENTINEL).touch()
    (killed / "result.json").write_text('{"schema": "hornproof.result/1", "case": "x", "frequencies_ghz": [10]}')
    write_marker(killed, "verify")
    code, _, err = _cli("report", str(killed))
    assert code == 2 and "not a published hornproof result folder" in _one_error_line(err)
    assert not (killed / "report.html").exists()


@pytest.mark.parametrize("content", [bytes(range(256)) * 4, b'{"schema": "hornproof.result/1", "case": "x", '
                                                           b'"frequencies_ghz": ["ten", "eleven"]}'])
def test_report_on_a_corrupt_result_is_one_line(tmp_path, content):
    folder = _published(tmp_path, "out", "verify")
    (folder / "result.json").write_bytes(content)
    code, _, err = _cli("report", str(folder))
    assert code == 2 and str(folder) in _one_error_line(err)


def test_sweep_out_refuses_a_users_folder_with_points(tmp_path):
    decoy = tmp_path / "mine"
    (decoy / "points").mkdir(parents=True)
    (decoy / "report.html").write_text("the user's page")
    code, _, err = _cli("sweep", str(SWEEP), "--analytic-only", "--out", str(decoy))
    assert code == 2 and "--out" in _one_error_line(err) and str(decoy) in err
    assert (decoy / "report.html").read_text() == "the user's page"


def test_sweep_resumes_in_its_own_folder_and_lists_what_it_wrote(tmp_path):
    out = tmp_path / "sweep-out"
    assert _cli("sweep", str(SWEEP), "--analytic-only", "--out", str(out))[0] == 0
    marker = read_marker(out)
    assert marker["kind"] == "sweep" and {"sweep.json", "report.html", "points"} <= set(marker["entries"])
    assert check_output_folder(out, "--out", kind="sweep") == out  # its own: a rerun may use it
    code, _, err = _cli("simulate", str(DEMO), "--out", str(out))  # another command's: refused
    assert code == 2 and "not a simulate result" in _one_error_line(err)


def test_regress_outputs_are_checked_before_anything_runs(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    decoy = tmp_path / "passwd"  # stands in for a system file; made here
    decoy.write_text("root:x:0:0\n")
    code, _, err = _cli("regress", str(DEMO), "--cache-only", "--summary", str(decoy))
    assert code == 2 and "refusing to overwrite" in _one_error_line(err)
    assert decoy.read_text() == "root:x:0:0\n"
    assert not (tmp_path / "results").exists()  # a refused run leaves nothing behind
    code, _, err = _cli("regress", str(DEMO), "--cache-only", "--junit", str(tmp_path / "new" / "sub" / "j.xml"))
    assert code == 2 and "does not exist" in _one_error_line(err)
    assert not (tmp_path / "new").exists()


def test_full_disk_while_writing_the_summary_is_exit_3_naming_the_file(tmp_path, monkeypatch):
    # A full disk simulated: every fsync of a hornproof atomic write fails with ENOSPC (what a
    # full file system returns, POSIX errno.h); the file the user named must be in the message,
    # never a temporary name, and the exit status is 3 (README: the run failed, out of resources).
    import hornproof.atomic as atomic

    monkeypatch.chdir(tmp_path)

    def no_space(fd):
        raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))

    monkeypatch.setattr(atomic.os, "fsync", no_space)
    code, _, err = _cli("regress", str(DEMO), "--cache-only", "--summary", "suite.json")
    line = _one_error_line(err)
    assert code == 3 and "suite.json" in line and "no space left" in line and ".part" not in line
    assert not [p for p in tmp_path.rglob("*.part")]
