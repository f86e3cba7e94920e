"""Content-hash keyed result cache: keys, publishing finished runs, never reading partial ones."""

import json

import pytest

from hornproof.compare.regress.cache import KEY_FILE, RESULT_FILE, ResultCache, cache_key

BASE = dict(case_sha256="a" * 64, tier="quick", settings={"dims": 2, "cells_per_wavelength": [10.0]},
            solver_version="1.25.0", hornproof_version="0.1.0")


def _result(sha="a" * 64):
    return {"schema": "hornproof.result/1", "case": "horn", "case_sha256": sha, "frequencies_ghz": [10.0],
            "models": {"fdtd": {"directivity_dbi": [15.0]}}}


def test_key_is_stable_and_depends_on_every_input():
    key, inputs = cache_key(**BASE)
    assert cache_key(**BASE)[0] == key
    assert inputs["tier"] == "quick" and len(key) == 24 and int(key, 16) >= 0
    changes = {"case_sha256": "b" * 64, "tier": "full", "settings": {"dims": 3, "cells_per_wavelength": [10.0]},
               "solver_version": "1.26.0", "hornproof_version": "0.2.0"}
    keys = {key}
    for name, value in changes.items():
        keys.add(cache_key(**{**BASE, name: value})[0])
    assert len(keys) == 1 + len(changes)


def test_settings_order_does_not_change_the_key():
    reordered = {**BASE, "settings": {"cells_per_wavelength": [10.0], "dims": 2}}
    assert cache_key(**reordered)[0] == cache_key(**BASE)[0]


def test_round_trip_and_partial_never_read(tmp_path):
    cache = ResultCache(tmp_path)
    key, inputs = cache_key(**BASE)
    partial = cache.begin("horn", key, "tok1")
    (partial / RESULT_FILE).write_text(json.dumps(_result()))
    # a finished-looking result inside a partial folder is still not a result
    assert cache.lookup("horn", key) is None
    final = cache.commit(partial, "horn", key, inputs)
    assert final == cache.entry_dir("horn", key) and not partial.exists()
    assert cache.lookup("horn", key, "a" * 64)["case"] == "horn"
    assert json.loads((final / KEY_FILE).read_text())["tier"] == "quick"


def test_commit_refuses_an_unfinished_run(tmp_path):
    cache = ResultCache(tmp_path)
    key, inputs = cache_key(**BASE)
    partial = cache.begin("horn", key, "tok")
    (partial / RESULT_FILE).write_text('{"schema": "hornproof.result/1", "cas')  # cut short
    with pytest.raises(ValueError, match="not a finished result"):
        cache.commit(partial, "horn", key, inputs)
    assert not cache.entry_dir("horn", key).exists()


@pytest.mark.parametrize("content, problem", [
    ("{not json", "unreadable"),
    (json.dumps({**_result(), "schema": "hornproof.result/9"}), "schema"),
    (json.dumps(_result(sha="c" * 64)), "case_sha256"),
    (json.dumps([1, 2]), "not a JSON object"),
])
def test_lookup_ignores_and_reports_bad_entries(tmp_path, content, problem):
    cache = ResultCache(tmp_path)
    key, _ = cache_key(**BASE)
    entry = cache.entry_dir("horn", key)
    entry.mkdir(parents=True)
    (entry / RESULT_FILE).write_text(content)
    notes = []
    assert cache.lookup("horn", key, "a" * 64, notes) is None
    assert len(notes) == 1 and problem in notes[0] and str(entry) in notes[0]


def test_commit_replaces_an_existing_entry(tmp_path):
    cache = ResultCache(tmp_path)
    key, inputs = cache_key(**BASE)
    for value in (15.0, 16.0):
        partial = cache.begin("horn", key, f"t{value:g}")
        result = _result()
        result["models"]["fdtd"]["directivity_dbi"] = [value]
        cache.write_result(partial, result)
        cache.commit(partial, "horn", key, inputs)
    assert cache.lookup("horn", key)["models"]["fdtd"]["directivity_dbi"] == [16.0]
    assert sorted(p.name for p in (tmp_path / "horn").iterdir()) == [key]


def test_failed_run_kept_aside_not_as_result(tmp_path):
    cache = ResultCache(tmp_path)
    key, _ = cache_key(**BASE)
    partial = cache.begin("horn", key, "tok")
    (partial / "log.txt").write_text("diverged")
    failed = cache.keep_failed(partial, "horn", key)
    assert (failed / "log.txt").read_text() == "diverged"
    assert failed.name.startswith(".") and cache.lookup("horn", key) is None


@pytest.mark.parametrize("name", ["", "..", "a/b", ".hidden"])
def test_names_that_cannot_be_folders_are_refused(tmp_path, name):
    with pytest.raises(ValueError, match="case name"):
        ResultCache(tmp_path).entry_dir(name, "k")
