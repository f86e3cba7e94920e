"""Case-file format 1: the malformed corpus, and good files parsed into SI.

Outside values used here, with their sources:

* EIA RS-261 / IEC 60153-2 waveguide sizes are defined in inches (WR-90: 0.900 x 0.400 in,
  WR-62: 0.622 x 0.311 in; from memory); 1 in = 25.4 mm exactly.
* TE10 cutoff f_c = c / (2 a) and TE20 cutoff c / a (any waveguide text; exact), with
  c = 299 792 458 m/s (SI, exact). For WR-90 f_c = 6.557 GHz is the handbook figure (from memory).
* Exact-path versus quadratic phase error: they agree below S = 0.2 wavelength and differ by
  more than 0.7 dB of gain at S = 1 wavelength for a 5-wavelength aperture (IEEE AP-S 1992,
  "Pyramidal horn gain calculation with improved accuracy", doi:10.1109/APS.1992.221722,
  abstract). Used to judge the shipped
  "short-wide-flare" and "gentle-long" cases.
"""

import dataclasses
import math
import re
import shutil
from pathlib import Path

import numpy as np
import pytest

from hornproof.analytic.geometry import HornGeometry
from hornproof.compare.case.casefile import load_case
from hornproof.compare.case.horn_table import HORN_KEYS, geometry_key
from hornproof.compare.case.sweepspec import PARAMETER_LABELS, SWEEP_PARAMETERS, SweepSpec
from hornproof.errors import InputError

HERE = Path(__file__).parent
MALFORMED = HERE / "malformed"
CASES = HERE.parents[2] / "cases"
C = 299_792_458.0  # m/s, SI exact
INCH = 25.4e-3  # m, exact

GOOD = """\
format = 1
title = "Good case (invented scenario for a test)"

[horn]
type = "h-sectoral"
waveguide = "WR-90"
aperture_a_mm = 90.0
flare_length_mm = 90.0
wall_mm = 1.5

[band]
f_min_ghz = 9.5
f_max_ghz = 10.5
points = 5

[fdtd]
dims = 3
cells_per_wavelength = [16, 12, 24]

[checks]
directivity_db = 0.5
hpbw_deg = 2.0
"""

PYRAMIDAL = """\
format = 1
title = "Pyramidal (invented scenario for a test)"
[horn]
type = "pyramidal"
waveguide = "WR-90"
aperture_a_mm = 80.0
aperture_b_mm = 60.0
flare_length_mm = 70.0
[band]
f_min_ghz = 9.5
f_max_ghz = 10.5
points = 3
[fdtd]
cells_per_wavelength = [12, 16]
"""


def write(tmp_path, text, name="case.toml"):
    path = tmp_path / name
    path.write_text(text)
    return path


def replace_once(text, old, new):
    assert old in text, old
    return text.replace(old, new, 1)


def error_of(path):
    with pytest.raises(InputError) as caught:
        load_case(path)
    return str(caught.value)


# --- the malformed corpus ------------------------------------------------------------------


def corpus_files():
    return sorted(MALFORMED.glob("*.toml"))


def expectation(path):
    """(key, fragment) from the first line '# expect: <key> | <fragment>'."""
    first = path.read_bytes().split(b"\n", 1)[0].decode("ascii")
    found = re.fullmatch(r"# expect: (.+?) \| (.+)", first)
    assert found, f"{path.name}: first line must be '# expect: <key> | <fragment>'"
    return found.group(1), found.group(2)


def test_corpus_is_large_enough():
    assert len(corpus_files()) >= 30


@pytest.mark.parametrize("path", corpus_files(), ids=lambda p: p.stem)
def test_malformed_case_is_refused_with_one_line(path):
    key, fragment = expectation(path)
    message = error_of(path)
    assert "\n" not in message and "\r" not in message
    # "<file>: <dotted.key>: <reason>" (file-level problems put the reason where the key goes)
    assert message.startswith(f"{path}: {key}"), message
    reason = message[len(f"{path}: {key}"):]
    assert reason.startswith((": ", ", ")), message
    assert fragment in reason, message


