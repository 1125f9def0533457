"""Part libraries: pins, output kinds, rails and families of the invented demo parts."""

from __future__ import annotations

from pathlib import Path

import pytest

from linter.electrical.family import OutputKind
from linter.electrical.parts import (
    Part,
    PartLibrary,
    Pin,
    PullResistor,
    load_part_library,
    merge_part_libraries,
)
from linter.errors import InputError
from linter.netlist.graph import PinDirection

FIXTURES = Path(__file__).resolve().parent / "fixtures"
DEMO_PARTS = FIXTURES / "demo" / "parts" / "demo_parts.yaml"
ERROR_FILES = sorted((FIXTURES / "part_errors").glob("*.yaml"))
DEMO_FAMILIES = {"DEMO_CMOS33", "DEMO_CMOS18", "DEMO_XLATE", "DEMO_OD_BUS"}


@pytest.fixture(scope="module")
def demo() -> PartLibrary:
    return load_part_library(DEMO_PARTS, DEMO_FAMILIES)


def _expected(path: Path) -> str:
    line = path.read_text(encoding="utf-8").splitlines()[1]
    assert line.startswith("# expect: "), f"{path.name} must say on line 2 what error it expects"
    return line.removeprefix("# expect: ").replace("{fixtures}", str(FIXTURES))


def _shape(pin: Pin) -> tuple[object, ...]:
    return (pin.direction, pin.output, pin.family, pin.rail, pin.clock)


def test_library_lists_its_parts_in_file_order(demo: PartLibrary) -> None:
    assert list(demo.parts) == ["ctrl_mcu_io", "xlate_2rail_1b", "bus_buf_4", "dff_r", "pull_4k7", "pulldown"]
    assert demo.files == (str(DEMO_PARTS),)
    assert "dff_r" in demo and "nand" not in demo
    assert demo.get("nand") is None
    assert demo.rail_parameters() == frozenset({"VCCA", "VCCB"})


def test_single_supply_part_pins(demo: PartLibrary) -> None:
    part = demo.parts["ctrl_mcu_io"]
    assert part.family == "DEMO_CMOS33"
    assert part.rail_parameters == ()
    assert part.resistor is None
    assert part.description == "Invented 3.3 V controller I/O block"
    assert {name: _shape(pin) for name, pin in part.pins.items()} == {
        "clk": (PinDirection.IN, None, None, None, True),
        "rx": (PinDirection.IN, None, None, None, False),
        # an output pin with no 'output' key drives both ways; an inout pin can also let go
        "tx": (PinDirection.OUT, OutputKind.PUSH_PULL, None, None, False),
        "irq_n": (PinDirection.OUT, OutputKind.OPEN_DRAIN, None, None, False),
        "sda": (PinDirection.INOUT, OutputKind.OPEN_DRAIN, "DEMO_OD_BUS", None, False),
        "gpio": (PinDirection.INOUT, OutputKind.TRI_STATE, None, None, False),
    }
    assert part.location is not None and (part.location.line, part.location.column) == (4, 3)
    assert (part.pins["sda"].location.line, part.pins["sda"].location.column) == (12, 7)


def test_dual_supply_part_powers_each_side_from_its_own_rail_parameter(demo: PartLibrary) -> None:
    part = demo.parts["xlate_2rail_1b"]
    assert part.rail_parameters == ("VCCA", "VCCB")
    assert part.family == "DEMO_XLATE"
    assert {name: pin.rail for name, pin in part.pins.items()} == {"A": "VCCA", "OE": "VCCA", "B": "VCCB"}
    assert part.pins["B"].output is OutputKind.PUSH_PULL
    assert part.sequential is False


def test_clock_pins_make_a_part_sequential(demo: PartLibrary) -> None:
    assert demo.parts["dff_r"].sequential is True
    assert demo.parts["dff_r"].pins["C"].clock is True
    assert demo.parts["ctrl_mcu_io"].sequential is True
    assert demo.parts["bus_buf_4"].sequential is False


def test_resistor_parts(demo: PartLibrary) -> None:
    pull_up = demo.parts["pull_4k7"]
    assert pull_up.resistor == PullResistor("up", 4700.0)
    # a resistor terminal defaults to inout and takes no output kind
    assert _shape(pull_up.pins["T"]) == (PinDirection.INOUT, None, None, None, False)
    pull_down = demo.parts["pulldown"]  # a gate keyword as a part; primitive terminals are "t0", "t1", ...
    assert pull_down.resistor == PullResistor("down", 100000.0)
    assert list(pull_down.pins) == ["t0"]


def test_bus_bits_find_their_pin(demo: PartLibrary) -> None:
    part = demo.parts["bus_buf_4"]
    assert part.pin("D[2]") is part.pins["D"]
    assert part.pin("Q[10]") is part.pins["Q"]
    assert part.pin("EN") is part.pins["EN"]
    assert part.pin("D[x]") is None
    assert part.pin("NC") is None


def test_families_are_checked_only_when_known_families_are_given() -> None:
    unchecked = load_part_library(FIXTURES / "part_errors" / "unknown_family.yaml")
    assert unchecked.parts["buf_a"].pins["Y"].family == "DEMO_CMOS25"


def test_merging_libraries_keeps_order_and_files(demo: PartLibrary) -> None:
    more = load_part_library(FIXTURES / "parts_extra" / "more_parts.yaml")
    merged = merge_part_libraries([demo, more])
    assert list(merged.parts)[-2:] == ["pulldown", "level_probe"]
    assert merged.files == (str(DEMO_PARTS), str(FIXTURES / "parts_extra" / "more_parts.yaml"))
    assert merged.parts["level_probe"] == Part(
        "level_probe",
        {"P": Pin("P", PinDirection.IN)},
        family="DEMO_CMOS18",
        description="Invented input-only probe point",
    )


def test_a_part_defined_in_two_libraries_is_an_error(demo: PartLibrary) -> None:
    duplicate = FIXTURES / "parts_extra" / "duplicate_of_demo.yaml"
    with pytest.raises(InputError) as caught:
        merge_part_libraries([demo, load_part_library(duplicate)])
    assert caught.value.one_line() == (
        f"{duplicate}:3:3: error: part 'bus_buf_4' is defined twice (first at {DEMO_PARTS}:22:3)"
    )


def test_missing_library_file() -> None:
    with pytest.raises(InputError) as caught:
        load_part_library(FIXTURES / "parts_extra" / "no_such_library.yaml")
    assert caught.value.one_line() == (
        f"levelcross: error: no such file '{FIXTURES / 'parts_extra' / 'no_such_library.yaml'}'"
    )


@pytest.mark.parametrize("path", ERROR_FILES, ids=[path.stem for path in ERROR_FILES])
def test_bad_part_libraries_give_one_line_with_place(path: Path) -> None:
    with pytest.raises(InputError) as caught:
        load_part_library(path, DEMO_FAMILIES)
    text = caught.value.one_line()
    assert "\n" not in text
    assert text == _expected(path)
