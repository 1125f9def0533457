"""Level expressions: a threshold that is fixed volts or a function of the family's own supply.

JEDEC standards state many levels as ratios of the supply ("0.65 * VDD") or offsets from it
("VDD - 0.2"), and some absolute limits as a cap ("min(VDD + 0.5, 4.6)"). A family file writes
them as text, so they are parsed here by a small recursive-descent parser instead of ``eval``:
a family file is input, and input must never run code.

Grammar (whitespace is free)::

    expression := term (("+" | "-") term)*
    term       := unary (("*" | "/") unary)*
    unary      := ("+" | "-") unary | primary
    primary    := NUMBER | "VDD" | ("min" | "max") "(" expression ("," expression)+ ")"
                | "(" expression ")"

NUMBER accepts decimals and scientific notation (``0.35``, ``100e-6``), so a current such as
``-1.6e-3``, which YAML 1.1 may read as a string, parses too. A mistake raises
:class:`~linter.errors.InputError` pointing at the offending character.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from typing import Union

from linter.errors import InputError, SourceLocation

SUPPLY_NAME = "VDD"
_FUNCTIONS = {"min": min, "max": max}
_MAX_DEPTH = 40  # nesting beyond this is not a level any standard states; refuse it early
_TOKEN = re.compile(
    r"\s*(?:(?P<number>(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)|(?P<name>[A-Za-z_][A-Za-z_0-9]*)"
    r"|(?P<op>[-+*/(),]))"
)


@dataclass(frozen=True)
class Number:
    value: float


@dataclass(frozen=True)
class Supply:
    """The family's own supply voltage, VDD."""


@dataclass(frozen=True)
class Negate:
    operand: Node


@dataclass(frozen=True)
class Binary:
    operator: str
    left: Node
    right: Node


@dataclass(frozen=True)
class Call:
    function: str
    arguments: tuple[Node, ...]


Node = Union[Number, Supply, Negate, Binary, Call]


@dataclass(frozen=True)
class Expression:
    """A parsed level: evaluate it at a supply voltage to get volts (or amps, for a current).

    ``text`` is what the file said; ``location`` is where, so an evaluation problem (a
    division by zero at some supply) can still name the file and line.
    """

    text: str
    root: Node
    location: SourceLocation | None = None

    @classmethod
    def constant(cls, value: float, location: SourceLocation | None = None) -> Expression:
        """A fixed value that does not depend on the supply."""
        return cls(_format_number(float(value)), Number(float(value)), location)

    @property
    def uses_supply(self) -> bool:
        """True when the value moves with VDD, so it must be evaluated at every rail corner."""
        return _uses_supply(self.root)

    def evaluate(self, vdd: float | None = None) -> float:
        """The value at supply ``vdd`` volts; ``vdd`` may be omitted only for a fixed value."""
        if vdd is None and self.uses_supply:
            raise ValueError(f"expression '{self.text}' depends on {SUPPLY_NAME}; give a supply voltage")
        return _evaluate(self.root, vdd, self)

    def __str__(self) -> str:
        return self.text


def parse_expression(text: str, location: SourceLocation | None = None) -> Expression:
    """Parse ``text``; ``location`` is where the text starts (errors add the column offset)."""
    parser = _Parser(text, location)
    root = parser.parse()
    return Expression(" ".join(text.split()), root, location)


def _format_number(value: float) -> str:
    return repr(value) if value != int(value) else f"{value:.1f}"


def _uses_supply(node: Node) -> bool:
    if isinstance(node, Supply):
        return True
    if isinstance(node, Negate):
        return _uses_supply(node.operand)
    if isinstance(node, Binary):
        return _uses_supply(node.left) or _uses_supply(node.right)
    if isinstance(node, Call):
        return any(_uses_supply(argument) for argument in node.arguments)
    return False


def _evaluate(node: Node, vdd: float | None, owner: Expression) -> float:
    if isinstance(node, Number):
        return node.value
    if isinstance(node, Supply):
        assert vdd is not None
        return float(vdd)
    if isinstance(node, Negate):
        return -_evaluate(node.operand, vdd, owner)
    if isinstance(node, Call):
        return float(_FUNCTIONS[node.function](_evaluate(a, vdd, owner) for a in node.arguments))
    left = _evaluate(node.left, vdd, owner)
    right = _evaluate(node.right, vdd, owner)
    if node.operator == "+":
        return left + right
    if node.operator == "-":
        return left - right
    if node.operator == "*":
        return left * right
    if right == 0:
        raise InputError(f"expression '{owner.text}' divides by zero at VDD = {vdd} V", owner.location)
    return left / right


