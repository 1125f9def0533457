"""Assignment: which family and rail each cell, pin and port gets, and in what precedence."""

from __future__ import annotations

from pathlib import Path

import pytest

from linter.electrical.assignment import (
    AssignmentResolver,
    CellAssignment,
    PinAssignment,
    PortAssignment,
    TimingNeed,
)
from linter.electrical.design_file import load_design
from linter.electrical.design_model import NoiseMarginRequirement
from linter.electrical.family import OutputKind
from linter.electrical.family_loader import FamilyCatalogue
from linter.electrical.name_patterns import NamePattern, PatternTable, parse_pattern
from linter.errors import InputError, SourceLocation
from linter.netlist.graph import PinDirection

FIXTURES = Path(__file__).resolve().parent / "fixtures"
NO_SHIPPED = FamilyCatalogue({})
DEMO_MODULES = {"demo_top": "demo_top", "demo_top.u_glue": "sensor_glue"}
PRECEDENCE_MODULES = {
    "demo_top.u_core": "core",
    "demo_top.u_core2": "core",
    "demo_top.u_pads": "pad_ring",
    "demo_top.u_pads.u_cell": "pad_cell",  # no module rule: the enclosing pad_ring's applies
}


@pytest.fixture(scope="module")
def demo() -> AssignmentResolver:
    return AssignmentResolver(load_design(FIXTURES / "demo" / "design.yaml", NO_SHIPPED), DEMO_MODULES)


@pytest.fixture(scope="module")
def rules() -> AssignmentResolver:
    design = load_design(FIXTURES / "assign" / "precedence.yaml", NO_SHIPPED)
    return AssignmentResolver(design, PRECEDENCE_MODULES)


# ---- the demo design ---------------------------------------------------------------------------
def test_demo_cells(demo: AssignmentResolver) -> None:
    assert demo.cell("demo_top.g_top", "and", "demo_top") == CellAssignment("DEMO_CMOS33", "VCC3V3")
    assert demo.cell("demo_top.u_glue.g_nand", "nand", "demo_top.u_glue") == CellAssignment("DEMO_CMOS18", "VCC1V8")
    # an exact cell rule beats the module default of sensor_glue
    assert demo.cell("demo_top.u_glue.g_keep", "buf", "demo_top.u_glue") == CellAssignment("DEMO_CMOS33", "VCC3V3")
    # a gate keyword named in the part library is that part
    assert demo.cell("demo_top.u_glue.g_pd", "pulldown", "demo_top.u_glue") == CellAssignment(
        "DEMO_CMOS18", "VCC1V8", "pulldown"
    )


def test_demo_translators_bind_each_side_per_cell(demo: AssignmentResolver) -> None:
    rx = demo.cell("demo_top.u_xl_rx", "xlate_2rail_1b", "demo_top")
    tx = demo.cell("demo_top.u_xl_tx", "xlate_2rail_1b", "demo_top")
    assert rx.rail_bindings == (("VCCA", "VCC1V8"), ("VCCB", "VCC3V3"))
    assert tx.rail_bindings == (("VCCA", "VCC3V3"), ("VCCB", "VCC1V8"))
    assert [(demo.pin(rx, pin).family, demo.pin(rx, pin).rail) for pin in ("A", "OE", "B")] == [
        ("DEMO_XLATE", "VCC1V8"), ("DEMO_XLATE", "VCC1V8"), ("DEMO_XLATE", "VCC3V3"),
    ]
    assert [demo.pin(tx, pin).rail for pin in ("A", "OE", "B")] == ["VCC3V3", "VCC3V3", "VCC1V8"]


def test_demo_part_pins(demo: AssignmentResolver) -> None:
    mcu = demo.cell("demo_top.u_mcu", "ctrl_mcu_io", "demo_top")
    assert mcu == CellAssignment("DEMO_CMOS33", "VCC3V3", "ctrl_mcu_io")
    sda = demo.pin(mcu, "sda")
    assert (sda.family, sda.rail, sda.pin.output) == ("DEMO_OD_BUS", "VCC3V3", OutputKind.OPEN_DRAIN)
    assert demo.pin(mcu, "clk").pin.clock is True


def test_demo_ports(demo: AssignmentResolver) -> None:
    assert demo.port("clk") == PortAssignment("DEMO_CMOS33", "VCC3V3")
    assert demo.port("sens_data") == PortAssignment("DEMO_CMOS18", "VCC1V8")
    assert demo.port("i2c_sda") == PortAssignment("DEMO_OD_BUS", "VCC3V3", PinDirection.INOUT, OutputKind.OPEN_DRAIN)


