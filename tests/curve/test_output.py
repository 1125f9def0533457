"""Report formats and the plot: deterministic JSON, text tables, -o, PNG and SVG images."""

from __future__ import annotations

from pathlib import Path

from tests.curve.conftest import FAMILIES, FIXTURES

NOISY = FIXTURES / "inverter_noisy.csv"


def test_json_is_byte_identical_across_runs(curve) -> None:
    arguments = (NOISY, "--family", "LVCMOS33", "--family-dir", FAMILIES, "--format", "json")
    first, second = curve(*arguments), curve(*arguments)
    assert first.code == second.code == 0
    assert first.out == second.out
    document = first.json()
    assert sorted(document) == ["curve", "family_check", "findings", "outputs", "stage"]
    assert document["curve"]["rows"] == 993 and document["curve"]["distinct_inputs"] == 331
    assert first.out.endswith("}\n")


def test_json_keys_are_always_present(curve) -> None:
    document = curve(FIXTURES / "attenuator.csv", "--format", "json").json()
    assert document["family_check"] is None
    assert sorted(document["stage"]) == [
        "noise_margin_high", "noise_margin_low", "peak_gain", "peak_gain_vin", "polarity", "switching_threshold",
        "unity_gain_crossings", "vih_min", "vil_max", "voh_min", "vol_max",
    ]
    assert document["outputs"] == {"family": None, "family_not_written": None, "plot": None}


def test_report_to_a_file(curve, tmp_path: Path) -> None:
    target = tmp_path / "report.json"
    run = curve(NOISY, "--format", "json", "-o", target)
    assert (run.code, run.out) == (0, "")
    assert target.read_text() == curve(NOISY, "--format", "json").out


def test_text_report_names_every_quantity(curve) -> None:
    run = curve(NOISY, "--supply", "3.3")
    assert run.code == 0
    for words in ("993 rows, 331 distinct inputs from 0 V to 3.3 V, supply 3.3 V", "Measured inverting stage",
                  "lower unity-gain point", "noise margin high", "switching threshold", "peak gain",
                  "no findings"):
        assert words in run.out, words


def test_png_plot(curve, tmp_path: Path) -> None:
    target = tmp_path / "curve.png"
    run = curve(NOISY, "--family", "LVCMOS33", "--family-dir", FAMILIES, "--plot", target)
    assert run.code == 0
    assert f"plot written to {target}" in run.out
    data = target.read_bytes()
    assert data.startswith(b"\x89PNG\r\n\x1a\n")
    width, height = int.from_bytes(data[16:20], "big"), int.from_bytes(data[20:24], "big")
    assert (width, height) == (900, 720)  # 7.5 x 6 inches at 120 dpi
    assert [p.name for p in tmp_path.iterdir()] == ["curve.png"]  # no temporary file left behind


def test_svg_plot_is_deterministic_and_labelled(curve, tmp_path: Path) -> None:
    first, second = tmp_path / "a.svg", tmp_path / "b.svg"
    assert curve(FIXTURES / "buffer_clean.csv", "--plot", first).code == 0
    assert curve(FIXTURES / "buffer_clean.csv", "--plot", second).code == 0
    text = first.read_text()
    assert text.startswith("<?xml") and "<svg" in text
    assert first.read_bytes() == second.read_bytes()


def test_plot_of_a_curve_without_unity_gain_points(curve, tmp_path: Path) -> None:
    target = tmp_path / "flatish.png"
    assert curve(FIXTURES / "attenuator.csv", "--plot", target).code == 1
    assert target.read_bytes().startswith(b"\x89PNG")


def test_plot_format_comes_from_the_extension(curve, tmp_path: Path) -> None:
    target = tmp_path / "curve.jpg"
    run = curve(NOISY, "--plot", target)
    assert (run.code, run.err) == (2, f"levelcross: error: --plot '{target}': the file name must end in .png or .svg\n")
    assert not target.exists()


def test_output_folder_must_exist(curve, tmp_path: Path) -> None:
    target = tmp_path / "missing" / "curve.png"
    run = curve(NOISY, "--plot", target)
    assert (run.code, run.err) == (
        2, f"levelcross: error: cannot write '{target}': folder '{target.parent}' does not exist\n")


def test_supply_must_be_positive(curve) -> None:
    run = curve(NOISY, "--supply", "-1")
    assert (run.code, run.err) == (2, "levelcross: error: --supply must be a positive voltage, got -1\n")
