"""What a regression run came to: one record per case, the tally over the suite, its summary."""

from dataclasses import dataclass, field

from ...sim.solver import meep_version
from ..output import regress_json
from .classify import STATUSES

__all__ = ["CaseOutcome", "count_statuses", "exit_status", "suite_summary"]


@dataclass
class CaseOutcome:
    """Everything known about one case after a regression run."""

    name: str
    case_file: str
    tier: str
    case_sha256: str
    key: str = ""
    status: str = "unchanged"
    source: str = ""  # "cache" | "run" | "" (failed before a result)
    seconds: float = 0.0
    reason: str = ""
    detail: str = ""
    result_dir: str = ""
    report: str = ""
    baseline_file: str = ""
    baseline_case_sha256: str = ""
    computation_sha256: str = ""
    figures: list = field(default_factory=list)
    result: dict = field(default=None, repr=False)
    cache_inputs: dict = field(default=None, repr=False)
    settings: dict = field(default=None, repr=False)

    def to_dict(self):
        return {
            "case": self.name,
            "case_file": self.case_file,
            "tier": self.tier,
            "case_sha256": self.case_sha256,
            "cache_key": self.key,
            "status": self.status,
            "source": self.source,
            "seconds": round(self.seconds, 3),
            "reason": self.reason,
            "result_dir": self.result_dir,
            "report": self.report,
            "baseline_file": self.baseline_file,
            "baseline_case_sha256": self.baseline_case_sha256,
            "figures": [verdict.to_dict() for verdict in self.figures],
        }


def count_statuses(outcomes):
    """{status: number of figures} over all cases (a failed case counts once as "failed")."""
    counts = {status: 0 for status in STATUSES}
    for outcome in outcomes:
        if outcome.status == "failed" or not outcome.figures:
            counts[outcome.status] += 1
        else:
            for verdict in outcome.figures:
                counts[verdict.status] += 1
    return counts


def exit_status(outcomes):
    """1 when any case regressed or failed, else 0."""
    return 1 if any(o.status in ("regressed", "failed") for o in outcomes) else 0


def suite_summary(outcomes, *, tier, started_utc, finished_utc, updated=()):
    """The ``hornproof.regress/1`` document of a run (:mod:`hornproof.compare.output.regress_json`)."""
    return regress_json.summary_document(
        [o.to_dict() for o in outcomes], tier=tier, counts=count_statuses(outcomes),
        exit_status=exit_status(outcomes), solver_version=meep_version(), started_utc=started_utc,
        finished_utc=finished_utc, updated=updated,
    )
