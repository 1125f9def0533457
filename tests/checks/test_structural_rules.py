"""Issue 4 acceptance: the structural rules on invented netlists, with every finding spelled out.

Fixtures are the invented netlists of ``fixtures/structural/`` (each says so in its first line).
Every expected finding was derived by hand from the fixture text and the language's rules
(IEEE 1364-2005, from memory): a gate's first terminal is its output (``buf``/``not``: all but
the last); ``bufif1`` and the switches may release their output (tri-state); ``pullup`` is a
weak pull; an ``always @(posedge ...)`` process is a flip-flop, an ``always @(*)`` one is
transparent; ``assign`` bitwise operators work bit by bit. That two open-drain outputs on one
net make a wired-AND, and that a push-pull output must not share a net with any other kind of
output, is common practice. Locations are found in the fixture text (:func:`at`), never typed
in as numbers.

Bare netlists get one family on one rail, as on the command line: ``LVCMOS33`` on ``VCC=3.3``.
"""

from __future__ import annotations

import dataclasses
from pathlib import Path

import numpy as np
import pytest

from linter.annotate import Annotation
from linter.checks.finding import Finding, Severity, Site
from linter.electrical.bare_design import bare_design
from linter.electrical.design_file import load_design
from linter.errors import SourceLocation
from linter.netlist.graph import ArcMode, CellClass, PinDirection
from linter.pipeline import annotate_design, check_annotation

FIXTURES = Path(__file__).parent / "fixtures" / "structural"
STRUCTURAL_RULES = (
    "cycle-through-logic", "outputs-shorted", "shared-tristate-bus", "input-floating", "open-drain-unpulled",
)
RECEIVING = (PinDirection.IN, PinDirection.INOUT)
DRIVING = (PinDirection.OUT, PinDirection.INOUT)
LOOP_FIXTURES = ("latch_module_loop.v", "self_loop.v", "cross_module_loop.v", "vector_loop.v", "bidirectional.v")


# ---- helpers -----------------------------------------------------------------------------------

def annotate_fixture(name: str) -> Annotation:
    """A bare netlist (``.v``) with LVCMOS33 on 3.3 V everywhere, or a design file (``.yaml``)."""
    path = FIXTURES / name
    if path.suffix == ".yaml":
        return annotate_design(load_design(path))
    return annotate_design(bare_design([str(path)], None, [], [], "LVCMOS33", "VCC=3.3"))


def structural_findings(annotation: Annotation) -> list[Finding]:
    return check_annotation(annotation, rules=STRUCTURAL_RULES).findings


def at(name: str, snippet: str, token: str | None = None) -> SourceLocation:
    """Where ``token`` (default: all of ``snippet``) starts on the one line of fixture ``name``
    holding ``snippet``: the location the front end must give that declaration or instance."""
    path = FIXTURES / name
    lines = path.read_text().splitlines()
    matches = [number for number, line in enumerate(lines, 1) if snippet in line]
    assert len(matches) == 1, f"{snippet!r} must occur on exactly one line of {name}"
    line = lines[matches[0] - 1]
    column = line.index(snippet) + (snippet.index(token) if token else 0) + 1
    return SourceLocation(str(path), matches[0], column)


def assert_real_cycle(annotation: Annotation, finding: Finding) -> None:
    """The loop a ``cycle-through-logic`` finding spells out is a cycle of the design graph.

    Sites alternate hop (a cell) and net; hop i leads from the net before it (for the first
    hop, the last net site, which is the subject) to the net after it. Each hop must be a
    combinational cell with an input (or inout) pin on the previous net and an output (or inout)
    pin on the next one, joined by an arc of that cell; every net appears once.
    """
    graph = annotation.graph
    hops, nets = finding.sites[0::2], finding.sites[1::2]
    assert hops and len(hops) == len(nets)
    assert {s.role for s in hops} == {"hop"} and {s.role for s in nets} == {"net"}
    names = [s.name for s in nets]
    assert len(set(names)) == len(names), "a simple cycle visits each net once"
    assert finding.subject == names[-1]
    assert " -> ".join(names[-1:] + names) in finding.message
    assert finding.data["cycle_nets"] == len(names)
    net_of = {name: i for i, name in enumerate(graph.net_names)}
    cell_of = {name: i for i, name in enumerate(graph.cell_names)}
    explicit = set(zip(graph.arc_from_pin.tolist(), graph.arc_to_pin.tolist()))
    previous = net_of[names[-1]]
    for hop, net_site in zip(hops, nets):
        cell, following = cell_of[hop.name], net_of[net_site.name]
        assert hop.location == graph.cell_location(cell)
        assert net_site.location == graph.net_location(following)
        assert graph.cell_class[cell] != CellClass.SEQUENTIAL and not annotation.cell_sequential[cell]
        pins = list(graph.pins_of(cell))
        inputs = [p for p in pins if graph.pin_net[p] == previous and graph.pin_direction[p] in RECEIVING]
        outputs = [p for p in pins if graph.pin_net[p] == following and graph.pin_direction[p] in DRIVING]
        assert inputs, f"{hop.name} has no input pin on {graph.net_names[previous]}"
        assert outputs, f"{hop.name} has no output pin on {net_site.name}"
        mode = graph.cell_arc_mode[cell]
        if mode == ArcMode.EXPLICIT:
            assert any((i, o) in explicit for i in inputs for o in outputs), f"{hop.name} has no such arc"
        else:
            assert mode == ArcMode.FULL and any(i != o for i in inputs for o in outputs)
        previous = following


