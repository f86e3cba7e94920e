"""Tests of the HTML report on synthetic result folders (invented numbers, written here).

What is checked: the report is one self-contained file (no external http(s) references, figures
embedded), the verdict table comes before the figures, the RF-exposure caution is there
(IEEE C95.1-2019 and ICNIRP (2020), Health Physics 118 (2020) 483–524), text from the JSON is
escaped, and an unknown schema is refused with a hint.
"""

import json
import os
import re

import numpy as np
import pytest

from hornproof.compare.numerics import convergence, metrics, verdict
from hornproof.compare.report import plots
from hornproof.compare.report import format as report_format
from hornproof.compare.report import html as report
from hornproof.compare.report.verify_page import VERDICT_TEXT
from hornproof.compare.output.safety import RF_EXPOSURE_CAUTION
from hornproof.errors import InputError

FREQS_GHZ = [9.5, 10.5, 11.5]


def synthetic_result(tmp_path, title="Synthetic horn <test> & co"):
    f = np.array(FREQS_GHZ) * 1e9
    cf = [16.0, 16.8, 17.6]
    ep = [15.8, 16.5, 17.3]
    fd = [15.6, 16.4, 16.4]
    cpw = [12, 16, 24]
    # Ladder rows = grids (12, 16, 24 cells/λ), columns = frequencies. Worked by hand:
    # 9.5 GHz: 15.4, 15.5, 15.6 — equal steps with r21 = 1.5, r32 = 1.333 is first order
    #   (ε32/ε21 = r21 (r32 − 1)/(r21 − 1) = 1 at p = 1), GCI = 1.25·0.1/(1.5 − 1) = 0.25 dB;
    #   d = 16.0 − 15.6 = 0.4 ≤ t + u with u ≤ t -> agrees.
    # 10.5 GHz: 16.0, 16.9, 16.4 — up then down: oscillatory, spread bound 0.9 dB > t
    #   -> unresolved (|d| − u = 0.4 − 0.9 < t).
    # 11.5 GHz: 16.2, 16.3, 16.4 — first order again, u = 0.25; d = 17.6 − 16.4 = 1.2,
    #   |d| − u = 0.95 > 0.5 -> disagrees.
    ladder = np.array([[15.4, 16.0, 16.2], [15.5, 16.9, 16.3], [15.6, 16.4, 16.4]])
    est = convergence.grid_convergence(ladder, cells_per_wavelength=cpw)
    unc = [e.uncertainty for e in est]
    comparison = verdict.comparison_block(
        f, {"closed_form": {"directivity_dbi": cf}, "exact_phase": {"directivity_dbi": ep},
            "fdtd": {"directivity_dbi": fd}},
        {"directivity_db": 0.5}, {"directivity_db": unc},
        convergence={"figure": "directivity_dbi", "unit": "dBi", "cells_per_wavelength": cpw,
                     "values": ladder.tolist(), "estimates": [e.to_dict() for e in est]},
        fdtd_estimates={"directivity_db": [e.to_dict() for e in est]})
    result = {
        "schema": "hornproof.result/1", "case": "synthetic", "title": title,
        "case_sha256": "0" * 64, "frequencies_ghz": FREQS_GHZ,
        "geometry": {"apex_h_mm": 312.5, "flare_half_angle_h_deg": 14.2, "phase_error_h_wl": 0.31},
        "models": {"closed_form": {"directivity_dbi": cf}, "exact_phase": {"directivity_dbi": ep},
                   "fdtd": {"directivity_dbi": fd, "s11_db": [-15.0, -21.0, -18.0],
                            "uncertainty": {"directivity_db": [None if not np.isfinite(u) else u for u in unc]}}},
        "comparison": comparison,
        "solver": {"meep": "1.25.0", "cells_per_wavelength": cpw, "seconds": 12.5},
        "warnings": ["wall thickened to 2 cells <b>"],
    }
    # Extra blocks as verify writes them: pattern error (metrics.PatternError.to_dict()) and
    # further checks. RMS 0.3 dB over the lobe is checked against a 0.5 dB limit with u 0.1.
    theta = np.linspace(-30, 30, 61)
    pe = metrics.pattern_error(theta, np.tile(-0.02 * theta**2 + 0.3, (3, 1)),
                               np.tile(-0.02 * theta**2, (3, 1))).to_dict()
    pe["uncertainty_db"] = [0.1, 0.1, 0.1]
    comparison["pattern_error"] = {"window_db": -10.0, "planes": {"h_plane": {"closed_form": pe}}}
    comparison["extra_checks"] = [{"check": "pattern_rms_h_plane", "frequency_index": 0,
                                   "value": pe["rms_db"][0], "uncertainty": 0.1, "limit": 0.5,
                                   "verdict": verdict.verdict(pe["rms_db"][0], 0.5, 0.1)}]
    result["comparison"] = comparison
    (tmp_path / "result.json").write_text(json.dumps(result))
    theta = np.linspace(-90, 90, 181)
    plots.plot_pattern_overlay(theta, 16 - 0.02 * theta**2, 15.8 - 0.02 * theta**2,
                               15.6 - 0.021 * theta**2, tmp_path / "pattern_h_plane",
                               fdtd_uncertainty_db=0.2, case_title=title)
    return result


