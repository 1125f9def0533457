"""Issue 2 acceptance: every Verilog construct the front end reads, on small hand-written netlists.

The fixtures in ``fixtures/`` are invented examples. Each expected value below was worked out by
hand from the fixture text and the rules of IEEE 1364 / 1800 (gate terminal order: outputs first;
concatenation lists the MSB first; ``[lo:hi]`` ranges have their LSB on the right); the comment
beside a value says how. Connectivity is compared whole (``connectivity(graph) == expected``),
so a missing, extra or misdirected pin anywhere fails the test.

Conventions of the front end the expectations rely on (see ``linter/netlist/connectivity.py``):
gate terminals are pins ``t0, t1, ...`` by position; top ports are ``<port>.NAME``; a pin of an
undefined module is ``unknown``; the canonical name of a net is its shallowest name, the earliest
declared among equals, and every other name is listed under ``aliases``.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from linter.errors import InputError
from linter.netlist import build_design
from linter.netlist.connectivity import connectivity
from linter.netlist.graph import CONST1, ArcMode, CellClass, DesignGraph, PinDirection

FIXTURES = Path(__file__).parent / "fixtures"


def build(*names: str, **options) -> DesignGraph:
    return build_design([str(FIXTURES / name) for name in names], **options)


def net(drivers=(), receivers=(), unknown=(), aliases=()) -> dict[str, list[str]]:
    """One entry of ``connectivity()``; lists are sorted there, so sort here too."""
    return {"drivers": sorted(drivers), "receivers": sorted(receivers), "unknown": sorted(unknown),
            "aliases": sorted(aliases)}


def cell(graph: DesignGraph, name: str) -> int:
    (index,) = [c for c, cell_name in enumerate(graph.cell_names) if cell_name == name]
    return index


def cell_facts(graph: DesignGraph, name: str) -> tuple[str, CellClass, ArcMode]:
    c = cell(graph, name)
    return graph.cell_kinds[c], CellClass(int(graph.cell_class[c])), ArcMode(int(graph.cell_arc_mode[c]))


def where(fixture: str, line: int, column: int) -> str:
    return f"{FIXTURES / fixture}:{line}:{column}"


def cell_where(graph: DesignGraph, name: str) -> str:
    return str(graph.cell_location(cell(graph, name)))


def net_where(graph: DesignGraph, name: str) -> str:
    return str(graph.net_location(graph.net_names.index(name)))


def edges_by_name(graph: DesignGraph) -> set[tuple[str, str]]:
    sources, destinations = graph.combinational_edges()
    return {(graph.net_names[s], graph.net_names[d]) for s, d in zip(sources.tolist(), destinations.tolist())}


# ---- gate primitives -----------------------------------------------------------------------

# (instance, keyword, output ports, input ports) in gates.v, lines 7 to 22 in this order.
GATES = [
    ("g_and", "and", ["y_and"], ["a", "b", "c"]),
    ("g_nand", "nand", ["y_nand"], ["a", "b"]),
    ("g_or", "or", ["y_or"], ["a", "b"]),
    ("g_nor", "nor", ["y_nor"], ["a", "b"]),
    ("g_xor", "xor", ["y_xor"], ["a", "b"]),
    ("g_xnor", "xnor", ["y_xnor"], ["a", "b"]),
    ("g_not", "not", ["y_not"], ["a"]),
    ("g_buf", "buf", ["y_buf"], ["a"]),
    ("g_fan", "buf", ["f1", "f2"], ["c"]),  # buf/not: every terminal but the last is an output
    ("g_nfan", "not", ["n1", "n2"], ["c"]),
    ("g_b0", "bufif0", ["t_b0"], ["a", "en"]),  # bufif/notif: (out, data, control)
    ("g_b1", "bufif1", ["t_b1"], ["a", "en"]),
    ("g_n0", "notif0", ["t_n0"], ["b", "en"]),
    ("g_n1", "notif1", ["t_n1"], ["b", "en"]),
    ("g_pu", "pullup", ["p_hi"], []),  # a pull has its one terminal as output
    ("g_pd", "pulldown", ["p_lo"], []),
]


def test_gate_primitives_pins_by_position() -> None:
    graph = build("gates.v")
    expected = {f"gates.{port}": net(drivers=[f"<port>.{port}"]) for port in ("a", "b", "c", "en")}
    for instance, _, outputs, inputs in GATES:
        for position, port in enumerate(outputs + inputs):
            label = f"gates.{instance}.t{position}"
            if position < len(outputs):
                expected[f"gates.{port}"] = net(drivers=[label], receivers=[f"<port>.{port}"])
            else:
                expected[f"gates.{port}"]["receivers"] = sorted(expected[f"gates.{port}"]["receivers"] + [label])
    assert connectivity(graph) == expected
    # spot checks of the table above, written out: a feeds ten gates; c is the last terminal of
    # both fan-out gates; f2 is the second output of `buf g_fan (f1, f2, c)`
    assert len(expected["gates.a"]["receivers"]) == 10
    assert expected["gates.c"] == net(["<port>.c"], ["gates.g_and.t3", "gates.g_fan.t2", "gates.g_nfan.t2"])
    assert expected["gates.f2"] == net(["gates.g_fan.t1"], ["<port>.f2"])
    assert expected["gates.t_n1"] == net(["gates.g_n1.t0"], ["<port>.t_n1"])


def test_gate_primitives_kinds_classes_and_locations() -> None:
    graph = build("gates.v")
    assert graph.cell_count == len(GATES)
    for line, (instance, keyword, _, _) in enumerate(GATES, start=7):
        # pulls have no input, so no combinational arc; every other gate has full arcs
        mode = ArcMode.NONE if keyword in ("pullup", "pulldown") else ArcMode.FULL
        assert cell_facts(graph, f"gates.{instance}") == (keyword, CellClass.GATE, mode)
        # the keywords are padded to 9 columns, so every instance name starts in column 12
        assert cell_where(graph, f"gates.{instance}") == where("gates.v", line, 12)
    # `module gates(input a` puts `a` in column 20 of line 2
    assert net_where(graph, "gates.a") == where("gates.v", 2, 20)
    assert graph.diagnostics == []


# ---- hierarchy, black boxes, undefined modules, unconnected ports ---------------------------

HIERARCHY_CONNECTIVITY = {
    # u1 (named connections) and u2 (ordered) are flattened: their port nets merge with ours
    "top.i": net(["<port>.i"], ["top.bb2.B", "top.u1.n0.t1"], ["top.m1.P"], ["top.u1.a"]),
    "top.j": net(["<port>.j"], ["top.bb2.A"], ["top.m2.#0"]),
    "top.o": net(["top.u2.n1.t0"], ["<port>.o"], aliases=["top.u2.y"]),
    "top.q": net(["top.bb1.Y"], ["<port>.q"]),
    # r is only on an undefined cell: no known driver, the pin is `unknown`
    "top.r": net([], ["<port>.r"], ["top.m2.#3"]),
    # an inout is both driver and receiver, for the top port and for the black-box pin
    "top.pad": net(["<port>.pad", "top.bb1.IO"], ["<port>.pad", "top.bb1.IO"]),
    "top.w": net(["top.u1.n1.t0"], ["top.bb1.A", "top.u2.n0.t1"], aliases=["top.u1.y", "top.u2.a"]),
    # m2 (j, , x, r): the empty second connection still counts, so x is pin #2 and r pin #3
    "top.x": net(unknown=["top.m1.Q", "top.m2.#2"]),
    # unconnected black-box pins get a net of their own, named after the pin
    "top.bb1.B": net([], ["top.bb1.B"]),
    "top.bb2.Y": net(["top.bb2.Y"]),
    "top.bb2.IO": net(["top.bb2.IO"], ["top.bb2.IO"]),
    # each copy of inv_pair keeps its own internal net m
    "top.u1.m": net(["top.u1.n0.t0"], ["top.u1.n1.t1"]),
    "top.u2.m": net(["top.u2.n0.t0"], ["top.u2.n1.t1"]),
}


def test_hierarchy_connectivity() -> None:
    assert connectivity(build("hierarchy.v")) == HIERARCHY_CONNECTIVITY


def test_hierarchy_cells() -> None:
    graph = build("hierarchy.v")
    assert sorted(graph.cell_names) == [
        "top.bb1", "top.bb2", "top.m1", "top.m2", "top.u1.n0", "top.u1.n1", "top.u2.n0", "top.u2.n1",
    ]
    assert cell_facts(graph, "top.u2.n0") == ("not", CellClass.GATE, ArcMode.FULL)
    assert graph.cell_module[cell(graph, "top.u2.n0")] == "top.u2"
    # a module with ports only is a black box named after its module; full arcs (conservative)
    assert cell_facts(graph, "top.bb1") == ("pad_cell", CellClass.BLACKBOX, ArcMode.FULL)
    bb1 = cell(graph, "top.bb1")
    pins = {graph.pin_names[p]: PinDirection(int(graph.pin_direction[p])) for p in graph.pins_of(bb1)}
    assert pins == {"A": PinDirection.IN, "B": PinDirection.IN, "Y": PinDirection.OUT, "IO": PinDirection.INOUT}
    assert cell_facts(graph, "top.m1") == ("mystery", CellClass.BLACKBOX, ArcMode.FULL)
    # the gate inside the body is located in the body (line 4, `  not n0` -> column 7);
    # instances at their name: `  pad_cell bb1` -> column 12, `  mystery m1` -> column 11
    assert cell_where(graph, "top.u1.n0") == where("hierarchy.v", 4, 7)
    assert cell_where(graph, "top.bb1") == where("hierarchy.v", 15, 12)
    assert [(name, module, str(at)) for name, module, at in graph.unknown_cells] == [
        ("top.m1", "mystery", where("hierarchy.v", 17, 11)),
        ("top.m2", "mystery", where("hierarchy.v", 18, 11)),
    ]
    # a net is located at its declaration: `  wire w` -> line 12, column 8
    assert net_where(graph, "top.w") == where("hierarchy.v", 12, 8)
    # the fresh net of an unconnected pin is located at the instance
    assert net_where(graph, "top.bb1.B") == where("hierarchy.v", 15, 12)
    # `.B()` is named and empty: slang warns at the port name, the `B` in column 25
    assert graph.diagnostics == [
        (f"{where('hierarchy.v', 15, 25)}: warning: input port 'B' is explicitly connected to nothing "
         "[empty-input-connection]")
    ]


def test_identical_instances_have_distinct_names() -> None:
    graph = build("hierarchy.v")
    assert len(set(graph.cell_names)) == graph.cell_count
    assert len(set(graph.net_names)) == graph.net_count
    assert {"top.u1.n0", "top.u2.n0"} <= set(graph.cell_names)


def _strip_escapes(text: str) -> str:
    return text.replace("\\", "")


def _comparable(graph: DesignGraph) -> dict[str, tuple[list[str], list[str]]]:
    return {
        _strip_escapes(name): ([_strip_escapes(d) for d in entry["drivers"]],
                               [_strip_escapes(r) for r in entry["receivers"]])
        for name, entry in connectivity(graph).items()
    }


def test_replication_equals_hand_flattened_netlist() -> None:
    """hand_flat.v is replicated.v flattened by hand, with escaped names for the paths."""
    hierarchical = build("replicated.v")
    flat = build("hand_flat.v")
    assert _comparable(hierarchical) == _comparable(flat)
    kinds = {_strip_escapes(n): k for n, k in zip(flat.cell_names, flat.cell_kinds)}
    assert dict(zip(hierarchical.cell_names, hierarchical.cell_kinds)) == kinds
    strip = {(_strip_escapes(s), _strip_escapes(d)) for s, d in edges_by_name(flat)}
    assert edges_by_name(hierarchical) == strip
    # and one net written out: x0 feeds the nand and the xor of u1 only
    assert _comparable(hierarchical)["pair.x0"] == (["<port>.x0"], ["pair.u1.g0.t1", "pair.u1.g2.t1"])


# ---- continuous assigns with logic ---------------------------------------------------------


def test_assign_cells_and_connectivity() -> None:
    graph = build("assigns.v")
    # assigns on lines 5..9, each `  assign` so the assign keyword starts in column 3 and the
    # assignment (the cell's location) in column 10
    cells = {line: f"assigns.assign@{line}:10" for line in range(5, 10)}
    and_, cond, sum_, cat, rep = (cells[line] for line in range(5, 10))
    assert cell_facts(graph, sum_) == ("assign", CellClass.ASSIGN, ArcMode.FULL)
    for name in (and_, cond, cat, rep):
        assert cell_facts(graph, name) == ("assign", CellClass.ASSIGN, ArcMode.EXPLICIT)
    assert cell_where(graph, and_) == where("assigns.v", 5, 10)

    # y_and, y_cond, y_sum read every bit of a and b; so does y_cat = {a[1:0]^b[1:0], b[3:2],
    # ~a[3:2]}; y_rep = {3{a[0]|b[0], s}} reads a[0], b[0] and s; y_cond also reads s
    receivers = {
        f"assigns.{v}[{i}]": [f"{c}.{v}[{i}]" for c in (and_, cond, sum_, cat)] for v in "ab" for i in range(4)
    }
    receivers["assigns.s"] = [f"{cond}.s", f"{rep}.s"]
    receivers["assigns.a[0]"].append(f"{rep}.a[0]")
    receivers["assigns.b[0]"].append(f"{rep}.b[0]")
    expected = {name: net([f"<port>.{name[8:]}"], pins) for name, pins in receivers.items()}
    for output, assign_cell, width in (("y_and", and_, 4), ("y_cond", cond, 4), ("y_sum", sum_, 4),
                                       ("y_cat", cat, 6), ("y_rep", rep, 6)):
        for i in range(width):
            expected[f"assigns.{output}[{i}]"] = net([f"{assign_cell}.{output}[{i}]"], [f"<port>.{output}[{i}]"])
    assert connectivity(graph) == expected


def _arcs(graph: DesignGraph, name: str) -> set[tuple[str, str]]:
    """The explicit arcs of one cell, as (input pin, output pin) names."""
    c = cell(graph, name)
    pins = graph.pins_of(c)
    return {
        (graph.pin_names[int(f)], graph.pin_names[int(t)])
        for f, t in zip(graph.arc_from_pin.tolist(), graph.arc_to_pin.tolist())
        if f in pins
    }


def test_assign_bit_precision() -> None:
    graph = build("assigns.v")
    # bitwise and: y_and[i] reads a[i] and b[i] only -> 8 arcs, bit-aligned
    assert _arcs(graph, "assigns.assign@5:10") == {
        (f"{v}[{i}]", f"y_and[{i}]") for v in "ab" for i in range(4)
    }
    # conditional: each result bit reads the select plus the same bit of both branches
    assert _arcs(graph, "assigns.assign@6:10") == {
        (source, f"y_cond[{i}]") for i in range(4) for source in ("s", f"a[{i}]", f"b[{i}]")
    }
    # concatenation, LSB first: y_cat[1:0] = ~a[3:2], y_cat[3:2] = b[3:2], y_cat[5:4] = a^b [1:0]
    assert _arcs(graph, "assigns.assign@8:10") == {
        ("a[2]", "y_cat[0]"), ("a[3]", "y_cat[1]"), ("b[2]", "y_cat[2]"), ("b[3]", "y_cat[3]"),
        ("a[0]", "y_cat[4]"), ("b[0]", "y_cat[4]"), ("a[1]", "y_cat[5]"), ("b[1]", "y_cat[5]"),
    }
    # replication {3{x, s}}, MSB first x s x s x s: even bits read s, odd bits read a[0] | b[0]
    assert _arcs(graph, "assigns.assign@9:10") == {
        *(("s", f"y_rep[{i}]") for i in (0, 2, 4)),
        *((v, f"y_rep[{i}]") for i in (1, 3, 5) for v in ("a[0]", "b[0]")),
    }
    # arithmetic is conservative (expressions.py): a FULL cell, so no explicit arcs at all
    assert _arcs(graph, "assigns.assign@7:10") == set()


def test_assign_edges_through_and_and_add() -> None:
    edges = edges_by_name(build("assigns.v"))
    into_and = {e for e in edges if e[1].startswith("assigns.y_and")}
    assert into_and == {(f"assigns.{v}[{i}]", f"assigns.y_and[{i}]") for v in "ab" for i in range(4)}
    assert all(len({e for e in into_and if e[0] == f"assigns.{v}[{i}]"}) == 1 for v in "ab" for i in range(4))
    # a + b: every one of the 8 operand bits reaches every one of the 4 sum bits
    into_sum = {e for e in edges if e[1].startswith("assigns.y_sum")}
    assert into_sum == {(f"assigns.{v}[{i}]", f"assigns.y_sum[{j}]") for v in "ab" for i in range(4) for j in range(4)}
    assert len(into_sum) == 32


def test_computed_port_connection_gets_its_own_cell() -> None:
    """``.d(a & b)`` on an ascending ``[0:3]`` port: the LSB of ``a & b`` is ``d[3]``."""
    graph = build("port_expressions.v")
    expression_cell = "top.u.d$expr"
    assert cell_facts(graph, expression_cell) == ("assign", CellClass.ASSIGN, ArcMode.EXPLICIT)
    # located at the expression: `  sink u (.d(a & b)` -> `a` in column 14 of line 7
    assert cell_where(graph, expression_cell) == where("port_expressions.v", 7, 14)
    expected = {}
    for i in range(4):
        for v in "ab":
            expected[f"top.{v}[{i}]"] = net([f"<port>.{v}[{i}]"], [f"{expression_cell}.{v}[{i}]"])
    for i in range(4):
        # q = d inside sink pairs q[i] with d's bit i above its LSB, which is d[3 - i]
        expected[f"top.q[{i}]"] = net([f"{expression_cell}.u.d[{3 - i}]"], [f"<port>.q[{i}]"],
                                      aliases=[f"top.u.d[{3 - i}]", f"top.u.q[{i}]"])
    assert connectivity(graph) == expected
    assert edges_by_name(graph) == {(f"top.{v}[{i}]", f"top.q[{i}]") for v in "ab" for i in range(4)}


# ---- pure aliases and constants ------------------------------------------------------------


def test_aliases_and_bit_reversal_through_two_levels() -> None:
    graph = build("aliases.v")
    expected = {}
    for i in range(4):
        # in[i] -> middle.d[i] -> reverse.m[i] = reverse.z[3-i] -> middle.q[3-i] -> out[3-i]
        expected[f"top.in[{i}]"] = net([f"<port>.in[{i}]"], [f"<port>.out[{3 - i}]"], aliases=[
            f"top.out[{3 - i}]", f"top.u.d[{i}]", f"top.u.q[{3 - i}]", f"top.u.r.m[{i}]", f"top.u.r.z[{3 - i}]",
        ])
    # rc.m = 4'b1010 through a port: bit i of the literal drives m[i] through a tie cell
    for i, value in enumerate("0101"):
        expected[f"top.rc.m[{i}]"] = net([f"top.rc.m[{i}]=1'b{value}.t0"], aliases=[f"top.rc.z[{3 - i}]"])
    expected.update({
        "top.b": net(["<port>.b"], ["<port>.a", "top.ga.t3"], aliases=["top.a"]),  # assign a = b
        "top.k0": net(["top.k0=1'b0.t0"], ["<port>.k0"]),  # assign k0 = 1'b0: a tie, not floating
        "top.k1": net(["top.gb.t0"], ["<port>.k1"]),
        "top.g": net(["top.ga.t0"], ["<port>.g"]),
        "top.t": net(["top.t=1'b1.t0"], ["top.ga.t1", "top.gb.t1"]),
    })
    assert connectivity(graph) == expected


def test_constants_tie_cells_and_constant_pins() -> None:
    graph = build("aliases.v")
    ties = sorted(name for name, kind in zip(graph.cell_names, graph.cell_kinds) if kind.startswith("tie"))
    # k0, t, and the four bits of rc.m; the 1'b1 written on ga's terminal is no tie cell
    assert ties == ["top.k0=1'b0", "top.rc.m[0]=1'b0", "top.rc.m[1]=1'b1", "top.rc.m[2]=1'b0",
                    "top.rc.m[3]=1'b1", "top.t=1'b1"]
    assert cell_facts(graph, "top.k0=1'b0") == ("tie0", CellClass.TIE, ArcMode.NONE)
    assert cell_facts(graph, "top.t=1'b1") == ("tie1", CellClass.TIE, ArcMode.NONE)
    ga = cell(graph, "top.ga")
    assert [int(graph.pin_net[p]) for p in graph.pins_of(ga)][2] == CONST1  # `and ga (g, t, 1'b1, b)`
    assert ("top.t", "top.g") in edges_by_name(graph)


def test_supply_nets_are_driven() -> None:
    graph = build("supplies.v")
    assert connectivity(graph) == {
        "supplies.a": net(["<port>.a"], ["supplies.g1.t1", "supplies.g2.t1"]),
        "supplies.y": net(["supplies.g1.t0"], ["<port>.y"]),
        "supplies.z": net(["supplies.g2.t0"], ["<port>.z"]),
        "supplies.vdd": net(["supplies.vdd=1'b1.t0"], ["supplies.g1.t2"]),  # supply1: the rail drives it
        "supplies.gnd": net(["supplies.gnd=1'b0.t0"], ["supplies.g2.t2"]),  # supply0
    }


# ---- processes -----------------------------------------------------------------------------


def test_processes() -> None:
    graph = build("processes.v")
    p = {line: f"processes.process@{line}:3" for line in (3, 4, 7, 8)}  # each `always` in column 3
    assert cell_facts(graph, p[3]) == ("sequential", CellClass.SEQUENTIAL, ArcMode.NONE)  # posedge clk
    assert cell_facts(graph, p[4]) == ("sequential", CellClass.SEQUENTIAL, ArcMode.NONE)  # or negedge rst_n
    assert cell_facts(graph, p[7]) == ("behavioural", CellClass.BEHAVIOURAL, ArcMode.FULL)  # @(en or d)
    assert cell_facts(graph, p[8]) == ("behavioural", CellClass.BEHAVIOURAL, ArcMode.FULL)  # @*
    assert cell_where(graph, p[4]) == where("processes.v", 4, 3)
    assert connectivity(graph) == {
        "processes.clk": net(["<port>.clk"], [f"{p[3]}.clk", f"{p[4]}.clk"]),
        "processes.rst_n": net(["<port>.rst_n"], [f"{p[4]}.rst_n"]),
        "processes.d": net(["<port>.d"], [f"{p[3]}.d", f"{p[7]}.d"]),
        "processes.en": net(["<port>.en"], [f"{p[7]}.en"]),
        "processes.a": net(["<port>.a"], [f"{p[8]}.a"]),
        "processes.b": net(["<port>.b"], [f"{p[8]}.b"]),
        "processes.q": net([f"{p[3]}.q"], ["<port>.q", f"{p[4]}.q"]),
        "processes.r": net([f"{p[4]}.r"], ["<port>.r", "processes.g.t1"]),
        "processes.l": net([f"{p[7]}.l"], ["<port>.l"]),
        "processes.c": net([f"{p[8]}.c"], ["<port>.c", "processes.g.t2"]),
        "processes.x": net(["processes.g.t0"], ["<port>.x"]),
    }
    assert graph.diagnostics == [
        f"{where('processes.v', line, 3)}: warning: level-sensitive process treated as a combinational black box"
        for line in (7, 8)
    ]
    # nothing passes through the flip-flops; the level-sensitive ones pass everything
    assert edges_by_name(graph) == {
        ("processes.d", "processes.l"), ("processes.en", "processes.l"),
        ("processes.a", "processes.c"), ("processes.b", "processes.c"),
        ("processes.r", "processes.x"), ("processes.c", "processes.x"),
    }


# ---- vectors, selects, escaped names, primitive arrays --------------------------------------


def test_vectors_selects_and_escaped_names() -> None:
    graph = build("vectors.v")
    v = "vectors."
    assert connectivity(graph) == {
        # asc is [0:3]: its LSB is asc[3]; z = asc[1:2] with z [0:1] pairs z[0]-asc[1], z[1]-asc[2]
        f"{v}asc[3]": net(["<port>.asc[3]"], [f"{v}b1.t1"]),
        f"{v}asc[2]": net(["<port>.asc[2]"], ["<port>.z[1]"], aliases=[f"{v}z[1]"]),
        f"{v}asc[1]": net(["<port>.asc[1]"], ["<port>.z[0]"], aliases=[f"{v}z[0]"]),
        f"{v}asc[0]": net(["<port>.asc[0]"], [f"{v}b0.t1"]),
        # `assign \data[0] = d[0]`: the escaped name is an alias, kept with its backslash
        f"{v}d[0]": net(["<port>.d[0]"], ["<port>.\\data[0]", f"{v}g[0].t1", f"{v}n_esc.t1"],
                        aliases=[f"{v}\\data[0]"]),
        # g[1:0] (py, d[1:0], d[3:2]): element g[1] takes the MSBs py[1], d[1], d[3]
        f"{v}d[1]": net(["<port>.d[1]"], [f"{v}g[1].t1"]),
        # up = d[2 +: 4] = d[5:2]; dn = d[7 -: 4] = d[7:4]; y[3:2] = d[7:6]
        f"{v}d[2]": net(["<port>.d[2]"], ["<port>.up[0]", f"{v}g[0].t2"], aliases=[f"{v}up[0]"]),
        f"{v}d[3]": net(["<port>.d[3]"], ["<port>.up[1]", f"{v}g[1].t2"], aliases=[f"{v}up[1]"]),
        f"{v}d[4]": net(["<port>.d[4]"], ["<port>.dn[0]", "<port>.up[2]"], aliases=[f"{v}dn[0]", f"{v}up[2]"]),
        f"{v}d[5]": net(["<port>.d[5]"], ["<port>.dn[1]", "<port>.up[3]"], aliases=[f"{v}dn[1]", f"{v}up[3]"]),
        f"{v}d[6]": net(["<port>.d[6]"], ["<port>.dn[2]", "<port>.y[2]"], aliases=[f"{v}dn[2]", f"{v}y[2]"]),
        f"{v}d[7]": net(["<port>.d[7]"], ["<port>.dn[3]", "<port>.y[3]"], aliases=[f"{v}dn[3]", f"{v}y[3]"]),
        f"{v}y[0]": net([f"{v}b0.t0"], ["<port>.y[0]"]),
        f"{v}y[1]": net([f"{v}b1.t0"], ["<port>.y[1]"]),
        f"{v}\\a.b": net([f"{v}n_esc.t0"], ["<port>.\\a.b"]),  # `\a.b `: backslash kept, space not
        f"{v}py[0]": net([f"{v}g[0].t0"], ["<port>.py[0]"]),
        f"{v}py[1]": net([f"{v}g[1].t0"], ["<port>.py[1]"]),
    }
    asc = next(port for port in graph.ports if port.name == "asc")
    assert (asc.msb, asc.lsb) == (0, 3)
    assert [asc.bit_name(offset) for offset in range(4)] == ["asc[3]", "asc[2]", "asc[1]", "asc[0]"]
    assert {port.name for port in graph.ports} >= {"\\a.b", "\\data[0]"}
    # both elements of the array are located at the array's name, `  and g` -> column 7
    assert cell_where(graph, "vectors.g[1]") == where("vectors.v", 12, 7)
    assert cell_facts(graph, "vectors.g[0]") == ("and", CellClass.GATE, ArcMode.FULL)


# ---- parameters, generate, implicit nets -----------------------------------------------------


def test_parameters_generate_and_implicit_net() -> None:
    graph = build("generate.v")
    expected = {}
    for i in range(4):
        # u4 (W=4, named) and u2 (W=2, ordered, a[1:0]) both read a[0] and a[1]
        readers = [f"top.u4.bit_[{i}].n.t1"] + ([f"top.u2.bit_[{i}].n.t1"] if i < 2 else [])
        aliases = [f"top.u4.a[{i}]"] + ([f"top.u2.a[{i}]"] if i < 2 else [])
        if i == 0:
            readers.append("top.u4.wide.sb.t1")  # the W > 2 branch exists in u4 only
        expected[f"top.a[{i}]"] = net([f"<port>.a[{i}]"], readers, aliases=aliases)
        expected[f"top.y4[{i}]"] = net([f"top.u4.bit_[{i}].n.t0"], [f"<port>.y4[{i}]"], aliases=[f"top.u4.y[{i}]"])
    for i in range(2):
        expected[f"top.y2[{i}]"] = net([f"top.u2.bit_[{i}].n.t0"], [f"<port>.y2[{i}]"], aliases=[f"top.u2.y[{i}]"])
    expected.update({
        "top.b": net(["<port>.b"], ["top.g.t2", "top.n.t1"]),
        "top.o": net(["top.g.t0"], ["<port>.o"]),
        "top.imp": net(["top.n.t0"], ["top.g.t1"]),  # never declared: an implicit net
        "top.u4.wide.spare": net(["top.u4.wide.sb.t0"]),
        "top.u2.narrow.spare2": net(),  # the else branch of u2 declares a net nobody uses
    })
    assert connectivity(graph) == expected
    # `  and g (o, imp, b);` on line 21: imp starts in column 13
    assert graph.diagnostics == [f"{where('generate.v', 21, 13)}: warning: implicit net 'imp' created [implicit-net]"]
    assert net_where(graph, "top.imp") == where("generate.v", 21, 13)
    assert graph.cell_module[cell(graph, "top.u4.bit_[3].n")] == "top.u4"


# ---- files, include folders, defines, tops ---------------------------------------------------


def test_include_folder_and_define() -> None:
    include = [str(FIXTURES / "include")]
    with_define = build("include_define.v", include_dirs=include, defines=["USE_NAND"])
    without = build("include_define.v", include_dirs=include)
    # PAIR_WIDTH 2 from the header gives a[1:0]; USE_NAND picks line 5, otherwise line 7
    assert [(n, k) for n, k in zip(with_define.cell_names, with_define.cell_kinds)] == [("top.g", "nand")]
    assert [(n, k) for n, k in zip(without.cell_names, without.cell_kinds)] == [("top.g", "nor")]
    assert cell_where(with_define, "top.g") == where("include_define.v", 5, 8)
    assert cell_where(without, "top.g") == where("include_define.v", 7, 7)
    assert sorted(with_define.net_names) == ["top.a[0]", "top.a[1]", "top.y"]
    with pytest.raises(InputError, match="widths.vh"):
        build("include_define.v")  # no -I: the header is not found


def test_two_files_auto_detected_top() -> None:
    expected = {
        "chain.in": net(["<port>.in"], ["chain.s1.g.t1"], aliases=["chain.s1.a"]),
        "chain.mid": net(["chain.s1.g.t0"], ["chain.s2.g.t1"], aliases=["chain.s1.y", "chain.s2.a"]),
        "chain.out": net(["chain.s2.g.t0"], ["<port>.out"], aliases=["chain.s2.y"]),
    }
    for order in (("lib_cells.v", "multi_top.v"), ("multi_top.v", "lib_cells.v")):
        graph = build(*order)
        assert graph.top == "chain"  # buf_stage is instantiated, chain is not
        assert connectivity(graph) == expected
        assert cell_where(graph, "chain.s2.g") == where("lib_cells.v", 3, 7)
        assert sorted(graph.files) == sorted(str(FIXTURES / name) for name in order)


def test_top_chosen_among_several() -> None:
    with pytest.raises(InputError, match=r"several top modules \(alpha, beta\)"):
        build("two_tops.v")
    beta = build("two_tops.v", top="beta")
    assert (beta.top, beta.cell_names, beta.cell_kinds) == ("beta", ["beta.g"], ["and"])
    alpha = build("two_tops.v", top="alpha")
    assert (alpha.top, alpha.cell_names, alpha.cell_kinds) == ("alpha", ["alpha.g"], ["not"])
    # --top may also pick a module that another one instantiates
    stage = build("lib_cells.v", "multi_top.v", top="buf_stage")
    assert connectivity(stage) == {
        "buf_stage.a": net(["<port>.a"], ["buf_stage.g.t1"]),
        "buf_stage.y": net(["buf_stage.g.t0"], ["<port>.y"]),
    }


def test_indexed_selects_on_ascending_and_offset_ranges() -> None:
    graph = build("selects.v")
    s = "selects."
    assert connectivity(graph) == {
        # asc[1 +: 2] and asc[2 -: 2] are both asc[1:2]: MSB asc[1], LSB asc[2]
        f"{s}asc[3]": net(["<port>.asc[3]"]),
        f"{s}asc[2]": net(["<port>.asc[2]"], ["<port>.u[0]", "<port>.v[0]"], aliases=[f"{s}u[0]", f"{s}v[0]"]),
        f"{s}asc[1]": net(["<port>.asc[1]"], ["<port>.u[1]", "<port>.v[1]"], aliases=[f"{s}u[1]", f"{s}v[1]"]),
        f"{s}asc[0]": net(["<port>.asc[0]"], ["<port>.e"], aliases=[f"{s}e"]),
        # d[9 +: 2] = d[10:9]; w is [0:1], so its MSB w[0] is d[10]
        f"{s}d[8]": net(["<port>.d[8]"]),
        f"{s}d[9]": net(["<port>.d[9]"], ["<port>.w[1]"], aliases=[f"{s}w[1]"]),
        f"{s}d[10]": net(["<port>.d[10]"], ["<port>.w[0]"], aliases=[f"{s}w[0]"]),
        f"{s}d[11]": net(["<port>.d[11]"], ["<port>.f"], aliases=[f"{s}f"]),
    }
    assert graph.cell_count == 0  # every assign here is a pure alias


def test_timing_only_cell_model_is_a_black_box() -> None:
    """Ports plus a specify block: no logic to flatten, so the cell stays, with its pins."""
    graph = build("timing_cell.v")
    assert cell_facts(graph, "top.u") == ("DELAY_BUF", CellClass.BLACKBOX, ArcMode.FULL)
    assert connectivity(graph) == {
        "top.a": net(["<port>.a"], ["top.u.A"]),
        "top.y": net(["top.u.Y"], ["<port>.y"]),
    }


def test_parameters_and_signed_literals_as_values() -> None:
    graph = build("parameter_values.v")
    p = "parameter_values."

    def tied(name: str, value: str) -> dict[str, list[str]]:
        return net([f"{p}{name}=1'b{value}.t0"], [f"<port>.{name}"])

    expected = {f"{p}a": net(["<port>.a"], [f"{p}g.t1"]), f"{p}z": net([f"{p}g.t0"], ["<port>.z"])}
    # y = INIT = 2'b10
    expected.update({f"{p}y[{i}]": tied(f"y[{i}]", bit) for i, bit in enumerate(reversed("10"))})
    # k = INIT + 1 = 2 + 1 = 4'b0011 (folded by slang)
    expected.update({f"{p}k[{i}]": tied(f"k[{i}]", bit) for i, bit in enumerate(reversed("0011"))})
    # 8'shFD is the bit pattern 1111_1101, negative as a signed number
    expected.update({f"{p}s[{i}]": tied(f"s[{i}]", bit) for i, bit in enumerate(reversed("11111101"))})
    assert connectivity(graph) == expected
    # the localparam on a gate terminal is a constant pin, like a literal there
    g = cell(graph, f"{p}g")
    assert [int(graph.pin_net[pin]) for pin in graph.pins_of(g)][2] == CONST1
    assert graph.diagnostics == []


def test_user_defined_primitive_and_switches() -> None:
    graph = build("switches.v")
    w = "switches."
    # a combinational UDP: terminal 0 is the output, the rest inputs (IEEE 1364 section 8)
    assert cell_facts(graph, f"{w}m") == ("pick", CellClass.GATE, ArcMode.FULL)
    # tran and rtranif1: both data terminals are inout; the control of rtranif1 an input
    assert cell_facts(graph, f"{w}t") == ("tran", CellClass.GATE, ArcMode.FULL)
    assert cell_facts(graph, f"{w}r") == ("rtranif1", CellClass.GATE, ArcMode.FULL)
    io1 = ["<port>.io1", f"{w}r.t0", f"{w}t.t0"]
    io2 = ["<port>.io2", f"{w}r.t1", f"{w}t.t1"]
    assert connectivity(graph) == {
        f"{w}s": net(["<port>.s"], [f"{w}m.t1"]),
        f"{w}a": net(["<port>.a"], [f"{w}m.t2"]),
        f"{w}b": net(["<port>.b"], [f"{w}m.t3"]),
        f"{w}en": net(["<port>.en"], [f"{w}r.t2"]),
        f"{w}y": net([f"{w}m.t0"], ["<port>.y"]),
        f"{w}io1": net(io1, io1),
        f"{w}io2": net(io2, io2),
    }


def test_unpacked_array_written_through_computed_index() -> None:
    """``mem[wa] <= d`` may write any of the four elements; the index itself is only read."""
    graph = build("register_file.v")
    r = "register_file."
    process = f"{r}process@4:3"
    assert cell_facts(graph, process) == ("sequential", CellClass.SEQUENTIAL, ArcMode.NONE)
    assert connectivity(graph) == {
        f"{r}clk": net(["<port>.clk"], [f"{process}.clk"]),
        f"{r}wa[0]": net(["<port>.wa[0]"], [f"{process}.wa[0]"]),
        f"{r}wa[1]": net(["<port>.wa[1]"], [f"{process}.wa[1]"]),
        f"{r}d": net(["<port>.d"], [f"{process}.d"]),
        # q = mem[2] is a pure alias; q, a port declared first, names the net
        f"{r}q": net([f"{process}.mem[2]"], ["<port>.q"], aliases=[f"{r}mem[2]"]),
        **{f"{r}mem[{i}]": net([f"{process}.mem[{i}]"]) for i in (0, 1, 3)},
    }
    assert graph.diagnostics == []