def loop(subject_to_subject: list[str], hops: list[tuple[str, SourceLocation]], net_locations: list[SourceLocation],
         message: str) -> Finding:
    """An expected loop finding: nets in path order (from the subject), the hop into each next net."""
    nets = subject_to_subject[1:] + subject_to_subject[:1]
    sites = []
    for (cell, cell_location), net, net_location in zip(hops, nets, net_locations):
        sites += [Site("hop", cell, cell_location), Site("net", net, net_location)]
    count = len(subject_to_subject)
    return Finding("cycle-through-logic", Severity.ERROR, message, hops[0][1], subject_to_subject[0], "net",
                   tuple(sites), {"cycle_nets": count, "group_nets": count})


# ---- loops that are no loops -------------------------------------------------------------------

def test_feedback_through_an_edge_triggered_process_is_no_loop() -> None:
    annotation = annotate_fixture("flop_loop.v")
    assert structural_findings(annotation) == []
    # the path q -> d exists; only the flip-flop between d and q breaks the loop
    assert CellClass.SEQUENTIAL in annotation.graph.cell_class.tolist()


def test_feedback_through_an_iscas89_style_dff_module_is_no_loop() -> None:
    annotation = annotate_fixture("dff_module_loop.v")
    assert structural_findings(annotation) == []
    graph = annotation.graph
    assert [graph.cell_kinds[c] for c in range(graph.cell_count) if graph.cell_names[c].startswith("toggle.DFF_0.")] \
        == ["sequential"]


def test_the_same_feedback_through_a_transparent_process_is_a_loop() -> None:
    # latch_module_loop.v is dff_module_loop.v with always @(*): now Q -> NQ -> D -> Q closes
    name = "latch_module_loop.v"
    annotation = annotate_fixture(name)
    expected = loop(
        ["toggle.D", "toggle.Q", "toggle.NQ"],
        [("toggle.LATCH_0.process@7:1", at(name, "always @ (*)", "always")),
         ("toggle.NOT_0", at(name, "not NOT_0", "NOT_0")),
         ("toggle.AND_0", at(name, "and AND_0", "AND_0"))],
        [at(name, "wire Q,NQ,D", "Q"), at(name, "wire Q,NQ,D", "NQ"), at(name, "wire Q,NQ,D", "D")],
        "combinational loop through 3 net(s): toggle.D -> toggle.Q -> toggle.NQ -> toggle.D",
    )
    assert structural_findings(annotation) == [expected]
    assert_real_cycle(annotation, expected)


def test_vector_assigns_whose_bits_do_not_read_themselves_are_no_loop() -> None:
    # y = {y[0] & a, b}: y[1] <- y[0], a; y[0] <- b.  w[1] = w[0] & a; w[0] = b.
    # s = {s[2:0], a} & m: s[0] <- a, m[0]; s[i] <- s[i-1], m[i]. No bit reaches itself.
    annotation = annotate_fixture("vector_assign.v")
    assert structural_findings(annotation) == []
    graph = annotation.graph
    # not vacuous: single assign cells both read and write bits of y and of s, with per-bit arcs
    def nets(cell: int, direction: PinDirection) -> set[int]:
        return {int(graph.pin_net[p]) for p in graph.pins_of(cell) if graph.pin_direction[p] == direction}

    for vector in ("y", "s"):
        bits = {i for i, name in enumerate(graph.net_names) if name.startswith(f"vector_assign.{vector}[")}
        cells = [c for c in range(graph.cell_count)
                 if nets(c, PinDirection.IN) & bits and nets(c, PinDirection.OUT) & bits]
        assert len(cells) == 1 and graph.cell_arc_mode[cells[0]] == ArcMode.EXPLICIT


