"""Random small designs for the planner's property tests (INVENTED netlists with no function).

A design is a few black-box drivers on random rails, a few glue gates reading earlier nets, and
a few black-box receivers reading random nets. Every rail has one family (LVCMOS18 on VCC1V8,
LVCMOS33 on VCC3V3, CMOS5 on VCC5V0; JESD8 levels from memory), so a gate moved to a rail takes
that rail's family, as the planner's re-homing rule says. Optionally some drivers are open-drain
(OD-TWOWIRE, no pull-up) and some nets carry ``net_timing`` (slow: dividers fit; fast: only the
fast translators do).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

from hypothesis import strategies as st

FAMILY = {"VCC1V8": "LVCMOS18", "VCC3V3": "LVCMOS33", "VCC5V0": "CMOS5"}
PARTS = Path(__file__).parent / "fixtures"


@dataclass
class RandomDesign:
    rails: tuple[str, ...]
    drivers: list[tuple[str, bool]]  # (rail, open-drain)
    gates: list[tuple[str, str, tuple[int, ...]]]  # (kind, rail, input nets)
    receivers: list[tuple[str, int]]  # (rail, net)
    timing: dict[int, float] = field(default_factory=dict)  # net -> max_rate_hz
    movable: bool = True

    @property
    def nets(self) -> int:
        return len(self.drivers) + len(self.gates)

    def verilog(self) -> str:
        lines = ["// INVENTED random test design (no function)", "module rnd_top (output done);"]
        lines.append("  wire " + ", ".join(f"n{i}" for i in range(self.nets)) + ";")
        for index, (_, open_drain) in enumerate(self.drivers):
            lines.append(f"  {'od1' if open_drain else 'drv1'} u_d{index} (.Q(n{index}));")
        for index, (kind, _, inputs) in enumerate(self.gates):
            out = len(self.drivers) + index
            lines.append(f"  {kind} g{index} (n{out}, {', '.join(f'n{i}' for i in inputs)});")
        for index, (_, net) in enumerate(self.receivers):
            lines.append(f"  rcv1 u_r{index} (.D(n{net}));")
        lines += ["  assign done = 1'b0;", "endmodule", ""]
        return "\n".join(lines)

    def design_yaml(self, netlist: str, parts_yaml: str, parts_v: str, rails: dict[int, str] | None = None) -> str:
        """The design file; ``rails`` re-homes gates (gate index -> rail) and turns movable off."""
        rails = rails or {}
        lines = ["# INVENTED random test design", "description: INVENTED random design for the planner tests",
                 f"netlist: {{files: [{netlist}, {parts_v}], top: rnd_top}}", f"part_libraries: [{parts_yaml}]",
                 "rails:"]
        lines += [f"  {rail}: {{nominal: {nominal}, tolerance_percent: 5}}"
                  for rail, nominal in (("VCC1V8", 1.8), ("VCC3V3", 3.3), ("VCC5V0", 5.0))]
        lines.append("cells:")
        for index, (rail, open_drain) in enumerate(self.drivers):
            family = "OD-TWOWIRE" if open_drain else FAMILY[rail]
            lines.append(f"  rnd_top.u_d{index}: {{family: {family}, rail: {rail}}}")
        for index, (_, rail, _) in enumerate(self.gates):
            rail = rails.get(index, rail)
            lines.append(f"  rnd_top.g{index}: {{family: {FAMILY[rail]}, rail: {rail}}}")
        for index, (rail, _) in enumerate(self.receivers):
            lines.append(f"  rnd_top.u_r{index}: {{family: {FAMILY[rail]}, rail: {rail}}}")
        lines.append('ports: {"*": {family: LVCMOS33, rail: VCC3V3}}')
        if self.timing:
            lines.append("net_timing:")
            lines += [f"  rnd_top.n{net}: {{max_rate_hz: {rate}}}" for net, rate in sorted(self.timing.items())]
        if self.movable and self.gates and not rails:
            lines.append("movable_cells: [rnd_top.g*]")
        return "\n".join(lines) + "\n"

    def write(self, folder: Path, rails: dict[int, str] | None = None) -> Path:
        folder.mkdir(parents=True, exist_ok=True)
        (folder / "rnd.v").write_text(self.verilog())
        (folder / "parts.v").write_text((PARTS / "parts.v").read_text())
        (folder / "parts.yaml").write_text((PARTS / "parts.yaml").read_text())
        path = folder / "design.yaml"
        path.write_text(self.design_yaml("rnd.v", "parts.yaml", "parts.v", rails))
        return path


@st.composite
def random_designs(draw, movable: bool = True, extras: bool = False, max_gates: int = 3) -> RandomDesign:
    rails = draw(st.sampled_from([("VCC1V8", "VCC3V3"), ("VCC1V8", "VCC3V3", "VCC5V0")]))
    drivers = []
    for _ in range(draw(st.integers(1, 3))):
        rail = draw(st.sampled_from(rails))
        open_drain = extras and rail != "VCC1V8" and draw(st.booleans())
        drivers.append((rail, open_drain))
    gates = []
    for index in range(draw(st.integers(0 if not movable else 1, max_gates))):
        available = len(drivers) + index
        kind = draw(st.sampled_from(["buf", "not", "and"]))
        count = 2 if kind == "and" else 1
        inputs = tuple(draw(st.integers(0, available - 1)) for _ in range(count))
        gates.append((kind, draw(st.sampled_from(rails)), inputs))
    nets = len(drivers) + len(gates)
    receivers = [(draw(st.sampled_from(rails)), draw(st.integers(0, nets - 1))) for _ in range(draw(st.integers(1, 5)))]
    timing = {}
    if extras:
        for net in range(nets):
            choice = draw(st.sampled_from([None, None, 10.0e3, 200.0e6]))
            if choice is not None:
                timing[net] = choice
    return RandomDesign(rails, drivers, gates, receivers, timing, movable)
