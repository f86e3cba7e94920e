"""JUnit XML test reports, the open convention CI servers read for test results.

The shape written (the common subset read by Jenkins, GitLab and GitHub test-report actions)::

    <testsuites name=… tests= failures= errors= skipped= time=>
      <testsuite name=… tests= failures= errors= skipped= time= timestamp=>
        <properties><property name= value=/></properties>
        <testcase classname=… name=… time=…>
          <failure message=… type=…>details</failure>   | <error …> | <skipped message=…/>
          <system-out>…</system-out>
        </testcase>
      </testsuite>
    </testsuites>

A testcase with no child element passed. Counts on both levels are computed from the cases.
"""

import re
import xml.etree.ElementTree as ET
from dataclasses import dataclass
from datetime import datetime, timezone

from ...atomic import write_text_atomic

__all__ = ["OUTCOMES", "TestCaseRecord", "junit_document", "write_junit", "suite_name"]

OUTCOMES = ("passed", "failure", "error", "skipped")

# Characters XML 1.0 does not allow (control characters other than tab, newline, return).
_NOT_XML = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\ufffe\uffff]")


def _clean(text):
    return _NOT_XML.sub("?", str(text))


@dataclass
class TestCaseRecord:
    """One JUnit testcase.

    Parameters
    ----------
    classname : str
        Grouping shown by CI servers (here: ``regress.<tier>.<case>``).
    name : str
        The check (here: a figure name, or "run").
    outcome : {"passed", "failure", "error", "skipped"}
    message : str
        One line for the failure/error/skipped element.
    detail : str
        Longer text inside the failure/error element.
    kind : str
        ``type`` attribute of the failure/error element.
    time_s : float
        Duration, seconds.
    system_out : str
        Text for <system-out> (shown by CI servers next to the case).
    """

    __test__ = False  # not a pytest test class despite the name

    classname: str
    name: str
    outcome: str = "passed"
    message: str = ""
    detail: str = ""
    kind: str = ""
    time_s: float = 0.0
    system_out: str = ""

    def __post_init__(self):
        if self.outcome not in OUTCOMES:
            raise ValueError(f"outcome: {self.outcome!r}, expected one of {', '.join(OUTCOMES)}")
        if not (self.time_s >= 0.0):
            raise ValueError(f"time_s: {self.time_s!r} must be >= 0")


def _counts(cases):
    return {
        "tests": len(cases),
        "failures": sum(c.outcome == "failure" for c in cases),
        "errors": sum(c.outcome == "error" for c in cases),
        "skipped": sum(c.outcome == "skipped" for c in cases),
    }


def junit_document(suite_name, cases, *, timestamp=None, properties=None):
    """The JUnit XML text for one test suite.

    Parameters
    ----------
    suite_name : str
    cases : sequence of TestCaseRecord
    timestamp : datetime, optional
        Start of the suite (UTC); now by default.
    properties : dict, optional
        Written as <property name= value=/> of the suite.

    Returns
    -------
    str
        XML declaration plus the indented document.
    """
    cases = list(cases)
    if timestamp is None:
        timestamp = datetime.now(timezone.utc)
    total_time = sum(c.time_s for c in cases)
    counts = _counts(cases)

    root = ET.Element("testsuites", name=_clean(suite_name))
    suite = ET.SubElement(root, "testsuite", name=_clean(suite_name))
    for element in (root, suite):
        for key, value in counts.items():
            element.set(key, str(value))
        element.set("time", f"{total_time:.3f}")
    suite.set("timestamp", timestamp.astimezone(timezone.utc).replace(tzinfo=None).isoformat(timespec="seconds"))
    if properties:
        props = ET.SubElement(suite, "properties")
        for key in sorted(properties):
            ET.SubElement(props, "property", name=_clean(key), value=_clean(properties[key]))
    for case in cases:
        element = ET.SubElement(
            suite, "testcase", classname=_clean(case.classname), name=_clean(case.name), time=f"{case.time_s:.3f}"
        )
        if case.outcome in ("failure", "error"):
            child = ET.SubElement(element, case.outcome, message=_clean(case.message))
            if case.kind:
                child.set("type", _clean(case.kind))
            if case.detail:
                child.text = _clean(case.detail)
        elif case.outcome == "skipped":
            ET.SubElement(element, "skipped", message=_clean(case.message))
        if case.system_out:
            ET.SubElement(element, "system-out").text = _clean(case.system_out)
    ET.indent(root, space="  ")
    return '<?xml version="1.0" encoding="UTF-8"?>\n' + ET.tostring(root, encoding="unicode") + "\n"


def write_junit(path, suite_name, cases, **kwargs):
    """Write :func:`junit_document` to ``path`` atomically (UTF-8)."""
    write_text_atomic(path, junit_document(suite_name, cases, **kwargs))


def suite_name(path):
    """The ``name`` of a JUnit XML file's root ``<testsuites>`` element; None when the file is
    not readable JUnit XML (used to replace only a report a tool wrote itself)."""
    try:
        root = ET.parse(path).getroot()
    except (OSError, ET.ParseError):
        return None
    return root.get("name") if root.tag == "testsuites" else None
