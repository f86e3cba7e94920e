"""verify's range-and-shop blocks: wall loss lowers gain, range gain, tolerance study, no change
without them.

Outside facts, each with its source:

* Gain G = e_rad·D and realized gain G(1 − |S11|²) (IEEE Std 145-2013, definitions of "gain",
  "radiation efficiency" and "realized gain"): with e_rad = 10^(−L/10) both fall by L dB.
* Root-sum-square of independent uncertainty parts (JCGM 100:2008, GUM §5.1.2, from memory).
* In the quadratic-phase approximation the range gain is the far-field formula with ρ → ρR/(ρ+R)
  (Chu and Semplak, Bell Syst. Tech. J. 44 (1965), from memory): the closed-form column is
  compared with that substitution done by hand here.
"""

import copy
import json
from pathlib import Path

import numpy as np
import pytest

from hornproof.analytic import closed_form
from hornproof.compare.case.casefile import load_case
from hornproof.compare.cli.verify import format_verdicts
from hornproof.compare.jobs.predict import predict_case
from hornproof.compare.jobs.range_and_shop import add_range_and_shop
from hornproof.compare.jobs.verify import verify_case
from hornproof.compare.jobs.wall_loss_block import apply_wall_loss, wall_loss_of

ROOT = Path(__file__).resolve().parents[3]
DEMO = ROOT / "cases" / "demo-h-sectoral.toml"

SHOP = """
[range]
distances_m = [1.0, 4.0]

[tolerance]
all_mm = 0.1
samples = 60
"""


def shop_case(tmp_path, pyramidal=False, extra=SHOP):
    text = (ROOT / "cases" / ("pyramidal.toml" if pyramidal else "demo-h-sectoral.toml")).read_text()
    text = text.replace("wall_mm = 1.0", 'wall_mm = 1.0\nwall_material = "brass"\nfeed_guide_length_mm = 100', 1)
    path = tmp_path / "shop.toml"
    path.write_text(text + extra)
    case = load_case(path)
    assert case.wall is not None, "the shipped case no longer has 'wall_mm = 1.0' to anchor the test"
    return case


def test_without_the_new_keys_the_summary_is_unchanged():
    case = load_case(DEMO)
    summary, _ = predict_case(case)
    before = copy.deepcopy(summary)
    add_range_and_shop(case, summary)
    assert summary == before


def test_wall_loss_lowers_3d_fdtd_gains_by_the_loss_and_widens_their_uncertainty(tmp_path):
    case = shop_case(tmp_path, pyramidal=True, extra="")
    loss = wall_loss_of(case)
    nf = len(case.frequencies)
    models = {"closed_form": {"directivity_dbi": [20.0] * nf},
              "fdtd": {"directivity_dbi": [20.1] * nf, "gain_dbi": [20.1] * nf, "realized_gain_dbi": [20.0] * nf,
                       "uncertainty": {"gain_dbi": [0.05] * nf, "realized_gain_dbi": [None] * nf},
                       "uncertainty_parts": {}}}
    apply_wall_loss(models, loss, 3)
    np.testing.assert_allclose(models["fdtd"]["gain_dbi"], 20.1 - loss.total_db, rtol=1e-12)
    np.testing.assert_allclose(models["fdtd"]["realized_gain_dbi"], 20.0 - loss.total_db, rtol=1e-12)
    assert models["fdtd"]["directivity_dbi"] == [20.1] * nf  # directivity is not a loss figure
    np.testing.assert_allclose(models["closed_form"]["gain_dbi"], 20.0 - loss.total_db, rtol=1e-12)
    np.testing.assert_allclose(models["fdtd"]["uncertainty"]["gain_dbi"], np.hypot(0.05, loss.approximation_db))
    assert models["fdtd"]["uncertainty"]["realized_gain_dbi"] == [None] * nf
    assert np.all(loss.total_db > 0)
    flat = {"fdtd": {"gain_dbi": [1.0]}}
    apply_wall_loss(flat, loss, 2)  # a 2D model's per-unit-length figures are left alone
    assert flat == {"fdtd": {"gain_dbi": [1.0]}}


def test_blocks_of_a_predicted_summary(tmp_path):
    case = shop_case(tmp_path, pyramidal=True)
    summary, _ = predict_case(case)
    add_range_and_shop(case, summary)
    f = case.frequencies
    directivity = 10 * np.log10(closed_form.directivity(case.horn, f))
    loss = np.array(summary["wall_loss"]["total_db"])
    np.testing.assert_allclose(summary["wall_loss"]["gain_3d_dbi"]["closed_form"], directivity - loss, rtol=1e-12)
    np.testing.assert_allclose(summary["models"]["closed_form"]["gain_dbi"], directivity - loss, rtol=1e-12)
    ranged = summary["finite_range"]
    for row in ranged["distances"]:
        r = row["distance_m"]
        by_hand = 10 * np.log10(closed_form.boresight_directivity(
            case.horn.aperture_a, case.horn.aperture_b, case.horn.apex_h * r / (case.horn.apex_h + r),
            case.horn.apex_e * r / (case.horn.apex_e + r), 299792458.0 / f)) - loss
        np.testing.assert_allclose(row["closed_form_gain_dbi"], by_hand, rtol=1e-10)
        assert all(c > 0 for c in row["correction_db"])
    study = summary["tolerance"]
    assert set(study["figures"]) == {"directivity_dbi", "hpbw_h_deg", "hpbw_e_deg", "phase_centre_h_mm",
                                     "phase_centre_e_mm"}
    # the phase centre moves back as B grows (a larger aperture, same length: the apex moves away);
    # sign only: the size is the model's (aperture-model phase-centre fit, jobs/feed_figures.py)
    assert all(v > 0 for v in study["figures"]["phase_centre_e_mm"]["sensitivity_per_mm"]["B"])
    assert study["samples"] == 60 and "S11" in study["not_covered"]
    text = format_verdicts_like(summary)
    assert "Wall loss: brass" in text and "Finite-range gain" in text and "Tolerance study" in text


