"""The markdown fix list, and the bus grouping that folds alike bits into one row."""

from __future__ import annotations

from dataclasses import replace

from linter.checks.finding import Finding, Severity
from linter.errors import SourceLocation
from linter.report.markdown import group_bus_bits, render_markdown
from tests.report.cases import assert_golden, empty_report, gap_on_bit, sample_report


def test_sample_report_matches_golden_file() -> None:
    assert_golden("sample.md", render_markdown(sample_report()))


def test_empty_report_matches_golden_file() -> None:
    assert_golden("empty.md", render_markdown(empty_report()))


def test_consecutive_alike_bits_fold_into_a_range() -> None:
    groups = group_bus_bits([gap_on_bit(i) for i in (0, 1, 2, 3)])
    assert [(g.subject, len(g.members)) for g in groups] == [("adc_data[3:0]", 4)]
    assert groups[0].message == "net adc_data[3:0]: VOH 1.45 V at VCC1V8 minimum is below VIH 2.0 V (margin -550 mV)"
    assert [m.subject for m in groups[0].members] == ["adc_data[0]", "adc_data[1]", "adc_data[2]", "adc_data[3]"]


def test_a_gap_in_the_bits_splits_the_range() -> None:
    groups = group_bus_bits([gap_on_bit(i) for i in (0, 1, 3, 4, 5, 7)])
    assert [g.subject for g in groups] == ["adc_data[1:0]", "adc_data[5:3]", "adc_data[7]"]
    assert groups[2].message == gap_on_bit(7).message


def test_order_of_input_does_not_matter_for_the_range_but_sets_the_group_order() -> None:
    # Sorted as strings, bit 10 comes before bit 9; the range still runs 10:8.
    findings = sorted((gap_on_bit(i) for i in (8, 9, 10)), key=lambda f: f.subject)
    assert [f.subject for f in findings] == ["adc_data[10]", "adc_data[8]", "adc_data[9]"]
    (group,) = group_bus_bits(findings)
    assert group.subject == "adc_data[10:8]"
    assert [m.subject for m in group.members] == ["adc_data[10]", "adc_data[8]", "adc_data[9]"]


def test_bits_differing_in_data_rule_or_severity_stay_apart() -> None:
    other_margin = replace(gap_on_bit(1), data={**gap_on_bit(1).data, "margin_mv": -400})
    other_rule = replace(gap_on_bit(2), rule="input-left-floating")
    lowered = gap_on_bit(3).with_severity(Severity.WARNING)
    groups = group_bus_bits([gap_on_bit(0), other_margin, other_rule, lowered])
    assert [g.subject for g in groups] == ["adc_data[0]", "adc_data[1]", "adc_data[2]", "adc_data[3]"]


def test_messages_must_match_once_the_bit_is_set_aside() -> None:
    first = gap_on_bit(0)
    second = replace(gap_on_bit(1), message="net adc_data[1]: a different complaint")
    assert [g.subject for g in group_bus_bits([first, second])] == ["adc_data[0]", "adc_data[1]"]


def test_non_bus_subjects_and_lone_bits_pass_through_in_order() -> None:
    plain = Finding("high-level-gap", Severity.ERROR, "net irq_n: low margin", SourceLocation("a.v", 9), "irq_n", "net")
    groups = group_bus_bits([gap_on_bit(4), plain, gap_on_bit(5), gap_on_bit(9)])
    assert [g.subject for g in groups] == ["adc_data[5:4]", "irq_n", "adc_data[9]"]


def test_multi_dimensional_names_group_on_the_last_index() -> None:
    def bit(index: int) -> Finding:
        net = f"mem[2][{index}]"
        return Finding("high-level-gap", Severity.ERROR, f"net {net}: low", SourceLocation("a.v", 3), net, "net")

    (group,) = group_bus_bits([bit(0), bit(1)])
    assert (group.subject, group.message) == ("mem[2][1:0]", "net mem[2][1:0]: low")


def test_a_repeated_bit_is_not_counted_twice_in_a_range() -> None:
    groups = group_bus_bits([gap_on_bit(0), gap_on_bit(0), gap_on_bit(1)])
    assert sorted((g.subject, len(g.members)) for g in groups) == [("adc_data[0]", 1), ("adc_data[1:0]", 2)]


def test_fix_list_rows_fold_bits_and_show_the_numbers() -> None:
    lines = render_markdown(sample_report()).splitlines()
    assert "| Severity | Location | Subject | Message | margin\\_mv | vih\\_min | voh\\_min |" in lines
    assert (
        "| error | `designs/sensor_bridge/sensor_bridge.v:20:5` to `designs/sensor_bridge/sensor_bridge.v:23:5` "
        "| `adc_data[3:0]` (4 bits) | net adc\\_data[3:0]: VOH 1.45 V at VCC1V8 minimum is below VIH 2.0 V "
        "(margin -550 mV) | -550 | 2.0 | 1.45 |"
    ) in lines
    lone_bit = "| error | `designs/sensor_bridge/sensor_bridge.v:25:5` | `adc_data[5]` |"
    assert any(line.startswith(lone_bit) for line in lines)


def test_rows_in_a_section_put_the_worst_first() -> None:
    lines = render_markdown(sample_report()).splitlines()
    warning = lines.index(
        "| warning | `designs/sensor_bridge/sensor_bridge.v:12:3` | `boot_sel` | input u\\_mcu.boot\\_sel has no "
        "driver and no pull resistor |  |"
    )
    note = lines.index(
        "| note | `designs/sensor_bridge/sensor_bridge.v` | `spare` | input u\\_mcu.spare has no driver and no "
        "pull resistor | 1 |"
    )
    assert warning < note


def test_each_rule_section_ends_with_its_fix() -> None:
    text = render_markdown(sample_report())
    gap = text.index("### `high-level-gap`: Driver high level is below the receiver")
    floating = text.index("### `input-left-floating`: An input is driven by nothing.")
    fix = text.index("**How to fix**\n\nPut a level translator between the two rails")
    assert gap < fix < floating
    assert text.count("**How to fix**") == 2


def test_waived_findings_come_last_with_reasons() -> None:
    text = render_markdown(sample_report())
    assert text.index("## Waived findings") > text.index("## Fix list")
    assert (
        "| `designs/sensor_bridge/sensor_bridge.v:14:3` | `input-left-floating` | `test_mode` "
        "| input u\\_mcu.test\\_mode has no driver and no pull resistor "
        "| strapped low on the carrier board (invented) |"
    ) in text.splitlines()


def test_caution_and_summary_come_first() -> None:
    lines = render_markdown(sample_report()).splitlines()
    assert lines[0] == "# levelcross check of `sensor_bridge`"
    assert lines[2].startswith("> **Caution:** levelcross checks declared DC data only.")
    assert "| 6 | 1 | 1 | 1 |" in lines
    assert "Coverage: cells assigned 950 of 1000; ports assigned 40 of 40." in lines


def test_table_cells_escape_markdown_characters() -> None:
    odd = Finding("high-level-gap", Severity.ERROR, "a|b *c* <d>", SourceLocation("a.v", 1, 1), "x|y", "net")
    text = render_markdown(replace(empty_report(), findings=[odd]))
    assert "| error | `a.v:1:1` | `x\\|y` | a\\|b \\*c\\* \\<d\\> |" in text.splitlines()


def test_empty_report_has_a_clean_summary() -> None:
    text = render_markdown(empty_report())
    assert "| 0 | 0 | 0 | 0 |" in text
    assert "No active findings." in text
    assert "Coverage: not reported." in text
    assert "## Waived findings" not in text and "###" not in text
    assert text.endswith("No active findings.\n")
