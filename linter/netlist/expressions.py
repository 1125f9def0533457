"""From slang expressions to net bits: which bits an expression names, and what each result bit reads.

Bits are integers local to one module body (see :mod:`linter.netlist.template`), listed LSB first;
negative integers are the constants of :mod:`linter.netlist.graph`. Literals, parameters and any
operator slang folded to a value (``W + 1``, ``-1``) name constant bits, never logic.

Precision, per operator (documented because the loop check relies on it):

- exact per bit: names, bit and part selects with constant indices, concatenation, replication,
  width conversion, the bitwise operators ``~ & | ^ ~^`` and the conditional ``?:`` (each result bit
  reads the condition plus the same bit of both branches);
- exact per result, one bit wide: reductions, logical operators and comparisons read every bit of
  their operands;
- conservative: arithmetic, shifts, calls and anything else make every result bit read every bit
  of every operand. A loop through an adder is therefore reported even when the carry chain would
  not close it; that errs on the side of reporting.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import NamedTuple

import pyslang
from pyslang import ast

from linter.netlist.graph import CONST0, CONST1, CONSTX, CONSTZ

EK = ast.ExpressionKind
_BITWISE_BINARY = {
    ast.BinaryOperator.BinaryAnd,
    ast.BinaryOperator.BinaryOr,
    ast.BinaryOperator.BinaryXor,
    ast.BinaryOperator.BinaryXnor,
}
_REDUCTIONS = {
    ast.UnaryOperator.BitwiseAnd,
    ast.UnaryOperator.BitwiseOr,
    ast.UnaryOperator.BitwiseXor,
    ast.UnaryOperator.BitwiseNand,
    ast.UnaryOperator.BitwiseNor,
    ast.UnaryOperator.BitwiseXnor,
    ast.UnaryOperator.LogicalNot,
}
_CONSTANT_OF_DIGIT = {"0": CONST0, "1": CONST1, "x": CONSTX, "X": CONSTX, "z": CONSTZ, "Z": CONSTZ, "?": CONSTZ}


class SymbolBits(NamedTuple):
    """Where a net or variable's bits start, how many there are, and its declared range."""

    base: int
    width: int
    lower: int
    upper: int
    descending: bool


class UnsupportedExpression(Exception):
    """An expression the bit resolver cannot map; the caller reports it with its location."""

    def __init__(self, expression: ast.Expression, reason: str) -> None:
        super().__init__(reason)
        self.expression = expression
        self.reason = reason


def constant_bits(value: pyslang.SVInt, width: int) -> list[int]:
    """The constant bits of a literal, LSB first, zero-extended to ``width``."""
    if value.isSigned and not value.hasUnknown and value.isNegative():
        # slang prints a negative signed value with a minus sign (8'shFD as "-11"), which read
        # as digits would give 8'b00000011; its two's complement bits are what the wires carry
        number = int(value)
        bits = [CONST1 if (number >> offset) & 1 else CONST0 for offset in range(value.bitWidth)]
        return (bits + [CONST0] * max(0, width - len(bits)))[:width]
    digits = value.toString(pyslang.LiteralBase.Binary, False)
    digits = digits.split("b", 1)[-1] if "'" in digits else digits
    bits = [_CONSTANT_OF_DIGIT.get(d, CONST0) for d in reversed(digits) if d != "_"]
    if len(bits) < width:
        bits.extend([CONST0] * (width - len(bits)))
    return bits[:width]


def _folded_bits(expression: ast.Expression) -> list[int] | None:
    """The bits of an expression slang evaluated to a constant integer, or None.

    Only what slang already folded is used (``expression.constant``, a parameter's value): no
    evaluation is started here, so expressions that read nets cost one attribute lookup.
    """
    constant = expression.constant
    if constant is None and expression.kind == EK.NamedValue and expression.symbol.kind == ast.SymbolKind.Parameter:
        constant = expression.symbol.value
    value = constant.value if constant is not None else None
    if not isinstance(value, pyslang.SVInt):
        return None
    return constant_bits(value, expression.type.bitWidth)


def _constant_int(expression: ast.Expression) -> int:
    if expression.kind == EK.IntegerLiteral:
        return int(expression.value)
    constant = expression.constant
    if constant is None:
        try:
            constant = expression.eval(ast.EvalContext(expression.type))
        except Exception:  # pyslang raises plain RuntimeError when it cannot evaluate
            constant = None
    if constant is None or constant.hasUnknown():
        raise UnsupportedExpression(expression, "index is not a constant")
    return int(constant.value if hasattr(constant, "value") else constant)


