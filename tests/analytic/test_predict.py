"""predict(): the analytic side's entry point."""

import json
import subprocess
import sys

import numpy as np
import pytest

from hornproof.analytic import closed_form as cf
from hornproof.analytic import exact_phase as ep
from hornproof.analytic.model_result import ModelResult
from hornproof.analytic.predict import predict
from hornproof.units import SPEED_OF_LIGHT

FREQS = np.linspace(9.5e9, 11.5e9, 5)


@pytest.mark.parametrize("kind", ["h-sectoral", "e-sectoral", "pyramidal"])
def test_predict_three_dimensional(horns, kind):
    out = predict(horns[kind], FREQS)
    assert set(out) == {"closed_form", "exact_phase"}
    for name, r in out.items():
        assert isinstance(r, ModelResult) and r.name == name and r.dims == 3
        assert r.theta_deg.shape == (721,) and r.theta_deg[0] == -180 and r.theta_deg[-1] == 180
        assert r.h_plane_dbi.shape == (5, 721)
        i0 = 360
        np.testing.assert_allclose(r.h_plane_dbi[:, i0], r.directivity_dbi, atol=1e-9)
        np.testing.assert_allclose(r.e_plane_dbi[:, i0], r.directivity_dbi, atol=1e-9)
        assert np.all(np.isfinite(r.hpbw_h_deg)) and np.all(np.isfinite(r.hpbw_e_deg))
        json.dumps(r.figures(), allow_nan=False)
    np.testing.assert_allclose(out["closed_form"].directivity_dbi, 10 * np.log10(cf.directivity(horns[kind], FREQS)))
    np.testing.assert_allclose(out["exact_phase"].directivity_dbi, 10 * np.log10(ep.directivity(horns[kind], FREQS)))
    eff = out["closed_form"].extra["aperture_efficiency"]
    assert np.all((eff > 0.3) & (eff < 8 / np.pi**2 + 1e-12))


@pytest.mark.parametrize("kind, plane", [("h-sectoral", "h"), ("e-sectoral", "e")])
def test_predict_two_dimensional(horns, kind, plane):
    out = predict(horns[kind], FREQS, dims=2, theta_deg=np.linspace(-90, 90, 361))
    other = "e" if plane == "h" else "h"
    for r in out.values():
        assert r.dims == 2
        assert np.all(np.isnan(getattr(r, f"{other}_plane_dbi")))
        assert np.all(np.isnan(getattr(r, f"hpbw_{other}_deg")))
        assert np.all(np.isfinite(getattr(r, f"hpbw_{plane}_deg")))
        figs = r.figures()
        assert "directivity_2d_db" in figs
        json.dumps(figs, allow_nan=False)
    d2 = 10 ** (out["closed_form"].directivity_dbi / 10)
    np.testing.assert_allclose(d2, cf.directivity_2d(horns[kind], FREQS))
    # 2D directivity of a w-wide aperture is at most k w (uniform, no phase error)
    width = horns[kind].aperture_a if plane == "h" else horns[kind].aperture_b
    assert np.all(d2 < 2 * np.pi * FREQS / SPEED_OF_LIGHT * width)


def test_predict_rejects_bad_arguments(horns):
    with pytest.raises(ValueError, match="dims"):
        predict(horns["pyramidal"], FREQS, dims=2)
    with pytest.raises(ValueError, match="dims"):
        predict(horns["pyramidal"], FREQS, dims=4)
    with pytest.raises(ValueError, match="frequencies"):
        predict(horns["pyramidal"], [0.0])
    with pytest.raises(ValueError, match="equivalent"):
        predict(horns["pyramidal"], FREQS, equivalent="pec")


def test_predict_e_field_equivalent_changes_cuts_not_boresight(horns):
    hu = predict(horns["pyramidal"], FREQS)["closed_form"]
    ef = predict(horns["pyramidal"], FREQS, equivalent="e-field")["closed_form"]
    np.testing.assert_allclose(hu.directivity_dbi, ef.directivity_dbi)
    assert np.all(ef.hpbw_e_deg > hu.hpbw_e_deg)  # no obliquity factor in the E-plane


def test_analytic_package_imports_without_meep():
    code = ("import sys; sys.modules['meep'] = None\n"
            "import hornproof.analytic.predict, hornproof.analytic.design, hornproof.analytic.gain_reduction\n"
            "assert 'meep' not in [m for m in sys.modules if sys.modules[m] is not None]\n")
    subprocess.run([sys.executable, "-c", code], check=True)