# ---- loops -------------------------------------------------------------------------------------

def test_a_gate_reading_its_own_output_is_a_loop_of_one_net() -> None:
    name = "self_loop.v"
    annotation = annotate_fixture(name)
    expected = loop(["self_loop.a"], [("self_loop.g", at(name, "and g (", "g"))], [at(name, "output a", "a")],
                    "combinational loop through 1 net(s): self_loop.a -> self_loop.a")
    assert structural_findings(annotation) == [expected]
    assert_real_cycle(annotation, expected)


def test_a_loop_across_module_boundaries_is_found_after_flattening() -> None:
    name = "cross_module_loop.v"
    annotation = annotate_fixture(name)
    inverter = at(name, "not g (o, i)", "g")  # both inv instances share the definition's location
    expected = loop(
        ["ring_top.x", "ring_top.y", "ring_top.z"],
        [("ring_top.u1.g", inverter), ("ring_top.g_en", at(name, "nand g_en", "g_en")), ("ring_top.u2.g", inverter)],
        [at(name, "wire y, z", "y"), at(name, "wire y, z", "z"), at(name, "output x", "x")],
        "combinational loop through 3 net(s): ring_top.x -> ring_top.y -> ring_top.z -> ring_top.x",
    )
    assert structural_findings(annotation) == [expected]
    assert_real_cycle(annotation, expected)


def test_two_bits_of_one_vector_assign_that_read_each_other_are_a_loop() -> None:
    # r = {r[0], r[1]} & m: r[1] <- r[0], m[1]; r[0] <- r[1], m[0]
    name = "vector_loop.v"
    annotation = annotate_fixture(name)
    cell = ("vector_loop.assign@3:10", at(name, "assign r =", "r"))
    declared = at(name, "output [1:0] r", "r")
    expected = loop(["vector_loop.r[0]", "vector_loop.r[1]"], [cell, cell], [declared, declared],
                    "combinational loop through 2 net(s): vector_loop.r[0] -> vector_loop.r[1] -> vector_loop.r[0]")
    assert structural_findings(annotation) == [expected]
    assert_real_cycle(annotation, expected)


def test_a_bidirectional_cell_is_no_loop_alone_but_closes_one_with_an_inverter() -> None:
    # u_alone joins pa and pb both ways: no loop (each pad is a tri-state bus of the part and the
    # outside). u_ring joins a and b both ways, and g_back drives a from b: a loop b -> a -> b,
    # and a push-pull output (g_back) on the part's inout pin A.
    name = "bidirectional.v"
    annotation = annotate_fixture(name)
    alone, ring = at(name, "xl_bidir u_alone", "u_alone"), at(name, "xl_bidir u_ring", "u_ring")
    back = at(name, "not g_back", "g_back")
    bus = "their enables must be exclusive; nothing holds it when all are off"
    expected = [
        Finding("shared-tristate-bus", Severity.NOTE, f"net bidirectional.pa is shared by 2 tri-state drivers: {bus}",
                alone, "bidirectional.pa", "net",
                (Site("driver (tri-state)", "bidirectional.u_alone.A", alone),
                 Site("driver (tri-state)", "port pa", at(name, "inout pa", "pa"))),
                {"tristate_drivers": 2, "pulled": False}),
        Finding("shared-tristate-bus", Severity.NOTE, f"net bidirectional.pb is shared by 2 tri-state drivers: {bus}",
                alone, "bidirectional.pb", "net",
                (Site("driver (tri-state)", "bidirectional.u_alone.B", alone),
                 Site("driver (tri-state)", "port pb", at(name, "inout pb", "pb"))),
                {"tristate_drivers": 2, "pulled": False}),
        Finding("outputs-shorted", Severity.ERROR,
                "net bidirectional.a has 2 drivers that can fight (push-pull, tri-state)", ring, "bidirectional.a",
                "net", (Site("driver (tri-state)", "bidirectional.u_ring.A", ring),
                        Site("driver (push-pull)", "bidirectional.g_back.t0", back)),
                {"strong_drivers": 1, "other_drivers": 1}),
        loop(["bidirectional.b", "bidirectional.a"], [("bidirectional.g_back", back), ("bidirectional.u_ring", ring)],
             [at(name, "wire a, b", "a"), at(name, "wire a, b", "b")],
             "combinational loop through 2 net(s): bidirectional.b -> bidirectional.a -> bidirectional.b"),
    ]
    assert structural_findings(annotation) == expected
    assert_real_cycle(annotation, expected[-1])


