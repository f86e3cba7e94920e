"""Case-file keys of issue "range and shop": wall metal, [range], [tolerance] read into SI.

The conductivity of copper (5.813e7 S/m) is Pozar's Appendix F value (from memory); the
rest is hornproof's own format.
"""

import pytest

from hornproof.compare.case.casefile import load_case
from hornproof.errors import InputError

BASE = """\
format = 1
title = "Range and shop (invented scenario for a test)"
[horn]
type = "pyramidal"
waveguide = "WR-90"
aperture_a_mm = 90.0
aperture_b_mm = 70.0
flare_length_mm = 160.0
{horn_extra}
[band]
f_min_ghz = 9.5
f_max_ghz = 10.5
points = 3
{tables}
"""


def case(tmp_path, horn_extra="", tables=""):
    path = tmp_path / "case.toml"
    path.write_text(BASE.format(horn_extra=horn_extra, tables=tables))
    return load_case(path)


def test_without_the_new_keys_nothing_changes(tmp_path):
    plain = case(tmp_path)
    assert plain.wall is None and plain.range_distances == () and plain.tolerance is None


def test_wall_material_by_name_and_by_number(tmp_path):
    copper = case(tmp_path, 'wall_material = "copper"\nwall_roughness_um = 0.4\nfeed_guide_length_mm = 50')
    assert copper.wall.material.conductivity == pytest.approx(5.813e7)
    assert copper.wall.material.roughness_rms == pytest.approx(0.4e-6)
    assert copper.wall.feed_guide_length == pytest.approx(0.05)
    alloy = case(tmp_path, "wall_material = 2.4e7")
    assert alloy.wall.material.name == "custom" and alloy.wall.feed_guide_length == 0.0


def test_range_and_tolerance_tables(tmp_path):
    c = case(tmp_path, tables="[range]\ndistances_m = [10.0, 3.0]\n[tolerance]\nall_mm = 0.1\n"
                              "flare_length_mm = 0.3\nsamples = 50\nmodel = \"exact_phase\"")
    assert c.range_distances == (3.0, 10.0)
    assert c.tolerance.tolerances["L"] == pytest.approx(0.3e-3)
    assert c.tolerance.tolerances["A"] == pytest.approx(0.1e-3)
    assert set(c.tolerance.tolerances) == set("ABLab")
    assert c.tolerance.samples == 50 and c.tolerance.model == "exact_phase"


def test_with_range_replaces_the_distances_and_the_hash(tmp_path):
    c = case(tmp_path)
    ranged = c.with_range([5.0])
    assert ranged.range_distances == (5.0,) and ranged.sha256 != c.sha256
    with pytest.raises(InputError, match="--range-m"):
        c.with_range([0.0])
