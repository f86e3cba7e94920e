"""Feed figures of the aperture models and of a synthetic feed field, without Meep.

Sources beside each check; "exact" marks closed forms derived from the stated physics.
"""

from pathlib import Path

import numpy as np
import pytest

from hornproof.analytic import exact_phase
from hornproof.analytic.cross_polar import huygens_source, ludwig3
from hornproof.analytic.geometry import HornGeometry
from hornproof.compare.case.casefile import load_case
from hornproof.compare.case.feed_table import FeedSpec
from hornproof.compare.jobs.feed_figures import (FEED_LADDER_FIGURES, add_feed_figures, aperture_feed_field,
                                                 feed_block, feed_figures)
from hornproof.compare.jobs.predict import predict_case
from hornproof.units import SPEED_OF_LIGHT

HORN = HornGeometry(kind="pyramidal", guide_a=22.86e-3, guide_b=10.16e-3, aperture_a=80e-3, aperture_b=60e-3,
                    flare_length=70e-3, wall_thickness=1e-3)  # invented test horn (the shipped probe's sizes)
F = np.array([9.5e9, 10.5e9])


def synthetic_field(d_m, frequencies, n=4.0, z_ref=0.0, half_angle_cut=180.0):
    """A Huygens-like feed with a cos^n(θ/2) taper whose phase centre sits d in front of z_ref."""
    theta = np.arange(-half_angle_cut, half_angle_cut + 0.25, 0.5)
    k = 2 * np.pi * np.asarray(frequencies) / SPEED_OF_LIGHT
    cuts = {}
    for name, phi in (("h", 0.0), ("e", 90.0), ("d45", 45.0)):
        th = np.radians(np.abs(theta))
        ph = np.radians(np.where(theta >= 0, phi, phi + 180.0))
        co, cross = ludwig3(*huygens_source(th, ph), ph)
        taper = np.cos(th / 2) ** n * np.exp(1j * k[:, None] * d_m * np.cos(th))
        cuts[name] = (co * taper, cross * taper)
    s_theta = np.arange(0.0, 180.5, 1.0)
    s_phi = np.array([0.0, 15.0, 30.0, 45.0, 60.0, 75.0, 90.0])
    th, ph = np.meshgrid(np.radians(s_theta), np.radians(s_phi), indexing="ij")
    co, cross = ludwig3(*huygens_source(th, ph), ph)
    taper = np.cos(th / 2) ** n * np.exp(1j * k[:, None, None] * d_m * np.cos(th))
    return {"theta_deg": theta, "cuts": cuts, "phase_reference_z_m": z_ref, "sphere_theta_deg": s_theta,
            "sphere_phi_deg": s_phi, "sphere": (co * taper, cross * taper)}


def test_synthetic_feed_figures_follow_from_its_construction():
    # exact: the phase centre is where the field was put; a Huygens source has no Ludwig-3
    # cross-polar field (Ludwig 1973, definition 3); its pattern ((1 + cosθ)/2)² cos^{2n}(θ/2)
    # = cos^{2n+4}(θ/2) in power falls to −10 dB where (2n + 4)·10 log10 cos(θ/2) = −10
    spec = FeedSpec(half_angle_rad=np.radians(60.0), f_over_d=None, beamwidth_level_db=-15.0)
    d = 0.012
    field = synthetic_field(d, F, z_ref=0.03)
    out = feed_figures(field, F, HORN, spec)
    behind = HORN.flare_length - (0.03 + d)
    assert out["phase_centre_h_mm"] == pytest.approx(behind * 1e3, abs=1e-6)
    assert out["phase_centre_e_mm"] == pytest.approx(behind * 1e3, abs=1e-6)
    assert np.all(out["cross_polar_45_db"] < -250)  # zero up to rounding
    n_power = 2 * 4.0 + 4
    expected_10 = 2 * np.degrees(2 * np.arccos(10 ** (-1 / n_power)))
    assert out["beamwidth_10db_h_deg"] == pytest.approx(expected_10, abs=0.05)
    assert out["beamwidth_10db_e_deg"] == pytest.approx(expected_10, abs=0.05)
    assert out["beam_asymmetry_10db_deg"] == pytest.approx(0.0, abs=1e-9)
    assert out["beamwidth_level_h_deg"] == pytest.approx(2 * np.degrees(2 * np.arccos(10 ** (-1.5 / n_power))), abs=0.05)
    # edge taper at 60°: 10 n_power log10 cos 30° (exact)
    assert out["edge_taper_h_db"] == pytest.approx(10 * n_power * np.log10(np.cos(np.radians(30))), abs=0.01)
    # the best feed position is the phase centre; there the phase efficiency is 1 and the
    # polarisation efficiency 1 (no cross-polar field)
    assert out["reflector_focus_mm"] == pytest.approx(behind * 1e3, abs=0.05)
    assert out["phase_efficiency_pct"] == pytest.approx(100.0, abs=1e-3)
    assert out["polarisation_efficiency_pct"] == pytest.approx(100.0, abs=1e-9)
    product = np.prod([out[f"{n}_efficiency_pct"] / 100 for n in ("spillover", "taper", "polarisation", "phase")],
                      axis=0)
    assert out["reflector_efficiency_pct"] / 100 == pytest.approx(product, rel=1e-9)


