"""Helpers for the curve tests: the fixture folder and a way to run the command in-process."""

from __future__ import annotations

import json
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import pytest

from linter.cli import main

FIXTURES = Path(__file__).resolve().parent / "fixtures"
FAMILIES = FIXTURES / "families"


@dataclass(frozen=True)
class Run:
    code: int
    out: str
    err: str

    def json(self) -> Any:
        return json.loads(self.out)


@pytest.fixture
def curve(capsys: pytest.CaptureFixture[str]) -> Callable[..., Run]:
    """``curve(*arguments)``: run ``levelcross curve`` and capture its exit code and output."""

    def run(*arguments: str | Path) -> Run:
        code = main(["curve", *(str(argument) for argument in arguments)])
        captured = capsys.readouterr()
        return Run(code, captured.out, captured.err)

    return run
