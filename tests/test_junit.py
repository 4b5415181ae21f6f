"""JUnit XML from `check`: one case per expectation, failures with the message, script errors
as errors, and the counts the CI dashboards read."""

from __future__ import annotations

import xml.etree.ElementTree as ET

from layoutlang import check, loads
from layoutlang.reports.junit import ScriptOutcome, junit_xml

# f = 50, s = 150 → s' = 75 (Hecht 2017, Optics, 5th ed., eq. 5.17; number from memory);
# the second one is wrong.
SCRIPT = """object 150 before, height 2
start in air
lens relay focal length 50
stop at relay, diameter 10
image at focus
expect image distance = 75 ± 0.01
expect image distance = 70 ± 0.01
"""


def test_cases_failures_and_errors() -> None:
    results = check(loads(SCRIPT, "relay.lay"))
    text = junit_xml([ScriptOutcome("relay.lay", results),
                      ScriptOutcome("broken.lay", [], "broken.lay:1:1: error: oops")])
    assert text == junit_xml([ScriptOutcome("relay.lay", results),
                              ScriptOutcome("broken.lay", [], "broken.lay:1:1: error: oops")])
    root = ET.fromstring(text.split("\n", 1)[1])
    assert (root.get("tests"), root.get("failures"), root.get("errors")) == ("3", "1", "1")
    cases = root.findall(".//testcase")
    assert [c.get("name") for c in cases] == ["line6[image distance]", "line7[image distance]",
                                              "script"]
    assert cases[0].find("failure") is None
    failure = cases[1].find("failure")
    assert failure is not None and "expected 70 mm ± 0.01 mm" in failure.get("message")
    assert cases[2].find("error").get("message") == "broken.lay:1:1: error: oops"
