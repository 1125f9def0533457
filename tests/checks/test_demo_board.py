"""The demo board ``designs/ctrl_board``: the check finds exactly the faults its EXPECTED.md lists.

The board is an invented scenario with faults seeded on purpose, one or two for every rule.
Its ``EXPECTED.md`` lists each fault (rule, subject, power state, severity) with a key number
worked out by hand from the shipped family values and the design's rails, the arithmetic and
the source (JEDEC JESD8 standards from memory, common TTL practice) written beside it. This
test reads that table, so the document and the tool cannot drift apart: every row must be
found with its severity and its number (mV within 0.5 mV, everything else exactly), and the
tool must find nothing else. A second table lists nets that must stay clean (the negatives:
the translated crossing, LVCMOS33 into a TTL-compatible 5 V input, a loop through a
flip-flop, a pulled-up wired-AND, a constant tie).
"""

from __future__ import annotations

import json
import math
import re
import subprocess
import sys
from collections import Counter
from dataclasses import dataclass
from pathlib import Path

import pytest

from linter.checks.engine import CheckResult
from linter.checks.finding import Finding, Severity
from linter.checks.registry import all_rules
from linter.electrical.design_file import load_design
from linter.electrical.design_model import Design
from linter.pipeline import annotate_design, check_annotation

PROJECT_ROOT = Path(__file__).resolve().parents[2]
BOARD = PROJECT_ROOT / "designs" / "ctrl_board"
DESIGN_FILE = BOARD / "design.yaml"
EXPECTED_FILE = BOARD / "EXPECTED.md"
SEEDED_MARK = re.compile(r"seeded fault: ([a-z]+(?:-[a-z]+)+)")
NO_STATE = "—"
# A key number: a value with a unit for voltages and currents, a bare integer for counts.
NUMBER = re.compile(r"(-?\d+(?:\.\d+)?)(?: (mV|mA))?")
MV_TOLERANCE = 0.5


@dataclass(frozen=True)
class ExpectedFinding:
    """One row of EXPECTED.md's table of seeded faults."""

    number: int
    rule: str
    severity: Severity
    subject: str
    state: str | None
    key: str
    expected: str
    waived: bool

    @property
    def identity(self) -> tuple[str, str, str | None]:
        return (self.rule, self.subject, self.state)


@dataclass(frozen=True)
class CleanNet:
    """One row of EXPECTED.md's table of nets that must not be reported."""

    net: str
    rules: tuple[str, ...]  # empty: no rule at all


def _table(heading: str) -> list[list[str]]:
    """The body rows of the first table under ``## heading``, cell texts stripped."""
    text = EXPECTED_FILE.read_text(encoding="utf-8")
    section = text.split(f"\n## {heading}\n", 1)[1].split("\n## ", 1)[0]
    rows = [line for line in section.splitlines() if line.startswith("|")]
    cells = [[cell.strip() for cell in row.strip().strip("|").split("|")] for row in rows]
    return cells[2:]  # past the header and the separator


def _expected_findings() -> list[ExpectedFinding]:
    found = []
    for cells in _table("Seeded faults"):
        number, rule_id, severity, subject, state, key, expected, status = cells[:8]
        assert status in ("active", "waived"), f"row {number}: status '{status}'"
        found.append(ExpectedFinding(int(number), rule_id, Severity(severity), subject,
                                     None if state == NO_STATE else state, key, expected, status == "waived"))
    return found


def _clean_nets() -> list[CleanNet]:
    rows = []
    for cells in _table("Must not fire"):
        rules = () if cells[1] == "any" else tuple(word.strip() for word in cells[1].split(","))
        rows.append(CleanNet(cells[0], rules))
    return rows


EXPECTED = _expected_findings()
CLEAN = _clean_nets()


def _identity(finding: Finding) -> tuple[str, str, str | None]:
    return (finding.rule, finding.subject, finding.data.get("state"))


def _key_matches(key: str, actual: object, expected: str) -> bool:
    """Whether a finding's ``data[key]`` is the table's value (mV within 0.5 mV, else exactly)."""
    number = NUMBER.fullmatch(expected)
    if number is None:
        return actual == expected
    value, unit = float(number.group(1)), number.group(2)
    if key.endswith("_mv"):
        assert unit == "mV", f"{key} is in mV; the table says '{expected}'"
        return isinstance(actual, (int, float)) and abs(actual - value) <= MV_TOLERANCE
    if key.endswith("_a"):
        assert unit == "mA", f"{key} is a current; the table gives it in mA, not '{expected}'"
        # exact up to the rounding of summing input currents in floating point
        return isinstance(actual, float) and math.isclose(actual, value / 1000.0, rel_tol=1e-9)
    assert unit is None and value == int(value), f"{key} is a count; the table says '{expected}'"
    return actual == int(value)


@pytest.fixture(scope="module")
def design() -> Design:
    return load_design(DESIGN_FILE)


