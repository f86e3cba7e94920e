"""The ``[map]`` table: good tables parsed, every mistake one line naming file, key and reason.

Geometry used as the outside check: a straight flare from the guide edge to the aperture edge
gives A = a + 2 L tan(θ) (similar triangles; plain geometry), so a horn made by the map at
(θ, L) has the flare half-angle θ whatever L is.
"""

import math

import pytest

from hornproof.compare.case.casefile import load_case
from hornproof.errors import InputError

BASE = """\
# Invented scenario for a test.
format = 1
title = "map table test"
[horn]
type = "{kind}"
waveguide = "WR-90"
aperture_a_mm = {a}
aperture_b_mm = {b}
flare_length_mm = 60.0
[band]
f_min_ghz = 10.0
f_max_ghz = 10.0
points = 1
[map]
{map}
"""

GOOD_MAP = """\
x_parameter = "flare_half_angle_h_deg"
x_values = [15, 30, 45]
y_parameter = "flare_length_mm"
y_values = [40, 80]
"""


def write(tmp_path, map_text, kind="h-sectoral", a=60.0, b=10.16):
    path = tmp_path / "map.toml"
    path.write_text(BASE.format(kind=kind, a=a, b=b, map=map_text))
    return path


def test_good_map_is_read(tmp_path):
    case = load_case(write(tmp_path, GOOD_MAP))
    spec = case.map
    assert spec.x_values == (15.0, 30.0, 45.0) and spec.y_values == (40.0, 80.0)
    assert spec.dims == 3 and spec.cells_per_wavelength is None and spec.analytic_samples == 60
    assert len(spec.fdtd_grid()) == 6
    for _, _, angle, length in spec.fdtd_grid():
        horn = spec.horn_at(case.horn, angle, length)
        assert horn.flare_length == pytest.approx(length * 1e-3)
        # A = a + 2 L tan θ (similar triangles)
        assert horn.aperture_a == pytest.approx(22.86e-3 + 2 * length * 1e-3 * math.tan(math.radians(angle)))
        assert math.degrees(horn.flare_half_angle_h) == pytest.approx(angle)


def test_a_case_without_a_map_has_none(tmp_path):
    path = tmp_path / "plain.toml"
    path.write_text(BASE.format(kind="h-sectoral", a=60.0, b=10.16, map="").replace("[map]\n", ""))
    assert load_case(path).map is None


def test_map_changes_the_case_hash(tmp_path):
    first = load_case(write(tmp_path, GOOD_MAP)).sha256
    second = load_case(write(tmp_path, GOOD_MAP.replace("[40, 80]", "[40, 90]"))).sha256
    assert first != second


@pytest.mark.parametrize("map_text, kind, key, reason", [
    (GOOD_MAP + "colour = 1\n", "h-sectoral", "map.colour", "unknown key"),
    (GOOD_MAP.replace("x_values = [15, 30, 45]\n", ""), "h-sectoral", "map.x_values", "missing required key"),
    (GOOD_MAP.replace("[15, 30, 45]", "[15]"), "h-sectoral", "map.x_values", "at least 2"),
    (GOOD_MAP.replace("[15, 30, 45]", "[15, 30, 15]"), "h-sectoral", "map.x_values", "repeated value"),
    (GOOD_MAP.replace("[15, 30, 45]", '"15, 30"'), "h-sectoral", "map.x_values", "must be a list"),
    (GOOD_MAP.replace("[40, 80]", "[40, nan]"), "h-sectoral", "map.y_values[1]", "finite"),
    (GOOD_MAP.replace('"flare_length_mm"', '"flare_half_angle_h_deg"'), "h-sectoral", "map.y_parameter",
     "the same"),
    (GOOD_MAP.replace('"flare_length_mm"', '"aperture_a_mm"').replace("[40, 80]", "[60, 90]"), "h-sectoral",
     "map.y_parameter", "same aperture size"),
    (GOOD_MAP.replace('"flare_length_mm"', '"flare_half_angle_e_deg"'), "h-sectoral", "map.y_parameter",
     "no E-plane flare"),
    (GOOD_MAP.replace('"flare_half_angle_h_deg"', '"flare_angle"'), "h-sectoral", "map.x_parameter",
     "unknown value"),
    (GOOD_MAP.replace("[15, 30, 45]", "[15, 30, 85]"), "h-sectoral", "map", "impossible horn"),
    (GOOD_MAP + "analytic_samples = 3\n", "h-sectoral", "map.analytic_samples", "from 8 to 400"),
    (GOOD_MAP + "analytic_samples = 20.5\n", "h-sectoral", "map.analytic_samples", "integer"),
    (GOOD_MAP + "dims = 4\n", "h-sectoral", "map.dims", "2 or 3"),
    (GOOD_MAP + "cells_per_wavelength = [2, 12]\n", "h-sectoral", "map.cells_per_wavelength", "too coarse"),
])
def test_map_mistakes_are_one_line(tmp_path, map_text, kind, key, reason):
    path = write(tmp_path, map_text, kind=kind)
    with pytest.raises(InputError) as caught:
        load_case(path)
    message = str(caught.value)
    assert "\n" not in message
    assert message.startswith(f"{path}: {key}"), message
    assert reason in message, message


def test_pyramidal_map_has_no_2d_model(tmp_path):
    text = GOOD_MAP + "dims = 2\n"
    path = write(tmp_path, text, kind="pyramidal", a=60.0, b=40.0)
    with pytest.raises(InputError, match=r"map\.dims: a pyramidal horn"):
        load_case(path)
