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
        for v in outcome.figures:
            text = f"{v.status}: {v.reason}".rstrip(": ")
            if v.status == "regressed":
                records.append(TestCaseRecord(classname, v.figure, "failure", message=v.reason, kind="regressed",
                                              detail=f"{v.reason}\nreport: {outcome.report}"))
            elif v.status in ("new", "not-comparable"):
                records.append(TestCaseRecord(classname, v.figure, "skipped", message=f"{v.status}: {v.reason}"))
            else:
                records.append(TestCaseRecord(classname, v.figure, "passed", system_out=text))
    return records
