"""Acceptance of the front end on the open benchmark netlists in ../shared/datasets/.

Check values come from outside the project:

- ISCAS-85 and ISCAS-89: each file's own header comment (input, output and gate counts by type),
  parsed below; the header is the source. ``c1355.v`` has none, so it uses the suite's published
  figures (41 inputs, 32 outputs, 546 gates; from memory, as the datasets README records).
- EPFL: input and output counts from the suite's published table (Amaru, Gaillardon, De Micheli,
  "The EPFL Combinational Benchmark Suite", IWLS 2015, as copied in the datasets README).

Structural facts (which modules a file defines, which instances it holds) are read from the
netlist text itself with small regular expressions, never typed in by hand.
"""

from __future__ import annotations

import json
import re
import subprocess
import sys
from collections import Counter
from dataclasses import dataclass
from pathlib import Path

from linter.netlist.graph import CellClass, DesignGraph, PinDirection

# ---- header readers ------------------------------------------------------------------------

# ISCAS-85 headers name gate types as <TYPE><number of inputs>: NAND2, AND9, NOT1, BUFF1.
ISCAS85_TYPE_KEYWORDS = {
    "AND": "and",
    "NAND": "nand",
    "OR": "or",
    "NOR": "nor",
    "XOR": "xor",
    "XNOR": "xnor",
    "NOT": "not",
    "BUFF": "buf",
}
HEADER_LINE = re.compile(r"^//#?\s*(?P<text>.*?)\s*$")


@dataclass(frozen=True)
class Iscas85Header:
    inputs: int
    outputs: int
    total_gates: int
    gates_by_type: dict[tuple[str, int], int]  # (primitive keyword, input count) -> gates

    def gates_by_keyword(self) -> dict[str, int]:
        totals: Counter[str] = Counter()
        for (keyword, _), count in self.gates_by_type.items():
            totals[keyword] += count
        return dict(totals)


@dataclass(frozen=True)
class Iscas89Header:
    inputs: int  # without the clock
    outputs: int
    flipflops: int
    inverters: int
    gates: int
    gates_by_keyword: dict[str, int]  # and / nand / or / nor


def header_lines(path: Path) -> list[str]:
    """The text of the comment lines before the first line of code."""
    lines = []
    for line in path.read_text().splitlines():
        if not line.strip():
            continue
        match = HEADER_LINE.match(line.strip())
        if match is None:
            break
        lines.append(match["text"])
    return lines


def read_iscas85_header(path: Path) -> Iscas85Header | None:
    lines = header_lines(path)
    if not lines:
        return None
    totals: dict[str, int] = {}
    gates_by_type: dict[tuple[str, int], int] = {}
    for text in lines:
        if text in ("Verilog", path.stem):
            continue
        if match := re.fullmatch(r"N(inputs|outputs|totalGates) (\d+)", text):
            totals[match[1]] = int(match[2])
        elif match := re.fullmatch(r"([A-Z]+?)(\d+) (\d+)", text):
            keyword = ISCAS85_TYPE_KEYWORDS[match[1]]
            gates_by_type[(keyword, int(match[2]))] = int(match[3])
        else:
            raise ValueError(f"{path}: header line not understood: {text!r}")
    return Iscas85Header(totals["inputs"], totals["outputs"], totals["totalGates"], gates_by_type)


def read_iscas89_header(path: Path) -> Iscas89Header:
    values: dict[str, int] = {}
    by_keyword: dict[str, int] = {}
    for text in header_lines(path):
        if text == "Verilog":
            continue
        if match := re.fullmatch(r"(\d+) (inputs|outputs|D-type flipflops|inverters)", text):
            values[match[2]] = int(match[1])
        elif match := re.fullmatch(
            r"(\d+) gates \((\d+) ANDs \+ (\d+) NANDs \+ (\d+) ORs \+ (\d+) NORs\)", text
        ):
            values["gates"] = int(match[1])
            by_keyword = dict(zip(("and", "nand", "or", "nor"), map(int, match.groups()[1:])))
        else:
            raise ValueError(f"{path}: header line not understood: {text!r}")
    return Iscas89Header(
        inputs=values["inputs"],
        outputs=values["outputs"],
        flipflops=values["D-type flipflops"],
        inverters=values["inverters"],
        gates=values["gates"],
        gates_by_keyword=by_keyword,
    )


# ---- facts read from the netlist text --------------------------------------------------------