def format_verdicts_like(summary):
    from hornproof.compare.cli.range_shop_lines import range_shop_lines
    return "\n".join(range_shop_lines(summary))


@pytest.mark.fullwave
def test_verify_reports_all_three_in_terminal_json_and_html(tmp_path):
    case = shop_case(tmp_path)
    summary = verify_case(case, tmp_path / "out")
    stored = json.loads((tmp_path / "out" / "result.json").read_text())
    for key in ("wall_loss", "finite_range", "tolerance"):
        assert key in stored and key in summary
    assert stored["schema"] == "hornproof.result/1"
    # the 3D horn's gain is below its directivity by the computed loss
    d3 = np.array(stored["horn_3d"]["exact_phase"]["directivity_dbi"])
    np.testing.assert_allclose(d3 - np.array(stored["wall_loss"]["gain_3d_dbi"]["exact_phase"]),
                               stored["wall_loss"]["total_db"], rtol=1e-9)
    html = (tmp_path / "out" / "report.html").read_text()
    for marker in ("Range and shop", "id='wall-loss'", "id='finite-range'", "id='tolerance'", "RF exposure"):
        assert marker in html
    assert (tmp_path / "out" / "tolerance.png").is_file()
    text = format_verdicts(summary)
    assert "Wall loss: brass" in text and "Finite-range gain" in text and "Tolerance study" in text


def test_realized_gain_is_judged_against_the_analytic_gain_when_walls_are_lossy():
    # IEEE Std 145-2013: a matched antenna's realized gain is its gain; with a wall metal the
    # analytic models' gain is directivity − loss, and that is what FDTD's realized gain meets
    from hornproof.compare.numerics.verdict import comparison_block
    f = np.array([10e9])
    models = {"closed_form": {"directivity_dbi": [16.0], "gain_dbi": [15.9]},
              "exact_phase": {"directivity_dbi": [16.1]},
              "fdtd": {"realized_gain_dbi": [15.8]}}
    block = comparison_block(f, models, {"realized_gain_db": 0.5}, {"realized_gain_db": [0.01]})
    row = block["metrics"][0]["per_frequency"][0]
    assert row["closed_form"] == pytest.approx(15.9) and row["exact_phase"] == pytest.approx(16.1)
    assert row["difference"] == pytest.approx(0.1)


def test_fdtd_range_rows_take_the_finest_rung_and_the_ladder_uncertainty():
    # three rungs converging at first order (error ∝ cell size): the GCI procedure (Celik et
    # al. 2008) must see a monotone ladder; the correction is far-field − range gain per rung
    from types import SimpleNamespace
    from hornproof.compare.jobs.range_block import fdtd_range_rows

    ladder = [20.0, 14.0, 28.0]  # given out of order on purpose

    def rung(cells):
        error = 1.0 / cells
        return SimpleNamespace(directivity_dbi=np.array([16.0 + error, 16.5 + error]),
                               extra={"range_gain_dbi": np.array([[15.8 + 2 * error, 15.95 + 2 * error],
                                                                  [16.3 + 2 * error, 16.45 + 2 * error]])})

    rows = fdtd_range_rows([rung(c) for c in ladder], ladder, np.array([0.1, 0.1]))
    assert len(rows) == 2
    finest = 1 / 28.0
    np.testing.assert_allclose(rows[0]["gain_dbi"], [15.8 + 2 * finest - 0.1, 16.3 + 2 * finest - 0.1])
    np.testing.assert_allclose(rows[1]["correction_db"], [0.05 - finest, 0.05 - finest])
    assert all(u is not None and u > 0 for u in rows[0]["gain_uncertainty_db"])
    assert rows[0]["gain_uncertainty_confident"] == [True, True]
    assert fdtd_range_rows([SimpleNamespace(extra={})], [14.0], np.zeros(2)) is None


def test_report_rebuilt_from_result_json_shows_the_section_and_draws_the_figure(tmp_path):
    # hornproof's own contract: report.html is rebuilt from result.json alone (README "Commands")
    from hornproof.compare.output.json_document import jsonable
    from hornproof.compare.output.result_json import write_result_json
    from hornproof.compare.report.html import build_report

    case = shop_case(tmp_path, pyramidal=True)
    summary, _ = predict_case(case)
    add_range_and_shop(case, summary)
    folder = tmp_path / "result"
    folder.mkdir()
    write_result_json(folder / "result.json", jsonable(summary))
    html = open(build_report(folder)).read()
    for marker in ("Range and shop", "id='wall-loss'", "id='finite-range'", "id='tolerance'", "Pozar",
                   "not a bound", "RF exposure"):
        assert marker in html, marker
    assert (folder / "tolerance.png").is_file()