def test_demo_netlist_through_the_front_end(demo: AssignmentResolver) -> None:
    """The demo netlist read by the real front end: its names and module map fit the resolver."""
    from linter.netlist import build_design

    spec = demo.design.netlist
    graph = build_design(list(spec.files), top=spec.top, include_dirs=list(spec.include_dirs))
    resolver = AssignmentResolver(demo.design, graph.instance_modules)
    cells = resolver.cells(graph.cell_names, graph.cell_kinds, graph.cell_module)
    assert {name: (cell.family, cell.rail, cell.part) for name, cell in zip(graph.cell_names, cells)} == {
        "demo_top.u_mcu": ("DEMO_CMOS33", "VCC3V3", "ctrl_mcu_io"),
        "demo_top.u_xl_rx": ("DEMO_CMOS33", "VCC3V3", "xlate_2rail_1b"),
        "demo_top.u_xl_tx": ("DEMO_CMOS33", "VCC3V3", "xlate_2rail_1b"),
        "demo_top.u_leds": ("DEMO_CMOS33", "VCC3V3", "bus_buf_4"),
        "demo_top.r_irq": ("DEMO_CMOS33", "VCC3V3", "pull_4k7"),
        "demo_top.g_top": ("DEMO_CMOS33", "VCC3V3", None),
        "demo_top.u_glue.g_nand": ("DEMO_CMOS18", "VCC1V8", None),
        "demo_top.u_glue.g_inv": ("DEMO_CMOS18", "VCC1V8", None),
        "demo_top.u_glue.g_keep": ("DEMO_CMOS33", "VCC3V3", None),
        "demo_top.u_glue.g_pd": ("DEMO_CMOS18", "VCC1V8", "pulldown"),
    }
    rx = graph.cell_names.index("demo_top.u_xl_rx")
    pins = {graph.pin_names[p]: resolver.pin(cells[rx], graph.pin_names[p]).rail for p in graph.pins_of(rx)}
    assert pins == {"A": "VCC1V8", "OE": "VCC1V8", "B": "VCC3V3"}
    leds = graph.cell_names.index("demo_top.u_leds")
    assert {resolver.pin(cells[leds], graph.pin_names[p]).pin.name for p in graph.pins_of(leds)} == {"D", "EN", "Q"}


# ---- precedence, setting by setting --------------------------------------------------------------
@pytest.mark.parametrize(
    ("name", "kind", "module_path", "expected"),
    [
        # design default only
        ("demo_top.g1", "and", "demo_top", CellAssignment("DEMO_CMOS33", "R_DEFAULT")),
        # module default beats design default; 'demo_top.u_core.*' must not catch 'u_core2'
        ("demo_top.u_core2.g1", "nand", "demo_top.u_core2", CellAssignment("DEMO_CMOS18", "R_MODULE")),
        # a glob beats the module default for the rail; the family still comes from the module
        ("demo_top.u_core.h1", "nand", "demo_top.u_core", CellAssignment("DEMO_CMOS18", "R_SHORT")),
        # the longer glob 'demo_top.u_core.g_*' beats 'demo_top.u_core.*'
        ("demo_top.u_core.g_y", "nand", "demo_top.u_core", CellAssignment("DEMO_CMOS18", "R_LONG")),
        # the exact name sets the family; the rail still comes from the longest glob
        ("demo_top.u_core.g_x", "nand", "demo_top.u_core", CellAssignment("DEMO_XLATE", "R_LONG")),
        # '*' crosses hierarchy levels: a cell two levels down is still covered
        ("demo_top.u_core.u_sub.g2", "or", "demo_top.u_core.u_sub", CellAssignment("DEMO_CMOS18", "R_SHORT")),
        # two globs of equal length (17 characters): the one written first wins
        ("demo_top.u_io.g_a", "buf", "demo_top.u_io", CellAssignment("DEMO_CMOS33", "R_FIRST")),
        ("demo_top.u_io.g_b", "buf", "demo_top.u_io", CellAssignment("DEMO_CMOS33", "R_SECOND")),
        # a module without a rule inherits the enclosing module's; family falls to the default
        ("demo_top.u_pads.u_cell.g1", "buf", "demo_top.u_pads.u_cell", CellAssignment("DEMO_CMOS33", "R_OUTER")),
        # a module path the caller did not map to a definition adds no module default
        ("demo_top.u_other.u_core.g1", "buf", "demo_top.u_other.u_core", CellAssignment("DEMO_CMOS33", "R_DEFAULT")),
        # an exact name holding brackets matches literally; '[[]' is a literal bracket in a glob
        ("demo_top.u_arr[0].g1", "buf", "demo_top.u_arr[0]", CellAssignment("DEMO_CMOS33", "R_EXACT")),
        ("demo_top.u_arr[1].g1", "buf", "demo_top.u_arr[1]", CellAssignment("DEMO_CMOS33", "R_SECOND")),
        # ... and still works as a glob, where '[0]' is the character set {0}
        ("demo_top.u_arr0.g1", "buf", "demo_top.u_arr0", CellAssignment("DEMO_CMOS33", "R_EXACT")),
        ("demo_top.u_arr2.g1", "buf", "demo_top.u_arr2", CellAssignment("DEMO_CMOS33", "R_DEFAULT")),
        # names are case-sensitive, as in Verilog
        ("demo_top.U_CORE.g_y", "nand", "demo_top.U_CORE", CellAssignment("DEMO_CMOS33", "R_DEFAULT")),
    ],
)
def test_cell_precedence(
    rules: AssignmentResolver, name: str, kind: str, module_path: str, expected: CellAssignment
) -> None:
    assert rules.cell(name, kind, module_path) == expected


