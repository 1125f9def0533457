"""Reading the CSV: accepted layouts, and one-line errors with exit 2 for every bad file."""

from __future__ import annotations

import shutil
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from linter.curve.csvread import read_curve_csv
from linter.errors import InputError
from tests.curve.conftest import FAMILIES, FIXTURES

PROJECT_ROOT = Path(__file__).resolve().parents[2]

BAD_FILES = [
    ("bad_non_numeric.csv", "4:6: error: '3.1V' is not a number (expected volts)"),
    ("bad_nan.csv", "3:1: error: 'nan' is not a finite voltage"),
    ("bad_columns.csv", "3:1: error: expected 2 comma-separated columns (input volts, output volts), found 3"),
    ("bad_empty.csv", "1:1: error: empty file, expected rows of (input volts, output volts)"),
    ("bad_binary.csv", "1:1: error: binary file: expected CSV text"),  # the NUL is the very first byte
    (
        "bad_too_few.csv",
        " error: too few points: 5 distinct input voltages, at least 8 are needed to find the unity-gain points",
    ),
]


@pytest.mark.parametrize(("name", "message"), BAD_FILES, ids=[name for name, _ in BAD_FILES])
def test_bad_file_is_one_line_and_exit_2(curve, name: str, message: str) -> None:
    path = FIXTURES / name
    run = curve(path)
    assert run.code == 2
    assert run.out == ""
    assert run.err == f"{path}:{message}\n"


def test_missing_file(curve, tmp_path: Path) -> None:
    missing = tmp_path / "nowhere.csv"
    run = curve(missing)
    assert (run.code, run.err) == (2, f"levelcross: error: no such file '{missing}'\n")


def test_folder_instead_of_file(curve, tmp_path: Path) -> None:
    run = curve(tmp_path)
    assert (run.code, run.err) == (2, f"levelcross: error: '{tmp_path}' is a folder, not a CSV file\n")


def test_header_only_and_not_utf8(curve, tmp_path: Path) -> None:
    header_only = tmp_path / "header.csv"
    header_only.write_text("vin,vout\n# nothing measured\n")
    run = curve(header_only)
    assert run.err == f"{header_only}: error: no data rows, expected rows of (input volts, output volts)\n"
    latin = tmp_path / "latin.csv"
    latin.write_bytes("vin,vout\n0.0,3.3\n# \xb5V\n".encode("latin-1"))
    run = curve(latin)
    # byte 19 is the 0xb5 after "# " on line 3, which starts at byte 17: column 3
    assert (run.code, run.err) == (2, f"{latin}:3:3: error: not UTF-8 text (byte 19)\n")


def test_only_the_first_row_may_be_a_header(tmp_path: Path) -> None:
    path = tmp_path / "late_header.csv"
    path.write_text("0.0,3.3\nvin,vout\n")
    with pytest.raises(InputError) as caught:
        read_curve_csv(str(path))
    assert caught.value.one_line() == f"{path}:2:1: error: 'vin' is not a number (expected volts)"


def test_repeats_are_averaged_and_order_does_not_matter(tmp_path: Path) -> None:
    path = tmp_path / "repeats.csv"
    rows = ["\ufeffVin (V), Vout (V)", "", "# comment", "0.7,1.0", "0.1,3.0", "0.7,2.0", "0.2,3.1",
            '"0.3","2.9"', "0.4,2.5", "0.5,1.5", "0.6,1.0", "0.8,0.2", "0.7,3.0"]
    path.write_text("\n".join(rows) + "\n", encoding="utf-8")
    curve = read_curve_csv(str(path))
    assert curve.vin.tolist() == [0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8]
    assert curve.vout.tolist() == [3.0, 3.1, 2.9, 2.5, 1.5, 1.0, 2.0, 0.2]  # (1 + 2 + 3) / 3 at 0.7
    assert curve.repeats.tolist() == [1, 1, 1, 1, 1, 1, 3, 1]
    assert curve.row_count == 10
    assert np.all(np.diff(curve.vin) > 0)


def test_no_output_file_is_written_on_bad_input(curve, tmp_path: Path) -> None:
    plot, family, report = tmp_path / "p.png", tmp_path / "f.yaml", tmp_path / "r.json"
    for name, _ in BAD_FILES + [("flat.csv", ""), ("partial_sweep.csv", "")]:
        run = curve(FIXTURES / name, "--plot", plot, "--emit-family", family, "--family", "LVCMOS33",
                    "--family-dir", FAMILIES, "--format", "json", "-o", report)
        assert run.code == 2, name
        assert sorted(tmp_path.iterdir()) == [], name


@pytest.mark.parametrize(("flag", "shown", "name"), [("--plot", "--plot", "trace.svg"),
                                                    ("--emit-family", "--emit-family", "trace.yaml"),
                                                    ("-o", "--output", "trace.csv")])
def test_input_file_is_never_overwritten(curve, tmp_path: Path, flag: str, shown: str, name: str) -> None:
    # The measurement may carry any name; an output naming the same file is refused before
    # anything is read or written.
    source = tmp_path / name
    shutil.copy(FIXTURES / "inverter_clean.csv", source)
    before = source.read_bytes()
    run = curve(source, flag, source, "--family", "LVCMOS33", "--family-dir", FAMILIES)
    assert run.code == 2
    assert run.err == f"levelcross: error: {shown} '{source}' is the input file; choose another name\n"
    assert source.read_bytes() == before
    assert sorted(path.name for path in tmp_path.iterdir()) == [name]


def test_emitted_family_may_not_replace_the_family_file(curve, tmp_path: Path) -> None:
    families = tmp_path / "families"
    shutil.copytree(FAMILIES, families)
    target = families / "lvcmos33.yaml"
    before = target.read_bytes()
    run = curve(FIXTURES / "inverter_clean.csv", "--family", "LVCMOS33", "--family-dir", families,
                "--emit-family", target)
    assert run.code == 2
    assert run.err == f"levelcross: error: --emit-family '{target}' is the file of family 'LVCMOS33'\n"
    assert target.read_bytes() == before


def test_no_traceback_from_the_real_command_line() -> None:
    completed = subprocess.run(
        [sys.executable, "-m", "linter", "curve", str(FIXTURES / "bad_binary.csv")],
        capture_output=True, text=True, cwd=PROJECT_ROOT, check=False,
    )
    assert completed.returncode == 2
    assert completed.stderr == f"{FIXTURES / 'bad_binary.csv'}:1:1: error: binary file: expected CSV text\n"
    assert "Traceback" not in completed.stderr
