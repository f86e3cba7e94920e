"""verify end to end on small 2D cases (full-wave, a few seconds per grid).

Outside references: the closed-form aperture theory of a long, gently flared horn is known to
hold (peak phase error < 0.15 wavelength: the quadratic phase approximation is then accurate —
"Pyramidal horn gain calculation with improved accuracy", IEEE AP-S International Symposium
Digest, 1992, doi:10.1109/APS.1992.221722, abstract: agreement for S < 0.2), so the FDTD must agree with it
within the case's tolerance; the phase-approximation error is by definition closed form minus
exact phase, the number `predict` prints.
"""

import json
from pathlib import Path

import numpy as np
import pytest

from hornproof.compare.case.casefile import load_case
from hornproof.compare.cli.main import main
from hornproof.compare.cli.predict import predict_case
from hornproof.compare.jobs.verify import verify_case
from hornproof.errors import RunError

ROOT = Path(__file__).resolve().parents[3]

pytestmark = pytest.mark.fullwave


def _metric(summary, name):
    for metric in summary["comparison"]["metrics"]:
        if metric["metric"] == name:
            return metric
    raise KeyError(name)


def test_gentle_long_horn_never_disagrees_in_directivity(tmp_path):
    case = load_case(ROOT / "cases" / "gentle-long.toml")
    summary = verify_case(case, tmp_path / "out")
    rows = _metric(summary, "directivity_2d_db")["per_frequency"]
    # Closed-form theory holds here (module docstring): FDTD must not disagree. Whether it may
    # say "agrees" depends on the ladder: only with a confident uncertainty (hornproof's rule,
    # numerics.confidence.confident_uncertainty); with the shipped ladder it was oscillatory
    # at every frequency in development runs, hence "unresolved" with that reason.
    assert "disagrees" not in [r["verdict"] for r in rows]
    for r in rows:
        assert r["verdict"] == ("agrees" if r["uncertainty_confident"] else "unresolved"), r
        assert r["ladder"] and r["uncertainty_reason"]
    # the FDTD figure comes with a numerical uncertainty from the ladder, confident or not
    assert all(r["fdtd_uncertainty"] is not None and r["fdtd_uncertainty"] >= 0 for r in rows)
    out = tmp_path / "out"
    for name in ("result.json", "fields.h5", "s11.s1p", "report.html", "pattern_h_plane.png",
                 "directivity_vs_frequency.png", "convergence_ladder.png", "s11.png"):
        assert (out / name).is_file(), name
    stored = json.loads((out / "result.json").read_text())
    assert stored["schema"] == "hornproof.result/1"
    # the uncertainty judged is the ladder's combined with the finest grid's power-balance term
    # and the fitted grid's size residual, u = √(u_ladder² + (10 log10(1 + |ε|))² + u_geometry²)
    # (hornproof's stated choice); the parts stay visible
    fdtd = stored["models"]["fdtd"]
    parts = fdtd["uncertainty_parts"]
    term = 10 * np.log10(1 + np.abs(fdtd["power_balance_error"]))
    geometry = parts["geometry_residual"]
    for key in ("directivity_2d_db", "gain_2d_db", "realized_gain_2d_db"):
        expected = np.hypot(np.hypot(parts["ladder"][key], term), geometry[key])
        np.testing.assert_allclose(fdtd["uncertainty"][key], expected, rtol=1e-9)
    np.testing.assert_allclose([r["fdtd_uncertainty"] for r in rows], fdtd["uncertainty"]["directivity_2d_db"])
    np.testing.assert_allclose(fdtd["uncertainty"]["hpbw_h_deg"],
                               np.hypot(parts["ladder"]["hpbw_h_deg"], geometry["hpbw_h_deg"]), rtol=1e-9)
    # the grid fit keeps every rung's sizes within 2 % of the horn's (hornproof's measured rule)
    assert all(fit["worst_residual_percent"] <= 2.0 for fit in stored["solver"]["grid_fit"])
    assert all(r <= g <= d for r, g, d in zip(fdtd["realized_gain_2d_db"], fdtd["gain_2d_db"], fdtd["directivity_2d_db"]))
    nf = len(stored["frequencies_ghz"])
    for key, values in stored["models"]["fdtd"].items():
        if isinstance(values, list):
            assert len(values) == nf, key
    assert stored["solver"]["meep"]
    html = (out / "report.html").read_text()
    assert "IEEE C95.1-2019" in html and "ICNIRP" in html
    assert html.index("id='verdicts'") < html.index("<img")  # verdicts before the plots
    assert not [p for p in tmp_path.iterdir() if p.name.startswith(".")]  # no staging left


