"""A 2D sectoral case also shows the real (3D) horn's directivity in dBi.

Outside reference: the directivity of an H-plane sectoral horn (C. A. Balanis, *Antenna
Theory*, 3rd ed., §13.3, "Directivity" of the H-plane sectoral horn; formula typed from the
book's form, axial apex distance ρ2, aperture width a1, guide height b):

    D_H = 4π b ρ2 / (a1 λ) · {[C(u) − C(v)]² + [S(u) − S(v)]²},
    u = (√(λρ2)/a1 + a1/√(λρ2)) / √2,   v = (√(λρ2)/a1 − a1/√(λρ2)) / √2,

C, S the Fresnel integrals ∫₀ˣ cos(πt²/2) dt, ∫₀ˣ sin(πt²/2) dt (scipy.special.fresnel returns
(S, C)). Tolerance 0.01 dB: both sides are the same closed form, computed independently.
"""

import json
from pathlib import Path

import numpy as np
import pytest
from scipy.special import fresnel

from hornproof.analytic.predict import predict
from hornproof.compare.case.casefile import load_case
from hornproof.compare.cli.predict import format_table
from hornproof.compare.cli.verify import format_verdicts
from hornproof.compare.jobs.predict import predict_case
from hornproof.compare.report.verify_page import horn_3d_rows
from hornproof.units import SPEED_OF_LIGHT

ROOT = Path(__file__).resolve().parents[3]
DEMO = ROOT / "cases" / "demo-h-sectoral.toml"


def balanis_h_sectoral_directivity_dbi(a1, b, rho2, frequency):
    """Balanis §13.3 H-plane sectoral horn directivity, dBi."""
    wavelength = SPEED_OF_LIGHT / np.asarray(frequency, dtype=float)
    root = np.sqrt(wavelength * rho2)
    u = (root / a1 + a1 / root) / np.sqrt(2)
    v = (root / a1 - a1 / root) / np.sqrt(2)
    s_u, c_u = fresnel(u)
    s_v, c_v = fresnel(v)
    d = 4 * np.pi * b * rho2 / (a1 * wavelength) * ((c_u - c_v) ** 2 + (s_u - s_v) ** 2)
    return 10 * np.log10(d)


def test_demo_prediction_carries_the_3d_horn_in_dbi():
    case = load_case(DEMO)
    assert case.fdtd.dims == 2 and case.horn.kind == "h-sectoral"
    summary, models = predict_case(case)
    block = summary["horn_3d"]
    assert block["unit"] == "dBi"
    assert models["closed_form"].dims == 2  # the case's own models stay 2D
    direct = predict(case.horn, case.frequencies, dims=3)
    for name in ("closed_form", "exact_phase"):
        np.testing.assert_allclose(block[name]["directivity_dbi"], direct[name].directivity_dbi, atol=1e-12)
    balanis = balanis_h_sectoral_directivity_dbi(case.horn.aperture_a, case.horn.guide_b, case.horn.apex_h,
                                                 case.frequencies)
    np.testing.assert_allclose(block["closed_form"]["directivity_dbi"], balanis, atol=0.01)
    # the 3D horn radiates into both planes: its dBi is not the 2D per-unit-length figure
    assert not np.allclose(block["closed_form"]["directivity_dbi"], summary["models"]["closed_form"]["directivity_2d_db"],
                           atol=0.5)


def test_predict_terminal_labels_2d_and_3d():
    case = load_case(DEMO)
    summary, _ = predict_case(case)
    text = format_table(summary)
    assert "2D model, dB (a per-unit-length ratio)" in text and "The 3D horn, dBi" in text
    three_d = summary["horn_3d"]["closed_form"]["directivity_dbi"]
    tail = text[text.index("The 3D horn, dBi"):]
    for value in three_d:
        assert f"{value:.2f}" in tail


def test_report_rows_show_2d_beside_3d():
    case = load_case(DEMO)
    summary, _ = predict_case(case)
    rows = horn_3d_rows(json.loads(json.dumps(summary)))
    assert len(rows) == len(case.frequencies)
    expected = summary["horn_3d"]["exact_phase"]["directivity_dbi"][2]
    assert rows[2]["exact_phase_3d"] == f"{expected:.2f}"
    assert rows[2]["closed_form_2d"] == f"{summary['models']['closed_form']['directivity_2d_db'][2]:.2f}"


def test_a_3d_case_has_no_separate_3d_block():
    summary, _ = predict_case(load_case(ROOT / "cases" / "pyramidal.toml"))
    assert "horn_3d" not in summary
    assert horn_3d_rows(summary) == [] and "The 3D horn" not in format_table(summary)


@pytest.mark.fullwave
def test_verify_of_the_demo_shows_the_3d_horn(tmp_path):
    from hornproof.compare.jobs.verify import verify_case

    case = load_case(DEMO)
    summary = verify_case(case, tmp_path / "out")
    stored = json.loads((tmp_path / "out" / "result.json").read_text())
    direct = predict(case.horn, case.frequencies, dims=3)
    np.testing.assert_allclose(stored["horn_3d"]["closed_form"]["directivity_dbi"],
                               direct["closed_form"].directivity_dbi, atol=1e-9)
    text = format_verdicts(summary)
    assert "The 3D horn, dBi" in text and "2D model, dB (a per-unit-length ratio)" in text
    html = (tmp_path / "out" / "report.html").read_text()
    assert "id='horn-3d'" in html and "3D horn (dBi)" in html
    assert f"{direct['exact_phase'].directivity_dbi[0]:.2f}" in html
