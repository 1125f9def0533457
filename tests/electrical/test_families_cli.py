"""``levelcross families`` end to end: listing, one family, the matrix, JSON determinism, errors."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from linter.cli import main
from linter.electrical.family_loader import default_family_dir

PROJECT_ROOT = Path(__file__).resolve().parents[2]


def run(capsys: pytest.CaptureFixture[str], *argv: str) -> tuple[int, str, str]:
    code = main(["families", *argv])
    captured = capsys.readouterr()
    return code, captured.out, captured.err


def test_json_listing_is_byte_identical_across_runs(capsys: pytest.CaptureFixture[str]) -> None:
    first = run(capsys, "--format", "json")
    second = run(capsys, "--format", "json")
    assert first[0] == second[0] == 0
    assert first[1] == second[1]
    data = json.loads(first[1])
    assert [entry["name"] for entry in data["families"]] == sorted(entry["name"] for entry in data["families"])
    ttl = next(entry for entry in data["families"] if entry["name"] == "TTL5")
    # classic TTL, common practice: both margins 0.4 V
    assert (ttl["evaluated"]["nm_low_v"], ttl["evaluated"]["nm_high_v"]) == (0.4, 0.4)
    assert ttl["source_status"]["vih_min"] == "common practice"


def test_one_family_at_a_supply(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = run(capsys, "LVCMOS18", "--supply", "1.65", "--format", "json")
    assert code == 0
    (entry,) = json.loads(out)["families"]
    # JESD8-7A at the 1.65 V corner, from memory: 0.65 * 1.65 and 0.35 * 1.65
    assert (entry["evaluated"]["vih_min"], entry["evaluated"]["vil_max"]) == (1.0725, 0.5775)
    assert entry["definition"]["vih_min"] == "0.65 * VDD"
    assert entry["sources"]["vih_min"] == "JESD8-7A, from memory"


def test_one_family_at_a_load(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = run(capsys, "LVCMOS25", "--load-ma", "2", "--format", "json")
    assert code == 0
    evaluated = json.loads(out)["families"][0]["evaluated"]
    # JESD8-5A at 2 mA, from memory: both margins 0.0 V
    assert (evaluated["nm_low_v"], evaluated["nm_high_v"], evaluated["overloaded"]) == (0.0, 0.0, False)


def test_text_listing_and_one_family_text(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = run(capsys)
    assert code == 0
    assert "LVCMOS33-5VT" in out and "OD-TWOWIRE" in out and "Datasheets" in out
    code, out, _ = run(capsys, "LVCMOS12")
    assert code == 0
    assert "confirmed indirectly" in out and "min(VDD + 0.3, 1.8)" in out


def test_supply_listing_omits_families_not_rated_there(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = run(capsys, "--supply", "1.8", "--format", "json")
    data = json.loads(out)
    assert code == 0
    assert [entry["name"] for entry in data["families"]] == ["LVCMOS18", "OD-TWOWIRE"]
    assert "LVCMOS33" in data["not_rated_at_supply"]


def test_matrix_marks_failing_and_passing_pairs(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = run(capsys, "--matrix", "--format", "json")
    assert code == 0
    cells = {(cell["driver"], cell["receiver"]): cell for cell in json.loads(out)["cells"]}
    assert len(cells) == 11 * 11
    # 1.8 V -> 3.3 V LVCMOS: VOH 1.6 at light load < VIH 2.0 (JESD8-7A / JESD8C.01, from memory)
    failing = cells[("LVCMOS18", "LVCMOS33")]
    assert (failing["passes"], failing["failures"], failing["nm_high_v"]) == (False, ["high"], -0.4)
    assert failing["verdict"] == "FAIL high"
    # 3.3 V LVCMOS -> 5 V TTL-compatible CMOS: 0.6 / 1.1 V (worked example)
    passing = cells[("LVCMOS33", "CMOS5-TTLIN")]
    assert (passing["passes"], passing["nm_low_v"], passing["nm_high_v"]) == (True, 0.6, 1.1)
    # 5 V CMOS -> 3.3 V LVCMOS has margins but destroys the input: 5.0 > 3.8
    assert cells[("CMOS5", "LVCMOS33")]["failures"] == ["over-voltage"]
    again = run(capsys, "--matrix", "--format", "json")
    assert again[1] == out


def test_matrix_text_says_fail_in_words(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = run(capsys, "--matrix")
    assert code == 0
    lines = out.splitlines()
    start = next(i for i, line in enumerate(lines) if line.startswith("│ LVCMOS18 "))
    header = next(line for line in lines if "CMOS5-TTLIN" in line and "LVCMOS33-5VT" in line)
    column = [cell.strip() for cell in header.split("┃")].index("LVCMOS33")
    # each cell is two lines: the margins, then the verdict
    assert lines[start].split("│")[column].strip() == "+0.600 / -0.400"  # 0.8 - 0.2 and 1.6 - 2.0, from memory
    assert lines[start + 1].split("│")[column].strip() == "FAIL high"
    passing_row = next(i for i, line in enumerate(lines) if line.startswith("│ LVCMOS33 "))
    column = [cell.strip() for cell in header.split("┃")].index("CMOS5-TTLIN")
    assert lines[passing_row].split("│")[column].strip() == "+0.600 / +1.100"  # worked example
    assert lines[passing_row + 1].split("│")[column].strip() == "pass"
    assert "pass" in out and "\x1b[" not in out  # no colour codes when not a terminal


def test_output_file_is_written_whole(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    target = tmp_path / "families.json"
    code, out, _ = run(capsys, "--format", "json", "-o", str(target))
    assert code == 0 and out == ""
    assert target.read_text(encoding="utf-8") == run(capsys, "--format", "json")[1]
    assert list(tmp_path.iterdir()) == [target]


def test_unknown_family_is_one_line_exit_2(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, err = run(capsys, "LVCMOS99")
    assert code == 2 and out == ""
    assert err.count("\n") == 1
    assert err.startswith("levelcross: error: unknown logic family 'LVCMOS99' (known: CMOS5, ")


@pytest.mark.parametrize("argv", [["LVCMOS18", "--supply", "3.3"], ["--matrix", "LVCMOS18"], ["--supply", "-1"]])
def test_inconsistent_requests_exit_2(capsys: pytest.CaptureFixture[str], argv: list[str]) -> None:
    code, out, err = run(capsys, *argv)
    assert code == 2 and out == "" and err.count("\n") == 1


def test_malformed_family_through_the_cli(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    good = (default_family_dir() / "lvcmos18.yaml").read_text(encoding="utf-8")
    broken = tmp_path / "lvcmos18.yaml"
    broken.write_text(good.replace("output_kind: push-pull", "output_kind: sideways"), encoding="utf-8")
    line = next(n for n, text in enumerate(broken.read_text().splitlines(), 1) if text.startswith("output_kind"))
    code, out, err = run(capsys, "--dir", str(tmp_path))
    assert code == 2 and out == ""
    assert err == (f"{broken}:{line}:14: error: 'output_kind' must be one of push-pull, open-drain, "
                   "tri-state, got 'sideways'\n")


def test_python_tag_through_the_real_command_line(tmp_path: Path) -> None:
    good = (default_family_dir() / "lvcmos18.yaml").read_text(encoding="utf-8")
    broken = tmp_path / "evil.yaml"
    broken.write_text(good.replace("iil: -1.0e-6", "iil: !!python/object/apply:os.system ['true']"), encoding="utf-8")
    result = subprocess.run([sys.executable, "-m", "linter", "families", "--dir", str(tmp_path)],
                            capture_output=True, text=True, cwd=PROJECT_ROOT, check=False)
    assert result.returncode == 2 and result.stdout == ""
    assert "Traceback" not in result.stderr and result.stderr.count("\n") == 1
    assert result.stderr.startswith(f"{broken}:10:6: error: YAML construct not allowed here")