def test_report_self_contained_verdicts_first_and_safety(tmp_path):
    result = synthetic_result(tmp_path)
    path = report.build_report(tmp_path)
    text = open(path, encoding="utf-8").read()
    assert os.stat(path).st_mode & 0o044 == 0o044  # readable by others
    # No external references of any kind: no http(s) URL anywhere, no src/href to a file.
    assert not re.search(r"https?://", text)
    assert not re.search(r"(src|href)\s*=\s*['\"](?!data:)", text)
    # The verdict table precedes the first figure.
    assert 0 < text.index("id='verdicts'") < text.index("<img")
    # Figures: the given one plus those drawn from result.json, all embedded.
    assert text.count("data:image/png;base64,") == 4
    assert text.index("alt='pattern h plane'") < text.index("alt='directivity vs frequency'")
    # The ladder health of each frequency and why its uncertainty is (not) confident are shown
    # beside its verdict; an uncertainty that is not confident is marked.
    assert ">oscillatory<" in text and "monotone: monotone ladder, observed order" in text
    assert "oscillatory: oscillatory ladder" not in text  # the label is not said twice
    assert "16.40 ± 0.90 (not confident)" in text
    # The safety caution and its two sources.
    assert RF_EXPOSURE_CAUTION.replace("&", "&amp;") in text
    assert "IEEE C95.1-2019" in text and "ICNIRP (2020)" in text
    # Escaping: the title's markup characters are escaped, the warning's tag is not live.
    assert "Synthetic horn &lt;test&gt; &amp; co" in text and "<b>" not in text
    # The verdicts worked by hand in synthetic_result, in table order.
    rows = result["comparison"]["metrics"][0]["per_frequency"]
    assert [r["verdict"] for r in rows] == ["agrees", "unresolved", "disagrees"]
    assert rows[0]["fdtd_uncertainty"] == pytest.approx(0.25)
    table = text[text.index("id='verdicts'"):text.index("</table>")]
    cells = re.findall(r"<td class='text verdict'>([^<]*)</td>", table)
    assert cells == [VERDICT_TEXT[v] for v in ("agrees", "unresolved", "disagrees")]
    assert "<td>16.00</td>" in table and "<td>15.60 ± 0.25</td>" in table  # levels to 0.01 dB
    assert result["comparison"]["overall"] == "disagrees" and "DISAGREES" in text
    # Pattern error and further checks precede the figures too; 0.3 dB offset -> RMS 0.30 dB.
    assert text.index("id='pattern-error'") < text.index("<img")
    pattern = text[text.index("id='pattern-error'"):]
    assert "<td>0.30</td>" in pattern[:pattern.index("</table>")]
    extra = text[text.index("id='extra-checks'"):]
    assert "agrees" in extra[:extra.index("</table>")]


def test_report_refuses_unknown_schema(tmp_path):
    (tmp_path / "result.json").write_text(json.dumps({"schema": "hornproof.result/2"}))
    with pytest.raises(InputError, match="schema.*hornproof.result/1"):
        report.build_report(tmp_path)
    assert not (tmp_path / "report.html").exists()
    (tmp_path / "result.json").write_text("{not json")
    with pytest.raises(InputError, match="not valid JSON"):
        report.build_report(tmp_path)


def test_sweep_report(tmp_path, synthetic_sweep):
    angle = np.linspace(4.0, 30.0, 8)
    phase = 0.002 * angle**2
    aperture = 0.1 + 0.01 * angle
    u = np.full(angle.shape, 0.1)
    sweep = synthetic_sweep(angle, phase, aperture, u)
    brk = sweep["breakdown"]
    (tmp_path / "sweep.json").write_text(json.dumps(sweep))
    text = open(report.build_sweep_report(tmp_path), encoding="utf-8").read()
    assert not re.search(r"https?://", text)
    assert text.index("id='breakdown'") < text.index("<img")
    # Margins 0.002 θ² − 0.5 at the samples θ = 15.143 and 18.857 deg are −0.0414 and +0.2112:
    # linear interpolation gives 15.143 + 0.0414/0.2526 · 3.714 = 15.75 deg (the smooth
    # curve crosses at sqrt(250) = 15.81 deg).
    assert brk["phase_approximation"]["latest"] == pytest.approx(15.75, abs=0.01)
    # Shown to one decimal: the swept values are 3.7 deg apart.
    assert f"breaks at {brk['phase_approximation']['latest']:.1f} deg" in text
    assert f"{brk['phase_approximation']['latest']:.3f}" not in text
    # |aperture| + u = 0.1 + 0.01 θ + 0.1 ≤ 0.5 up to θ = 30: holds throughout, uncertainty included
    assert "holds over the whole sweep, uncertainty included" in text
    assert "3D model of the real horn" in text
    assert "IEEE C95.1-2019" in text
    (tmp_path / "sweep.json").write_text(json.dumps({**sweep, "schema": "hornproof.result/1"}))
    with pytest.raises(InputError, match="hornproof.sweep/2"):
        report.build_sweep_report(tmp_path)