def test_rule_part_and_bindings_merge_per_parameter(rules: AssignmentResolver) -> None:
    # 'demo_top.u_xl*' makes any module there the translator part and binds both sides
    xl1 = rules.cell("demo_top.u_xl1", "xl_generic", "demo_top")
    bindings = (("VCCA", "R_MODULE"), ("VCCB", "R_DEFAULT"))
    assert xl1 == CellAssignment("DEMO_CMOS33", "R_DEFAULT", "xlate_2rail_1b", bindings)
    # the exact rule rebinds VCCB only; VCCA still comes from the glob
    xl2 = rules.cell("demo_top.u_xl2", "xl_generic", "demo_top")
    assert xl2.rail_bindings == (("VCCA", "R_MODULE"), ("VCCB", "R_EXACT"))
    assert [rules.pin(xl2, pin).rail for pin in ("A", "B")] == ["R_MODULE", "R_EXACT"]


def test_an_unbound_rail_parameter_leaves_its_pins_unassigned(rules: AssignmentResolver) -> None:
    half = rules.cell("demo_top.u_half", "xl_generic", "demo_top")
    assert half.rail_bindings == (("VCCA", "R_MODULE"),)
    side_a = rules.design.parts.parts["xlate_2rail_1b"].pins["A"]
    assert rules.pin(half, "A") == PinAssignment("DEMO_XLATE", "R_MODULE", side_a)
    assert rules.pin(half, "B").rail is None  # not silently the cell's rail


def test_pin_family_precedence(rules: AssignmentResolver) -> None:
    # ctrl_mcu_io sits in module 'core' (family DEMO_CMOS18) but names its own family
    mcu = rules.cell("demo_top.u_core2.u_mcu", "ctrl_mcu_io", "demo_top.u_core2")
    assert mcu == CellAssignment("DEMO_CMOS18", "R_MODULE", "ctrl_mcu_io")
    assert (rules.pin(mcu, "tx").family, rules.pin(mcu, "tx").rail) == ("DEMO_CMOS33", "R_MODULE")  # part
    assert rules.pin(mcu, "sda").family == "DEMO_OD_BUS"  # the pin's own family
    # a pin the part does not list keeps the part's family and the cell's rail
    assert rules.pin(mcu, "nc") == PinAssignment("DEMO_CMOS33", "R_MODULE", None)
    # a part without a family: pins take the cell's; bus bits find their pin
    buf = rules.cell("demo_top.u_core2.u_buf", "bus_buf_4", "demo_top.u_core2")
    bit = rules.pin(buf, "D[2]")
    assert (bit.family, bit.rail, bit.pin.name) == ("DEMO_CMOS18", "R_MODULE", "D")
    # a cell with no part: every pin is the cell's
    gate = rules.cell("demo_top.g1", "and", "demo_top")
    assert rules.pin(gate, "t1") == PinAssignment("DEMO_CMOS33", "R_DEFAULT", None)


def test_ports_merge_setting_by_setting(rules: AssignmentResolver) -> None:
    # exact 'spi_miso' sets the family, 'spi_m*' the direction, 'spi_*' the rail
    assert rules.port("spi_miso") == PortAssignment("DEMO_CMOS18", "R_SHORT", PinDirection.IN)
    assert rules.port("spi_clk") == PortAssignment("DEMO_CMOS33", "R_SHORT")
    assert rules.port("i2c_scl") == PortAssignment(
        "DEMO_OD_BUS", "R_DEFAULT", PinDirection.INOUT, OutputKind.OPEN_DRAIN
    )
    assert rules.port("led") == PortAssignment("DEMO_CMOS33", "R_DEFAULT")


