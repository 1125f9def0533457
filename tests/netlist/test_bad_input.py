"""Issue 2 acceptance: bad Verilog input through the command line.

The project's rule for bad input: exactly one line ``file:line:col: error: message`` on stderr
(``levelcross: error: message`` when there is no location), exit code 2, no traceback, no output
file created or touched, and the inputs left byte for byte as they were. Each case runs
``python -m linter inspect`` in a subprocess, as a user would.

Lines and columns were counted by hand in the fixture (or in the bytes written below). Messages
that come from slang are its own wording (pyslang 12.1.0, observed); the front end adds hints.
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

FIXTURES = Path(__file__).parent / "fixtures"

# Bad inputs that are not fit to keep in the repository as files; written into tmp_path.
GENERATED = {
    "empty.v": b"",
    # the NUL is on line 2 after "  wire " (7 bytes): column 8
    "binary.v": b"module t(input a);\n  wire \x00x;\nendmodule\n",
    # Latin-1 e-acute in a comment: line 2, after "  // caf" (8 bytes) -> column 9;
    # byte offset 19 (line 1 with its newline) + 8 = 27
    "latin1.v": b"module t(input a);\n  // caf\xe9\nendmodule\n",
}

CASES = {
    # `  and g (y, a b);`: slang reports the missing comma right after `a` (column 13), at 14
    "syntax error": (["syntax_error.v"], "syntax_error.v:3:14: error: expected ','"),
    "missing file": (["no_such_file.v"], "levelcross: error: no such file 'no_such_file.v'"),
    "unknown top": (["hierarchy.v", "--top", "nosuch"],
                    "levelcross: error: 'nosuch' is not a valid top-level module (check --top)"),
    "empty file": (["empty.v"], "empty.v:1:1: error: empty file: no Verilog to read"),
    "binary file": (["binary.v"], "binary.v:2:8: error: binary file: expected Verilog text"),
    "not UTF-8": (["latin1.v"], "latin1.v:2:9: error: not UTF-8 text (byte 27)"),
    # `include "self_include.v"` on line 2: the file name starts in column 10; slang stops at
    # its include depth limit and the front end says why
    "recursive include": (["self_include.v"], ("self_include.v:2:10: error: exceeded max include depth "
                                               "(does a file `include itself, directly or through others?)")),
    "missing include": (["missing_include.v"],
                        "missing_include.v:2:10: error: 'no_such_header.vh': No such file or directory"),
    "folder": (["include"], "levelcross: error: 'include' is a folder, not a Verilog file"),
    "missing include folder": (["hierarchy.v", "-I", "no_such_folder"],
                               "levelcross: error: include folder 'no_such_folder' does not exist"),
}


@pytest.fixture()
def workdir(tmp_path: Path) -> Path:
    """A folder holding copies of the fixtures and the generated bad files."""
    for path in FIXTURES.rglob("*"):
        if path.is_file():
            target = tmp_path / path.relative_to(FIXTURES)
            target.parent.mkdir(parents=True, exist_ok=True)
            target.write_bytes(path.read_bytes())
    for name, data in GENERATED.items():
        (tmp_path / name).write_bytes(data)
    return tmp_path


def snapshot(folder: Path) -> dict[str, bytes]:
    return {str(p.relative_to(folder)): p.read_bytes() for p in sorted(folder.rglob("*")) if p.is_file()}


def inspect(folder: Path, *args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "linter", "inspect", *args],
        cwd=folder, capture_output=True, text=True, encoding="utf-8", check=False,
    )


@pytest.mark.parametrize("case", sorted(CASES))
def test_bad_input_is_one_line_and_exit_2(case: str, workdir: Path) -> None:
    arguments, expected_line = CASES[case]
    before = snapshot(workdir)
    result = inspect(workdir, *arguments)
    assert result.returncode == 2, result.stderr
    assert "Traceback" not in result.stderr
    assert result.stderr == expected_line + "\n"
    assert result.stdout == ""
    assert snapshot(workdir) == before  # inputs unchanged, nothing new written


@pytest.mark.parametrize("case", ["syntax error", "unknown top", "recursive include"])
def test_no_output_file_on_error(case: str, workdir: Path) -> None:
    arguments, expected_line = CASES[case]
    out = workdir / "out" / "summary.json"
    out.parent.mkdir()
    result = inspect(workdir, *arguments, "--format", "json", "-o", str(out))
    assert (result.returncode, result.stderr) == (2, expected_line + "\n")
    assert list(out.parent.iterdir()) == []  # neither the file nor a temporary one

    # an output file from an earlier run stays exactly as it was
    out.write_bytes(b'{"earlier": "run"}\n')
    result = inspect(workdir, *arguments, "--format", "json", "-o", str(out))
    assert result.returncode == 2
    assert out.read_bytes() == b'{"earlier": "run"}\n'
    assert [p.name for p in out.parent.iterdir()] == ["summary.json"]


def test_several_errors_report_only_the_first(workdir: Path) -> None:
    """Two syntax errors: one line, for the earlier one in the file."""
    (workdir / "two_errors.v").write_text(
        "module m(input a, b, output y, z);\n  buf g (y, a b);\n  buf h (z, b a);\nendmodule\n"
    )
    result = inspect(workdir, "two_errors.v")
    # the same layout as syntax_error.v: the comma missing after `a` is reported at column 14
    assert (result.returncode, result.stderr) == (2, "two_errors.v:2:14: error: expected ','\n")