def test_corpus_covers_every_table_for_unknown_keys():
    prefixes = set()
    for path in corpus_files():
        key, fragment = expectation(path)
        if "unknown key" in fragment or "did you mean" in fragment:
            prefixes.add(key.rsplit(".", 1)[0] if "." in key else "")
    assert {"", "horn", "band", "fdtd", "checks", "sweep", "tiers", "tiers.quick"} <= prefixes


def test_missing_file_and_directory_are_one_line_errors(tmp_path):
    missing = tmp_path / "nowhere.toml"
    message = error_of(missing)
    assert message == f"{missing}: cannot read the case file: no such file"
    message = error_of(tmp_path)
    assert message.startswith(f"{tmp_path}: cannot read the case file") and "\n" not in message


def test_unreadable_file_is_one_line_error(tmp_path):
    path = write(tmp_path, GOOD)
    path.chmod(0)
    try:
        try:
            path.read_bytes()
        except PermissionError:
            pass
        else:
            pytest.skip("running with privileges that ignore file permissions")
        message = error_of(path)
        assert message.startswith(f"{path}: cannot read the case file:") and "\n" not in message
    finally:
        path.chmod(0o644)


def test_syntax_error_names_the_line(tmp_path):
    text = replace_once(GOOD, "points = 5", "points = = 5")
    path = write(tmp_path, text)
    line = text.splitlines().index("points = = 5") + 1
    message = error_of(path)
    assert message.startswith(f"{path}: line {line}, column "), message
    assert "invalid TOML" in message and "\n" not in message


def test_failed_load_leaves_the_file_untouched(tmp_path):
    source = MALFORMED / "band-below-cutoff.toml"
    path = tmp_path / source.name
    shutil.copy(source, path)
    before = path.read_bytes()
    with pytest.raises(InputError):
        load_case(path)
    assert path.read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == [source.name]


def test_every_geometry_field_maps_to_a_case_key():
    for field in dataclasses.fields(HornGeometry):
        key = geometry_key(field.name, "horn.waveguide")
        assert key.startswith("horn.")
        assert key.split(".", 1)[1] in HORN_KEYS


# --- good files: values into SI ------------------------------------------------------------


def test_good_case_values_in_si(tmp_path):
    case = load_case(write(tmp_path, GOOD, "good-one.toml"))
    assert case.name == "good-one"
    assert case.title == "Good case (invented scenario for a test)"
    horn = case.horn
    assert horn.kind == "h-sectoral"
    assert horn.aperture_a == pytest.approx(0.090, rel=1e-12)
    assert horn.flare_length == pytest.approx(0.090, rel=1e-12)
    assert horn.wall_thickness == pytest.approx(1.5e-3, rel=1e-12)
    # an H-plane sectoral horn keeps B = b
    assert horn.aperture_b == horn.guide_b
    # ladder sorted coarse to fine
    assert case.fdtd.cells_per_wavelength == (12.0, 16.0, 24.0)
    assert case.fdtd.dims == 3
    assert case.checks == {"directivity_db": 0.5, "hpbw_deg": 2.0}
    assert case.check_model == "closed_form"
    assert case.sweep is None
    assert case.raw["horn"]["aperture_a_mm"] == 90.0
    assert case.warnings == ()


def test_eia_lookup_matches_the_inch_definition(tmp_path):
    # WR-90 is 0.900 x 0.400 in (EIA RS-261, from memory)
    case = load_case(write(tmp_path, GOOD))
    assert case.horn.guide_a == pytest.approx(0.900 * INCH, rel=1e-9)
    assert case.horn.guide_b == pytest.approx(0.400 * INCH, rel=1e-9)
    # WR-62 is 0.622 x 0.311 in (EIA RS-261, from memory); spelt without the hyphen
    text = replace_once(GOOD, '"WR-90"', '"wr62"')
    text = replace_once(text, "f_min_ghz = 9.5", "f_min_ghz = 12.5")
    text = replace_once(text, "f_max_ghz = 10.5", "f_max_ghz = 15.0")
    case = load_case(write(tmp_path, text))
    assert case.horn.guide_a == pytest.approx(0.622 * INCH, rel=2e-4)
    assert case.horn.guide_b == pytest.approx(0.311 * INCH, rel=2e-4)


