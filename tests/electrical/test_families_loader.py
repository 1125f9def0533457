"""Malformed family files: each mistake is one InputError line naming the file, line and key."""

from __future__ import annotations

from pathlib import Path

import pytest

from linter.electrical.family_loader import default_family_dir, load_families, load_family_file
from linter.errors import InputError

GOOD = (default_family_dir() / "lvcmos18.yaml").read_text(encoding="utf-8")


def _line_of(text: str, start: str) -> int:
    return next(number for number, line in enumerate(text.splitlines(), 1) if line.startswith(start))


def _error_for(tmp_path: Path, text: str) -> str:
    path = tmp_path / "broken.yaml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(InputError) as caught:
        load_family_file(path)
    line = caught.value.one_line()
    assert "\n" not in line and "Traceback" not in line
    return line.removeprefix(str(path))


def test_the_unmodified_file_loads(tmp_path: Path) -> None:
    path = tmp_path / "copy.yaml"
    path.write_text(GOOD, encoding="utf-8")
    assert load_family_file(path).name == "LVCMOS18"


def test_missing_key(tmp_path: Path) -> None:
    text = "\n".join(line for line in GOOD.splitlines() if not line.startswith("vih_min:"))
    assert _error_for(tmp_path, text) == f":{_line_of(text, 'name:')}:1: error: missing key 'vih_min'"


def test_wrong_type(tmp_path: Path) -> None:
    text = GOOD.replace("iil: -1.0e-6", "iil: [1]")
    line = _line_of(text, "iil:")
    assert _error_for(tmp_path, text) == f":{line}:6: error: 'iil' must be a number or a level expression, got a list"


def test_boolean_is_not_a_number(tmp_path: Path) -> None:
    text = GOOD.replace("iih: 1.0e-6", "iih: true")
    assert "'iih' must be a number or a level expression, got true" in _error_for(tmp_path, text)


def test_bad_expression_points_at_the_character(tmp_path: Path) -> None:
    text = GOOD.replace('vih_min: "0.65 * VDD"', 'vih_min: "0.65 * VCC"')
    line = _line_of(text, "vih_min:")
    # the value's text starts at column 11, one past the quote; VCC is 7 characters in
    assert _error_for(tmp_path, text) == (
        f":{line}:18: error: unknown name 'VCC' (allowed: VDD, min, max) in expression '0.65 * VCC'"
    )


def test_python_object_tag_is_refused(tmp_path: Path) -> None:
    text = GOOD.replace("iil: -1.0e-6", "iil: !!python/object/apply:os.system ['true']")
    line = _line_of(text, "iil:")
    assert _error_for(tmp_path, text).startswith(f":{line}:6: error: YAML construct not allowed here")


def test_unknown_output_kind(tmp_path: Path) -> None:
    text = GOOD.replace("output_kind: push-pull", "output_kind: totem-pole")
    line = _line_of(text, "output_kind:")
    assert _error_for(tmp_path, text) == (
        f":{line}:14: error: 'output_kind' must be one of push-pull, open-drain, tri-state, got 'totem-pole'"
    )


def test_unknown_key(tmp_path: Path) -> None:
    text = GOOD + "vih_typ: 0.9\n"
    assert _error_for(tmp_path, text).startswith(f":{_line_of(text, 'vih_typ:')}:1: error: unknown key 'vih_typ'")


def test_every_value_needs_a_source(tmp_path: Path) -> None:
    text = "\n".join(line for line in GOOD.splitlines() if not line.startswith("  vih_min:"))
    assert "'sources' gives no source for 'vih_min'" in _error_for(tmp_path, text)


def test_a_source_must_say_how_sure_it_is(tmp_path: Path) -> None:
    text = GOOD.replace('  vih_min: "JESD8-7A, from memory"', '  vih_min: "JESD8-7A"')
    line = _line_of(text, "  vih_min:")
    assert _error_for(tmp_path, text).startswith(f":{line}:12: error: the source of 'vih_min' must say how sure")


def test_points_must_be_in_order_and_signed(tmp_path: Path) -> None:
    swapped = GOOD.replace("{current: 100.0e-6, level: 0.2}", "{current: 3.0e-3, level: 0.2}")
    assert "points must be in order of increasing load current" in _error_for(tmp_path, swapped)
    unsigned = GOOD.replace("{current: -100.0e-6, level: \"VDD - 0.2\"}", "{current: 100.0e-6, level: \"VDD - 0.2\"}")
    assert "'voh_min' current must be negative (sourcing, out of the pin)" in _error_for(tmp_path, unsigned)


def test_current_must_not_depend_on_the_supply(tmp_path: Path) -> None:
    text = GOOD.replace("iih: 1.0e-6", "iih: \"VDD * 1e-6\"")
    assert "'iih' must be a fixed number, not a function of VDD" in _error_for(tmp_path, text)


def test_static_discipline_is_enforced(tmp_path: Path) -> None:
    # VIL above VIH: no input band, so no family
    text = GOOD.replace('vil_max: "0.35 * VDD"', 'vil_max: "0.7 * VDD"')
    assert "breaks the static discipline VOL < VIL < VIH < VOH at 1.8 V" in _error_for(tmp_path, text)


def test_open_drain_has_no_high_points(tmp_path: Path) -> None:
    text = GOOD.replace("output_kind: push-pull", "output_kind: open-drain")
    assert "an open-drain family has no 'voh_min' points" in _error_for(tmp_path, text)


def test_tri_state_loads(tmp_path: Path) -> None:
    path = tmp_path / "tri.yaml"
    path.write_text(GOOD.replace("output_kind: push-pull", "output_kind: tri-state"), encoding="utf-8")
    assert load_family_file(path).output_kind.value == "tri-state"


def test_not_a_mapping_and_empty_file(tmp_path: Path) -> None:
    assert _error_for(tmp_path, "- 1\n- 2\n") == ":1:1: error: a family file must be a mapping of keys to values"
    assert _error_for(tmp_path, "") == ":1:1: error: a family file must be a mapping of keys to values"


def test_duplicate_names_across_files(tmp_path: Path) -> None:
    (tmp_path / "a.yaml").write_text(GOOD, encoding="utf-8")
    (tmp_path / "b.yaml").write_text(GOOD, encoding="utf-8")
    with pytest.raises(InputError, match="family 'LVCMOS18' is defined twice"):
        load_families(tmp_path)


def test_unknown_family_name_lists_the_known_ones(tmp_path: Path) -> None:
    (tmp_path / "a.yaml").write_text(GOOD, encoding="utf-8")
    with pytest.raises(InputError) as caught:
        load_families(tmp_path).require("LVCMOS99")
    assert caught.value.one_line() == "levelcross: error: unknown logic family 'LVCMOS99' (known: LVCMOS18)"


def test_missing_or_empty_folder(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="does not exist"):
        load_families(tmp_path / "absent")
    with pytest.raises(InputError, match="no family files"):
        load_families(tmp_path)
