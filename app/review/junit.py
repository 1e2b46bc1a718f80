"""The check as a JUnit XML file, the result format CI servers show without a plug-in.

One ``testsuite`` per file, one ``testcase`` per check: reading the file, then
every measured finding (a seam measure, a free edge, a section's inflections).
A finding over tolerance is a ``failure`` carrying the finding in words; a file
that cannot be read, or that met an internal error, is an ``error`` of its read
case. The layout follows the common JUnit schema of Apache Ant's JUnit task
(``tests/data/junit.xsd`` validates it). The JSON stays the full record.
"""

from __future__ import annotations

import re
import socket
import xml.etree.ElementTree as ET
from dataclasses import dataclass
from datetime import datetime

from .result import ERROR, FAIL, UNREADABLE, FileReview, Finding


@dataclass(frozen=True)
class SuiteRun:
    """How one file's result was obtained: seconds spent, and whether it came from the cache."""

    seconds: float = 0.0
    cached: bool = False


# Characters XML 1.0 cannot carry (control characters, lone surrogates from undecodable file names).
_NOT_XML = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\ud800-\udfff\ufffe\uffff]")


def _clean(root: ET.Element) -> None:
    """Replace characters XML cannot hold by U+FFFD in every attribute and text, in place."""
    for element in root.iter():
        element.attrib.update({k: _NOT_XML.sub("\ufffd", v) for k, v in element.attrib.items()})
        if element.text:
            element.text = _NOT_XML.sub("\ufffd", element.text)


def _number(value: float | None) -> str:
    return "no limit" if value is None else f"{value:.6g}"


def finding_text(f: Finding) -> str:
    """One finding in words: ``'angle 0.8 deg over the limit 0.5 deg (faces 2-3)'``."""
    where = "" if f.where is None else " at ({:.3f}, {:.3f}, {:.3f}) mm".format(*f.where)
    relation = "over the limit" if f.verdict == FAIL else "within the limit"
    return f"{f.measure} {_number(f.value)} {f.unit} {relation} {_number(f.limit)} {f.unit} ({f.subject}){where}"


def _case(suite: ET.Element, classname: str, name: str) -> ET.Element:
    return ET.SubElement(suite, "testcase", name=name, classname=classname, time="0")


def _suite(index: int, review: FileReview, run: SuiteRun, stamp: str, host: str, version: str) -> ET.Element:
    failures = review.failures
    broken = review.verdict in (UNREADABLE, ERROR)
    suite = ET.Element(
        "testsuite",
        name=review.source,
        package="batten",
        id=str(index),
        timestamp=stamp,
        hostname=host,
        tests=str(1 + len(review.findings)),
        failures=str(len(failures)),
        errors=str(int(broken)),
        skipped="0",
        time=f"{run.seconds:.3f}",
    )
    props = ET.SubElement(suite, "properties")
    for name, value in (
        ("verdict", review.verdict),
        ("cached", "true" if run.cached else "false"),
        ("sha256", review.sha256 or ""),
        ("profile", str(review.profile.get("name", ""))),
        ("batten_version", version),
    ):
        ET.SubElement(props, "property", name=name, value=value)
    read = _case(suite, "batten.read", "read and analyse")
    if broken:
        kind = "unreadable" if review.verdict == UNREADABLE else "internal error"
        error = ET.SubElement(read, "error", message=review.error or kind, type=kind)
        error.text = review.error or kind
    for f in review.findings:
        case = _case(suite, f"batten.{f.kind}", f"{f.subject}: {f.measure}")
        if f.verdict == FAIL:
            failure = ET.SubElement(case, "failure", message=finding_text(f), type="over tolerance")
            failure.text = finding_text(f)
    ET.SubElement(suite, "system-out").text = "\n".join(review.warnings)
    ET.SubElement(suite, "system-err").text = review.error or ""
    return suite


def junit_text(reviews: list[FileReview], runs: list[SuiteRun], when: datetime, version: str) -> str:
    """The JUnit XML document of a check run.

    Parameters
    ----------
    reviews : list of FileReview
        One per file, in the order of the run.
    runs : list of SuiteRun
        Timing and cache use of each file, same order.
    when : datetime
        Start of the run (written without time zone, as the schema wants).
    version : str
        Batten's version, echoed in each suite's properties.
    """
    root = ET.Element("testsuites")
    stamp = when.strftime("%Y-%m-%dT%H:%M:%S")
    host = socket.gethostname() or "localhost"
    for index, (review, run) in enumerate(zip(reviews, runs, strict=True)):
        root.append(_suite(index, review, run, stamp, host, version))
    _clean(root)
    ET.indent(root)
    return ET.tostring(root, encoding="unicode", xml_declaration=True) + "\n"
