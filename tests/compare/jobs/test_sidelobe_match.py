"""Like-for-like sidelobe comparison on synthetic cuts with known features.

The cuts are line-source patterns (Silver 1949, Table 6.1, from memory: the uniform source's
first null at sin θ = λ/L, first sidelobe −13.26 dB); the "FDTD" ladder is the same pattern
with its first null filled by a constant so that only a 0.5 dB dip is left (a shoulder), the
fill shrinking with the grid like a first-order error.
"""

from types import SimpleNamespace

import numpy as np
import pytest

from hornproof.analytic.model_result import ModelResult
from hornproof.analytic.pattern_metrics import cut_metrics, level_at_angle
from hornproof.compare.jobs.sidelobe_match import add_feature_notes, matched_sidelobes

L_WL = 8.0
THETA = np.arange(-180.0, 180.01, 0.5)
FREQS = np.array([10e9, 11e9])


def _sinc2(fill):
    u = L_WL * np.sin(np.radians(THETA))
    return 10 * np.log10((np.sinc(u) ** 2 + fill) / (1 + fill))


def _model(cut):
    nan = np.full(FREQS.size, np.nan)
    cuts = np.stack([cut] * FREQS.size)
    return ModelResult(name="closed_form", dims=3, frequencies=FREQS, theta_deg=THETA, h_plane_dbi=cuts,
                       e_plane_dbi=cuts, directivity_dbi=nan, hpbw_h_deg=nan, hpbw_e_deg=nan,
                       first_null_h_deg=nan, first_null_e_deg=nan, sll_h_db=nan, sll_e_db=nan)


def _grid(h_cut, e_cut):
    return SimpleNamespace(theta_deg=THETA, h_plane_dbi=np.stack([h_cut] * FREQS.size),
                           e_plane_dbi=np.stack([e_cut] * FREQS.size))


def test_shoulder_against_null_is_read_at_the_models_sidelobe_angle():
    ladder = [10.0, 20.0, 40.0]
    # fill constants giving a 0.5 dB dip on the finest grid and more fill on coarser ones
    # (first order in the cell size): every grid has a shoulder in the H-plane
    fills = [0.387 * 4, 0.387 * 2, 0.387]
    clean = _sinc2(0.0)
    grids = [_grid(_sinc2(c), clean) for c in fills]  # E-plane: the same null as the model
    model = _model(clean)
    matched = matched_sidelobes({"closed_form": model}, grids, ladder, "closed_form", 1.0)

    m_model = cut_metrics(THETA, clean)
    assert m_model["main_lobe_edge"] == "null"
    m_fdtd = cut_metrics(THETA, grids[-1].h_plane_dbi[0])
    assert m_fdtd["main_lobe_edge"] == "shoulder"
    # H-plane: FDTD read at the model's first-sidelobe angle, relative to the FDTD peak
    expected = float(level_at_angle(THETA, grids[-1].h_plane_dbi[0], m_model["first_sidelobe_right_deg"])
                     - m_fdtd["peak_db"])
    assert set(matched["values"]["sll_h_db"]) == {0, 1}
    assert matched["values"]["sll_h_db"][0] == pytest.approx(expected, abs=1e-9)
    # the filled sinc² at the sidelobe, independently: 10 log10((s + c)/(1 + c)) with s ≈ 0.0472
    # (−13.26 dB, Silver Table 6.1): the 0.5° grid reads it within 0.05 dB
    s, c = 10 ** (-13.26 / 10), fills[-1]
    assert matched["values"]["sll_h_db"][0] == pytest.approx(10 * np.log10((s + c) / (1 + c)), abs=0.05)
    # its uncertainty comes from the ladder of the same reading (three grids: finite)
    assert np.isfinite(matched["uncertainty"]["sll_h_db"][0]) and matched["uncertainty"]["sll_h_db"][0] > 0
    assert "shoulder" in matched["notes"]["sll_h_db"][0] and "null" in matched["notes"]["sll_h_db"][0]
    assert "first null not compared" in matched["notes"]["first_null_h_deg"][1]
    # E-plane: both sides name the same null and sidelobe, nothing replaced
    assert "sll_e_db" not in matched["values"] and "sll_e_db" not in matched["notes"]
    assert "first_null_e_deg" not in matched["notes"]

    block = {"metrics": [{"metric": "sll_h_db", "per_frequency": [{}, {}]},
                         {"metric": "sll_e_db", "per_frequency": [{}, {}]}]}
    add_feature_notes(block, matched["notes"])
    assert "note" in block["metrics"][0]["per_frequency"][1]
    assert block["metrics"][1]["per_frequency"] == [{}, {}]


def test_sidelobes_of_different_lobes_are_matched_by_angle():
    # both cuts have nulls, but the FDTD one (a 4 λ aperture) has its first sidelobe about
    # twice as far out as the model's (8 λ): different lobes, read at the model's angle
    u4 = 4.0 * np.sin(np.radians(THETA))
    wide = 10 * np.log10(np.sinc(u4) ** 2 + 1e-12)
    model = _model(_sinc2(0.0))
    matched = matched_sidelobes({"closed_form": model}, [_grid(wide, wide)], [20.0], "closed_form", 1.0)
    assert set(matched["values"]) == {"sll_h_db", "sll_e_db"}
    assert np.isnan(matched["uncertainty"]["sll_h_db"][0])  # one grid: no uncertainty, unresolved
    assert "first_null_h_deg" not in matched["notes"]  # both nulls: compared as they are


def test_a_sidelobe_the_model_does_not_have_is_not_compared_and_says_so():
    # model: a single Gaussian lobe (no dip, no shelf: "none within ±90°"); FDTD: sinc² (null)
    gaussian = 10 * np.log10(np.exp(-THETA**2 / (2 * 3.0**2)) + 1e-12)
    model = _model(gaussian)
    matched = matched_sidelobes({"closed_form": model}, [_grid(_sinc2(0.0), _sinc2(0.0))], [20.0],
                                "closed_form", 1.0)
    assert matched["values"] == {}  # nothing to read the FDTD at
    assert "sidelobe not compared" in matched["notes"]["sll_h_db"][0]
    assert "first null not compared" in matched["notes"]["first_null_e_deg"][1]
