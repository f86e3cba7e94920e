"""map: the analytic layer against analytic/predict.py and published limits; the FDTD layer
with a fake solver (estimate first, budget refusal, failed points, schema round trip); one
small full-wave map.

Outside references:
* exact-path and quadratic-phase gain agree for a small peak phase error, S < 0.2 λ — IEEE
  AP-S International Symposium Digest 1992, "Pyramidal horn gain calculation with improved
  accuracy", doi:10.1109/APS.1992.221722 (abstract; tolerance 0.05 dB as in
  tests/analytic/test_exact_phase.py, hornproof's choice);
* the closed form's directivity optimum sits at S ≈ 0.3965 at fixed apex distance (Orfanidis,
  *Electromagnetic Waves and Antennas*, horn chapter): for a long gentle horn family the
  phase-approximation error tends to 0 as S → 0 and stays small up to the optimum.
"""

import json
import math

import numpy as np
import pytest

from hornproof.analytic.predict import predict
from hornproof.compare.case.casefile import load_case
from hornproof.compare.jobs.map import run_map
from hornproof.compare.output.map_json import MAP_SCHEMA, read_map_json
from hornproof.errors import InputError, RunError

CASE = """\
# Invented scenario for a test: a small map of H-plane sectoral horns.
format = 1
title = "test map"
[horn]
type = "h-sectoral"
waveguide = "WR-90"
aperture_a_mm = 60.0
flare_length_mm = 60.0
[band]
f_min_ghz = 10.0
f_max_ghz = 10.0
points = 1
[checks]
directivity_db = 0.3
[map]
x_parameter = "flare_half_angle_h_deg"
x_values = {x}
y_parameter = "flare_length_mm"
y_values = {y}
dims = {dims}
analytic_samples = {samples}
{extra}
"""


def make_case(tmp_path, x="[15, 30, 45]", y="[40, 60]", dims=3, samples=12, extra="cells_per_wavelength = [12, 16]"):
    path = tmp_path / "map.toml"
    path.write_text(CASE.format(x=x, y=y, dims=dims, samples=samples, extra=extra))
    return load_case(path)


class FakeSolver:
    """Directivity = exact phase − 0.1 × (angle / 10)² dB (an invented error growing with the
    flare), uncertainty 0.05 dB; fails for the horns listed."""

    def __init__(self, fail_angles=()):
        self.calls = 0
        self.fail_angles = set(fail_angles)

    def __call__(self, horn, frequencies, settings, ladder, force):
        self.calls += 1
        angle = round(math.degrees(horn.flare_half_angle_h))
        if angle in self.fail_angles:
            raise RunError("the FDTD run diverged (fake)")
        exact = float(predict(horn, frequencies, dims=settings.dims)["exact_phase"].directivity_dbi[0])
        value = exact - 0.1 * (angle / 10) ** 2
        return {"directivity": [value], "uncertainty": [0.05], "directivity_per_grid": [[value]] * len(ladder),
                "cells_per_wavelength": list(ladder), "seconds": [1.0] * len(ladder),
                "convergence_status": ["monotone"], "confident_uncertainty": [0.05],
                "disagreement_bound": [0.05]}


def quiet(message):
    pass


def test_analytic_phase_error_is_closed_form_minus_exact_phase_from_predict(tmp_path):
    case = make_case(tmp_path, samples=8)
    doc = run_map(case, tmp_path / "out", analytic_only=True, log=quiet)
    x, y = doc["x"]["analytic"], doc["y"]["analytic"]
    grid = np.array(doc["analytic"]["phase_approximation_error"], dtype=float)
    for j in (0, 3, 7):
        for i in (0, 4, 7):
            horn = case.map.horn_at(case.horn, x[i], y[j])
            models = predict(horn, case.frequencies, dims=3)
            expected = models["closed_form"].directivity_dbi[0] - models["exact_phase"].directivity_dbi[0]
            assert grid[j, i] == pytest.approx(expected, abs=1e-9)
    assert doc["analytic_only"] and doc["estimate"] is None
    assert (tmp_path / "out" / "map_phase_approximation_error.png").is_file()
    assert (tmp_path / "out" / "report.html").is_file()


def test_long_gentle_horns_have_no_phase_approximation_error(tmp_path):
    # 0.5-2 m long H-plane horns with 1-8 deg flares at 10 GHz: S from about 0.006 to 0.7 λ
    case = make_case(tmp_path, x="[1, 8]", y="[500, 2000]", samples=20)
    doc = run_map(case, tmp_path / "out", analytic_only=True, log=quiet)
    error = np.abs(np.array(doc["analytic"]["phase_approximation_error"], dtype=float))
    s = np.array(doc["analytic"]["phase_error_h_wl"], dtype=float)
    assert np.nanmin(s) < 0.05 and np.nanmax(s) > 0.3
    # IEEE AP-S 1992: agreement below S = 0.2 λ (tolerance 0.05 dB, hornproof's)
    assert np.nanmax(error[s < 0.2]) < 0.05
    # tends to 0 with S: the smallest phase errors give the smallest model differences
    assert np.nanmax(error[s < 0.05]) < np.nanmax(error[s > 0.3])
    assert np.nanmax(error[s < 0.05]) < 0.01
    # so the analytic breakdown never happens on this family below S = 0.2
    for row in doc["breakdown"]["phase_approximation"]:
        assert row["at"] is None or not isinstance(row["at"], str)


