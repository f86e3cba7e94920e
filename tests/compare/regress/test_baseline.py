"""Baseline file format hornproof.baseline/1: round trip, diffable layout, refusals with a hint."""

import json
import math

import pytest

from hornproof.compare.output.baseline_file import (
    SCHEMA,
    baseline_path,
    figures_from_result,
    read_baseline,
    write_baseline,
)
from hornproof.compare.regress.baseline import baseline_from_result
from hornproof.errors import InputError


def _result():
    return {
        "schema": "hornproof.result/1", "case": "horn", "case_sha256": "d" * 64,
        "frequencies_ghz": [9.0, 10.0],
        "models": {
            "closed_form": {"directivity_dbi": [14.0, 15.0]},
            "fdtd": {"directivity_dbi": [14.2, 15.1], "hpbw_h_deg": [30.0, 27.5], "sll_e_db": [-12.0, float("nan")],
                     "s11_db": [-25.0, -27.0],
                     "uncertainty": {"directivity_dbi": [0.1, 0.12], "hpbw_h_deg": [0.5, None]}},
        },
        "solver": {"meep": "1.25.0", "cells_per_wavelength": [10.0], "seconds": 3.0},
    }


def _baseline():
    return baseline_from_result(_result(), case="horn", tier="quick", settings={"dims": 2},
                                hornproof_version="0.1.0", recorded_utc="2026-12-01T00:00:00Z")


def test_round_trip(tmp_path):
    path = baseline_path(tmp_path / "baselines", "horn", "quick")
    assert path.name == "horn.quick.json"
    write_baseline(path, _baseline())
    back = read_baseline(path)
    assert back == _baseline()
    assert back.figures["sll_e_db"].values == [-12.0, None]  # NaN stored as null
    assert back.figures["hpbw_h_deg"].uncertainty == [0.5, None]
    assert back.figures["s11_db"].uncertainty == [None, None]
    assert back.solver == {"meep": "1.25.0", "cells_per_wavelength": [10.0]}


def test_file_is_pretty_sorted_json_for_diffs(tmp_path):
    path = tmp_path / "b.json"
    write_baseline(path, _baseline())
    text = path.read_text()
    data = json.loads(text)
    assert data["schema"] == SCHEMA
    assert text == json.dumps(data, indent=2, sort_keys=True) + "\n"
    assert data["units"]["hpbw_h_deg"] == "deg"
    assert "closed_form" not in text  # only the FDTD figures are baselined


def test_missing_file_is_none(tmp_path):
    assert read_baseline(tmp_path / "nothing.json") is None


def test_unknown_version_refused_with_hint(tmp_path):
    path = tmp_path / "b.json"
    write_baseline(path, _baseline())
    data = json.loads(path.read_text())
    data["schema"] = "hornproof.baseline/2"
    path.write_text(json.dumps(data))
    with pytest.raises(InputError) as info:
        read_baseline(path)
    message = str(info.value)
    assert str(path) in message and "schema" in message and "upgrade hornproof" in message
    assert "\n" not in message


@pytest.mark.parametrize("edit, key", [
    (lambda d: d.update(schema="something/1"), "schema"),
    (lambda d: d["figures"]["directivity_dbi"]["values"].pop(), "figures.directivity_dbi.values"),
    (lambda d: d["figures"]["hpbw_h_deg"].update(uncertainty=[-1.0, 0.0]), "negative uncertainty"),
    (lambda d: d["figures"]["s11_db"]["values"].__setitem__(0, "x"), "figures.s11_db.values[0]"),
    (lambda d: d.pop("case_sha256"), "case_sha256"),
    (lambda d: d.update(frequencies_ghz=[]), "frequencies_ghz"),
])
def test_malformed_files_name_file_and_key(tmp_path, edit, key):
    path = tmp_path / "b.json"
    write_baseline(path, _baseline())
    data = json.loads(path.read_text())
    edit(data)
    path.write_text(json.dumps(data))
    with pytest.raises(InputError) as info:
        read_baseline(path)
    assert str(path) in str(info.value) and key in str(info.value)


def test_not_json_names_the_file(tmp_path):
    path = tmp_path / "b.json"
    path.write_text("{\n  \"schema\": ")
    with pytest.raises(InputError, match="not valid JSON"):
        read_baseline(path)


def test_failed_write_keeps_the_old_file(tmp_path):
    path = tmp_path / "b.json"
    write_baseline(path, _baseline())
    before = path.read_text()
    broken = _baseline()
    broken.figures["directivity_dbi"].values[0] = math.inf  # JSON cannot hold it
    with pytest.raises(ValueError):
        write_baseline(path, broken)
    assert path.read_text() == before
    assert [p.name for p in tmp_path.iterdir()] == ["b.json"]


def test_figures_from_result_checks_alignment_and_aliases():
    result = _result()
    result["models"]["fdtd"]["uncertainty"] = {"directivity_db": [0.2, 0.3]}  # older key name
    _, figures = figures_from_result(result)
    assert figures["directivity_dbi"].uncertainty == [0.2, 0.3]
    result["models"]["fdtd"]["hpbw_h_deg"] = [30.0]
    with pytest.raises(ValueError, match=r"models\.fdtd\.hpbw_h_deg: 1 values, expected 2"):
        figures_from_result(result)
    with pytest.raises(ValueError, match="models.fdtd"):
        figures_from_result({"frequencies_ghz": [1.0], "models": {}})
