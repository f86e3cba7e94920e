"""JUnit XML writer: structure as CI servers read it.

Outside references for the structure: the JUnit XML convention as read by Jenkins' JUnit
plugin, GitLab and GitHub test-report actions (root <testsuites>, <testsuite> with
tests/failures/errors/skipped/time counts, <testcase classname name time>, children
<failure message type>, <error>, <skipped message>); summarised from memory of those tools'
documentation. The second outside check is pytest's own --junitxml writer, run here on a
tiny test file: our document must use the same elements and attributes for the same outcomes.
"""

import subprocess
import sys
import xml.etree.ElementTree as ET
from datetime import datetime, timezone

import pytest

from hornproof.compare.output.junit import TestCaseRecord, junit_document, write_junit


def _cases():
    return [
        TestCaseRecord("regress.quick.horn-a", "run", "passed", time_s=1.5),
        TestCaseRecord("regress.quick.horn-a", "directivity_dbi", "failure", message="changed by +0.8",
                       kind="regressed", detail="long text"),
        TestCaseRecord("regress.quick.horn-a", "hpbw_h_deg", "skipped", message="new: no baseline"),
        TestCaseRecord("regress.quick.horn-b", "run", "error", message="diverged", kind="run-failed"),
        TestCaseRecord("regress.quick.horn-b", "s11_db", "passed", system_out="unchanged"),
    ]


def test_counts_and_children_parse_back():
    text = junit_document("hornproof regress (quick)", _cases(),
                          timestamp=datetime(2026, 1, 2, 3, 4, 5, tzinfo=timezone.utc), properties={"tier": "quick"})
    root = ET.fromstring(text.encode("utf-8"))
    assert root.tag == "testsuites"
    suites = root.findall("testsuite")
    assert len(suites) == 1
    suite = suites[0]
    for element in (root, suite):
        assert element.get("tests") == "5"
        assert element.get("failures") == "1"
        assert element.get("errors") == "1"
        assert element.get("skipped") == "1"
        assert float(element.get("time")) == pytest.approx(1.5)
    assert suite.get("timestamp") == "2026-01-02T03:04:05"
    assert suite.find("properties/property").attrib == {"name": "tier", "value": "quick"}
    testcases = suite.findall("testcase")
    assert [(t.get("classname"), t.get("name")) for t in testcases] == [(c.classname, c.name) for c in _cases()]
    failure = testcases[1].find("failure")
    assert failure.get("message") == "changed by +0.8" and failure.get("type") == "regressed"
    assert failure.text == "long text"
    assert testcases[2].find("skipped").get("message") == "new: no baseline"
    assert testcases[3].find("error").get("type") == "run-failed"
    assert list(testcases[0]) == []  # a passed testcase has no child element
    assert testcases[4].find("system-out").text == "unchanged"


def test_control_characters_do_not_break_the_xml():
    text = junit_document("s", [TestCaseRecord("c", "n\x01", "failure", message="bad\x07bell", detail="x\x1by")])
    root = ET.fromstring(text.encode("utf-8"))
    assert root.find("testsuite/testcase").get("name") == "n?"


def test_bad_outcome_and_time_are_refused():
    with pytest.raises(ValueError, match="outcome"):
        TestCaseRecord("c", "n", "broken")
    with pytest.raises(ValueError, match="time_s"):
        TestCaseRecord("c", "n", "passed", time_s=-1.0)


def test_write_is_atomic_and_leaves_no_temporary(tmp_path):
    target = tmp_path / "out.xml"
    write_junit(target, "suite", _cases())
    assert ET.parse(target).getroot().tag == "testsuites"
    assert [p.name for p in tmp_path.iterdir()] == ["out.xml"]


def test_same_shape_as_pytest_junitxml(tmp_path):
    # Outside reference: pytest's own JUnit writer on one passing, one failing, one skipped test.
    (tmp_path / "test_sample.py").write_text(
        "import pytest\n"
        "def test_ok():\n    pass\n"
        "def test_bad():\n    assert 1 == 2\n"
        "@pytest.mark.skip(reason='later')\n"
        "def test_later():\n    pass\n"
    )
    report = tmp_path / "pytest.xml"
    subprocess.run([sys.executable, "-m", "pytest", "-q", "-p", "no:cacheprovider", "-o", "addopts=",
                    "-o", "junit_family=xunit2", f"--junitxml={report}", str(tmp_path / "test_sample.py")],
                   cwd=tmp_path, capture_output=True, check=False)
    reference = ET.parse(report).getroot()
    ours = ET.fromstring(junit_document("s", [
        TestCaseRecord("test_sample", "test_ok", "passed"),
        TestCaseRecord("test_sample", "test_bad", "failure", message="assert 1 == 2"),
        TestCaseRecord("test_sample", "test_later", "skipped", message="later"),
    ]).encode("utf-8"))

    def shape(root):
        return sorted({"/".join(tag for tag in path) for path in _paths(root)})

    assert shape(ours) == shape(reference)
    ref_suite, our_suite = reference.find("testsuite"), ours.find("testsuite")
    # Every count attribute pytest writes is present, with the same values for the same outcomes.
    for key in ("tests", "failures", "errors", "skipped"):
        assert our_suite.get(key) == ref_suite.get(key), key
    for ref_case, our_case in zip(ref_suite.findall("testcase"), our_suite.findall("testcase")):
        assert set(ref_case.attrib) == set(our_case.attrib)
        for ref_child, our_child in zip(ref_case, our_case):
            assert ref_child.tag == our_child.tag
            assert "message" in our_child.attrib


def _paths(element, prefix=()):
    here = prefix + (element.tag,)
    yield here
    for child in element:
        if child.tag in ("properties", "system-out", "system-err"):
            continue
        yield from _paths(child, here)