def test_net_rules(rules: AssignmentResolver) -> None:
    # both pull-ups on i2c_sda apply (in parallel), the exact one listed first
    assert [(p.ohms, p.rail) for p in rules.pull_ups("demo_top.i2c_sda")] == [
        (10000.0, "R_MODULE"), (4700.0, "R_DEFAULT"),
    ]
    assert [(p.ohms, p.rail) for p in rules.pull_ups("demo_top.i2c_scl")] == [(4700.0, "R_DEFAULT")]
    assert [p.ohms for p in rules.pull_ups("demo_top.bus[3]")] == [1000.0]  # through the bus name
    assert rules.pull_ups("demo_top.busy") == ()
    assert rules.noise_margin("demo_top.clk_slow") == NoiseMarginRequirement(volts=0.05)
    assert rules.noise_margin("demo_top.clk_fast") == NoiseMarginRequirement(fraction_of_swing=0.2)
    assert rules.noise_margin("demo_top.clk_fast").required_v(3.3) == 0.66
    assert rules.noise_margin("demo_top.data") == NoiseMarginRequirement(volts=0.1)
    assert rules.timing("demo_top.spi_clk") == TimingNeed(max_rate_hz=1e6, max_delay_s=5e-9)
    assert rules.timing("demo_top.spi_mosi") == TimingNeed(max_rate_hz=1e6)
    assert rules.timing("demo_top.clk") == TimingNeed()


def test_movable_cells_and_waivers(rules: AssignmentResolver) -> None:
    assert rules.is_movable("demo_top.u_core.g1") is True
    assert rules.is_movable("demo_top.u_core2.g1") is False
    floating = rules.waivers("input-floating", net="demo_top.spare_in", cell="demo_top.u_core.g1")
    assert [waiver.applies_to for waiver in floating] == ["net", "cell"]
    assert [w.rule for w in rules.waivers("over-voltage", net="demo_top.spare_in")] == ["over-voltage"]
    assert rules.waivers("over-voltage", net="demo_top.spare_out") == ()
    assert rules.waivers("input-floating", cell="demo_top.spare_in") == ()


def test_without_a_default_uncovered_cells_and_ports_stay_unassigned() -> None:
    design = load_design(FIXTURES / "assign" / "no_default.yaml", NO_SHIPPED)
    resolver = AssignmentResolver(design, DEMO_MODULES)
    assert resolver.cell("demo_top.g_top", "and", "demo_top") == CellAssignment(None, None)
    assert resolver.cell("demo_top.u_glue.g_inv", "not", "demo_top.u_glue") == CellAssignment("DEMO_CMOS18", None)
    assert resolver.cell("demo_top.u_glue.g_nand", "nand", "demo_top.u_glue") == CellAssignment("DEMO_CMOS18", "VCC1V8")
    assert resolver.port("clk") == PortAssignment()


def test_results_do_not_depend_on_query_order(rules: AssignmentResolver) -> None:
    design = rules.design
    queries = [
        ("demo_top.u_core.g_x", "nand", "demo_top.u_core"),
        ("demo_top.u_core.h1", "nand", "demo_top.u_core"),
        ("demo_top.u_pads.u_cell.g1", "buf", "demo_top.u_pads.u_cell"),
        ("demo_top.g1", "and", "demo_top"),
    ]
    forward = [AssignmentResolver(design, PRECEDENCE_MODULES).cell(*query) for query in queries]
    fresh = AssignmentResolver(design, PRECEDENCE_MODULES)
    backward = [fresh.cell(*query) for query in reversed(queries)][::-1]
    assert forward == backward


def test_a_hundred_thousand_cells_resolve(demo: AssignmentResolver) -> None:
    """Scale smoke test: 100 module instances of 1000 cells each (speed is in benchmarks/)."""
    definitions = dict(DEMO_MODULES)
    names, kinds, paths = [], [], []
    for block in range(100):
        path = f"demo_top.u_blk{block}"
        definitions[path] = "sensor_glue" if block % 2 else "other_block"
        for cell in range(1000):
            names.append(f"{path}.g{cell}")
            kinds.append("dff_r" if cell % 10 == 0 else "nand")
            paths.append(path)
    resolver = AssignmentResolver(demo.design, definitions)
    results = resolver.cells(names, kinds, paths)
    assert len(results) == 100_000
    assert sum(result.family == "DEMO_CMOS18" for result in results) == 50_000
    assert sum(result.rail == "VCC3V3" for result in results) == 50_000
    assert sum(result.part == "dff_r" for result in results) == 10_000
    assert results[1000] == CellAssignment("DEMO_CMOS18", "VCC1V8", "dff_r")
    assert results[1] == CellAssignment("DEMO_CMOS33", "VCC3V3")