MODULE_HEADER = re.compile(r"^\s*module\s+(\\\S+|\w+)", re.MULTILINE)
INSTANCE_LINE = re.compile(r"^\s*(\w+)\s+(\w+)\s*\(", re.MULTILINE)


def module_names(path: Path) -> list[str]:
    return MODULE_HEADER.findall(path.read_text())


def module_body(path: Path, name: str) -> str | None:
    """The text between ``module <name>`` and its ``endmodule``, or None if not defined."""
    match = re.search(rf"^\s*module\s+{name}\b(.*?)^\s*endmodule", path.read_text(), re.S | re.M)
    return match[1] if match else None


def dff_instances(path: Path) -> dict[str, int]:
    """Instance name -> line of every ``dff`` instance in the file."""
    text = path.read_text()
    return {
        match[2]: text.count("\n", 0, match.start(1)) + 1
        for match in INSTANCE_LINE.finditer(text)
        if match[1] == "dff"
    }


# ---- views of a graph ------------------------------------------------------------------------


def port_bits(graph: DesignGraph, direction: PinDirection) -> int:
    return sum(len(port.bits) for port in graph.ports if port.direction == direction)


def input_port_names(graph: DesignGraph) -> set[str]:
    return {port.name for port in graph.ports if port.direction == PinDirection.IN}


def input_counts(graph: DesignGraph) -> Counter[tuple[str, int]]:
    """(kind, number of input pins) -> cells: the header's NAND2 / AND9 / NOT1 view."""
    counts: Counter[tuple[str, int]] = Counter()
    for cell in range(graph.cell_count):
        pins = graph.pins_of(cell)
        inputs = sum(1 for pin in pins if graph.pin_direction[pin] == PinDirection.IN)
        counts[(graph.cell_kinds[cell], inputs)] += 1
    return counts


def kinds_in_module(graph: DesignGraph, module: str) -> dict[str, int]:
    return dict(
        Counter(kind for kind, where in zip(graph.cell_kinds, graph.cell_module) if where == module)
    )


def nonzero(counts: dict[str, int]) -> dict[str, int]:
    return {kind: count for kind, count in counts.items() if count}


# ---- every file ------------------------------------------------------------------------------


def test_every_netlist_builds(dataset_netlist: Path, design_of) -> None:
    from linter.netlist.summary import summarise

    graph = design_of(dataset_netlist)
    names = module_names(dataset_netlist)
    # The top is the one module that no other module of the file instantiates.
    instantiated = {match[1] for match in INSTANCE_LINE.finditer(dataset_netlist.read_text())}
    (expected_top,) = [name for name in names if name not in instantiated]
    assert graph.top == expected_top
    assert graph.cell_count > 0
    assert graph.net_count > 0
    summary = summarise(graph)
    assert summary["top"] == expected_top
    assert summary["cells"] == graph.cell_count
    assert summary["net_bits"] == graph.net_count
    json.dumps(summary, sort_keys=True)  # the summary must be plain JSON data


# ---- ISCAS-85 --------------------------------------------------------------------------------

# c1355.v carries no header; the suite's published figures (from memory, datasets README).
C1355_PUBLISHED = {"inputs": 41, "outputs": 32, "gates": 546}


def test_iscas85_headers_are_self_consistent(iscas85_netlist: Path) -> None:
    header = read_iscas85_header(iscas85_netlist)
    if header is None:
        assert iscas85_netlist.name == "c1355.v", "only c1355.v is known to lack a header"
        return
    assert sum(header.gates_by_type.values()) == header.total_gates


def test_iscas85_matches_header(iscas85_netlist: Path, design_of) -> None:
    from linter.netlist.summary import summarise

    graph = design_of(iscas85_netlist)
    summary = summarise(graph)
    header = read_iscas85_header(iscas85_netlist)
    if header is None:
        expected_ports = {"input": C1355_PUBLISHED["inputs"], "output": C1355_PUBLISHED["outputs"]}
        expected_cells = C1355_PUBLISHED["gates"]
    else:
        expected_ports = {"input": header.inputs, "output": header.outputs}
        expected_cells = header.total_gates
        assert summary["cells_by_kind"] == header.gates_by_keyword()
        assert dict(input_counts(graph)) == header.gates_by_type
    assert summary["ports"] == {**expected_ports, "inout": 0}
    assert port_bits(graph, PinDirection.IN) == expected_ports["input"]
    assert port_bits(graph, PinDirection.OUT) == expected_ports["output"]
    assert summary["cells"] == expected_cells
    assert set(graph.cell_class.tolist()) == {CellClass.GATE}
    assert summary["unknown_cells"] == []