def _no_symbol_bits(symbol: ast.Symbol) -> SymbolBits | None:
    raise RuntimeError("this resolver was told to forget its symbols")


class BitResolver:
    """Maps expressions of one module body to its local bits.

    ``symbol_bits`` returns the :class:`SymbolBits` of a net or variable of the body, allocating
    them on first use; it returns None for a symbol outside the body (a hierarchical reference).
    """

    def __init__(self, symbol_bits: Callable[[ast.Symbol], SymbolBits | None]) -> None:
        self._symbol_bits = symbol_bits

    def forget_symbols(self) -> None:
        """Drop ``symbol_bits`` (often a bound method of the resolver's owner, so a reference
        cycle); the resolver resolves nothing afterwards."""
        self._symbol_bits = _no_symbol_bits

    # ---- bits named by an expression (None: the expression computes something) ------------------
    def bits(self, expression: ast.Expression) -> list[int] | None:
        kind = expression.kind
        if kind == EK.NamedValue:
            info = self._symbol_bits(expression.symbol)
            if info is None:
                folded = _folded_bits(expression)
                if folded is not None:  # a parameter: constant bits, like a literal
                    return folded
                raise UnsupportedExpression(expression, f"'{expression.symbol.name}' is not a net of this module")
            return list(range(info.base, info.base + info.width))
        if kind == EK.Assignment:
            return self.bits(expression.left)
        if kind == EK.ElementSelect:
            return self._element_select(expression)
        if kind == EK.RangeSelect:
            return self._range_select(expression)
        if kind == EK.Concatenation:
            result: list[int] = []
            for operand in reversed(list(expression.operands)):
                part = self.bits(operand)
                if part is None:
                    return None
                result.extend(part)
            return result
        if kind == EK.Replication:
            inner = self.bits(expression.concat)
            return None if inner is None else inner * _constant_int(expression.count)
        if kind == EK.Conversion:
            inner = self.bits(expression.operand)
            return _folded_bits(expression) if inner is None else self._resize(inner, expression)
        if kind == EK.IntegerLiteral:
            return constant_bits(expression.value, expression.type.bitWidth)
        if kind == EK.UnbasedUnsizedIntegerLiteral:
            digit = str(expression.syntax).strip()[-1:] if expression.syntax else "0"
            return [_CONSTANT_OF_DIGIT.get(digit, CONST0)] * expression.type.bitWidth
        if kind == EK.EmptyArgument:
            return []
        if kind == EK.HierarchicalValue:
            raise UnsupportedExpression(expression, "hierarchical references are not supported in a netlist")
        # an operator slang folded to a constant (``W + 1``, ``-1``) drives constants, not logic
        return _folded_bits(expression)

    def _resize(self, bits: list[int], expression: ast.Expression) -> list[int]:
        width = expression.type.bitWidth
        if len(bits) >= width:
            return bits[:width]
        fill = bits[-1] if bits and expression.operand.type.isSigned else CONST0
        return bits + [fill] * (width - len(bits))

    def _offset_in(self, value: ast.Expression, index: int, element_width: int) -> int:
        selected_range = value.type.fixedRange
        if selected_range.left >= selected_range.right:
            offset = index - selected_range.lower
        else:
            offset = selected_range.upper - index
        if not 0 <= offset < selected_range.width:
            raise UnsupportedExpression(value, f"index {index} is outside the declared range")
        return offset * element_width

    def _element_select(self, expression: ast.Expression) -> list[int]:
        value = expression.value
        index = _constant_int(expression.selector)
        if value.kind == EK.NamedValue:
            info = self._symbol_bits(value.symbol)
            if info is not None and info.width == info.upper - info.lower + 1:
                offset = index - info.lower if info.descending else info.upper - index
                if not 0 <= offset < info.width:
                    raise UnsupportedExpression(expression, f"index {index} is outside the declared range")
                return [info.base + offset]
        whole = self.bits(value)
        if whole is None:
            raise UnsupportedExpression(expression, "select of a computed value")
        element_width = expression.type.bitWidth
        start = self._offset_in(value, index, element_width)
        return whole[start : start + element_width]

    def _range_select(self, expression: ast.Expression) -> list[int]:
        value = expression.value
        left = _constant_int(expression.left)
        right = _constant_int(expression.right)
        selection = expression.selectionKind
        width = expression.type.bitWidth
        element_width = 1
        whole = None
        if value.kind != EK.NamedValue or self._symbol_bits(value.symbol) is None:
            whole = self.bits(value)
            if whole is None:
                raise UnsupportedExpression(expression, "select of a computed value")
        declared = value.type.fixedRange
        element_width = max(1, value.type.bitWidth // declared.width)
        descending = declared.left >= declared.right
        if selection == ast.RangeSelectionKind.Simple:
            low_index = min(left, right) if descending else max(left, right)
        elif selection == ast.RangeSelectionKind.IndexedUp:
            low_index = left if descending else left + right - 1
        else:
            low_index = left - right + 1 if descending else left
        offset = (low_index - declared.lower) if descending else (declared.upper - low_index)
        start = offset * element_width
        if start < 0 or start + width > value.type.bitWidth:
            raise UnsupportedExpression(expression, "part select is outside the declared range")
        if whole is None:
            info = self._symbol_bits(value.symbol)
            return list(range(info.base + start, info.base + start + width))
        return whole[start : start + width]

    # ---- what each result bit reads ------------------------------------------------------------
    def dependencies(self, expression: ast.Expression) -> list[frozenset[int]]:
        """For each result bit (LSB first), the set of non-constant bits it depends on."""
        named = self.bits(expression)
        if named is not None:
            return [frozenset((b,)) if b >= 0 else frozenset() for b in named]
        kind = expression.kind
        width = expression.type.bitWidth
        if kind == EK.UnaryOp:
            operand = self.dependencies(expression.operand)
            if expression.op == ast.UnaryOperator.BitwiseNot:
                return operand
            if expression.op in _REDUCTIONS:
                return self._one_bit(frozenset().union(*operand), width)
            return self._all(frozenset().union(*operand), width)
        if kind == EK.BinaryOp:
            left = self.dependencies(expression.left)
            right = self.dependencies(expression.right)
            if expression.op in _BITWISE_BINARY and len(left) == len(right) == width:
                return [a | b for a, b in zip(left, right)]
            # comparisons and logical operators are one bit wide, so this is exact for them
            return self._all(frozenset().union(*left, *right), width)
        if kind == EK.ConditionalOp:
            condition = frozenset()
            for item in expression.conditions:
                condition = condition.union(*self.dependencies(item.expr))
            left = self.dependencies(expression.left)
            right = self.dependencies(expression.right)
            if len(left) == len(right) == width:
                return [condition | a | b for a, b in zip(left, right)]
            return self._all(condition.union(*left, *right), width)
        if kind == EK.Concatenation:
            result: list[frozenset[int]] = []
            for operand in reversed(list(expression.operands)):
                result.extend(self.dependencies(operand))
            return result
        if kind == EK.Replication:
            return self.dependencies(expression.concat) * _constant_int(expression.count)
        if kind == EK.Conversion:
            inner = self.dependencies(expression.operand)
            if len(inner) >= width:
                return inner[:width]
            fill = inner[-1] if inner and expression.operand.type.isSigned else frozenset()
            return inner + [fill] * (width - len(inner))
        return self._all(self.reads(expression), width)

    @staticmethod
    def _all(reads: frozenset[int], width: int) -> list[frozenset[int]]:
        return [reads] * width

    @staticmethod
    def _one_bit(reads: frozenset[int], width: int) -> list[frozenset[int]]:
        return [reads] + [frozenset()] * (width - 1)

    def reads(self, expression: ast.Expression) -> frozenset[int]:
        """Every non-constant bit an arbitrary expression reads (conservative)."""
        found: set[int] = set()

        def visit(node: object) -> object:
            if isinstance(node, ast.Expression) and node.kind in (EK.NamedValue, EK.ElementSelect, EK.RangeSelect):
                try:
                    named = self.bits(node)
                except UnsupportedExpression:
                    named = None
                if named is not None:
                    found.update(b for b in named if b >= 0)
                    return ast.VisitAction.Skip
            return ast.VisitAction.Advance

        expression.visit(visit)
        return frozenset(found)