def test_short_wide_flare_reports_the_phase_approximation_error(tmp_path):
    case = load_case(ROOT / "cases" / "short-wide-flare.toml").with_cells([12, 16])
    summary = verify_case(case, tmp_path / "out")
    predicted, _ = predict_case(case)
    cf = np.array(predicted["models"]["closed_form"]["directivity_2d_db"])
    ex = np.array(predicted["models"]["exact_phase"]["directivity_2d_db"])
    rows = _metric(summary, "directivity_2d_db")["per_frequency"]
    reported = np.array([r["phase_approximation_error"] for r in rows])
    np.testing.assert_allclose(reported, cf - ex, atol=1e-9)
    # S is about 1 wavelength here: the quadratic phase visibly under-predicts the directivity
    assert np.all(reported < -0.3)


def test_failed_check_exits_1(tmp_path):
    # the closed form is far off for this short, wide horn (S about 1 wavelength): verify fails
    case_path = tmp_path / "tight.toml"
    text = (ROOT / "cases" / "short-wide-flare.toml").read_text()
    text = text.replace('model = "exact_phase"', 'model = "closed_form"')
    case_path.write_text(text)
    code = main(["verify", str(case_path), "--cells-per-wavelength", "12,16", "--out", str(tmp_path / "o")])
    assert code == 1


def test_unresolved_only_run_exits_4(tmp_path, capsys):
    # two grids give no confident uncertainty (Roache 1997: the order is assumed, not
    # observed), so nothing can agree; the demo horn's closed form is within about 0.3 dB and
    # 0.2° of FDTD, inside tolerance + the Fs = 3 two-grid GCI, so nothing disagrees either.
    code = main(["verify", str(ROOT / "cases" / "demo-h-sectoral.toml"), "--cells-per-wavelength", "10,12",
                 "--out", str(tmp_path / "o")])
    out = capsys.readouterr().out
    assert code == 4
    result = json.loads((tmp_path / "o" / "result.json").read_text())
    comparison = result["comparison"]
    assert comparison["overall"] == "unresolved" and not comparison["failed_checks"]
    assert comparison["unresolved_reasons"]["directivity_2d_db"] == ["two rungs"]
    # the terminal table shows the ladder column and every uncertainty, marked not confident
    assert "ladder" in out and "2 rungs" in out and "?" in out
    assert "2D directivity: two rungs" in out  # trade words, not the result.json key


def test_a_failing_run_leaves_no_result_folder(tmp_path, monkeypatch):
    import hornproof.sim.run as run

    calls = {"n": 0}
    real = run.simulate

    def flaky(*args, **kwargs):
        calls["n"] += 1
        if calls["n"] == 2:
            raise RunError("the FDTD run diverged (simulated for the test)")
        return real(*args, **kwargs)

    monkeypatch.setattr(run, "simulate", flaky)
    case = load_case(ROOT / "cases" / "demo-h-sectoral.toml").with_cells([10, 12])
    with pytest.raises(RunError):
        verify_case(case, tmp_path / "out")
    assert not (tmp_path / "out").exists()
    assert list(tmp_path.iterdir()) == []
