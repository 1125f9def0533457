"""A second opinion on gate-primitive netlists, read with pyverilog's parser instead of slang.

It understands only what flat gate-level benchmark netlists use: one module; scalar or
constant-range ``input`` / ``output`` / ``wire`` declarations; and the gate primitives whose pin
directions the language fixes by position (IEEE 1364-2005, 7.2 and 7.3, from memory):

- ``and nand or nor xor xnor``: the first terminal is the output, the rest are inputs;
- ``buf not``: the last terminal is the input, the others are outputs.

Anything else raises :class:`ReferenceUnsupported` rather than being guessed at, so a
comparison against this reader can only fail loudly, never agree by accident.

Pins are named by terminal position (``t0``, ``t1``, ...) and nets by hierarchical name
(``c17.N10``, ``top.data[3]``), the same conventions the front end documents, so the two
results can be compared with plain set equality. A top-level input port counts as a driver of
its net and an output port as a receiver, written ``(TOP_PORT, "N1")``.

pyverilog normally runs an external preprocessor (a simulator binary) first; these netlists use
no directives, so the text goes straight to ``VerilogParser`` and no binary is needed.
"""

from __future__ import annotations

import warnings
from collections.abc import Iterable, Iterator
from dataclasses import dataclass
from pathlib import Path

with warnings.catch_warnings():
    # pyverilog's __init__ reads its VERSION file without closing it; the project turns every
    # warning into an error, and this one is not ours to fix.
    warnings.simplefilter("ignore", ResourceWarning)
    try:
        from pyverilog.vparser import ast as vast
        from pyverilog.vparser.parser import VerilogParser
    except ImportError:  # pragma: no cover - only without the test extra
        PYVERILOG_AVAILABLE = False
    else:
        PYVERILOG_AVAILABLE = True

TOP_PORT = "<port>"
N_INPUT_GATES = frozenset({"and", "nand", "or", "nor", "xor", "xnor"})
N_OUTPUT_GATES = frozenset({"buf", "not"})

Endpoint = tuple[str, str]  # (cell name or TOP_PORT, pin name or port bit name)


class ReferenceUnsupported(Exception):
    """The netlist uses something this deliberately small reader does not model."""


@dataclass(frozen=True)
class NetEnds:
    """Who drives one net bit and who receives it."""

    drivers: frozenset[Endpoint]
    receivers: frozenset[Endpoint]


@dataclass(frozen=True)
class ReferenceGate:
    name: str  # hierarchical: "c17.NAND2_1"
    keyword: str  # "nand"
    terminals: tuple[str, ...]  # hierarchical net bit per terminal, in connection order
    line: int

    def output_positions(self) -> range:
        if self.keyword in N_INPUT_GATES:
            return range(0, 1)
        return range(0, len(self.terminals) - 1)


@dataclass(frozen=True)
class ReferenceNetlist:
    top: str
    nets: tuple[str, ...]  # every net bit, hierarchical, declared or implicit, sorted
    input_bits: tuple[str, ...]  # top input port bits, unqualified ("N1", "data[3]")
    output_bits: tuple[str, ...]
    gates: tuple[ReferenceGate, ...]

    def connectivity(self) -> dict[str, NetEnds]:
        """For every net bit, its drivers and receivers."""
        drivers: dict[str, set[Endpoint]] = {net: set() for net in self.nets}
        receivers: dict[str, set[Endpoint]] = {net: set() for net in self.nets}
        for bit in self.input_bits:
            drivers[f"{self.top}.{bit}"].add((TOP_PORT, bit))
        for bit in self.output_bits:
            receivers[f"{self.top}.{bit}"].add((TOP_PORT, bit))
        for gate in self.gates:
            outputs = gate.output_positions()
            for position, net in enumerate(gate.terminals):
                side = drivers if position in outputs else receivers
                side[net].add((gate.name, f"t{position}"))
        return {
            net: NetEnds(frozenset(drivers[net]), frozenset(receivers[net])) for net in self.nets
        }


class GatePrimitiveReader:
    """Builds pyverilog's LALR parser once, then reads any number of netlists with it.

    Building the tables takes most of a second, so share one reader per test session; the
    generated ``parsetab.py`` goes to ``table_dir`` (a temporary folder, never the repository).
    """

    def __init__(self, table_dir: Path) -> None:
        if not PYVERILOG_AVAILABLE:
            raise ReferenceUnsupported("pyverilog is not importable")
        self._parser = VerilogParser(outputdir=str(table_dir), debug=False)

    def read(self, path: Path) -> ReferenceNetlist:
        self._parser.lexer.filename = str(path)
        self._parser.lexer.reset_lineno()
        source = self._parser.parse(Path(path).read_text())
        modules = [d for d in source.description.definitions if isinstance(d, vast.ModuleDef)]
        if len(modules) != 1:
            raise ReferenceUnsupported(f"{path}: expected one module, found {len(modules)}")
        return _read_module(modules[0], path)


