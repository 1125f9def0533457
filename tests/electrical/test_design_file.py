"""The design file: the invented demo loads to exact values; every mistake is one located line."""

from __future__ import annotations

import dataclasses
import textwrap
from pathlib import Path

import pytest

from linter.electrical import design_file
from linter.electrical.design_file import Design, load_design
from linter.electrical.design_model import (
    AssignmentRule,
    NetlistSpec,
    NetTiming,
    NoiseMarginPolicy,
    NoiseMarginRequirement,
    PullUp,
    Waiver,
)
from linter.electrical.family import OutputKind
from linter.electrical.family_loader import FamilyCatalogue, load_families
from linter.electrical.name_patterns import NamePattern
from linter.errors import InputError
from linter.netlist.graph import PinDirection
from linter.yamlio import load_yaml_file, load_yaml_text

FIXTURES = Path(__file__).resolve().parent / "fixtures"
DEMO = FIXTURES / "demo"
ERROR_FILES = sorted((FIXTURES / "design_errors").glob("*.yaml"))
NO_SHIPPED = FamilyCatalogue({})  # the demo brings its own invented families


@pytest.fixture(scope="module")
def demo() -> Design:
    return load_design(DEMO / "design.yaml", NO_SHIPPED)


def _expected(path: Path) -> str:
    line = path.read_text(encoding="utf-8").splitlines()[1]
    assert line.startswith("# expect: "), f"{path.name} must say on line 2 what error it expects"
    return line.removeprefix("# expect: ").replace("{fixtures}", str(FIXTURES))


def _pattern_texts(patterns: tuple[NamePattern, ...]) -> list[str]:
    return [pattern.text for pattern in patterns]


def test_netlist_paths_are_joined_to_the_design_folder(demo: Design) -> None:
    assert demo.path == DEMO / "design.yaml"
    assert demo.description == "Invented demo board (test fixture)"
    assert demo.netlist == NetlistSpec(
        files=(DEMO / "demo_top.v",),
        top="demo_top",
        include_dirs=(DEMO / "include",),
        defines=(("DEMO_FAST", None), ("DEMO_REV", "2")),
    )
    assert demo.family_dirs == (DEMO / "families",)
    assert demo.family_files == (DEMO / "extra" / "DEMO_OD_BUS.yaml",)
    assert demo.part_libraries == (DEMO / "parts" / "demo_parts.yaml",)


def test_rail_corners(demo: Design) -> None:
    corners = {name: (rail.minimum, rail.nominal, rail.maximum) for name, rail in demo.rails.items()}
    assert corners == {
        "VCC3V3": (3.135, 3.3, 3.465),  # 3.3 V +/- 5 %: 3.3 x 0.95 and 3.3 x 1.05 (arithmetic)
        "VCC1V8": (1.65, 1.8, 1.95),  # the JESD8-7A normal range, from memory
        "VBAT": (3.0, 3.6, 4.2),  # one lithium-ion cell, common practice; nominal is the midpoint
    }
    assert demo.rail("VCC3V3").corners() == (3.135, 3.465)
    where = demo.rails["VCC1V8"].location
    assert (where.file, where.line, where.column) == (str(DEMO / "design.yaml"), 14, 11)


def test_power_states(demo: Design) -> None:
    assert [state.name for state in demo.power_states] == ["run", "standby", "ship"]
    assert dict(demo.power_state("standby").rail_on) == {"VCC3V3": False, "VCC1V8": True, "VBAT": True}
    assert demo.power_state("ship").rails_on == ("VBAT",)
    with pytest.raises(KeyError):
        demo.power_state("hibernate")


def test_families_are_the_design_folders_and_files(demo: Design) -> None:
    assert list(demo.families) == ["DEMO_CMOS18", "DEMO_CMOS33", "DEMO_OD_BUS", "DEMO_XLATE"]
    assert demo.families["DEMO_OD_BUS"].output_kind is OutputKind.OPEN_DRAIN


def test_shipped_families_are_added_by_default() -> None:
    shipped = load_families()
    design = load_design(DEMO / "design.yaml")
    assert sorted(design.families) == sorted([*shipped, "DEMO_CMOS18", "DEMO_CMOS33", "DEMO_OD_BUS", "DEMO_XLATE"])


def test_a_design_using_only_shipped_families() -> None:
    design = load_design(FIXTURES / "assign" / "shipped.yaml")
    assert design.default == AssignmentRule(family="LVCMOS33", rail="VCC3V3")
    assert design.modules["sensor_glue"] == AssignmentRule(family="LVCMOS18", rail="VCC1V8")
    assert (design.rails["VCC3V3"].minimum, design.rails["VCC3V3"].maximum) == (3.0, 3.6)  # JESD8C.01, from memory
    assert design.noise_margin == NoiseMarginPolicy(NoiseMarginRequirement(volts=0.0))
    assert design.parts.parts == {}
    assert design.power_states == ()