def test_explicit_guide_size(tmp_path):
    text = replace_once(GOOD, 'waveguide = "WR-90"', "waveguide_a_mm = 23.0\nwaveguide_b_mm = 10.0")
    case = load_case(write(tmp_path, text))
    assert (case.horn.guide_a, case.horn.guide_b) == pytest.approx((0.023, 0.010), rel=1e-12)


def test_e_sectoral_defaults_and_accepts_equal_width(tmp_path):
    text = replace_once(GOOD, '"h-sectoral"', '"e-sectoral"')
    text = replace_once(text, "aperture_a_mm = 90.0", "aperture_b_mm = 60.0")
    case = load_case(write(tmp_path, text))
    assert case.horn.aperture_a == case.horn.guide_a
    assert case.horn.aperture_b == pytest.approx(0.060)
    written = replace_once(text, "aperture_b_mm = 60.0",
                           "aperture_b_mm = 60.0\naperture_a_mm = 22.86")
    assert load_case(write(tmp_path, written)).horn.aperture_a == case.horn.guide_a


def test_band_points_and_list(tmp_path):
    case = load_case(write(tmp_path, GOOD))
    np.testing.assert_allclose(case.frequencies, [9.5e9, 9.75e9, 10.0e9, 10.25e9, 10.5e9],
                               rtol=1e-12)
    assert not case.frequencies.flags.writeable
    text = replace_once(GOOD, "f_min_ghz = 9.5\nf_max_ghz = 10.5\npoints = 5",
                        "frequencies_ghz = [9.0, 10.0, 11.5]")
    case = load_case(write(tmp_path, text))
    np.testing.assert_allclose(case.frequencies, [9.0e9, 10.0e9, 11.5e9], rtol=1e-12)
    single = replace_once(GOOD, "f_min_ghz = 9.5\nf_max_ghz = 10.5\npoints = 5",
                          "f_min_ghz = 10.0\nf_max_ghz = 10.0")
    np.testing.assert_allclose(load_case(write(tmp_path, single)).frequencies, [10.0e9])


def test_band_at_cutoff_is_refused_and_just_above_warns(tmp_path):
    cutoff_ghz = C / (2 * 0.900 * INCH) / 1e9  # 6.557 GHz for WR-90 (handbook, from memory)
    assert cutoff_ghz == pytest.approx(6.557, abs=5e-4)
    below = replace_once(GOOD, "f_min_ghz = 9.5", f"f_min_ghz = {cutoff_ghz * 0.999:.4f}")
    message = error_of(write(tmp_path, below))
    assert ": band.f_min_ghz: " in message and "TE10 cutoff 6.557 GHz" in message
    near = replace_once(GOOD, "f_min_ghz = 9.5", f"f_min_ghz = {cutoff_ghz * 1.03:.4f}")
    case = load_case(write(tmp_path, near))
    assert any(": band.f_min_ghz: " in w and "within 5%" in w for w in case.warnings)
    clear = replace_once(GOOD, "f_min_ghz = 9.5", f"f_min_ghz = {cutoff_ghz * 1.07:.4f}")
    assert not any("within 5%" in w for w in load_case(write(tmp_path, clear)).warnings)