def _read_module(module: vast.ModuleDef, path: Path) -> ReferenceNetlist:
    top = module.name
    declared: dict[str, list[str]] = {}  # base name -> its bit names
    inputs: list[str] = []
    outputs: list[str] = []
    gates: list[ReferenceGate] = []
    for item in module.items:
        if isinstance(item, vast.Decl):
            for variable in item.list:
                bits = _declared_bits(variable, path)
                declared.setdefault(variable.name, bits)
                if isinstance(variable, vast.Input):
                    inputs.extend(bits)
                elif isinstance(variable, vast.Output):
                    outputs.extend(bits)
                elif not isinstance(variable, vast.Wire):
                    raise ReferenceUnsupported(
                        f"{path}:{variable.lineno}: declaration {type(variable).__name__}"
                    )
        elif isinstance(item, vast.InstanceList):
            gates.extend(_read_gates(item, top, declared, path))
        else:
            raise ReferenceUnsupported(f"{path}:{item.lineno}: item {type(item).__name__}")
    nets = {f"{top}.{bit}" for bits in declared.values() for bit in bits}
    nets.update(net for gate in gates for net in gate.terminals)
    return ReferenceNetlist(
        top=top,
        nets=tuple(sorted(nets)),
        input_bits=tuple(dict.fromkeys(inputs)),
        output_bits=tuple(dict.fromkeys(outputs)),
        gates=tuple(gates),
    )


def _declared_bits(variable: vast.Variable, path: Path) -> list[str]:
    if variable.dimensions is not None:
        raise ReferenceUnsupported(f"{path}:{variable.lineno}: array {variable.name}")
    if variable.width is None:
        return [variable.name]
    msb = _constant(variable.width.msb, path)
    lsb = _constant(variable.width.lsb, path)
    step = -1 if msb >= lsb else 1
    return [f"{variable.name}[{index}]" for index in range(lsb, msb - step, -step)]


def _read_gates(
    instances: vast.InstanceList, top: str, declared: dict[str, list[str]], path: Path
) -> Iterator[ReferenceGate]:
    keyword = instances.module
    if keyword not in N_INPUT_GATES | N_OUTPUT_GATES:
        raise ReferenceUnsupported(f"{path}:{instances.lineno}: cell type {keyword!r}")
    if instances.parameterlist:
        raise ReferenceUnsupported(f"{path}:{instances.lineno}: gate delay or strength")
    for instance in instances.instances:
        if not instance.name or instance.array is not None:
            raise ReferenceUnsupported(f"{path}:{instance.lineno}: unnamed or arrayed gate")
        if any(arg.portname is not None for arg in instance.portlist):
            raise ReferenceUnsupported(f"{path}:{instance.lineno}: named gate terminal")
        terminals = tuple(
            f"{top}.{_terminal_bit(arg.argname, declared, path, instance.lineno)}"
            for arg in instance.portlist
        )
        if len(terminals) < 2:
            raise ReferenceUnsupported(f"{path}:{instance.lineno}: gate with < 2 terminals")
        yield ReferenceGate(f"{top}.{instance.name}", keyword, terminals, instance.lineno)


def _terminal_bit(
    expression: vast.Node, declared: dict[str, list[str]], path: Path, line: int
) -> str:
    if isinstance(expression, vast.Identifier) and expression.scope is None:
        bits = declared.get(expression.name, [expression.name])  # undeclared: implicit scalar
        if len(bits) != 1:
            raise ReferenceUnsupported(f"{path}:{line}: vector {expression.name} on a gate pin")
        return bits[0]
    if isinstance(expression, vast.Pointer) and isinstance(expression.var, vast.Identifier):
        return f"{expression.var.name}[{_constant(expression.ptr, path)}]"
    raise ReferenceUnsupported(f"{path}:{line}: terminal {type(expression).__name__}")


def _constant(node: vast.Node, path: Path) -> int:
    if not isinstance(node, vast.IntConst) or not node.value.isdigit():
        raise ReferenceUnsupported(f"{path}:{node.lineno}: non-decimal constant {node!r}")
    return int(node.value)


def first_differences(
    expected: dict[str, NetEnds], actual: dict[str, NetEnds], limit: int = 5
) -> list[str]:
    """Human-readable lines for the first ``limit`` nets (by name) on which two maps differ."""
    lines: list[str] = []
    for net in sorted(set(expected) | set(actual)):
        want, got = expected.get(net), actual.get(net)
        if want == got:
            continue
        lines.append(f"{net}: reference {_describe(want)}; front end {_describe(got)}")
        if len(lines) == limit:
            break
    return lines


def _describe(ends: NetEnds | None) -> str:
    if ends is None:
        return "no such net"
    return f"drivers {_sorted(ends.drivers)} receivers {_sorted(ends.receivers)}"


def _sorted(endpoints: Iterable[Endpoint]) -> list[Endpoint]:
    return sorted(endpoints)