class _Parser:
    """Recursive descent over a token list; every token remembers its column for errors."""

    def __init__(self, text: str, location: SourceLocation | None) -> None:
        self.text = text
        self.location = location
        self.tokens = self._tokenize()
        self.position = 0

    def error(self, message: str, offset: int) -> InputError:
        if self.text.strip():
            message = f"{message} in expression '{self.text}'"
        if self.location is None:
            return InputError(f"{message} (column {offset + 1})")
        where = SourceLocation(self.location.file, self.location.line, (self.location.column or 1) + offset)
        return InputError(message, where)

    def _tokenize(self) -> list[tuple[str, str, int]]:
        tokens: list[tuple[str, str, int]] = []
        index = 0
        while index < len(self.text):
            if self.text[index:].strip() == "":
                break
            match = _TOKEN.match(self.text, index)
            if match is None or match.end() == index:
                offset = len(self.text) - len(self.text[index:].lstrip())
                raise self.error(f"unexpected character '{self.text[offset]}'", offset)
            kind = match.lastgroup or "op"
            tokens.append((kind, match.group(kind), match.start(kind)))
            index = match.end()
        tokens.append(("end", "", len(self.text)))
        return tokens

    def peek(self) -> tuple[str, str, int]:
        return self.tokens[self.position]

    def take(self) -> tuple[str, str, int]:
        token = self.tokens[self.position]
        self.position += 1
        return token

    def expect(self, symbol: str) -> None:
        kind, value, offset = self.take()
        if value != symbol or kind != "op":
            found = f"'{value}'" if value else "the end"
            raise self.error(f"expected '{symbol}', found {found}", offset)

    def parse(self) -> Node:
        if self.peek()[0] == "end":
            raise self.error("empty level expression", 0)
        node = self.expression(0)
        kind, value, offset = self.peek()
        if kind != "end":
            raise self.error(f"expected an operator, found '{value}'", offset)
        return node

    def expression(self, depth: int) -> Node:
        node = self.term(depth)
        while self.peek()[1] in ("+", "-") and self.peek()[0] == "op":
            operator = self.take()[1]
            node = Binary(operator, node, self.term(depth))
        return node

    def term(self, depth: int) -> Node:
        node = self.unary(depth)
        while self.peek()[1] in ("*", "/") and self.peek()[0] == "op":
            operator, offset = self.take()[1:]
            right = self.unary(depth)
            if operator == "/" and isinstance(right, Number) and right.value == 0:
                raise self.error("division by zero", offset)
            node = Binary(operator, node, right)
        return node

    def unary(self, depth: int) -> Node:
        if depth > _MAX_DEPTH:
            raise self.error("expression nested too deeply", self.peek()[2])
        kind, value, _ = self.peek()
        if kind == "op" and value in ("+", "-"):
            self.take()
            operand = self.unary(depth + 1)
            return operand if value == "+" else Negate(operand)
        return self.primary(depth)

    def primary(self, depth: int) -> Node:
        kind, value, offset = self.take()
        if kind == "number":
            return Number(float(value))
        if kind == "name":
            if value == SUPPLY_NAME:
                return Supply()
            if value in _FUNCTIONS:
                return self.call(value, depth)
            raise self.error(f"unknown name '{value}' (allowed: {SUPPLY_NAME}, min, max)", offset)
        if kind == "op" and value == "(":
            node = self.expression(depth + 1)
            self.expect(")")
            return node
        found = f"'{value}'" if value else "the end"
        raise self.error(f"expected a number, {SUPPLY_NAME} or '(', found {found}", offset)

    def call(self, function: str, depth: int) -> Node:
        self.expect("(")
        arguments = [self.expression(depth + 1)]
        while self.peek()[1] == "," and self.peek()[0] == "op":
            self.take()
            arguments.append(self.expression(depth + 1))
        if len(arguments) < 2:
            raise self.error(f"{function}() needs at least two arguments", self.peek()[2])
        self.expect(")")
        return Call(function, tuple(arguments))