def test_aperture_feed_field_carries_the_model_directivity():
    # internal consistency: |co|² + |cross|² on the H-plane cut is the model's own H-plane
    # directivity (exact_phase.principal_plane_cuts), and about the aperture centre
    field = aperture_feed_field(HORN, F, "exact_phase", "huygens", sphere=False)
    d_h, _ = exact_phase.principal_plane_cuts(HORN, F, field["theta_deg"])
    co, cross = field["cuts"]["h"]
    assert np.abs(co) ** 2 + np.abs(cross) ** 2 == pytest.approx(d_h, rel=1e-9, abs=1e-12)
    assert field["phase_reference_z_m"] == HORN.flare_length


def test_aperture_models_put_the_phase_centre_between_aperture_and_apex():
    # common practice (E. I. Muehldorf 1970, shape from memory): the phase centre of a flared
    # horn lies behind the aperture, towards the apex, and not beyond it
    out = feed_figures(aperture_feed_field(HORN, F, "closed_form", sphere=False), F, HORN)
    assert np.all(out["phase_centre_h_mm"] > 0) and np.all(out["phase_centre_h_mm"] < HORN.apex_h * 1e3)
    assert np.all(out["phase_centre_e_mm"] > 0) and np.all(out["phase_centre_e_mm"] < HORN.apex_e * 1e3)


def test_add_feed_figures_and_block_on_the_shipped_case(tmp_path):
    # the analytic half of verify's feed figures (no FDTD rung): keys, units and the E-field
    # equivalent named for the aperture models' cross-polar level
    text = tmp_path / "case.toml"
    shipped = Path(__file__).parents[3] / "cases" / "pyramidal.toml"
    body = shipped.read_text().split("[feed]")[0] + "\n[feed]\nf_over_d = 0.4\n"
    text.write_text(body)
    case = load_case(text)
    summary, _ = predict_case(case)
    add_feed_figures(case, summary["models"], [])
    for key in ("phase_centre_h_mm", "beamwidth_10db_e_deg", "cross_polar_45_db", "reflector_efficiency_pct"):
        assert len(summary["models"]["closed_form"][key]) == len(case.frequencies)
    assert set(FEED_LADDER_FIGURES) >= {"phase_centre_h_mm", "reflector_efficiency_pct"}
    block = feed_block(case, summary)
    assert block["conventions"]["aperture_cross_polar_equivalent"] == "e-field"
    # f/D = 0.4 → θ₀ = 2 arctan(1/1.6) = 64.0° (exact)
    assert block["spec"]["half_angle_deg"] == pytest.approx(np.degrees(2 * np.arctan(1 / 1.6)))
    throat = block["figures"]["phase_centre_from_throat_h_mm"]["closed_form"]
    behind = block["figures"]["phase_centre_h_mm"]["closed_form"]
    assert np.allclose(np.array(throat) + np.array(behind), 70.0)
    cross = np.array(summary["models"]["exact_phase"]["cross_polar_45_db"], dtype=float)
    assert np.all((cross < -15) & (cross > -60))


def test_feed_checks_are_judged_like_every_other_figure(tmp_path):
    # the [checks] keys of the feed figures reach verify's comparison: a difference inside the
    # tolerance with a confident, smaller uncertainty agrees; beyond it even at the favourable
    # end of the uncertainty it disagrees (the verdict rules of numerics.verdict; README)
    from hornproof.compare.numerics.figures import CHECK_METRICS
    from hornproof.compare.numerics.verdict import comparison_block

    shipped = Path(__file__).parents[3] / "cases" / "pyramidal.toml"
    body = shipped.read_text().replace("[checks]\n", "[checks]\nphase_centre_mm = 5.0\nefficiency_pct = 3.0\n", 1)
    path = tmp_path / "case.toml"
    path.write_text(body)
    case = load_case(path)
    assert case.checks["phase_centre_mm"] == 5.0 and case.checks["efficiency_pct"] == 3.0
    assert CHECK_METRICS["phase_centre_mm"] == ("phase_centre_h_mm", "phase_centre_e_mm")
    models = {"closed_form": {"phase_centre_h_mm": [30.0, 30.0]}, "exact_phase": {"phase_centre_h_mm": [29.0, 29.0]},
              "fdtd": {"phase_centre_h_mm": [28.0, 40.0]}}
    block = comparison_block([9.5e9, 10.5e9], models, {"phase_centre_h_mm": 5.0},
                             {"phase_centre_h_mm": [1.0, 1.0]})
    rows = block["metrics"][0]["per_frequency"]
    assert block["metrics"][0]["unit"] == "mm"
    assert [r["verdict"] for r in rows] == ["agrees", "disagrees"]