def test_inspect_command_prints_the_summary_of_c17(datasets: Path, design_of) -> None:
    from linter.netlist.summary import summarise

    c17 = datasets / "iscas85" / "c17.v"
    result = subprocess.run(
        [sys.executable, "-m", "linter", "inspect", str(c17), "--format", "json"],
        capture_output=True,
        text=True,
        check=False,
    )
    assert result.returncode == 0, result.stderr
    printed = json.loads(result.stdout)
    # c17 header: Ninputs 5, Noutputs 2, NtotalGates 6, NAND2 6.
    assert printed["top"] == "c17"
    assert printed["cells"] == 6
    assert printed["cells_by_kind"] == {"nand": 6}
    assert printed["ports"] == {"input": 5, "output": 2, "inout": 0}
    assert printed == json.loads(json.dumps(summarise(design_of(c17))))


# ---- ISCAS-89 --------------------------------------------------------------------------------

# Top-level inputs the headers do not count. The clock CK is an extra input everywhere the file
# declares it (datasets README). s1196.v never mentions CK: its dff instances have only Q and D.
# s298.v and s344.v also carry GND and VDD as ports that nothing inside uses.
EXTRA_INPUTS = {
    "s1196.v": set(),
    "s298.v": {"CK", "GND", "VDD"},
    "s344.v": {"CK", "GND", "VDD"},
}
DEFAULT_EXTRA_INPUTS = {"CK"}
PRIMITIVE_LINE = re.compile(r"^\s*([a-z]+)\s+\w+\s*\(", re.MULTILINE)


def test_iscas89_headers_are_self_consistent(iscas89_netlist: Path) -> None:
    header = read_iscas89_header(iscas89_netlist)
    assert sum(header.gates_by_keyword.values()) == header.gates
    assert len(dff_instances(iscas89_netlist)) == header.flipflops


def test_iscas89_ports_match_header(iscas89_netlist: Path, design_of) -> None:
    from linter.netlist.summary import summarise

    graph = design_of(iscas89_netlist)
    header = read_iscas89_header(iscas89_netlist)
    extra = EXTRA_INPUTS.get(iscas89_netlist.name, DEFAULT_EXTRA_INPUTS)
    assert extra <= input_port_names(graph)
    assert port_bits(graph, PinDirection.IN) == header.inputs + len(extra)
    assert port_bits(graph, PinDirection.OUT) == header.outputs
    assert summarise(graph)["ports"] == {
        "input": header.inputs + len(extra),
        "output": header.outputs,
        "inout": 0,
    }


def test_iscas89_top_level_gates_match_header(iscas89_netlist: Path, design_of) -> None:
    graph = design_of(iscas89_netlist)
    header = read_iscas89_header(iscas89_netlist)
    expected = nonzero({"not": header.inverters, **header.gates_by_keyword})
    top_cells = kinds_in_module(graph, graph.top)
    flipflops = top_cells.pop("dff", 0)  # undefined dff (s1196) stays a cell of the top
    assert top_cells == expected
    assert flipflops == (header.flipflops if module_body(iscas89_netlist, "dff") is None else 0)


def test_iscas89_flipflops_are_what_the_dff_module_says(iscas89_netlist: Path, design_of) -> None:
    """Each flip-flop is flattened into whatever the file's own ``dff`` module holds.

    Most files define ``dff`` as ``always @ (posedge CK) Q <= D;``: one sequential cell per
    flip-flop. s298.v and s344.v define it at switch level instead (two ``nmos`` pass gates,
    three ``not`` gates, ``trireg`` storage nodes), so those flip-flops become gates, not
    sequential cells. s1196.v does not define ``dff`` at all (see the unknown-cell test).
    """
    from linter.netlist.summary import summarise

    graph = design_of(iscas89_netlist)
    header = read_iscas89_header(iscas89_netlist)
    instances = dff_instances(iscas89_netlist)
    body = module_body(iscas89_netlist, "dff")
    if body is None:  # s1196.v: each dff stays one black box in the top (unknown-cell test)
        assert set(graph.cell_module) == {graph.top}
        return
    if re.search(r"always\s*@\s*\(\s*posedge\s+CK\s*\)", body):
        per_flipflop = {"sequential": 1}
    else:
        per_flipflop = dict(Counter(PRIMITIVE_LINE.findall(body)))
    flipflop_modules = {f"{graph.top}.{name}" for name in instances}
    for module in sorted(flipflop_modules):
        assert kinds_in_module(graph, module) == per_flipflop, module
    assert set(graph.cell_module) == flipflop_modules | {graph.top}

    expected = Counter(nonzero({"not": header.inverters, **header.gates_by_keyword}))
    for kind, count in per_flipflop.items():
        expected[kind] += count * header.flipflops
    summary = summarise(graph)
    assert summary["cells_by_kind"] == dict(expected)
    assert summary["cells"] == sum(expected.values())
    assert summary["unknown_cells"] == []
    sequential = int((graph.cell_class == CellClass.SEQUENTIAL).sum())
    assert sequential == per_flipflop.get("sequential", 0) * header.flipflops