@pytest.mark.parametrize("name", LOOP_FIXTURES)
def test_every_reported_loop_is_a_cycle_of_the_graph(name: str) -> None:
    annotation = annotate_fixture(name)
    loops = [f for f in structural_findings(annotation) if f.rule == "cycle-through-logic"]
    assert loops
    for finding in loops:
        assert_real_cycle(annotation, finding)


def test_the_cycle_check_rejects_a_path_that_is_not_a_cycle() -> None:
    # the checker itself must be able to fail: the same hops in reverse order, or a hop whose
    # cell does not connect the two nets, are no cycle of cross_module_loop.v
    annotation = annotate_fixture("cross_module_loop.v")
    (finding,) = structural_findings(annotation)
    hops, nets = list(finding.sites[0::2]), list(finding.sites[1::2])
    swapped = [hops[1], hops[0], hops[2]]
    broken = dataclasses.replace(finding, sites=tuple(s for pair in zip(swapped, nets) for s in pair))
    with pytest.raises(AssertionError):
        assert_real_cycle(annotation, broken)
    reversed_nets = nets[-2::-1] + nets[-1:]
    backwards = dataclasses.replace(finding, sites=tuple(s for pair in zip(hops[::-1], reversed_nets) for s in pair))
    with pytest.raises(AssertionError):
        assert_real_cycle(annotation, backwards)


# ---- drivers that fight, and drivers that share --------------------------------------------------

def test_two_bufif_drivers_on_a_bus_are_a_note_not_a_short() -> None:
    name = "tristate_bus.v"
    annotation = annotate_fixture(name)

    def bus(net: str, first: str, second: str, idle: str, pulled: bool) -> Finding:
        where = at(name, f"bufif1 {first}", first)
        return Finding("shared-tristate-bus", Severity.NOTE,
                       f"net tristate_bus.{net} is shared by 2 tri-state drivers: their enables must be exclusive; "
                       f"{idle}", where, f"tristate_bus.{net}", "net",
                       (Site("driver (tri-state)", f"tristate_bus.{first}.t0", where),
                        Site("driver (tri-state)", f"tristate_bus.{second}.t0", at(name, f"bufif1 {second}", second))),
                       {"tristate_drivers": 2, "pulled": pulled})

    assert structural_findings(annotation) == [
        bus("bus", "drv_a", "drv_b", "nothing holds it when all are off", False),
        bus("held", "drv_c", "drv_d", "a pull holds it when all are off", True),
    ]


def test_push_pull_and_tristate_on_one_net_are_a_short() -> None:
    name = "push_pull_tristate.v"
    drv, g = at(name, "bufif1 drv", "drv"), at(name, "and g", "g")
    assert structural_findings(annotate_fixture(name)) == [
        Finding("outputs-shorted", Severity.ERROR,
                "net push_pull_tristate.m has 2 drivers that can fight (push-pull, tri-state)", drv,
                "push_pull_tristate.m", "net",
                (Site("driver (tri-state)", "push_pull_tristate.drv.t0", drv),
                 Site("driver (push-pull)", "push_pull_tristate.g.t0", g)),
                {"strong_drivers": 1, "other_drivers": 1}),
    ]