def test_te20_warning_only_for_the_feed_guide(tmp_path):
    te20_ghz = C / (0.900 * INCH) / 1e9  # TE20 cutoff c / a, 13.11 GHz for WR-90
    above = replace_once(GOOD, "f_max_ghz = 10.5", f"f_max_ghz = {te20_ghz * 1.02:.3f}")
    case = load_case(write(tmp_path, above))
    te20 = [w for w in case.warnings if "TE20" in w]
    assert len(te20) == 1 and ": band.f_max_ghz: " in te20[0] and "13.11 GHz" in te20[0]
    assert te20[0].startswith(str(tmp_path / "case.toml")) and "\n" not in te20[0]
    below = replace_once(GOOD, "f_max_ghz = 10.5", f"f_max_ghz = {te20_ghz * 0.98:.3f}")
    # the 90 mm aperture carries higher modes far lower (c/A = 3.3 GHz): normal, no warning
    assert not any("TE20" in w for w in load_case(write(tmp_path, below)).warnings)


def test_coarse_grid_warns_about_the_narrowest_opening(tmp_path):
    # b = 10.16 mm at 10.5 GHz (lambda = 28.55 mm): 10 cells/lambda gives 3.6 cells across b
    coarse = replace_once(PYRAMIDAL, "[12, 16]", "[10, 16]")
    warnings = load_case(write(tmp_path, coarse)).warnings
    grid = [w for w in warnings if "cells across" in w]
    assert len(grid) == 1 and ": fdtd.cells_per_wavelength: " in grid[0]
    assert "guide height b = 10.16 mm spans only 3.6 cells" in grid[0]
    assert load_case(write(tmp_path, PYRAMIDAL)).warnings == ()
    # a 2D H-plane model has no height: its narrowest opening is the guide width a
    flat = replace_once(GOOD, "dims = 3\ncells_per_wavelength = [16, 12, 24]",
                        "dims = 2\ncells_per_wavelength = [6, 10]")
    assert not any("cells across" in w for w in load_case(write(tmp_path, flat)).warnings)


# --- hash ----------------------------------------------------------------------------------


def test_hash_ignores_comments_layout_and_file_name(tmp_path):
    base = load_case(write(tmp_path, GOOD)).sha256
    assert re.fullmatch(r"[0-9a-f]{64}", base)
    edited = "# a new comment line\n" + GOOD.replace("aperture_a_mm = 90.0",
                                                     "aperture_a_mm   =   90.0   # widened")
    assert load_case(write(tmp_path, edited, "renamed.toml")).sha256 == base
    # key order inside a table is layout too
    reordered = GOOD.replace("aperture_a_mm = 90.0\nflare_length_mm = 90.0",
                             "flare_length_mm = 90.0\naperture_a_mm = 90.0")
    assert load_case(write(tmp_path, reordered)).sha256 == base


def test_hash_changes_with_any_value(tmp_path):
    base = load_case(write(tmp_path, GOOD)).sha256
    for old, new in (("aperture_a_mm = 90.0", "aperture_a_mm = 90.5"),
                     ("points = 5", "points = 6"),
                     ("directivity_db = 0.5", "directivity_db = 0.4"),
                     ('title = "Good case', 'title = "Good  case')):
        changed = load_case(write(tmp_path, replace_once(GOOD, old, new))).sha256
        assert changed != base, new


# --- tiers and grid override ---------------------------------------------------------------


def test_default_tiers(tmp_path):
    case = load_case(write(tmp_path, GOOD))
    quick = case.for_tier("quick")
    assert quick.tier == "quick"
    assert quick.fdtd.dims == 2  # sectoral horn: the quick tier runs the 2D model
    assert quick.fdtd.cells_per_wavelength == (10.0,)  # coarsest 12, capped at 10
    full = case.for_tier("full")
    assert full.fdtd == case.fdtd
    np.testing.assert_array_equal(full.frequencies, case.frequencies)
    assert len({case.sha256, quick.sha256, full.sha256}) == 3
    assert quick.sha256 == case.for_tier("quick").sha256
    # a ladder coarser than the cap keeps its coarsest value
    coarse = load_case(write(tmp_path, replace_once(GOOD, "[16, 12, 24]", "[8, 12]")))
    assert coarse.for_tier("quick").fdtd.cells_per_wavelength == (8.0,)
    # quick_2d = false keeps the case's dimension
    no2d = load_case(write(tmp_path, replace_once(GOOD, "dims = 3", "dims = 3\nquick_2d = false")))
    assert no2d.for_tier("quick").fdtd.dims == 3
    # pyramidal horns have no 2D model
    assert load_case(write(tmp_path, PYRAMIDAL)).for_tier("quick").fdtd.dims == 3