def test_assignment_rules(demo: Design) -> None:
    assert demo.default == AssignmentRule(family="DEMO_CMOS33", rail="VCC3V3")
    assert dict(demo.modules) == {"sensor_glue": AssignmentRule(family="DEMO_CMOS18", rail="VCC1V8")}
    assert demo.cells == (
        AssignmentRule(rails={"VCCA": "VCC1V8", "VCCB": "VCC3V3"}, pattern=NamePattern("demo_top.u_xl_rx")),
        AssignmentRule(rails={"VCCA": "VCC3V3", "VCCB": "VCC1V8"}, pattern=NamePattern("demo_top.u_xl_tx")),
        AssignmentRule(family="DEMO_CMOS33", rail="VCC3V3", pattern=NamePattern("demo_top.u_glue.g_keep")),
    )
    assert list(demo.parts.parts) == ["ctrl_mcu_io", "xlate_2rail_1b", "bus_buf_4", "dff_r", "pull_4k7", "pulldown"]


def test_ports(demo: Design) -> None:
    assert [(rule.pattern.text, rule.family, rule.rail, rule.direction, rule.output) for rule in demo.ports] == [
        ("sens_*", "DEMO_CMOS18", "VCC1V8", None, None),
        ("i2c_sda", "DEMO_OD_BUS", "VCC3V3", PinDirection.INOUT, OutputKind.OPEN_DRAIN),
        ("*", "DEMO_CMOS33", "VCC3V3", None, None),
    ]


def test_net_settings(demo: Design) -> None:
    assert demo.pull_ups == (PullUp(NamePattern("demo_top.i2c_sda"), 2200.0, "VCC3V3"),)
    # "10%" is a fraction of the swing: 0.33 V on a 3.3 V swing
    assert demo.noise_margin.default == NoiseMarginRequirement(fraction_of_swing=0.1)
    assert demo.noise_margin.default.required_v(3.3) == 0.33
    assert demo.noise_margin.nets == ((NamePattern("demo_top.clk"), NoiseMarginRequirement(volts=0.4)),)
    assert demo.noise_margin.nets[0][1].required_v(3.3) == 0.4
    # YAML 1.1 reads 10e6 and 20e-9 as text; they are accepted as numbers
    assert demo.net_timing == (
        NetTiming(NamePattern("demo_top.sens_*"), max_rate_hz=10e6, max_delay_s=20e-9),
        NetTiming(NamePattern("demo_top.spi_miso"), max_rate_hz=25e6),
    )


def test_planner_hints_and_waivers(demo: Design) -> None:
    assert _pattern_texts(demo.movable_cells) == ["demo_top.u_glue.*"]
    assert demo.waivers == (
        Waiver(
            "input-floating", NamePattern("demo_top.spare_in"), "net",
            "Invented example; the spare pad is tied low on the board.",
        ),
    )
    waiver = demo.waivers[0]
    assert (waiver.location.line, waiver.location.column) == (46, 5)  # the list item
    assert (waiver.pattern.location.line, waiver.pattern.location.column) == (47, 10)


def test_percent_noise_margin_scalar() -> None:
    design = load_design(FIXTURES / "assign" / "no_default.yaml", NO_SHIPPED)
    assert design.noise_margin == NoiseMarginPolicy(NoiseMarginRequirement(fraction_of_swing=0.15))
    assert design.noise_margin.default.required_v(1.8) == 0.27
    assert design.default is None


def test_design_is_frozen(demo: Design) -> None:
    with pytest.raises(dataclasses.FrozenInstanceError):
        demo.description = "changed"  # type: ignore[misc]
    with pytest.raises(TypeError):
        demo.rails["VCC5"] = demo.rails["VCC3V3"]  # type: ignore[index]
    with pytest.raises(TypeError):
        demo.cells[0].rails["VCCA"] = "VBAT"  # type: ignore[index]


def test_docstring_example_is_the_demo_fixture() -> None:
    """The user documentation's example must stay a design file that loads."""
    doc = design_file.__doc__ or ""
    block = doc.split(".. code-block:: yaml", 1)[1].split("\n\n", 2)[1]
    example = load_yaml_text(textwrap.dedent(block), "<docstring>")
    fixture = load_yaml_file(DEMO / "design.yaml")
    assert example == fixture


@pytest.mark.parametrize("path", ERROR_FILES, ids=[path.stem for path in ERROR_FILES])
def test_bad_design_files_give_one_line_with_place(path: Path) -> None:
    with pytest.raises(InputError) as caught:
        load_design(path, NO_SHIPPED)
    text = caught.value.one_line()
    assert "\n" not in text
    assert text == _expected(path)


def test_missing_design_file() -> None:
    with pytest.raises(InputError) as caught:
        load_design(FIXTURES / "no_such_design.yaml", NO_SHIPPED)
    assert caught.value.one_line() == f"levelcross: error: no such file '{FIXTURES / 'no_such_design.yaml'}'"