@pytest.fixture(scope="module")
def result(design: Design) -> CheckResult:
    return check_annotation(annotate_design(design))


def test_the_table_names_every_rule_and_only_registered_rules() -> None:
    assert [row.number for row in EXPECTED] == list(range(1, len(EXPECTED) + 1))
    seeded = {row.rule for row in EXPECTED}
    registered = {rule.id for rule in all_rules()}
    assert seeded == registered, "the demo board seeds one fault or more of every rule"
    assert len({row.identity for row in EXPECTED}) == len(EXPECTED), "two rows describe one finding"


@pytest.mark.parametrize("row", EXPECTED, ids=[f"{row.number}-{row.rule}" for row in EXPECTED])
def test_seeded_fault_is_found_with_its_number(result: CheckResult, row: ExpectedFinding) -> None:
    pool = result.waived if row.waived else result.findings
    matches = [finding for finding in pool if _identity(finding) == row.identity]
    assert len(matches) == 1, f"row {row.number}: {row.rule} on {row.subject} found {len(matches)} times"
    finding = matches[0]
    assert finding.severity is row.severity
    assert row.key in finding.data, f"row {row.number}: the finding carries no '{row.key}' ({finding.data})"
    assert _key_matches(row.key, finding.data[row.key], row.expected), (
        f"row {row.number}: {row.key} is {finding.data[row.key]!r}, EXPECTED.md says {row.expected}")


def test_nothing_is_found_beyond_the_table(result: CheckResult) -> None:
    expected_active = Counter(row.identity for row in EXPECTED if not row.waived)
    expected_waived = Counter(row.identity for row in EXPECTED if row.waived)
    assert Counter(_identity(f) for f in result.findings) == expected_active
    assert Counter(_identity(f) for f in result.waived) == expected_waived


def test_the_waived_finding_keeps_the_reason_written_in_the_design_file(
        result: CheckResult, design: Design) -> None:
    for row in (row for row in EXPECTED if row.waived):
        waiver = next(w for w in design.waivers if w.rule == row.rule and w.pattern.text == row.subject)
        finding = next(f for f in result.waived if _identity(f) == row.identity)
        assert finding.waiver_reason == waiver.reason
        assert finding.waiver_reason.startswith("Invented example: the device configuration enables")


@pytest.mark.parametrize("clean", CLEAN, ids=[clean.net for clean in CLEAN])
def test_negative_is_not_reported(result: CheckResult, clean: CleanNet) -> None:
    def on_net(finding: Finding) -> bool:
        return finding.subject == clean.net or finding.subject.startswith(clean.net + "[")

    reported = [f for f in [*result.findings, *result.waived]
                if on_net(f) and (not clean.rules or f.rule in clean.rules)]
    assert reported == []


def test_every_seeded_fault_is_marked_where_it_is_written() -> None:
    marked = Counter()
    for path in sorted(BOARD.glob("*.v")) + [DESIGN_FILE]:
        marked.update(SEEDED_MARK.findall(path.read_text(encoding="utf-8")))
    assert set(marked) == {row.rule for row in EXPECTED}


@pytest.mark.parametrize("name", ["board.v", "fpga_bank.v", "glue.v", "parts.v", "design.yaml", "parts.yaml",
                                  "README.md", "EXPECTED.md"])
def test_every_file_says_at_the_top_that_it_is_invented(name: str) -> None:
    head = " ".join((BOARD / name).read_text(encoding="utf-8").splitlines()[:3])
    assert "INVENTED EXAMPLE" in head and "describes no real product" in head


def _run_check_json() -> subprocess.CompletedProcess[bytes]:
    return subprocess.run(
        [sys.executable, "-m", "linter", "check", "designs/ctrl_board/design.yaml", "--format", "json"],
        cwd=PROJECT_ROOT, capture_output=True, timeout=300, check=False)


def test_check_command_exits_1_with_byte_identical_json_listing_the_table() -> None:
    first, second = _run_check_json(), _run_check_json()
    assert first.returncode == 1, first.stderr.decode()
    assert second.returncode == 1
    assert first.stderr == b""
    assert first.stdout == second.stdout
    document = json.loads(first.stdout)
    active = Counter((f["rule"], f["subject"], f["data"].get("state")) for f in document["findings"])
    waived = Counter((f["rule"], f["subject"], f["data"].get("state")) for f in document["waived"])
    assert active == Counter(row.identity for row in EXPECTED if not row.waived)
    assert waived == Counter(row.identity for row in EXPECTED if row.waived)
    by_severity = Counter(row.severity.value for row in EXPECTED if not row.waived)
    assert document["summary"] == {
        "errors": by_severity["error"], "warnings": by_severity["warning"], "notes": by_severity["note"],
        "waived": sum(row.waived for row in EXPECTED),
    }
    assert document["design"]["file"] == "designs/ctrl_board/design.yaml"
