"""The plausibility table: each value the audit found accepted silently is refused or warned,
with one line naming the file and the key; the README carries the same table.

Outside facts used (source beside each): the TE10 cutoff c/2a of WR-90 (a = 22.86 mm, EIA
RS-261 size) = 6.557 GHz; copper's resistivity 1.68e-8 ohm m (CRC Handbook of Chemistry and
Physics, 20 C) and the skin depth sqrt(rho / (pi f mu0)) (Pozar, Microwave Engineering, 4th ed.,
eq. 1.63).
"""

import math
import re
from pathlib import Path

import pytest

from hornproof.compare.case.casefile import load_case
from hornproof.compare.case.plausibility import LIMITS, judge_value, limit_named
from hornproof.compare.case.values import CaseProblem
from hornproof.errors import InputError

ROOT = Path(__file__).resolve().parents[3]
DEMO = ROOT / "cases" / "demo-h-sectoral.toml"
SWEEP = ROOT / "cases" / "sweep-h-flare.toml"


def _variant(tmp_path, source, *edits):
    text = source.read_text()
    for old, new in edits:
        assert old in text, old
        text = text.replace(old, new, 1)
    path = tmp_path / "variant.toml"
    path.write_text(text)
    return path


@pytest.mark.parametrize("edits, key", [
    ([("f_min_ghz = 9.5", "f_min_ghz = 6000"), ("f_max_ghz = 10.5", "f_max_ghz = 6500")], "band.f_min_ghz"),
    ([("f_max_ghz = 10.5", "f_max_ghz = 1e308")], "band.f_max_ghz"),
    ([("flare_length_mm = 90.0", "flare_length_mm = 1e308")], "horn.flare_length_mm"),
    ([("flare_length_mm = 90.0", "flare_length_mm = 1e6")], "horn.flare_length_mm"),
    ([("wall_mm = 1.0", "wall_mm = 1e-308")], "horn.wall_mm"),
    ([("wall_mm = 1.0", "wall_mm = 1e6")], "horn.wall_mm"),
    ([("directivity_db = 0.5", "directivity_db = 1e9")], "checks"),
    ([("[fdtd]", "[fdtd]\npml_wavelengths = 1e-6")], "fdtd.pml_wavelengths"),
    ([("[fdtd]", "[fdtd]\npml_wavelengths = 1000")], "fdtd.pml_wavelengths"),
    ([("[fdtd]", "[fdtd]\nfeed_length_wavelengths = 1e-9")], "fdtd.feed_length_wavelengths"),
    # WR-90 TE10 cutoff 6.557 GHz (c / 2a, a = 22.86 mm): a hair above it
    ([("f_min_ghz = 9.5", "f_min_ghz = 6.5575")], "band.f_min_ghz"),
    ([("f_min_ghz = 9.5\nf_max_ghz = 10.5\npoints = 5",
       "frequencies_ghz = [10.0, 10.000000000000002]")], "band.frequencies_ghz"),
])
def test_impossible_values_are_refused_naming_the_key(tmp_path, edits, key):
    path = _variant(tmp_path, DEMO, *edits)
    with pytest.raises(InputError) as caught:
        load_case(path)
    message = str(caught.value)
    assert message.startswith(f"{path}: {key}") and "\n" not in message, message


def test_sweep_rung_beyond_the_cell_cap_is_refused(tmp_path):
    text = SWEEP.read_text()
    sweep_table = text.index("[sweep]")
    cells = re.compile(r"^cells_per_wavelength\s*=\s*\S+", re.M).search(text, sweep_table)
    assert cells, "the shipped sweep names its cells per wavelength in [sweep]"
    path = tmp_path / "s.toml"
    path.write_text(text[:cells.start()] + "cells_per_wavelength = 300" + text[cells.end():])
    with pytest.raises(InputError, match=r"sweep.cells_per_wavelength: .*x 2 rung"):
        load_case(path)


def test_swept_lengths_of_a_nanometre_are_refused(tmp_path):
    path = _variant(tmp_path, DEMO, ("[checks]", '[sweep]\nparameter = "flare_length_mm"\nvalues = [1e-9, 90]\n'
                                                 "\n[checks]"))
    with pytest.raises(InputError, match=r"sweep\.values"):
        load_case(path)


def test_implausible_but_possible_values_warn(tmp_path):
    path = _variant(tmp_path, DEMO, ("wall_mm = 1.0", "wall_mm = 0.0015"))
    case = load_case(path)
    assert any("horn.wall_mm" in w and "implausible" in w for w in case.warnings)


def test_warnings_print_before_the_safety_text(tmp_path, capsys):
    from hornproof.compare.cli.main import main

    path = _variant(tmp_path, DEMO, ("wall_mm = 1.0", "wall_mm = 0.0015"))
    assert main(["predict", str(path)]) == 0
    out = capsys.readouterr().out
    assert out.index("warning:") < out.index("IEEE C95.1-2019")


def test_shipped_cases_are_plausible():
    for case in sorted((ROOT / "cases").glob("*.toml")):
        assert not [w for w in load_case(case).warnings if "implausible" in w or "refused" in w], case


def test_wall_bound_is_below_the_skin_depth_it_cites():
    # skin depth of copper at 1 GHz from the textbook formula (Pozar eq. 1.63), rho from CRC
    rho, mu0 = 1.68e-8, 4e-7 * math.pi
    depth_um = math.sqrt(rho / (math.pi * 1e9 * mu0)) * 1e6
    assert depth_um == pytest.approx(2.06, abs=0.01)
    wall = limit_named("wall thickness")
    assert wall.refused[0] * 1e3 < depth_um  # the refused bound (mm) is thinner than one skin depth
    assert "2 um" in wall.reason


def test_one_value_against_one_row():
    assert judge_value("lowest frequency", 10.0) is None
    assert "implausible" in judge_value("lowest frequency", 500.0)
    with pytest.raises(CaseProblem):
        judge_value("lowest frequency", 6000.0)
    with pytest.raises(CaseProblem):
        judge_value("lowest frequency", float("nan"))


def test_readme_carries_the_same_table():
    readme = (ROOT / "README.md").read_text()
    section = readme.split("## Plausibility limits", 1)[1].split("\n## ", 1)[0]
    rows = [line for line in section.splitlines() if line.startswith("| ") and not line.startswith("| limit")
            and not line.startswith("| ---")]
    assert len(rows) == len(LIMITS)
    for row, limit in zip(rows, LIMITS):
        cells = [cell.strip() for cell in row.strip("|").split("|")]
        assert cells[0] == limit.name and cells[1] == f"`{limit.key}`", row
        for bound in limit.refused + limit.plausible:
            if bound is not None:
                assert f"{bound:g}" in row, (bound, row)
