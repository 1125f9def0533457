"""The design file: one YAML file per design that says what the netlist alone cannot.

It names the Verilog to read, the supply rails and power states, the part libraries, and which
logic family and rail every cell, part pin and top-level port gets. Paths are relative to the
design file's folder. Every mistake stops loading with one line ``file:line:col: error: ...``:
an unknown key (typos are caught), a wrong type, a missing required key, a family, rail or part
that is not declared, a file that does not exist, a waiver without a reason.

Keys (only ``netlist`` and ``rails`` are required)
--------------------------------------------------
``description``
    Free text.
``netlist``
    ``files`` (list, at least one; each must exist), ``top`` (module name), optional
    ``include_dirs`` (folders that must exist) and ``defines`` (name -> value, or ``null`` for a
    bare define).
``family_dirs``, ``family_files``
    Extra logic families (measured or custom) besides the shipped ``families/`` folder: folders
    of family files, or single files. A family name may be defined only once overall.
``part_libraries``
    Part library files (format in :mod:`linter.electrical.parts`); a part name may be defined once.
``rails``
    name -> ``{nominal, tolerance_percent}`` (3.3 V at 5 % spans 3.135 .. 3.465 V) or
    ``{minimum, maximum}`` with an optional ``nominal`` (default: the midpoint).
``power_states``
    name -> ``{default: on|off, rails: {RAIL: on|off}}``; every rail must end up on or off
    (format in :mod:`linter.electrical.power`).
``default``, ``modules``, ``cells``
    Assignment rules. ``default`` and each ``modules`` entry (keyed by Verilog module name) take
    ``family``, ``rail`` and ``rails``; ``cells`` entries (keyed by a hierarchical cell name or
    glob) also take ``part``. ``rails`` binds the rail parameters of dual-supply parts,
    ``{VCCA: VCC1V8, VCCB: VCC3V3}``; ``part`` makes the covered cells that part whatever their
    Verilog module is called.
``ports``
    Top-level port name or glob -> ``family``, ``rail``, ``direction`` (``in``, ``out``,
    ``inout``: as seen from the design, so ``in`` means the outside drives it) and ``output``
    (``push-pull``, ``open-drain``, ``tri-state``: how the outside drives). This describes what
    sits beyond the connector.
``pull_ups``
    Net name or glob -> ``{ohms, rail}``: resistors on the board. Every matching entry applies.
``noise_margin``
    The least margin a crossing must keep: volts (``0.1``) or a percentage of the signal swing
    (``"10%"``); or ``{default: ..., nets: {net glob: ...}}``. Without it, 0 V.
``net_timing``
    Net name or glob -> ``{max_rate_hz, max_delay_s}`` (either or both), for the planner.
``movable_cells``
    List of cell globs the planner may move to another rail.
``waivers``
    List of ``{rule, net: glob}`` or ``{rule, cell: glob}``, each with a non-empty ``reason``.

Patterns and precedence
-----------------------
Patterns are shell-style globs over the whole hierarchical name (``*`` crosses levels; see
:mod:`linter.electrical.name_patterns`). Net patterns also match each bit of a bus through the
bus name (``demo_top.led`` covers ``demo_top.led[2]``). Each setting of a cell (its family, its
rail, its part, each rail-parameter binding) is taken from the first of these that sets it:

1. the ``cells`` entry whose pattern is exactly the cell's hierarchical name;
2. matching ``cells`` globs, the longest pattern text first (equal length: the one written first);
3. the ``modules`` entry of the module the cell sits in; if that module has none, of the module
   instance enclosing it, and so on up to the top;
4. ``default``.

A pin of a part then takes the pin's own ``family``, else the part's, else the cell's; and its
rail from the binding of the pin's rail parameter (unassigned while unbound), else the cell's
rail. Ports, ``noise_margin`` nets and ``net_timing`` use rules 1 and 2 only. A cell or port no
rule covers stays unassigned, which a check reports.

Example (invented; the test fixture ``tests/electrical/fixtures/demo/design.yaml``)
-----------------------------------------------------------------------------------
.. code-block:: yaml

    description: Invented demo board (test fixture)
    netlist:
      files: [demo_top.v]
      top: demo_top
      include_dirs: [include]
      defines: {DEMO_FAST: null, DEMO_REV: 2}
    family_dirs: [families]
    family_files: [extra/DEMO_OD_BUS.yaml]
    part_libraries: [parts/demo_parts.yaml]
    rails:
      VCC3V3: {nominal: 3.3, tolerance_percent: 5}     # 3.135 .. 3.465 V
      VCC1V8: {nominal: 1.8, minimum: 1.65, maximum: 1.95}
      VBAT: {minimum: 3.0, maximum: 4.2}               # nominal 3.6 V, the midpoint
    power_states:
      run: {default: on}
      standby: {default: off, rails: {VBAT: on, VCC1V8: on}}
      ship: {default: off, rails: {VBAT: on}}
    default: {family: DEMO_CMOS33, rail: VCC3V3}
    modules:
      sensor_glue: {family: DEMO_CMOS18, rail: VCC1V8}
    cells:
      demo_top.u_xl_rx: {rails: {VCCA: VCC1V8, VCCB: VCC3V3}}
      demo_top.u_xl_tx: {rails: {VCCA: VCC3V3, VCCB: VCC1V8}}
      demo_top.u_glue.g_keep: {family: DEMO_CMOS33, rail: VCC3V3}
    ports:
      "sens_*": {family: DEMO_CMOS18, rail: VCC1V8}
      i2c_sda: {family: DEMO_OD_BUS, rail: VCC3V3, direction: inout, output: open-drain}
      "*": {family: DEMO_CMOS33, rail: VCC3V3}
    pull_ups:
      demo_top.i2c_sda: {ohms: 2200, rail: VCC3V3}
    noise_margin: {default: 10%, nets: {demo_top.clk: 0.4}}
    net_timing:
      demo_top.sens_*: {max_rate_hz: 10e6, max_delay_s: 20e-9}
      demo_top.spi_miso: {max_rate_hz: 25000000}
    movable_cells: [demo_top.u_glue.*]
    waivers:
      - rule: input-floating
        net: demo_top.spare_in
        reason: Invented example; the spare pad is tied low on the board.

The file records declared DC data. It cannot know the parts on the real board: datasheets, local
codes and licensed practice rule, above all for over-voltage and power sequencing.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from pathlib import Path
from types import MappingProxyType
from typing import TypeVar

from linter.electrical.design_model import Design, NoiseMarginPolicy
from linter.electrical.design_sections import (
    Names,
    parse_cell_rules,
    parse_default_rule,
    parse_module_rules,
    parse_movable_cells,
    parse_net_timing,
    parse_netlist,
    parse_noise_margin,
    parse_paths,
    parse_port_rules,
    parse_pull_ups,
    parse_rails,
    parse_waivers,
)
from linter.electrical.family import LogicFamily
from linter.electrical.family_loader import (
    FAMILY_SUFFIX,
    FamilyCatalogue,
    default_family_dir,
    load_families,
    load_family_file,
)
from linter.electrical.fields import as_mapping, as_text, check_keys
from linter.electrical.parts import EMPTY_LIBRARY, load_part_library, merge_part_libraries
from linter.electrical.power import PowerState, parse_power_states
from linter.errors import InputError, SourceLocation
from linter.yamlio import LocatedDict, load_yaml_file

__all__ = ["Design", "load_design"]

Section = TypeVar("Section")

TOP_KEYS = (
    "cells", "default", "description", "family_dirs", "family_files", "modules", "movable_cells",
    "net_timing", "netlist", "noise_margin", "part_libraries", "ports", "power_states", "pull_ups",
    "rails", "waivers",
)


def load_design(path: str | Path, builtin_families: Mapping[str, LogicFamily] | None = None) -> Design:
    """Read and validate a design file.

    ``builtin_families`` are the families every design may use; by default the shipped
    ``families/`` folder (none if that folder is absent or empty, as in an installed copy).
    Raises :class:`~linter.errors.InputError` with the file, line and column of the mistake.
    """
    design_path = Path(path)
    name = str(design_path)
    top = as_mapping(load_yaml_file(design_path), SourceLocation(name, 1, 1), "a design file")
    check_keys(top, TOP_KEYS, "the design file", required=("netlist", "rails"))
    base = design_path.parent

    def paths(key: str, want_dir: bool) -> tuple[Path, ...]:
        return parse_paths(top[key], top.where(key), key, base, want_dir) if key in top else ()

    netlist = parse_netlist(top["netlist"], top.where("netlist"), base)
    family_dirs, family_files = paths("family_dirs", True), paths("family_files", False)
    families = _gather_families(builtin_families, top, family_dirs, family_files)
    rails = parse_rails(top["rails"], top.where("rails"))
    power_states: tuple[PowerState, ...] = ()
    if "power_states" in top:
        power_states = parse_power_states(top["power_states"], top.where("power_states"), list(rails))
    library_paths = paths("part_libraries", False)
    parts = EMPTY_LIBRARY
    if library_paths:
        parts = merge_part_libraries(load_part_library(library, families) for library in library_paths)
    names = Names(MappingProxyType(rails), families, parts)

    def section(key: str, reader: Callable[..., Section], *extra: object) -> Section | None:
        return reader(top[key], top.where(key), *extra) if key in top else None

    return Design(
        path=design_path,
        netlist=netlist,
        rails=MappingProxyType(rails),
        families=families,
        parts=parts,
        power_states=power_states,
        default=section("default", parse_default_rule, names),
        modules=MappingProxyType(section("modules", parse_module_rules, names) or {}),
        cells=section("cells", parse_cell_rules, names) or (),
        ports=section("ports", parse_port_rules, names) or (),
        pull_ups=section("pull_ups", parse_pull_ups, names) or (),
        noise_margin=section("noise_margin", parse_noise_margin) or NoiseMarginPolicy(),
        net_timing=section("net_timing", parse_net_timing) or (),
        movable_cells=section("movable_cells", parse_movable_cells) or (),
        waivers=section("waivers", parse_waivers) or (),
        description=as_text(top["description"], top.where("description"), "description")
        if "description" in top else "",
        family_dirs=family_dirs,
        family_files=family_files,
        part_libraries=library_paths,
    )


def _gather_families(
    builtin: Mapping[str, LogicFamily] | None, top: LocatedDict,
    family_dirs: tuple[Path, ...], family_files: tuple[Path, ...],
) -> FamilyCatalogue:
    """The shipped families plus the design's own; one name defined twice is an error."""
    found: dict[str, LogicFamily] = dict(_shipped_families() if builtin is None else builtin)
    extra: list[LogicFamily] = []
    for index, folder in enumerate(family_dirs):
        try:
            extra.extend(load_families(folder).values())
        except InputError as error:
            if error.location is not None:
                raise
            raise InputError(error.message, top["family_dirs"].where(index)) from None
    extra.extend(load_family_file(file) for file in family_files)
    for family in extra:
        if family.name in found:
            first = found[family.name].location
            raise InputError(f"family '{family.name}' is defined twice (first at {first})", family.location)
        found[family.name] = family
    return FamilyCatalogue(found)


def _shipped_families() -> Mapping[str, LogicFamily]:
    folder = default_family_dir()
    if not folder.is_dir() or not any(folder.glob(f"*{FAMILY_SUFFIX}")):
        return {}
    return load_families(folder)
