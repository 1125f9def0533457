"""``--emit-family``: a family YAML written from the measurement loads with the family loader,
lists through ``levelcross families --dir``, and the curve clears its own measured family.

Expected levels: the logistic inverter's closed-form unity-gain points (tests/curve/models.py)
rounded 1 mV towards the cautious side: VIL 1.256706 -> 1.256, VIH 1.943294 -> 1.944,
VOH 3.196771 -> 3.196, VOL 0.103229 -> 0.104.
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest

from linter.electrical.family import OutputKind, SourceStatus
from linter.electrical.family_loader import load_family_file
from tests.curve.conftest import FAMILIES, FIXTURES

CLEAN = FIXTURES / "inverter_clean.csv"


def _emit(curve, target: Path, *extra: str | Path):
    return curve(CLEAN, "--family", "LVCMOS33", "--family-dir", FAMILIES, "--emit-family", target, *extra)


def test_emitted_family_holds_the_measured_levels(curve, tmp_path: Path) -> None:
    target = tmp_path / "u7-measured.yaml"
    run = _emit(curve, target, "--supply", "3.3")
    assert run.code == 0
    assert f"measured family written to {target}" in run.out
    family = load_family_file(target)
    assert family.name == "u7-measured"
    assert (family.supply.nominal, family.supply.minimum, family.supply.maximum) == (3.3, 3.3, 3.3)
    assert (family.vil_max_at(), family.vih_min_at()) == (1.256, 1.944)
    assert [(p.current, p.level.evaluate()) for p in family.vol_max] == [(100e-6, 0.104)]
    assert [(p.current, p.level.evaluate()) for p in family.voh_min] == [(-100e-6, 3.196)]
    # copied from the declared family, which a transfer curve cannot show
    assert family.input_max.text == "min(VDD + 0.5, 4.6)"
    assert (family.iil, family.iih, family.output_kind) == (-1e-6, 1e-6, OutputKind.PUSH_PULL)
    # every measured value names the file it came from and is marked as measured
    for key in ("vil_max", "vih_min", "vol_max", "voh_min", "supply"):
        assert str(CLEAN) in family.sources[key].text, key
        assert "measured on one sample, not a rated limit" in family.sources[key].text
    assert family.sources["vil_max"].text.startswith(f"measured from '{CLEAN}'")
    assert family.sources["input_min"].text == (
        "copied from family 'LVCMOS33': JESD8C.01, from memory (absolute maximum -0.5 V)"
    )
    assert family.sources["input_min"].status is SourceStatus.FROM_MEMORY
    assert target.read_text().startswith("# MEASURED family written by 'levelcross curve'")
    assert "Measured by levelcross curve" in family.notes


def test_emitted_family_round_trips_through_the_families_command(curve, tmp_path: Path, capsys) -> None:
    from linter.cli import main

    target = tmp_path / "u7-measured.yaml"
    assert _emit(curve, target, "--supply", "3.3").code == 0
    assert main(["families", "--dir", str(tmp_path), "--format", "json"]) == 0
    (entry,) = json.loads(capsys.readouterr().out)["families"]
    evaluated = entry["evaluated"]
    assert entry["name"] == "u7-measured"
    assert (evaluated["vil_max"], evaluated["vih_min"], evaluated["vol_max"], evaluated["voh_min"]) == (
        1.256, 1.944, 0.104, 3.196)
    # NM_L = 1.256 - 0.104 = 1.152, NM_H = 3.196 - 1.944 = 1.252
    assert (evaluated["nm_low_v"], evaluated["nm_high_v"]) == (1.152, 1.252)
    assert entry["source_status"]["vil_max"] == "measured"  # one bench sample, not a rated limit


def test_curve_clears_its_own_measured_family(curve, tmp_path: Path) -> None:
    target = tmp_path / "u7-measured.yaml"
    assert _emit(curve, target, "--supply", "3.3").code == 0
    run = curve(CLEAN, "--family", "u7-measured", "--family-dir", tmp_path, "--format", "json")
    assert run.code == 0
    # the levels were rounded towards caution, so the curve clears them by under 2 mV but not less than 0
    assert 0.0 <= run.json()["family_check"]["minimum_clearance"] < 0.002


def test_emission_is_deterministic_and_notes_an_assumed_supply(curve, tmp_path: Path) -> None:
    first, second = tmp_path / "a.yaml", tmp_path / "b.yaml"
    assert _emit(curve, first).code == 0
    assert _emit(curve, second).code == 0
    assert first.read_text().replace("name: a\n", "name: b\n") == second.read_text()
    supply_source = load_family_file(first).sources["supply"].text
    assert "taken to be at the nominal 3.3 V of family 'LVCMOS33' (no --supply given)" in supply_source


def test_open_drain_family_keeps_no_high_points(curve, tmp_path: Path) -> None:
    target = tmp_path / "od.yaml"
    run = curve(CLEAN, "--family", "TWOWIRE", "--family-dir", FAMILIES, "--emit-family", target)
    # the inverter's high plateau 3.2989 V at 0.99 V is below the ideal pull-up 3.3 V: a finding,
    # but the measured levels themselves are sound, so the family is still written
    assert run.code == 1
    family = load_family_file(target)
    assert family.output_kind is OutputKind.OPEN_DRAIN and family.voh_min == ()
    assert [(p.current, p.level.evaluate()) for p in family.vol_max] == [(3e-3, 0.104)]


@pytest.mark.parametrize(("fixture", "reason"), [
    ("attenuator.csv", "the curve has no unity-gain points"),
    ("low_swing.csv", "the measured levels break the static discipline"),
])
def test_no_family_from_a_curve_that_breaks_the_discipline(curve, tmp_path: Path, fixture: str, reason: str) -> None:
    target = tmp_path / "x.yaml"
    run = curve(FIXTURES / fixture, "--family", "LVCMOS33", "--family-dir", FAMILIES, "--emit-family", target,
                "--format", "json")
    assert run.code == 1
    assert not target.exists()
    outputs = run.json()["outputs"]
    assert (outputs["family"], outputs["family_not_written"]) == (None, reason)


def test_emit_needs_a_declared_family(curve, tmp_path: Path) -> None:
    target = tmp_path / "x.yaml"
    run = curve(CLEAN, "--emit-family", target)
    assert run.code == 2
    assert run.err.startswith("levelcross: error: --emit-family needs --family NAME: a transfer curve does not show")
    assert not target.exists()


def test_emit_needs_the_yaml_suffix_the_loader_reads(curve, tmp_path: Path) -> None:
    target = tmp_path / "x.yml"
    run = _emit(curve, target)
    assert (run.code, run.err) == (2, f"levelcross: error: --emit-family '{target}': the file name must end in .yaml\n")
    assert not target.exists()


def test_emit_may_not_add_a_second_family_of_the_same_name(curve, tmp_path: Path) -> None:
    families = tmp_path / "families"
    shutil.copytree(FAMILIES, families)
    target = families / "CMOS5.yaml"  # a new file, but its name repeats family CMOS5 of cmos5.yaml
    run = curve(CLEAN, "--family", "LVCMOS33", "--family-dir", families, "--emit-family", target)
    assert run.code == 2
    assert run.err == (
        f"levelcross: error: --emit-family '{target}' would add a second family 'CMOS5' to '{families}'; "
        "choose another file name\n"
    )
    assert not target.exists()
