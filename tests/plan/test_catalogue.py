"""The fix catalogue: the shipped demo catalogue loads and is marked invented; mistakes are one line each."""

from __future__ import annotations

import pytest

from linter.errors import InputError
from linter.plan.catalogue import (
    BIDIRECTIONAL,
    BUFFER,
    default_catalogue_path,
    load_catalogue,
)

GOOD_SIDE = "{minimum: 1.1, maximum: 3.6, family: LX-IN}"


def test_demo_catalogue_loads_and_says_it_is_invented():
    path = default_catalogue_path()
    assert "INVENTED" in path.read_text().splitlines()[0]
    catalogue = load_catalogue(path)
    assert "INVENTED" in catalogue.description
    widths = sorted({(item.name.split("_")[0], item.width) for item in catalogue.translators if item.kind == BUFFER})
    for direction in ("up", "down"):
        assert [w for d, w in widths if d == direction] == [1, 2, 4, 8, 16]
    assert any(item.kind == BIDIRECTIONAL and item.open_drain for item in catalogue.translators)
    assert any(item.kind == BIDIRECTIONAL and not item.open_drain for item in catalogue.translators)
    assert catalogue.pull_up_resistors and catalogue.dividers and catalogue.replacements
    assert catalogue.translator("up_buf_8").cost_milli == 950


def _write(tmp_path, text: str):
    path = tmp_path / "cat.yaml"
    families = default_catalogue_path().read_text().split("translators:")[0]
    path.write_text(families + text)
    return path


def _line_of(path, needle: str) -> int:
    return next(i for i, line in enumerate(path.read_text().splitlines(), 1) if needle in line)


@pytest.mark.parametrize(("body", "needle", "message"), [
    ((f"translators:\n  t1: {{kind: buffer, width: 3, cost: 0.4, delay_s: 1e-9, max_rate_hz: 1e6, "
     f"side_a: {GOOD_SIDE}, side_b: {GOOD_SIDE}}}\n"), "width: 3", "width must be one of 1, 2, 4, 8, 16, 32, got 3"),
    ((f"translators:\n  t1: {{kind: buffer, width: 1, cost: 0.4001, delay_s: 1e-9, max_rate_hz: 1e6, "
     f"side_a: {GOOD_SIDE}, side_b: {GOOD_SIDE}}}\n"), "0.4001", "cost must have at most three decimals"),
    ((f"translators:\n  t1: {{kind: buffer, width: 1, cost: 0.4, delay_s: 1e-9, max_rate_hz: 1e6, "
     f"side_a: {{minimum: 1.1, maximum: 3.6, family: NOPE}}, side_b: {GOOD_SIDE}}}\n"), "NOPE",
     "names family 'NOPE', which the catalogue's families do not define"),
    ((f"translators:\n  t1: {{kind: buffer, width: 1, cost: 0.4, delay_s: 1e-9, max_rate_hz: 1e6, open_drain: true, "
     f"side_a: {GOOD_SIDE}, side_b: {GOOD_SIDE}}}\n"), "open_drain", "open_drain applies to bidirectional"),
    ((f"translators:\n  t1: {{kind: sideways, width: 1, cost: 0.4, delay_s: 1e-9, max_rate_hz: 1e6, "
     f"side_a: {GOOD_SIDE}, side_b: {GOOD_SIDE}}}\n"), "sideways", "kind must be one of bidirectional, buffer"),
    ((f"translators:\n  t1: {{kind: buffer, width: 1, cost: 0.4, delay_s: 1e-9, max_rate_hz: 1e6, price: 1, "
     f"side_a: {GOOD_SIDE}, side_b: {GOOD_SIDE}}}\n"), "price: 1", "unknown key 'price'"),
])
def test_mistakes_name_file_line_and_column(tmp_path, body, needle, message):
    path = _write(tmp_path, body)
    with pytest.raises(InputError) as raised:
        load_catalogue(path)
    error = raised.value
    assert message in error.message
    assert error.location.file == str(path)
    assert error.location.line == _line_of(path, needle)
    assert error.one_line().startswith(f"{path}:{error.location.line}:")


def test_replacement_must_name_known_families(tmp_path):
    path = _write(tmp_path, f"translators:\n  t1: {{kind: buffer, width: 1, cost: 0.4, delay_s: 1e-9, "
                            f"max_rate_hz: 1e6, side_a: {GOOD_SIDE}, side_b: {GOOD_SIDE}}}\n"
                            "replacements:\n  - {family: LVCMOS33, replacement: NOT-A-FAMILY, cost: 0.1}\n")
    from linter.electrical.family_loader import load_families

    with pytest.raises(InputError, match="replacement names unknown family 'NOT-A-FAMILY'") as raised:
        load_catalogue(path, load_families())
    assert raised.value.location.line == _line_of(path, "NOT-A-FAMILY")


def test_missing_catalogue_is_one_line(tmp_path):
    with pytest.raises(InputError, match="no such file"):
        load_catalogue(tmp_path / "absent.yaml")