def test_written_tiers_and_unknown_tier(tmp_path):
    text = GOOD + "\n[tiers.quick]\ncells_per_wavelength = 8\npoints = 2\n" \
                  "\n[tiers.full]\ncells_per_wavelength = [20, 28]\n"
    case = load_case(write(tmp_path, text))
    quick = case.for_tier("quick")
    assert quick.fdtd.cells_per_wavelength == (8.0,)
    assert quick.fdtd.dims == 3  # a written tier replaces the default one
    np.testing.assert_allclose(quick.frequencies, [9.5e9, 10.5e9])
    assert case.for_tier("full").fdtd.cells_per_wavelength == (20.0, 28.0)
    with pytest.raises(InputError, match=r"tiers: unknown tier 'quik'.*did you mean 'quick'"):
        case.for_tier("quik")


def test_with_cells_overrides_the_ladder(tmp_path):
    case = load_case(write(tmp_path, GOOD))
    finer = case.with_cells([24, 20, 16])
    assert finer.fdtd.cells_per_wavelength == (16.0, 20.0, 24.0)
    assert finer.sha256 != case.sha256
    assert finer.horn == case.horn and finer.fdtd.dims == case.fdtd.dims
    # an explicit grid survives a tier change
    assert finer.for_tier("quick").fdtd.cells_per_wavelength == (16.0, 20.0, 24.0)
    assert case.with_cells(14).fdtd.cells_per_wavelength == (14.0,)
    with pytest.raises(InputError) as caught:
        case.with_cells([3])
    message = str(caught.value)
    assert message.startswith(f"{case.path}: --cells-per-wavelength: 3 cells per wavelength")
    with pytest.raises(InputError, match="--cells-per-wavelength: the list is empty"):
        case.with_cells([])
    with pytest.raises(InputError, match="got a boolean"):
        case.with_cells([True])


def test_case_is_frozen(tmp_path):
    case = load_case(write(tmp_path, GOOD))
    with pytest.raises(dataclasses.FrozenInstanceError):
        case.title = "changed"


# --- sweeps --------------------------------------------------------------------------------


def sweep_case(tmp_path, base, parameter, values, extra=""):
    text = base + f'\n[sweep]\nparameter = "{parameter}"\nvalues = {values}\n{extra}'
    return load_case(write(tmp_path, text))


def test_sweep_flare_angle_is_what_geometry_reports(tmp_path):
    case = sweep_case(tmp_path, GOOD, "flare_half_angle_h_deg", [10, 20, 30, 45])
    # 3D (the real horn) unless the sweep asks for the 2D look; no ladder: each point's default
    assert case.sweep.dims == 3 and case.sweep.cells_per_wavelength is None
    horns = case.sweep.horns(case.horn)
    assert [value for value, _ in horns] == [10, 20, 30, 45]
    for value, horn in horns:
        assert math.degrees(horn.flare_half_angle_h) == pytest.approx(value, abs=1e-9)
        assert horn.flare_length == case.horn.flare_length
        assert horn.aperture_b == case.horn.aperture_b
        # A = a + 2 L tan(angle), plain geometry of a straight wall
        expected = case.horn.guide_a + 2 * case.horn.flare_length * math.tan(math.radians(value))
        assert horn.aperture_a == pytest.approx(expected, rel=1e-12)


def test_sweep_e_plane_angle_on_pyramidal(tmp_path):
    case = sweep_case(tmp_path, PYRAMIDAL, "flare_half_angle_e_deg", [5, 15, 25])
    assert case.sweep.dims == 3  # pyramidal default
    for value, horn in case.sweep.horns(case.horn):
        assert math.degrees(horn.flare_half_angle_e) == pytest.approx(value, abs=1e-9)
        assert horn.aperture_a == case.horn.aperture_a