def test_s1196_reports_each_undefined_dff_and_analyses_the_rest(datasets: Path, design_of) -> None:
    from linter.netlist.summary import summarise

    s1196 = datasets / "iscas89" / "s1196.v"
    header = read_iscas89_header(s1196)
    instances = dff_instances(s1196)
    assert module_body(s1196, "dff") is None
    graph = design_of(s1196)

    reported = {
        (path, module, Path(where.file).name, where.line)
        for path, module, where in graph.unknown_cells
    }
    expected_cells = {(f"s1196.{name}", "dff", "s1196.v", line) for name, line in instances.items()}
    assert reported == expected_cells
    assert all(where.column > 0 for _, _, where in graph.unknown_cells)

    summary = summarise(graph)
    assert len(summary["unknown_cells"]) == header.flipflops
    expected = {"not": header.inverters, **header.gates_by_keyword, "dff": header.flipflops}
    assert summary["cells_by_kind"] == expected
    blackboxes = [c for c in range(graph.cell_count) if graph.cell_class[c] == CellClass.BLACKBOX]
    assert sorted(graph.cell_names[c] for c in blackboxes) == sorted(
        f"s1196.{name}" for name in instances
    )


# ---- EPFL ------------------------------------------------------------------------------------

# Input / output counts from the suite's published table (IWLS 2015; datasets README).
EPFL_PUBLISHED_PORTS = {
    "adder": (256, 129),
    "bar": (135, 128),
    "max": (512, 130),
    "sin": (24, 25),
    "multiplier": (128, 128),
    "cavlc": (10, 11),
    "ctrl": (7, 26),
    "dec": (8, 256),
    "i2c": (147, 142),
    "int2float": (11, 7),
    "priority": (128, 8),
    "router": (60, 30),
}
DECLARATION = re.compile(r"^\s*(input|output)\b(.*?);", re.MULTILINE | re.DOTALL)


def test_epfl_ports_match_published_table(epfl_netlist: Path, design_of) -> None:
    from linter.netlist.summary import summarise

    inputs, outputs = EPFL_PUBLISHED_PORTS[epfl_netlist.stem]
    graph = design_of(epfl_netlist)
    assert summarise(graph)["ports"] == {"input": inputs, "output": outputs, "inout": 0}
    assert port_bits(graph, PinDirection.IN) == inputs
    assert port_bits(graph, PinDirection.OUT) == outputs


def test_epfl_is_assigns_only(epfl_netlist: Path, design_of) -> None:
    graph = design_of(epfl_netlist)
    assert graph.unknown_cells == []
    assert set(graph.cell_class.tolist()) <= {CellClass.ASSIGN, CellClass.TIE}


def test_epfl_port_names_keep_escapes(epfl_netlist: Path, design_of) -> None:
    """``\\opcode[0] `` is one scalar net named ``top.\\opcode[0]`` (backslash kept, space not)."""
    graph = design_of(epfl_netlist)
    declared = {
        name.strip()
        for match in DECLARATION.finditer(epfl_netlist.read_text())
        for name in match[2].replace("\n", " ").split(",")
    }
    known = set(graph.net_names)
    for aliases in graph.net_aliases.values():
        known.update(aliases)
    missing = sorted(name for name in (f"{graph.top}.{d}" for d in declared) if name not in known)
    near = sorted(name for name in known if missing and name.startswith(missing[0]))[:3]
    assert missing == [], f"{len(missing)} port nets missing; {missing[:1]} resembles {near}"
