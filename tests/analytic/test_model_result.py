"""ModelResult: shapes, figures() as JSON (NaN -> null), the dims = 2 key."""

import json

import numpy as np
import pytest

from hornproof.analytic.model_result import FIGURE_FIELDS, ModelResult


def _result(dims=3, nf=3, nt=5, **over):
    fields = dict(
        name="closed_form", dims=dims, frequencies=np.linspace(9e9, 11e9, nf), theta_deg=np.linspace(-2, 2, nt),
        h_plane_dbi=np.zeros((nf, nt)), e_plane_dbi=np.full((nf, nt), np.nan),
        extra={"gain_dbi": np.arange(nf, dtype=float), "uncertainty": {"directivity_db": np.full(nf, np.inf)}},
    )
    fields.update({k: np.linspace(1, 2, nf) for k in FIGURE_FIELDS})
    fields["sll_e_db"] = np.array([np.nan] * nf)
    fields.update(over)
    return ModelResult(**fields)


def test_figures_are_json_ready_with_nan_as_null():
    r = _result()
    figs = r.figures()
    text = json.dumps(figs, allow_nan=False)
    back = json.loads(text)
    assert back["sll_e_db"] == [None, None, None]
    assert back["uncertainty"] == {"directivity_db": [None, None, None]}
    assert back["gain_dbi"] == [0.0, 1.0, 2.0]
    assert list(back)[:7] == list(FIGURE_FIELDS)
    assert "directivity_2d_db" not in back


def test_two_dimensional_results_use_the_2d_key():
    figs = _result(dims=2).figures(include_cuts=True)
    assert "directivity_2d_db" in figs and "directivity_dbi" not in figs
    assert figs["e_plane_2d_db"][0] == [None] * 5 and len(figs["theta_deg"]) == 5
    json.dumps(figs, allow_nan=False)


def test_shape_errors_name_the_field():
    with pytest.raises(ValueError, match="h_plane_dbi"):
        _result(h_plane_dbi=np.zeros((3, 4)))
    with pytest.raises(ValueError, match="hpbw_h_deg"):
        _result(hpbw_h_deg=np.zeros(2))
    with pytest.raises(ValueError, match="gain_dbi"):
        _result(extra={"gain_dbi": np.zeros(2)})
    with pytest.raises(ValueError, match="dims"):
        _result(dims=1)
