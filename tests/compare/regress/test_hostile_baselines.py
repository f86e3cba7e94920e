"""Baselines and cached results that could lie: the checks of hornproof's own contract
(README.md "Output folders and files"): a baseline names its case; an uncertainty that would
swallow any change is refused; only the computation (not the [checks] judgement) decides
comparability; a cached result whose bytes changed after it was cached is run again.
"""

import json
from pathlib import Path

import pytest

from hornproof.compare.case.casefile import load_case
from hornproof.compare.output.baseline_file import FigureRecord, read_baseline, write_baseline
from hornproof.compare.regress.baseline import baseline_from_result
from hornproof.compare.regress.cache import RESULT_FILE, ResultCache, cache_key
from hornproof.compare.regress.classify import NOT_COMPARABLE_HINT, compare_case
from hornproof.errors import InputError

ROOT = Path(__file__).resolve().parents[3]
DEMO = ROOT / "cases" / "demo-h-sectoral.toml"


def _result(sha="d" * 64):
    return {"schema": "hornproof.result/1", "case": "horn", "case_sha256": sha, "frequencies_ghz": [9.0, 10.0],
            "models": {"fdtd": {"directivity_dbi": [14.2, 15.1],
                                "uncertainty": {"directivity_dbi": [0.1, 0.12]}}},
            "solver": {"meep": "1.25.0", "cells_per_wavelength": [10.0]}}


def _stored(tmp_path, **changes):
    baseline = baseline_from_result(_result(), case="horn", tier="quick", settings={},
                                    hornproof_version="x", computation_sha256="c" * 64)
    path = tmp_path / "horn.quick.json"
    write_baseline(path, baseline)
    data = json.loads(path.read_text())
    for dotted, value in changes.items():
        holder = data
        *parents, last = dotted.split(".")
        for name in parents:
            holder = holder[name]
        holder[last] = value
    path.write_text(json.dumps(data))
    return path


def test_a_baseline_of_another_case_is_refused(tmp_path):
    path = _stored(tmp_path, case="other-horn")
    with pytest.raises(InputError, match=r"case: the baseline is for case 'other-horn', not 'horn'"):
        read_baseline(path, expected_case="horn")


def test_an_uncertainty_that_swallows_any_change_is_refused(tmp_path):
    # the audit's baseline: +30 dB with an uncertainty of 1e9 dB read "unchanged"
    path = _stored(tmp_path, **{"figures.directivity_dbi.values": [44.2, 45.1],
                                "figures.directivity_dbi.uncertainty": [1e9, 1e9]})
    with pytest.raises(InputError, match=r"figures.directivity_dbi.uncertainty: 1e\+09 dBi is beyond 20"):
        read_baseline(path, expected_case="horn")


def test_editing_only_checks_keeps_the_computation_hash(tmp_path):
    text = DEMO.read_text()
    looser = tmp_path / "demo-h-sectoral.toml"
    looser.write_text(text.replace("directivity_db = 0.5", "directivity_db = 0.8"))
    original, edited = load_case(DEMO), load_case(looser)
    assert original.sha256 != edited.sha256  # the case changed ...
    assert original.computation_sha256 == edited.computation_sha256  # ... but not what is computed
    moved = tmp_path / "m.toml"
    moved.write_text(text.replace("flare_length_mm = 90.0", "flare_length_mm = 91.0"))
    assert load_case(moved).computation_sha256 != original.computation_sha256
    tier = original.for_tier("quick")
    assert tier.computation_sha256 != original.computation_sha256  # the tier is part of it


def test_tolerance_edit_is_comparable_but_a_geometry_edit_is_not_and_says_what_to_do(tmp_path):
    baseline = read_baseline(_stored(tmp_path))
    figures = {"directivity_dbi": FigureRecord(values=[14.2, 15.1], uncertainty=[0.1, 0.12])}
    same = compare_case(baseline, "e" * 64, [9.0, 10.0], figures, {"directivity_db": 0.8},
                        computation_sha256="c" * 64)
    assert [v.status for v in same] == ["unchanged"]
    other = compare_case(baseline, "e" * 64, [9.0, 10.0], figures, {}, computation_sha256="f" * 64)
    assert other[0].status == "not-comparable" and other[0].reason.endswith(NOT_COMPARABLE_HINT)


def test_a_cached_result_edited_after_caching_runs_again(tmp_path):
    cache = ResultCache(tmp_path)
    key, inputs = cache_key(case_sha256="a" * 64, tier="quick", settings={}, solver_version="1.25.0",
                            hornproof_version="x")
    partial = cache.begin("horn", key, "t0")
    cache.write_result(partial, _result("a" * 64))
    cache.commit(partial, "horn", key, inputs)
    assert cache.lookup("horn", key, "a" * 64) is not None
    stored = cache.entry_dir("horn", key) / RESULT_FILE
    edited = json.loads(stored.read_text())
    edited["models"]["fdtd"]["directivity_dbi"] = [19.2, 20.1]  # +5 dB typed in
    stored.write_text(json.dumps(edited, indent=2, sort_keys=True) + "\n")
    notes = []
    assert cache.lookup("horn", key, "a" * 64, notes) is None
    assert len(notes) == 1 and "does not match the hash recorded" in notes[0]