def test_sweep_flare_length_keeps_the_angles(tmp_path):
    case = sweep_case(tmp_path, PYRAMIDAL, "flare_length_mm", [35, 70, 140])
    for value, horn in case.sweep.horns(case.horn):
        assert horn.flare_length == pytest.approx(value * 1e-3)
        assert horn.flare_half_angle_h == pytest.approx(case.horn.flare_half_angle_h, rel=1e-12)
        assert horn.flare_half_angle_e == pytest.approx(case.horn.flare_half_angle_e, rel=1e-12)
    # doubling the length from the written horn doubles the flare growth D - d
    doubled = dict(case.sweep.horns(case.horn))[140]
    assert doubled.aperture_a - doubled.guide_a == pytest.approx(
        2 * (case.horn.aperture_a - case.horn.guide_a), rel=1e-12)


def test_sweep_aperture_and_cells(tmp_path):
    case = sweep_case(tmp_path, GOOD, "aperture_a_mm", [40, 60, 80],
                      "cells_per_wavelength = 16\ndims = 3\n")
    # one number N: the grids N, 1.4 N, 2 N (GRID_RATIOS)
    assert case.sweep.cells_per_wavelength == (16.0, 22.4, 32.0) and case.sweep.dims == 3
    assert [h.aperture_a for _, h in case.sweep.horns(case.horn)] == pytest.approx(
        [0.040, 0.060, 0.080])


def test_sweepspec_names_parameter_and_value():
    horn = HornGeometry("h-sectoral", 0.02286, 0.01016, 0.09, 0.01016, 0.09)
    spec = SweepSpec("flare_half_angle_h_deg", (10.0, 80.0), 2, 12.0)
    with pytest.raises(ValueError, match=r"^flare_half_angle_h_deg = 80: "):
        spec.horns(horn)
    with pytest.raises(ValueError, match=r"^aperture_a_mm = 10: .*smaller than the guide"):
        SweepSpec("aperture_a_mm", (10.0, 50.0), 2, 12.0).horns(horn)



@pytest.mark.parametrize("parameter", sorted(SWEEP_PARAMETERS))
def test_sweep_parameter_table_says_what_horn_at_does(parameter):
    described = SWEEP_PARAMETERS[parameter]
    # the unit shown to people is the unit the [sweep] name carries
    assert parameter.endswith("_" + described.unit)
    assert PARAMETER_LABELS[parameter] == (described.label, described.unit)
    base = HornGeometry("pyramidal", 0.02286, 0.01016, 0.09, 0.07, 0.16)
    value = 25.0 if described.unit == "deg" else 120.0
    swept = SweepSpec(parameter, (value, value + 5.0), 3, (12.0,), frequency=10e9).horn_at(base, value)
    if parameter == "optimum_flare_length_mm":
        assert swept.flare_length == pytest.approx(value * 1e-3)
    elif described.held_fixed == "flare length":
        assert swept.flare_length == base.flare_length
    else:
        assert described.held_fixed == "flare half-angles"
        assert swept.flare_length != base.flare_length
        assert swept.flare_half_angle_h == pytest.approx(base.flare_half_angle_h, rel=1e-12)
        assert swept.flare_half_angle_e == pytest.approx(base.flare_half_angle_e, rel=1e-12)

# --- the shipped cases ---------------------------------------------------------------------

SHIPPED = ("demo-h-sectoral", "e-sectoral", "pyramidal", "short-wide-flare", "gentle-long",
           "sweep-h-flare")


def centre(case):
    return float(np.mean([case.frequencies.min(), case.frequencies.max()]))


def wavelengths(case, size):
    return size * centre(case) / C


