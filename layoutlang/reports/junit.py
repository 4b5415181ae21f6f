"""JUnit XML for CI dashboards: one test case per expectation, one suite per script.

The same names as the pytest plugin (`line<N>[<quantity>]`) so a result reads the same whichever
front end produced it. No timestamps or host names: the same scripts give the same bytes.
"""

from __future__ import annotations

import xml.etree.ElementTree as ET
from dataclasses import dataclass, field

from ..checks import CheckResult

__all__ = ["ScriptOutcome", "junit_xml", "case_name"]


@dataclass(frozen=True)
class ScriptOutcome:
    """What checking one script gave: its results, or the error that stopped it."""

    file: str
    results: list[CheckResult] = field(default_factory=list)
    error: str | None = None


def case_name(result: CheckResult) -> str:
    """`line16[focal length]`: where the expectation is and what it is about."""
    return f"line{result.expectation.span.line}[{result.expectation.quantity}]"


def junit_xml(outcomes: list[ScriptOutcome]) -> str:
    """The JUnit XML document for these scripts."""
    root = ET.Element("testsuites", name="layoutlang check")
    totals = {"tests": 0, "failures": 0, "errors": 0}
    for outcome in outcomes:
        suite = ET.SubElement(root, "testsuite", name=outcome.file)
        counts = {"tests": 0, "failures": 0, "errors": 0}
        if outcome.error is not None:
            case = ET.SubElement(suite, "testcase", classname=outcome.file, name="script",
                                 time="0")
            first_line = outcome.error.splitlines()[0] if outcome.error else "error"
            error = ET.SubElement(case, "error", message=first_line, type="LayoutError")
            error.text = outcome.error
            counts["tests"] += 1
            counts["errors"] += 1
        for result in outcome.results:
            e = result.expectation
            case = ET.SubElement(suite, "testcase", classname=outcome.file,
                                 name=case_name(result), file=e.span.file,
                                 line=str(e.span.line), time="0")
            counts["tests"] += 1
            if not result.passed:
                failure = ET.SubElement(case, "failure", message=result.outcome.message,
                                        type="ExpectationFailed")
                failure.text = f"{e.span.file}:{e.span.line}: {e.text}\n{result.outcome.message}"
                counts["failures"] += 1
        for key, value in counts.items():
            suite.set(key, str(value))
            totals[key] += value
    for key, value in totals.items():
        root.set(key, str(value))
    ET.indent(root)
    return '<?xml version="1.0" encoding="utf-8"?>\n' + ET.tostring(root, encoding="unicode") \
        + "\n"
