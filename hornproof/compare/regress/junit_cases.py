"""A regression run as JUnit testcases (the file format itself is :mod:`hornproof.compare.output.junit`)."""

from ..output.junit import TestCaseRecord

__all__ = ["junit_cases"]


def junit_cases(outcomes, tier):
    """JUnit testcases: per case one "run" testcase, then one per figure.

    failure: regressed figures and failed runs; skipped: new and not-comparable figures.
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