@pytest.mark.parametrize("name", SHIPPED)
def test_shipped_case_loads_and_says_it_is_invented(name):
    path = CASES / f"{name}.toml"
    case = load_case(path)
    assert "invented scenario" in path.read_text().lower()
    assert case.checks, "every shipped case carries tolerances"
    assert case.warnings == ()
    # modest: apertures of a few wavelengths, so FDTD runs in minutes on two cores
    assert max(wavelengths(case, case.horn.aperture_a), wavelengths(case, case.horn.aperture_b)) < 5
    assert name in (CASES / "README.md").read_text()


def test_demo_case_is_small():
    case = load_case(CASES / "demo-h-sectoral.toml")
    assert case.horn.kind == "h-sectoral" and case.fdtd.dims == 2
    assert len(case.fdtd.cells_per_wavelength) == 3
    assert 2.5 < wavelengths(case, case.horn.aperture_a) < 3.5
    assert "directivity_db" in case.checks


def test_pyramidal_case_is_moderate_and_3d():
    case = load_case(CASES / "pyramidal.toml")
    assert case.horn.kind == "pyramidal" and case.fdtd.dims == 3
    assert 2.5 <= wavelengths(case, case.horn.aperture_a) <= 3.0


def test_short_wide_flare_is_where_quadratic_phase_fails():
    # S about 1 wavelength: the regime where exact and quadratic phase differ by > 0.7 dB
    # (IEEE AP-S 1992, doi:10.1109/APS.1992.221722)
    case = load_case(CASES / "short-wide-flare.toml")
    f = centre(case)
    quadratic = float(case.horn.phase_error_h(f))
    exact = float(case.horn.exact_edge_path_h(f))
    assert 0.8 <= quadratic <= 1.2
    assert quadratic - exact > 0.1  # visibly different edge phase (> 36 deg)
    assert case.check_model == "exact_phase"


def test_gentle_long_is_where_quadratic_phase_holds():
    # S < 0.2: exact and quadratic phase agree (IEEE AP-S 1992, doi:10.1109/APS.1992.221722)
    case = load_case(CASES / "gentle-long.toml")
    assert np.all(case.horn.phase_error_h(case.frequencies) < 0.15)
    assert np.all(case.horn.phase_error_e(case.frequencies) < 0.15)
    assert wavelengths(case, case.horn.aperture_a) >= 3.0
    assert abs(float(case.horn.phase_error_h(centre(case)))
               - float(case.horn.exact_edge_path_h(centre(case)))) < 0.01


def test_sweep_case_spans_small_to_large_phase_error():
    case = load_case(CASES / "sweep-h-flare.toml")
    assert case.sweep.parameter == "flare_half_angle_h_deg" and case.sweep.dims == 2
    assert len(case.sweep.values) >= 8
    f = centre(case)
    errors = [float(horn.phase_error_h(f)) for _, horn in case.sweep.horns(case.horn)]
    assert errors == sorted(errors)
    assert errors[0] < 0.1 and errors[-1] > 1.0


@pytest.mark.parametrize("name", SHIPPED)
def test_shipped_pattern_checks_name_figures_the_model_defines(name):
    # a sidelobe or null tolerance is only meaningful where the analytic model has one
    from hornproof.analytic.predict import predict

    case = load_case(CASES / f"{name}.toml")
    model = predict(case.horn, case.frequencies, dims=case.fdtd.dims)[case.check_model]
    figures = {"sll_db": ("sll_h_db", "sll_e_db"),
               "first_null_deg": ("first_null_h_deg", "first_null_e_deg")}
    for check, attributes in figures.items():
        if check in case.checks:
            values = np.concatenate([np.asarray(getattr(model, attribute), dtype=float)
                                     for attribute in attributes])
            assert np.isfinite(values).any(), f"{name}: {check} but the model has no such figure"


def test_odd_keys_and_paths_stay_one_line(tmp_path):
    text = GOOD.replace("wall_mm = 1.5", 'wall_mm = 1.5\n"two\\nlines" = 1')
    message = error_of(write(tmp_path, text))
    assert "\n" not in message and ": horn.two lines: unknown key" in message
    message = error_of(str(tmp_path / "bad\0name.toml"))
    assert "cannot read the case file" in message and "\n" not in message