# ---- patterns ----------------------------------------------------------------------------------
def test_pattern_table_precedence_and_prefix_screening() -> None:
    table = PatternTable([
        (NamePattern("top.*"), "short"),
        (NamePattern("top.u1.*"), "long"),
        (NamePattern("top.u1.g?"), "same-length-first"),
        (NamePattern("top.u1.?3"), "same-length-second"),
        (NamePattern("top.u1.g3"), "exact"),
    ])
    assert table.matching("top.u1.g3") == ["exact", "same-length-first", "same-length-second", "long", "short"]
    assert table.matching_under("top.u1.", "top.u1.g3") == table.matching("top.u1.g3")
    assert table.matching_under("top.u2.", "top.u2.g3") == ["short"]
    # a name outside the prefix it is said to be under is still matched against every glob
    assert table.matching_under("elsewhere.", "top.u1.g4") == ["same-length-first", "long", "short"]
    assert table.best("other") is None


def test_column_matching_equals_name_by_name() -> None:
    # every name against the patterns of the precedence test above, plus names no pattern
    # matches, names equal to a glob's text, a bracket set, and a glob with a wildcard inside
    patterns = ["top.*", "top.u1.*", "top.u1.g?", "top.u1.?3", "top.u1.g3", "top.u[12].h*", "x*", "*3"]
    table = PatternTable((NamePattern(text), text) for text in patterns)
    names = ["top.u1.g3", "top.u1.g4", "top.u1.h3", "top.u2.h7", "top.u1.*", "other", "xy", "top.u3.k", "x3"]
    group_of, groups = table.matching_groups(names)
    assert [groups[group] for group in group_of.tolist()] == [table.matching(name) for name in names]
    assert groups[group_of[1]] == ["top.u1.g?", "top.u1.*", "top.*"]  # top.u1.g4, most specific first
    assert groups[group_of[5]] == [] and group_of[5] == 0  # "other": nothing matches
    assert groups[group_of[4]][0] == "top.u1.*"  # spelt out exactly: the exact pattern first
    # names matched by the same patterns share one group; group 0 is "nothing matches"
    shared, shared_groups = table.matching_groups(["top.u1.k3", "top.u1.m3", "top.u1.k4"])
    assert shared[0] == shared[1] != shared[2] and len(shared_groups) == 3 and shared_groups[0] == []
    assert shared_groups[shared[0]] == ["top.u1.?3", "top.u1.*", "top.*", "*3"]
    assert shared_groups[shared[2]] == ["top.u1.*", "top.*"]


def test_column_matching_of_many_names_in_blocks() -> None:
    """More names than one numpy block: the answer for each equals matching it alone."""
    from linter.electrical import name_patterns

    table = PatternTable([(NamePattern("chip.g1*"), "g1"), (NamePattern("chip.g2?"), "g2x"), (NamePattern("*7"), "7")])
    names = [f"chip.g{i}" for i in range(name_patterns._BLOCK + 500)]
    group_of, groups = table.matching_groups(names)
    expected = [table.matching(name) for name in names]
    assert [groups[g] for g in group_of.tolist()] == expected
    assert len(groups) == len({tuple(values) for values in expected})
    empty_of, empty_groups = table.matching_groups([])
    assert empty_of.shape == (0,) and empty_groups == [[]]


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("top.u[0", "cells pattern 'top.u[0' has an unclosed '['"),
        ("", "cells pattern '' must be non-empty and contain no spaces"),
        ("top. u1", "cells pattern 'top. u1' must be non-empty and contain no spaces"),
    ],
)
def test_bad_patterns(text: str, message: str) -> None:
    with pytest.raises(InputError) as caught:
        parse_pattern(text, SourceLocation("design.yaml", 3, 5), "cells pattern")
    assert caught.value.one_line() == f"design.yaml:3:5: error: {message}"


def test_bracket_sets_are_valid_patterns() -> None:
    assert parse_pattern("top.u[]x]", SourceLocation("d.yaml"), "p").matches("top.u]")
    assert parse_pattern("top.u[!0-3]", SourceLocation("d.yaml"), "p").matches("top.u7")
    assert not parse_pattern("top.u[!0-3]", SourceLocation("d.yaml"), "p").matches("top.u2")

