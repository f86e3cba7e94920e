"""Refinement to a target uncertainty (jobs/refine.py): rungs are added while a checked figure is
open, each rung estimated before it runs, and the run says why it stopped.

The rule is hornproof's own (README "Commands", DEVELOPERS.md "Modelling notes"); the outside
facts are the grid-convergence procedure it relies on (Celik et al. 2008) and the cost of an
explicit FDTD run, ∝ (cells per wavelength)^(dims + 1) (cells × Courant-limited steps; any FDTD
text, e.g. Taflove & Hagness, *Computational Electrodynamics*, 3rd ed., ch. 4).
"""

from pathlib import Path

import pytest

from hornproof.compare.cli.main import main
from hornproof.compare.case.casefile import load_case
from hornproof.compare.jobs.refine import RefinementGoal
from hornproof.compare.jobs.verify import verify_case
from hornproof.sim.grid_fit import MIN_RATIO

ROOT = Path(__file__).resolve().parents[3]


@pytest.mark.fullwave
def test_refinement_adds_finer_rungs_and_says_why_it_stopped(tmp_path):
    case = load_case(ROOT / "cases" / "demo-h-sectoral.toml").with_cells([10, 13, 17])
    # the budget is set from this machine's own time for the three rungs (shared machines are
    # noisy): room for the next rung (cost ratio (22/17)^3 · … ≈ 1.3 of the three), not for two
    plain = verify_case(case, tmp_path / "plain")
    spent = sum(plain["solver"]["seconds_per_grid"])
    budget = 3.2 * spent
    summary = verify_case(case, tmp_path / "out", goal=RefinementGoal(0.001, budget_seconds=budget))
    solver = summary["solver"]
    ladder = solver["cells_per_wavelength"]
    assert len(ladder) > 3, ladder
    assert all(b / a >= MIN_RATIO - 1e-9 for a, b in zip(ladder, ladder[1:]))
    stopped = solver["refinement"]["stopped"]
    assert stopped.startswith("stopped with") and ("past the budget" in stopped or "rungs added" in stopped)
    # every rung added is grid-fitted like the others
    assert len(solver["grid_fit"]) == len(ladder)
    assert all(fit["worst_residual_percent"] <= 2.0 for fit in solver["grid_fit"])


@pytest.mark.fullwave
def test_a_reachable_target_stops_at_once(tmp_path):
    # the demo horn checked on directivity only (its directivity ladder is monotone, measured)
    text = (ROOT / "cases" / "demo-h-sectoral.toml").read_text()
    text = text[:text.index("[checks]")] + "[checks]\ndirectivity_db = 0.5\n"
    (tmp_path / "directivity-only.toml").write_text(text)
    case = load_case(tmp_path / "directivity-only.toml")
    summary = verify_case(case, tmp_path / "out", goal=RefinementGoal(5.0, budget_seconds=60.0))
    assert len(summary["solver"]["cells_per_wavelength"]) == 3
    assert summary["solver"]["refinement"]["stopped"].startswith("target reached")


@pytest.mark.fullwave
def test_an_unreachable_target_without_a_budget_stops_after_a_few_rungs(tmp_path):
    from hornproof.compare.jobs.refine import MAX_ADDED_RUNGS

    case = load_case(ROOT / "cases" / "demo-h-sectoral.toml").with_cells([8, 10, 12])
    summary = verify_case(case, tmp_path / "out", goal=RefinementGoal(0.0001))
    assert len(summary["solver"]["cells_per_wavelength"]) == 3 + MAX_ADDED_RUNGS
    assert "rungs added, the most one refinement adds" in summary["solver"]["refinement"]["stopped"]


def test_budget_without_a_target_is_refused(tmp_path, capsys):
    code = main(["verify", str(ROOT / "cases" / "demo-h-sectoral.toml"), "--budget", "10",
                 "--out", str(tmp_path / "out")])
    assert code == 2
    assert "--budget: give --target-uncertainty too" in capsys.readouterr().err
    assert not (tmp_path / "out").exists()
