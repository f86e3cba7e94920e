"""A sweep's breakdown intervals and optima as regress figures (value ± half the interval).

The classification rule is the project's (classify.py: a change counts only beyond the tolerance
and beyond √(u_base² + u_new²), Roache-style noise); the numbers below are worked by hand.
"""

import numpy as np
import pytest

from hornproof.compare.jobs.sweep import regress_figures
from hornproof.compare.output.baseline_file import Baseline, figure_unit, figures_from_result
from hornproof.compare.regress.classify import compare_case


def _summary(sweep_figures):
    return {"frequencies_ghz": [10.0], "models": {"fdtd": {"directivity_dbi": [12.0],
                                                            "uncertainty": {"directivity_dbi": [0.1]}}},
            "sweep_figures": sweep_figures}


def test_interval_becomes_value_and_half_width(synthetic_sweep):
    angle = np.linspace(4.0, 30.0, 8)
    document = synthetic_sweep(angle, 0.002 * angle**2, 0.1 + 0.01 * angle, np.full(8, 0.1))
    document["optimum"] = {"fdtd": {"value": 20.0, "range": [16.0, 26.0]}}
    block = regress_figures(document, 0)
    figures = block["figures"]
    # the analytic breakdown is a point: 15.75 deg (test_report's hand calculation), no width
    assert figures["sweep_breakdown_phase_approximation_deg"]["value"] == pytest.approx(15.75, abs=0.01)
    assert figures["sweep_breakdown_phase_approximation_deg"]["uncertainty"] == pytest.approx(0.0)
    # [16, 26] -> 20 ± 5 (the value is the model's peak, the noise half the range)
    assert figures["sweep_optimum_fdtd_deg"] == {"value": 20.0, "uncertainty": 5.0}
    assert figure_unit("sweep_optimum_fdtd_deg") == "deg"
    frequencies, records = figures_from_result(_summary(block))
    assert records["sweep_optimum_fdtd_deg"].values == [20.0]


def test_a_breakdown_that_moves_beyond_its_noise_regresses():
    base = {"frequency_index": 0, "figures": {"sweep_breakdown_total_deg": {"value": 30.0, "uncertainty": 1.0}}}
    _, base_figures = figures_from_result(_summary(base))
    baseline = Baseline(case="c", tier="full", case_sha256="h", frequencies_ghz=[10.0], figures=base_figures)
    for new_value, expected in ((31.0, "within-noise"), (34.0, "regressed")):
        # noise √(1² + 1²) = 1.41: a move of 1 deg is noise, 4 deg is not (tolerance 0: no check key)
        new = {"frequency_index": 0, "figures": {"sweep_breakdown_total_deg": {"value": new_value,
                                                                                "uncertainty": 1.0}}}
        _, figures = figures_from_result(_summary(new))
        verdict = next(v for v in compare_case(baseline, "h", [10.0], figures, {})
                       if v.figure == "sweep_breakdown_total_deg")
        assert verdict.status == expected, new_value


def test_malformed_sweep_figures_are_named():
    with pytest.raises(ValueError, match="sweep_figures.frequency_index"):
        figures_from_result(_summary({"frequency_index": 3, "figures": {}}))
    with pytest.raises(ValueError, match="sweep_figures.figures.x"):
        figures_from_result(_summary({"frequency_index": 0, "figures": {"x": {"value": 1}}}))
