"""The deterministic JSON writer, against the standard library's ``json`` (the reference): the
layout is exactly ``json.dumps(indent=2, sort_keys=True)`` except that each item of a list named
as a record list is one line, ``json.dumps(item, sort_keys=True)`` with spaced separators."""

from __future__ import annotations

import json
from typing import Any

from hypothesis import given, settings
from hypothesis import strategies as st

from linter.report.jsonout import to_json

scalars = st.none() | st.booleans() | st.integers() | st.floats(allow_nan=False, allow_infinity=False) | st.text()
documents = st.recursive(scalars, lambda inner: st.lists(inner, max_size=4) | st.dictionaries(st.text(max_size=6), inner,
                                                                                            max_size=4),
                         max_leaves=40)
keyed = st.dictionaries(st.sampled_from(["findings", "waived", "other", "x"]), documents, max_size=4)


def _standard(data: Any) -> str:
    return json.dumps(data, indent=2, sort_keys=True, ensure_ascii=False) + "\n"


@settings(max_examples=300)
@given(documents)
def test_without_record_lists_the_layout_is_the_standard_librarys(data: Any) -> None:
    assert to_json(data) == _standard(data)
    # a record key that never occurs: the writer's own indenting must match byte for byte
    assert to_json(data, records=("no-such-key",)) == _standard(data)


@settings(max_examples=300)
@given(keyed, documents)
def test_record_lists_get_one_line_per_item_and_the_data_is_unchanged(data: dict[str, Any], nested: Any) -> None:
    data = {**data, "outer": {"findings": [nested, {"a": [1, 2]}]}}
    text = to_json(data, records=("findings", "waived"))
    assert json.loads(text) == json.loads(_standard(data))
    assert text.endswith("}\n") and to_json(data, records=("findings", "waived")) == text
    lines = text.split("\n")  # not splitlines: a string may hold U+0085 or U+2028, which JSON leaves raw
    for key in ("findings", "waived"):
        for owner in (data, data["outer"]):
            items = owner.get(key)
            if not isinstance(items, list) or not items:
                continue
            one_line = [json.dumps(item, sort_keys=True, ensure_ascii=False, separators=(", ", ": ")) for item in items]
            expected = [line + "," for line in one_line[:-1]] + one_line[-1:]
            assert any(line.strip() == f'"{key}": [' and
                       [row.strip() for row in lines[i + 1:i + 1 + len(items)]] == expected and
                       lines[i + 1 + len(items)].strip() in ("]", "],")
                       for i, line in enumerate(lines))


def test_a_small_report_shape() -> None:
    data = {"schema": "s/1", "findings": [{"rule": "r", "sites": [{"b": 1, "a": "é"}]}, {"rule": "q"}], "waived": []}
    assert to_json(data, records=("findings", "waived")) == (
        '{\n'
        '  "findings": [\n'
        '    {"rule": "r", "sites": [{"a": "é", "b": 1}]},\n'
        '    {"rule": "q"}\n'
        '  ],\n'
        '  "schema": "s/1",\n'
        '  "waived": []\n'
        '}\n'
    )


def test_keys_that_are_no_strings_are_written_as_the_standard_library_writes_them() -> None:
    data = {"counts": {2: "two", 10: {"nested": [1]}}, "findings": [{"z": 1, "a": 2}]}
    assert to_json(data, records=("findings",)) == (
        '{\n'
        '  "counts": {\n'
        '    "2": "two",\n'
        '    "10": {\n'
        '      "nested": [\n'
        '        1\n'
        '      ]\n'
        '    }\n'
        '  },\n'
        '  "findings": [\n'
        '    {"a": 2, "z": 1}\n'
        '  ]\n'
        '}\n'
    )
    # the same text as the standard library gives for that part (ints sorted as numbers, 2 before 10)
    assert to_json(data, records=("findings",)).startswith(_standard({"counts": data["counts"]})[:-3])