def test_map_with_a_fake_solver_reports_errors_breakdowns_and_a_failed_point(tmp_path):
    case = make_case(tmp_path)
    solver, messages = FakeSolver(fail_angles={30}), []
    doc = run_map(case, tmp_path / "out", log=messages.append, runner=solver)
    assert solver.calls == 6
    # the estimate is printed before anything runs
    first_run = next(i for i, m in enumerate(messages) if m.endswith(": running"))
    assert any("map estimate" in m for m in messages[:first_run])
    assert any("whole map" in m for m in messages[:first_run])
    failed = [p for p in doc["points"] if p["status"] == "failed"]
    assert len(failed) == 2 and all(p["x"] == 30 and "diverged" in p["reason"] for p in failed)
    assert len(doc["failed_points"]) == 2 and doc["solver"]["points_failed"] == 2
    for p in doc["points"]:
        if p["status"] == "failed":
            assert p["fdtd"] is None and p["aperture_model_error"] is None
            continue
        assert p["aperture_model_error"] == pytest.approx(0.1 * (p["x"] / 10) ** 2)
        assert p["total_error"] == pytest.approx(p["phase_approximation_error"] + p["aperture_model_error"])
    # aperture-model error 0.225 at 15 deg, 2.025 at 45 deg (30 failed): the interval lies between
    for row in doc["breakdown"]["aperture_model"]:
        assert row["status"] == "breaks" and 15 < row["earliest"] <= row["latest"] < 45
    doc_again = run_map(case, tmp_path / "out", log=quiet, runner=FakeSolver())
    assert doc_again["solver"]["points_reused"] == 4 and doc_again["solver"]["points_computed"] == 2
    for stem in ("map_aperture_model_error", "map_total_error", "map_phase_approximation_error"):
        assert (tmp_path / "out" / f"{stem}.png").is_file()
    assert "failed" in (tmp_path / "out" / "report.html").read_text()


def test_map_json_round_trip_and_schema_refusal(tmp_path):
    case = make_case(tmp_path)
    doc = run_map(case, tmp_path / "out", log=quiet, runner=FakeSolver())
    stored = read_map_json(tmp_path / "out" / "map.json")
    assert stored["schema"] == MAP_SCHEMA
    assert stored == json.loads(json.dumps(doc))
    text = json.loads((tmp_path / "out" / "map.json").read_text())
    text["schema"] = "hornproof.map/9"
    (tmp_path / "out" / "map.json").write_text(json.dumps(text))
    with pytest.raises(InputError, match="hornproof.map/9.*not supported"):
        read_map_json(tmp_path / "out" / "map.json")


def test_every_point_failed_is_a_run_error_after_writing_the_map(tmp_path):
    case = make_case(tmp_path)
    with pytest.raises(RunError, match="every FDTD point"):
        run_map(case, tmp_path / "out", log=quiet, runner=FakeSolver(fail_angles={15, 30, 45}))
    stored = read_map_json(tmp_path / "out" / "map.json")
    assert len(stored["failed_points"]) == 6


def test_a_map_beyond_its_budget_is_refused_before_running(tmp_path):
    case = make_case(tmp_path)
    solver, messages = FakeSolver(), []
    with pytest.raises(InputError, match=r"beyond the budget of 1e-05 h \(--budget-hours\); use --force"):
        run_map(case, tmp_path / "out", log=messages.append, runner=solver, budget_hours=1e-5)
    assert solver.calls == 0 and any("whole map" in m for m in messages)
    assert not (tmp_path / "out").exists()
    run_map(case, tmp_path / "out", log=quiet, runner=solver, budget_hours=1e-5, force=True)
    assert solver.calls == 6


@pytest.mark.fullwave
def test_small_2d_map_runs_full_wave(tmp_path):
    # 2 x 2 points of the 2D principal-plane model on two coarse rungs: a few seconds
    case = make_case(tmp_path, x="[15, 35]", y="[40, 60]", dims=2, extra="cells_per_wavelength = [10, 14]")
    messages = []
    doc = run_map(case, tmp_path / "out", log=messages.append)
    assert "principal-plane" in doc["model"]
    fdtd = [p["fdtd"] for p in doc["points"]]
    assert all(v is not None and math.isfinite(v) for v in fdtd)
    # FDTD 2D directivity within 1.5 dB of the exact-phase model on these coarse grids
    # (hornproof's sanity bound; the 2D models agree within ~0.5 dB on finer grids, cases/README.md)
    assert all(abs(p["aperture_model_error"]) < 1.5 for p in doc["points"])
    # the wider flare has the larger 2D directivity at both lengths, as both aperture models say
    by = {(p["x"], p["y"]): p for p in doc["points"]}
    for length in (40.0, 60.0):
        assert by[(35.0, length)]["fdtd"] > by[(15.0, length)]["fdtd"]
        assert by[(35.0, length)]["exact_phase"] > by[(15.0, length)]["exact_phase"]
