"""Check reports built by hand for the reporter tests, and the golden-file comparison.

The design, its nets and the waiver are an invented scenario: a 1.8 V sensor front end whose
outputs reach a 3.3 V controller. The numbers in the findings are what the check engine would
compute for it, taken from the standards (the reporters only show them):

- LVCMOS18 output high ``VOH = VDD - 0.2 V`` at 100 uA, at VDD minimum 1.65 V: 1.45 V
  (JESD8-7A, from memory);
- LVCMOS33 input high ``VIH = 2.0 V`` (JESD8C.01, from memory);
- so the high noise margin ``NM_H = VOH - VIH = 1.45 - 2.0 = -0.55 V``, -550 mV.

The two rules are local :class:`Rule` objects, never registered, so the tests do not depend on
which rules the engine has.
"""

from __future__ import annotations

import os
from pathlib import Path

from linter.checks.finding import Finding, Severity, Site
from linter.checks.registry import Rule
from linter.cli import CAUTION
from linter.errors import SourceLocation
from linter.report.model import CheckReport

GOLDEN = Path(__file__).resolve().parent / "golden"
UPDATE_GOLDEN = "LEVELCROSS_UPDATE_GOLDEN"
DESIGN_FILE = "designs/sensor_bridge/sensor_bridge.v"

HIGH_GAP_DOC = """Driver high level is below the receiver's input-high threshold.

What it finds
-------------
A net whose driver's guaranteed VOH is lower than a receiver's VIH at some rail corner.

Why it matters
--------------
The receiver may read a high as a low or sit between the two and draw extra current.

How to fix
----------
Put a level translator between the two rails, or choose a receiver whose VIH the driver meets.
"""

FLOATING_DOC = """An input is driven by nothing.

What it finds
-------------
A receiver pin whose net has no driver, no pull-up and no pull-down.

Why it matters
--------------
A CMOS input left open drifts between levels and may oscillate.

How to fix
----------
Tie the input to a rail through a resistor, or drive it from an output.
"""


def _no_findings(context: object) -> list[Finding]:
    return []


HIGH_GAP = Rule("high-level-gap", Severity.ERROR, HIGH_GAP_DOC.splitlines()[0], HIGH_GAP_DOC, _no_findings)
FLOATING = Rule("input-left-floating", Severity.WARNING, FLOATING_DOC.splitlines()[0], FLOATING_DOC, _no_findings)
RULES = [HIGH_GAP, FLOATING]

GAP_DATA = {"corner": "VCC1V8 minimum", "margin_mv": -550, "vih_min": 2.0, "voh_min": 1.45}


def at(line: int, column: int = 5, file: str = DESIGN_FILE) -> SourceLocation:
    return SourceLocation(file, line, column)


def gap_on_bit(index: int) -> Finding:
    """The high-level gap on bit ``index`` of the sensor's data bus."""
    net = f"adc_data[{index}]"
    return Finding(
        rule="high-level-gap",
        severity=Severity.ERROR,
        message=f"net {net}: VOH 1.45 V at VCC1V8 minimum is below VIH 2.0 V (margin -550 mV)",
        location=at(20 + index),
        subject=net,
        subject_kind="net",
        sites=(
            Site("driver", f"u_adc.d{index}", at(20 + index)),
            Site("receiver", f"u_mcu.pa{index}", at(40 + index, 7)),
        ),
        data=dict(GAP_DATA),
    )


def sample_findings() -> list[Finding]:
    """Active findings: four consecutive bus bits, one bit after a gap, a single net, two inputs."""
    findings = [gap_on_bit(i) for i in (0, 1, 2, 3, 5)]
    findings.append(
        Finding(
            rule="high-level-gap",
            severity=Severity.ERROR,
            message="net irq_n: VOH 1.45 V at VCC1V8 minimum is below VIH 2.0 V (margin -550 mV)",
            location=at(30),
            subject="irq_n",
            subject_kind="net",
            sites=(Site("driver", "u_adc.irq_n", at(30)), Site("receiver", "u_mcu.pc3", at(50, 7))),
            data=dict(GAP_DATA),
        )
    )
    findings.append(
        Finding(
            rule="input-left-floating",
            severity=Severity.WARNING,
            message="input u_mcu.boot_sel has no driver and no pull resistor",
            location=at(12, 3),
            subject="boot_sel",
            subject_kind="net",
            sites=(Site("receiver", "u_mcu.boot_sel", at(52, 7)),),
        )
    )
    # A severity lowered to a note by configuration, on a net declared without a known line.
    findings.append(
        Finding(
            rule="input-left-floating",
            severity=Severity.NOTE,
            message="input u_mcu.spare has no driver and no pull resistor",
            location=SourceLocation(DESIGN_FILE),
            subject="spare",
            subject_kind="net",
            sites=(Site("receiver", "u_mcu.spare", SourceLocation("")),),
            data={"pins": 1},
        )
    )
    return sorted(findings, key=Finding.sort_key)


def sample_waived() -> list[Finding]:
    floating = Finding(
        rule="input-left-floating",
        severity=Severity.WARNING,
        message="input u_mcu.test_mode has no driver and no pull resistor",
        location=at(14, 3),
        subject="test_mode",
        subject_kind="net",
        sites=(Site("receiver", "u_mcu.test_mode", at(54, 7)),),
    )
    return [floating.waived("strapped low on the carrier board (invented)")]


def sample_report() -> CheckReport:
    return CheckReport(
        design="sensor_bridge",
        design_file=DESIGN_FILE,
        tool_version="0.1.0",
        findings=sample_findings(),
        waived=sample_waived(),
        rules=RULES,
        coverage={"cells_assigned": 950, "cells_total": 1000, "ports_assigned": 40, "ports_total": 40},
        # Supply ranges: JESD8C.01 (3.0-3.6 V) and JESD8-7A (1.65-1.95 V), from memory.
        rails={"VCC3V3": (3.3, 3.0, 3.6), "VCC1V8": (1.8, 1.65, 1.95)},
        power_states={"run": [], "standby": ["VCC1V8"]},
        caution=CAUTION,
    )


def empty_report() -> CheckReport:
    return CheckReport(
        design="sensor_bridge",
        design_file=None,
        tool_version="0.1.0",
        findings=[],
        rules=RULES,
        caution=CAUTION,
    )


def assert_golden(name: str, text: str) -> None:
    """Compare with ``golden/<name>``; ``LEVELCROSS_UPDATE_GOLDEN=1`` rewrites it on purpose."""
    path = GOLDEN / name
    if os.environ.get(UPDATE_GOLDEN) == "1":
        path.write_bytes(text.encode("utf-8"))
    assert path.is_file(), f"{path} is missing; run the tests with {UPDATE_GOLDEN}=1 and review the diff"
    expected = path.read_bytes().decode("utf-8")
    assert text == expected, f"{name} differs from its golden file; if on purpose, rerun with {UPDATE_GOLDEN}=1"
