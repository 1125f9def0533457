"""The level-expression parser: the forms the JEDEC standards use, and exact error positions."""

from __future__ import annotations

import pytest

from linter.electrical.expr import Expression, parse_expression
from linter.errors import InputError, SourceLocation

HERE = SourceLocation("family.yaml", 7, 10)


@pytest.mark.parametrize(
    ("text", "vdd", "expected"),
    [
        ("0.65 * VDD", 1.65, 1.0725),  # JESD8-7A VIH at the 1.65 V corner, from memory
        ("0.35 * VDD", 1.95, 0.6825),  # JESD8-7A VIL at the 1.95 V corner, from memory
        ("VDD - 0.2", 3.3, 3.1),  # JESD8C.01 LVCMOS VOH at 3.3 V, from memory
        ("0.75*VDD", 1.2, 0.9),  # JESD8-12A VOH at 2 mA, from memory
        ("min(VDD + 0.5, 4.6)", 3.3, 3.8),  # JESD8C.01 absolute maximum below the cap
        ("min(VDD + 0.5, 4.6)", 4.5, 4.6),  # the cap binds (hypothetical 4.5 V, arithmetic only)
        ("max(0.1, VDD / 10)", 3.0, 0.3),
        ("-(VDD - 1) * 2", 2.0, -2.0),
        ("2 - 1 - 0.5", None, 0.5),  # left-associative subtraction
        ("8 / 4 / 2", None, 1.0),  # left-associative division
        ("1 + 2 * 3", None, 7.0),  # precedence
        ("(1 + 2) * 3", None, 9.0),
        ("-1.6e-3", None, -0.0016),  # TTL IIL, common practice
        ("100e-6", None, 0.0001),
        (".5", None, 0.5),
    ],
)
def test_expressions_evaluate_exactly(text: str, vdd: float | None, expected: float) -> None:
    assert parse_expression(text).evaluate(vdd) == pytest.approx(expected, abs=1e-12)


def test_supply_dependence_is_known() -> None:
    assert parse_expression("0.7 * VDD").uses_supply
    assert parse_expression("min(VDD + 0.5, 4.6)").uses_supply
    assert not parse_expression("min(2.0, 4.6)").uses_supply
    assert not Expression.constant(0.8).uses_supply
    with pytest.raises(ValueError):
        parse_expression("VDD - 0.2").evaluate()


@pytest.mark.parametrize(
    ("text", "column", "message"),
    [
        ("0.7VDD", 13, "expected an operator, found 'VDD'"),  # implicit product is refused
        ("VCC - 0.2", 10, "unknown name 'VCC'"),  # one word per concept: VDD
        ("min(VDD)", 17, "min() needs at least two arguments"),
        ("(VDD + 1", 18, "expected ')', found the end"),
        ("0.7 ** VDD", 15, "expected a number, VDD or '('"),
        ("1 / 0", 12, "division by zero"),
        ("VDD $ 2", 14, "unexpected character '$'"),
        ("__import__(1, 2)", 10, "unknown name '__import__'"),  # never eval
        ("open('x')", 15, "unexpected character"),
        ("0.5 +", 15, "found the end"),
    ],
)
def test_bad_expressions_name_file_line_and_column(text: str, column: int, message: str) -> None:
    with pytest.raises(InputError) as caught:
        parse_expression(text, HERE)
    line = caught.value.one_line()
    assert line.startswith(f"family.yaml:7:{column}: error: ")
    assert message in line
    assert "\n" not in line


def test_deep_nesting_is_an_input_error_not_a_crash() -> None:
    with pytest.raises(InputError, match="nested too deeply"):
        parse_expression("(" * 500 + "1" + ")" * 500, HERE)
    with pytest.raises(InputError, match="nested too deeply"):
        parse_expression("-" * 500 + "1", HERE)


def test_division_by_zero_at_a_supply_names_the_file() -> None:
    expression = parse_expression("1 / (VDD - 3.3)", HERE)
    assert expression.evaluate(3.0) == pytest.approx(-1 / 0.3)
    with pytest.raises(InputError) as caught:
        expression.evaluate(3.3)
    assert caught.value.one_line().startswith("family.yaml:7:10: error: expression '1 / (VDD - 3.3)' divides by zero")
