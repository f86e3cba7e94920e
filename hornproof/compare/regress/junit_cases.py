"""A regression run as JUnit testcases (the file format itself is :mod:`hornproof.compare.output.junit`)."""

from ..output.junit import TestCaseRecord

__all__ = ["junit_cases"]


def verdict_case(classname, result):
    """The "verdict" testcase of one case: verify's overall verdict on its checks.

    An *unresolved* verdict is written as ``<skipped message="unresolved: ...">``: a CI server
    shows a skipped test in its own colour and count, so the undecided check stays visible
    without turning the nightly run red. It is not a failure on purpose: the regression suite
    judges *change* against the baselines (its exit status), and an unresolved verdict is a
    statement about numerical uncertainty, not a regression; a ``failure`` would also make an
    unresolved case indistinguishable from a regressed one. *agrees*, *disagrees* (a finding
    the baseline records) and "no checks" pass, with the verdict in <system-out>. None when the
    result has no comparison block.
    """
    comparison = (result or {}).get("comparison")
    if not isinstance(comparison, dict) or "overall" not in comparison:
        return None
    overall = str(comparison["overall"])
    if overall == "unresolved":
        reasons = comparison.get("unresolved_reasons") or {}
        parts = [f"{name} ({'; '.join(reasons.get(name, [])) or 'uncertainty above tolerance'})"
                 for name in comparison.get("unresolved_checks") or sorted(reasons)]
        return TestCaseRecord(classname, "verdict", "skipped", message="unresolved: " + ", ".join(parts))
    return TestCaseRecord(classname, "verdict", "passed", system_out=f"verdict: {overall}")


def junit_cases(outcomes, tier):
    """JUnit testcases: per case one "run" testcase, one "verdict" testcase (verify's overall
    verdict, :func:`verdict_case`), then one per figure.

    failure: regressed figures and failed runs; skipped: unresolved verdicts, new and
    not-comparable figures.
    """
    records = []
    for outcome in outcomes:
        classname = f"regress.{tier}.{outcome.name}"
        if outcome.status == "failed":
            records.append(TestCaseRecord(classname, "run", "failure", message=outcome.reason, kind="run-failed",
                                          detail=outcome.detail or outcome.reason, time_s=outcome.seconds,
                                          system_out=f"case file: {outcome.case_file}\n"
                                                     f"run folder: {outcome.result_dir}"))
            continue
        records.append(TestCaseRecord(classname, "run", "passed", time_s=outcome.seconds,
                                      system_out=f"case file: {outcome.case_file}\nresult: {outcome.result_dir}\n"
                                                 f"source: {outcome.source}"))
        judged = verdict_case(classname, outcome.result)
        if judged is not None:
            records.append(judged)
        for verdict in outcome.figures:
            text = f"{verdict.status}: {verdict.reason}".rstrip(": ")
            if verdict.status == "regressed":
                records.append(TestCaseRecord(classname, verdict.figure, "failure", message=verdict.reason,
                                              kind="regressed", detail=f"{verdict.reason}\nreport: {outcome.report}"))
            elif verdict.status in ("new", "not-comparable"):
                records.append(TestCaseRecord(classname, verdict.figure, "skipped",
                                              message=f"{verdict.status}: {verdict.reason}"))
            else:
                records.append(TestCaseRecord(classname, verdict.figure, "passed", system_out=text))
    return records
