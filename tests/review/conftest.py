"""Shared fixtures of the review-report tests: the two designs, their check JSON and their pages.

Two designs are reviewed. The demo board ``designs/ctrl_board`` (invented, faults seeded on
purpose, numbers worked by hand in its EXPECTED.md) is the acceptance case; the small three-rail
fixture under ``fixtures/three_rail`` (invented) has exactly one crossing of each kind the page
treats differently (failing high, over-voltage, thin, passing, waived). Every page is written by
the real command line, into a temporary folder.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from linter.checks.rules.family_unassigned import assignment_coverage
from linter.cli import main
from linter.electrical.design_file import load_design
from linter.pipeline import annotate_design, check_annotation
from linter.review.model import build_review

PROJECT_ROOT = Path(__file__).resolve().parents[2]
DEMO_BOARD = PROJECT_ROOT / "designs" / "ctrl_board" / "design.yaml"
THREE_RAIL = Path(__file__).resolve().parent / "fixtures" / "three_rail" / "design.yaml"


def run_cli(*argv: str) -> int:
    return main([str(a) for a in argv])


def check_json(design: Path, tmp_path: Path) -> dict:
    """The check's own JSON for ``design`` (``levelcross check --format json``)."""
    out = tmp_path / "check.json"
    run_cli("check", design, "--format", "json", "-o", out)
    return json.loads(out.read_text(encoding="utf-8"))


@pytest.fixture(scope="session")
def demo_page(tmp_path_factory) -> tuple[str, dict, Path]:
    """(HTML text, check JSON, folder) of the demo board's review."""
    folder = tmp_path_factory.mktemp("demo_review")
    code = run_cli("report", DEMO_BOARD, "-o", folder / "review.html")
    assert code == 1  # the board has errors on purpose
    return (folder / "review.html").read_text(encoding="utf-8"), check_json(DEMO_BOARD, folder), folder


@pytest.fixture(scope="session")
def fixture_page(tmp_path_factory) -> tuple[str, dict, Path]:
    """(HTML text, check JSON, folder) of the three-rail fixture's review, with one net asked for."""
    folder = tmp_path_factory.mktemp("fixture_review")
    code = run_cli("report", THREE_RAIL, "-o", folder / "review.html", "--net", "three_rail.status")
    assert code == 1
    return (folder / "review.html").read_text(encoding="utf-8"), check_json(THREE_RAIL, folder), folder


@pytest.fixture(scope="session")
def checked():
    """(annotation, check result) of the three-rail fixture."""
    annotation = annotate_design(load_design(THREE_RAIL))
    return annotation, check_annotation(annotation)


def review(checked, nets=()):
    annotation, result = checked
    return build_review(annotation, result, tool_version="test", caution="caution text",
                        coverage=assignment_coverage(annotation), nets=nets)


@pytest.fixture(scope="session")
def model(checked):
    """The fixture's review model, with the passing net ``status`` asked for."""
    return review(checked, nets=("three_rail.status",))


def diagram(model, net):
    (found,) = [d for d in model.diagrams if d.net == net]
    return found