def test_number_formatting_in_tables():
    # Typographic minus (Unicode U+2212), no negative zero, missing values as one word.
    assert report_format.number(-0.2) == "\u22120.200"
    assert report_format.number(-0.0001) == "0.000"
    assert report_format.number(None) == "n/a" and report_format.number(float("nan")) == "n/a"
    assert report_format.value_text(20.0) == "20" and report_format.value_text(True) == "yes"


def test_autoescape_of_a_script_title(tmp_path):
    synthetic_result(tmp_path, title="<script>alert(1)</script> horn")
    text = open(report.build_report(tmp_path), encoding="utf-8").read()
    assert "<script" not in text
    assert "&lt;script&gt;alert(1)&lt;/script&gt; horn" in text


def test_trade_words_and_one_missing_value_word(tmp_path):
    result = synthetic_result(tmp_path)
    # keys as verify writes them (invented values): internal names must not reach the page
    result["geometry"].update({"phase_error_h_wl_per_frequency": [0.27, 0.28, 0.29], "apex_e_mm": None})
    result["solver"].update({"symmetry": ["Mirror(X, phase=+1)", "Mirror(Y, phase=-1)"],
                             "max_power_balance_error": 0.00469334096587241, "decay_by": 1e-4})
    result["comparison"]["extra_checks"].append(
        {"check": "s11_db", "frequency_index": 1, "value": None, "uncertainty": None, "limit": -10.0,
         "verdict": "missing"})
    (tmp_path / "result.json").write_text(json.dumps(result))
    text = open(report.build_report(tmp_path), encoding="utf-8").read()
    for internal in ("_wl", "s11_db", "Mirror(", "0.00469", "per frequency"):
        assert internal not in text, internal
    assert "x (even), y (odd)" in text
    # 0.00469 of the incident power is 0.47 %
    assert re.search(r"Largest power-balance error</th><td class='text'>0\.47</td><td class='text'>%", text)
    assert "Peak phase error, H-plane</th>" in text and "wavelengths" in text
    assert "<td class='text'>0.0001</td>" in text  # a small ratio keeps its digit, not 0.000
    # one word for a missing value: the empty apex, the missing S11 and its verdict
    body = text[:text.index("<section><h2>Figures")]
    assert "—" not in body.replace(" — needs finer cells", "")
    extra = text[text.index("id='extra-checks'"):]
    extra = extra[:extra.index("</table>")]
    assert "<td class='text'>S11</td>" in extra and extra.count("n/a") >= 3


def test_grid_fit_is_a_table_not_a_dump(tmp_path):
    # the grid fit of each rung (sim/grid_fit.py, stored by verify) is shown as a table of
    # modelled sizes with their residuals; the solver table does not dump the nested record
    from hornproof.analytic.geometry import HornGeometry
    from hornproof.sim.grid_fit import fit_ladder

    horn = HornGeometry("pyramidal", 22.86e-3, 10.16e-3, 80e-3, 60e-3, 70e-3)
    fits = fit_ladder(horn, 10.5e9, 3, [16.9, 21.9, 28.5])
    synthetic_result(tmp_path)
    stored = json.loads((tmp_path / "result.json").read_text())
    stored["solver"].update({"grid_fit": [fit.to_dict() for fit in fits],
                             "nominal_cells_per_wavelength": [16.9, 21.9, 28.5],
                             "refinement": {"target_uncertainty_db": 0.15, "budget_seconds": 300.0,
                                            "stopped": "target reached: every checked figure decided"}})
    (tmp_path / "result.json").write_text(json.dumps(stored))
    text = open(report.build_report(tmp_path), encoding="utf-8").read()
    assert "Grid-fitted rungs" in text and "b = 10.16 mm" in text
    b_cells = {s.name: s for s in fits[0].sizes}["guide_b"]
    assert f"{b_cells.modelled_m * 1e3:.2f} ({b_cells.cells} cells" in text
    assert "nominal_mm" not in text and "residual_percent" not in text
    assert "Refinement to ±0.15 dB within 300 s: target reached" in text