def test_two_push_pull_outputs_and_an_output_against_a_constant_are_shorts() -> None:
    name = "push_pull_pair.v"
    g1, g2, g3 = at(name, "and g1", "g1"), at(name, "or g2", "g2"), at(name, "not g3", "g3")
    k = at(name, "output k", "k")  # the tie has no cell of its own in the text: it sits at the net
    assert structural_findings(annotate_fixture(name)) == [
        Finding("outputs-shorted", Severity.ERROR, "net push_pull_pair.m has 2 drivers that can fight (push-pull)",
                g1, "push_pull_pair.m", "net",
                (Site("driver (push-pull)", "push_pull_pair.g1.t0", g1),
                 Site("driver (push-pull)", "push_pull_pair.g2.t0", g2)),
                {"strong_drivers": 2, "other_drivers": 0}),
        Finding("outputs-shorted", Severity.ERROR,
                "net push_pull_pair.k has 2 drivers that can fight (constant tie, push-pull)", g3, "push_pull_pair.k",
                "net", (Site("driver (push-pull)", "push_pull_pair.g3.t0", g3),
                        Site("driver (constant tie)", "push_pull_pair.k=1'b1.t0", k)),
                {"strong_drivers": 2, "other_drivers": 0}),
    ]


# ---- floating inputs and open-drain nets ----------------------------------------------------------

def test_constant_ties_are_not_floating_but_unconnected_inputs_are() -> None:
    name = "ties.v"
    annotation = annotate_fixture(name)
    assert structural_findings(annotation) == [
        Finding("input-floating", Severity.ERROR, "net ties.u_open.a reaches 1 input(s) but nothing drives it",
                at(name, "and2(input a,", "a,"), "ties.u_open.a", "net",
                (Site("receiver", "ties.u_open.g.t1", at(name, "and g (y, a, b)", "g")),), {"receivers": 1}),
        Finding("input-floating", Severity.ERROR, "net ties.nowhere reaches 1 input(s) but nothing drives it",
                at(name, "wire t, nowhere", "nowhere"), "ties.nowhere", "net",
                (Site("receiver", "ties.g_n.t1", at(name, "and g_n", "g_n")),), {"receivers": 1}),
    ]
    graph = annotation.graph
    ties = sorted((graph.cell_kinds[c], graph.net_names[int(graph.pin_net[graph.pins_of(c)[0]])])
                  for c in np.flatnonzero(graph.cell_class == CellClass.TIE).tolist())
    # assign t = 1'b0 ties t; .a(1'b0) ties the child's input net
    assert ties == [("tie0", "ties.t"), ("tie0", "ties.u_tied.a")]


OPEN_DRAIN_V = "open_drain.v"


def open_drain_expected(board_pull_up: bool) -> list[Finding]:
    def od(gate: str) -> SourceLocation:
        return at(OPEN_DRAIN_V, f"nand {gate}", gate)

    def unpulled(net: str, gate: str) -> Finding:
        return Finding("open-drain-unpulled", Severity.ERROR, f"open-drain net open_drain.{net} has no pull-up",
                       od(gate), f"open_drain.{net}", "net", (Site("driver", f"open_drain.{gate}.t0", od(gate)),),
                       {"open_drain_drivers": 1})

    found = [] if board_pull_up else [
        Finding("open-drain-unpulled", Severity.ERROR, "open-drain net open_drain.wired has no pull-up", od("u_od_1"),
                "open_drain.wired", "net",
                (Site("driver", "open_drain.u_od_1.t0", od("u_od_1")),
                 Site("driver", "open_drain.u_od_2.t0", od("u_od_2"))),
                {"open_drain_drivers": 2}),
    ]
    return found + [
        unpulled("bare", "u_od_3"),
        Finding("outputs-shorted", Severity.ERROR,
                "net open_drain.mixed has 2 drivers that can fight (open-drain, push-pull)", od("u_od_4"),
                "open_drain.mixed", "net",
                (Site("driver (open-drain)", "open_drain.u_od_4.t0", od("u_od_4")),
                 Site("driver (push-pull)", "open_drain.g_pp.t0", at(OPEN_DRAIN_V, "and g_pp", "g_pp"))),
                {"strong_drivers": 1, "other_drivers": 1}),
        # a pulldown is no pull-up
        unpulled("pulled_down", "u_od_7"),
    ]


def test_open_drain_nets_with_and_without_pull_ups() -> None:
    # wired: u_od_1 and u_od_2 make a wired-AND, pulled up on the board (design file): nothing.
    # pulled_prim: a wired-AND held by a pullup primitive: nothing. Other nets as commented.
    assert structural_findings(annotate_fixture("open_drain.yaml")) == open_drain_expected(board_pull_up=True)


def test_without_the_board_pull_up_the_wired_and_floats_high() -> None:
    findings = structural_findings(annotate_fixture("open_drain_no_board_pull_up.yaml"))
    assert findings == open_drain_expected(board_pull_up=False)
