"""verify's verdict in the regression suite's JUnit XML: unresolved is a <skipped> testcase.

The JUnit structure (testsuite counts, <skipped message=...>) follows the JUnit XML schema
as CI servers read it (Jenkins / GitLab: a <skipped> child marks the testcase skipped).
"""

import xml.etree.ElementTree as ET

from hornproof.compare.output.junit import junit_document
from hornproof.compare.regress.junit_cases import junit_cases
from hornproof.compare.regress.outcome import CaseOutcome


def _outcome(name, comparison):
    return CaseOutcome(name=name, case_file=f"cases/{name}.toml", tier="full", case_sha256="0" * 64,
                       source="run", result={"comparison": comparison})


def _verdict_testcases(outcomes):
    root = ET.fromstring(junit_document("hornproof regress (full)", junit_cases(outcomes, "full")).split("\n", 1)[1])
    suite = root.find("testsuite")
    cases = {t.get("classname"): t for t in suite.findall("testcase") if t.get("name") == "verdict"}
    return suite, cases


def test_unresolved_verdict_is_skipped_with_its_reasons():
    unresolved = _outcome("a", {"overall": "unresolved", "failed_checks": [],
                                "unresolved_checks": ["directivity_db", "s11_db"],
                                "unresolved_reasons": {"directivity_db": ["divergent ladder"],
                                                       "s11_db": ["confident uncertainty, too large to decide"]}})
    agrees = _outcome("b", {"overall": "agrees", "failed_checks": [], "unresolved_checks": []})
    disagrees = _outcome("c", {"overall": "disagrees", "failed_checks": ["hpbw_h_deg"], "unresolved_checks": []})
    suite, cases = _verdict_testcases([unresolved, agrees, disagrees])
    skipped = cases["regress.full.a"].find("skipped")
    assert skipped is not None
    assert skipped.get("message") == ("unresolved: directivity_db (divergent ladder), "
                                      "s11_db (confident uncertainty, too large to decide)")
    assert cases["regress.full.a"].find("failure") is None
    # agrees and disagrees are verdicts, not regressions: they pass and say which in system-out
    for name, word in (("b", "agrees"), ("c", "disagrees")):
        case = cases[f"regress.full.{name}"]
        assert case.find("skipped") is None and case.find("failure") is None
        assert case.find("system-out").text == f"verdict: {word}"
    # three "run" testcases + three "verdict" testcases; only the unresolved one is skipped
    assert suite.get("tests") == "6" and suite.get("skipped") == "1" and suite.get("failures") == "0"


def test_result_without_comparison_has_no_verdict_testcase():
    outcome = CaseOutcome(name="d", case_file="cases/d.toml", tier="full", case_sha256="0" * 64, result={})
    suite, cases = _verdict_testcases([outcome])
    assert cases == {} and suite.get("tests") == "1"
