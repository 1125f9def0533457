"""Deterministic generators of large gate-level Verilog netlists for the benchmarks.

Every design here is invented benchmark data: random logic with no function, sized to stress the
front end. The same design name and seed always give the same bytes (draws come from numpy's legacy
``RandomState``, whose stream numpy keeps frozen), so timings taken on different days read the
same file.

Design names (``SIZE`` is a cell count such as ``10k``, ``100k``, ``1m`` or ``250000``):

* ``flat_SIZE``: one module of ``SIZE`` gate primitives (and, nand, or, nor, xor with 2-3 inputs;
  not, buf with 1). Each gate reads primary inputs or nets of earlier gates, so the network is
  acyclic; the last 64 gates drive the primary outputs.
* ``hier_SIZE``: ``SIZE / 100`` instances of one 100-gate module, chained through part selects of a
  vector wire (``chain[8*i+7:8*i]``) written out as literal text.
* ``hiergen_SIZE``: the same chain built by a generate loop (plus two alias assigns at its ends).

``--loops K --extra-drivers D`` (flat designs only) injects K combinational loops and D extra
drivers into a copy written as ``flat_SIZE_lK_dD.v``, with a ``.expect.json`` beside it naming the
injected sites, for a later check benchmark.
"""

from __future__ import annotations

import argparse
import json
import os
import re
import sys
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path

import numpy as np

GENERATOR_VERSION = 1
DEFAULT_SEED = 1
OUT_DIR = Path(__file__).resolve().parent / "out"

FLAT_INPUTS = 64
FLAT_OUTPUTS = 64
UNIT_WIDTH = 8  # bits passed from one chained instance to the next
UNIT_CELLS = 100
RECENT_WINDOW = 256  # half of all gate inputs come from the last this-many nets: local wiring

# (keyword, cumulative probability); the n-input gates take 2 inputs 70 % of the time, else 3
GATE_MIX = (("and", 0.2), ("nand", 0.4), ("or", 0.55), ("nor", 0.7), ("xor", 0.8),
            ("not", 0.9), ("buf", 1.0))
SINGLE_INPUT = frozenset({"not", "buf"})


@dataclass
class GateNetwork:
    """Gates over a net list: net ``k`` is ``names[k]``; gate ``i`` drives net ``first_output + i``.

    Gate ``i`` is ``GATE_MIX[kind[i]]`` reading nets ``terminals[i, :arity[i]]``; numpy arrays keep
    a million gates cheap to build and to print.
    """

    names: list[str]
    first_output: int
    kind: np.ndarray
    arity: np.ndarray
    terminals: np.ndarray

    @property
    def gates(self) -> int:
        return len(self.kind)

    def output_net(self, gate: int) -> int:
        return self.first_output + gate


def random_network(seed: int, input_names: list[str], output_names: list[str]) -> GateNetwork:
    """Random acyclic gates: gate ``i`` reads only inputs or nets of gates ``0 .. i-1``."""
    names = input_names + output_names
    first, gates = len(input_names), len(output_names)
    rng = np.random.RandomState(seed)  # the legacy generator, whose stream numpy keeps frozen
    kind_draw, arity_draw = rng.random_sample(gates), rng.random_sample(gates)
    recent_draw, pick_draw = rng.random_sample((gates, 3)), rng.random_sample((gates, 3))
    limits = np.array([limit for _, limit in GATE_MIX])
    kind = np.minimum(np.searchsorted(limits, kind_draw, side="right"), len(GATE_MIX) - 1)
    single = np.isin(kind, [k for k, (name, _) in enumerate(GATE_MIX) if name in SINGLE_INPUT])
    arity = np.where(single, 1, np.where(arity_draw < 0.7, 2, 3))
    pool = (first + np.arange(gates))[:, None]  # nets 0 .. pool-1 exist when the gate is made
    recent = pool - 1 - (pick_draw * np.minimum(RECENT_WINDOW, pool)).astype(np.int64)
    anywhere = (pick_draw * pool).astype(np.int64)
    terminals = np.where(recent_draw < 0.5, recent, anywhere)
    return GateNetwork(names, first, kind, arity, terminals)


def gate_lines(network: GateNetwork, prefix: str = "g", indent: str = "  ") -> list[str]:
    """One primitive instance per gate; object-array indexing shares the name strings."""
    names = np.array(network.names, dtype=object)
    keywords = np.array([name for name, _ in GATE_MIX], dtype=object)[network.kind].tolist()
    outputs = network.names[network.first_output:]
    pins = [names[network.terminals[:, slot]].tolist() for slot in range(3)]
    return [
        f"{indent}{k} {prefix}{g} ({o}, {a});" if n == 1 else
        (f"{indent}{k} {prefix}{g} ({o}, {a}, {b});" if n == 2 else
         f"{indent}{k} {prefix}{g} ({o}, {a}, {b}, {c});")
        for g, (k, o, a, b, c, n) in enumerate(zip(keywords, outputs, *pins, network.arity.tolist()))
    ]


def declaration_lines(keyword: str, names: list[str], per_line: int = 16) -> list[str]:
    return [f"  {keyword} {', '.join(names[start:start + per_line])};"
            for start in range(0, len(names), per_line)]


def header(design: str, seed: int) -> str:
    return (f"// invented benchmark netlist {design}, seed {seed}, "
            f"benchmarks/generate.py v{GENERATOR_VERSION}; random logic with no function\n")


def flat_network(cells: int, seed: int) -> GateNetwork:
    if cells < FLAT_OUTPUTS:
        raise ValueError(f"a flat design needs at least {FLAT_OUTPUTS} cells, not {cells}")
    inputs = [f"pi{k}" for k in range(FLAT_INPUTS)]
    internal = [f"n{k}" for k in range(cells - FLAT_OUTPUTS)]
    outputs = [f"po{k}" for k in range(FLAT_OUTPUTS)]
    return random_network(seed, inputs, internal + outputs)


def flat_text(design: str, network: GateNetwork, seed: int, extra: list[str] = ()) -> str:
    inputs = network.names[:FLAT_INPUTS]
    outputs = network.names[-FLAT_OUTPUTS:]
    internal = network.names[FLAT_INPUTS:-FLAT_OUTPUTS]
    ports = ", ".join(inputs + outputs)
    lines = [header(design, seed) + f"module {design} ({ports});"]
    lines += declaration_lines("input", inputs)
    lines += declaration_lines("output", outputs)
    lines += declaration_lines("wire", internal)
    lines += gate_lines(network)
    lines += list(extra)
    lines.append("endmodule\n")
    return "\n".join(lines)


def unit_module_text(seed: int) -> tuple[str, str]:
    """The one 100-gate module every hierarchical design chains: (module name, text)."""
    inputs = [f"a[{k}]" for k in range(UNIT_WIDTH)]
    internal = [f"n{k}" for k in range(UNIT_CELLS - UNIT_WIDTH)]
    outputs = [f"y[{k}]" for k in range(UNIT_WIDTH)]
    network = random_network(seed, inputs, internal + outputs)
    name = f"unit{UNIT_CELLS}"
    top = UNIT_WIDTH - 1
    lines = [f"module {name} (a, y);", f"  input [{top}:0] a;", f"  output [{top}:0] y;"]
    lines += declaration_lines("wire", internal)
    lines += gate_lines(network)
    lines.append("endmodule\n")
    return name, "\n".join(lines)


def hier_text(design: str, cells: int, seed: int, use_generate: bool) -> str:
    if cells % UNIT_CELLS or cells < 2 * UNIT_CELLS:
        raise ValueError(f"a hierarchical design needs a multiple of {UNIT_CELLS} cells, "
                         f"at least {2 * UNIT_CELLS}; not {cells}")
    count = cells // UNIT_CELLS
    unit, unit_text = unit_module_text(seed)
    w = UNIT_WIDTH
    lines = [header(design, seed) + unit_text, f"module {design} (din, dout);",
             f"  input [{w - 1}:0] din;", f"  output [{w - 1}:0] dout;"]
    if use_generate:
        lines += [f"  wire [{w * (count + 1) - 1}:0] chain;",
                  f"  assign chain[{w - 1}:0] = din;",
                  f"  assign dout = chain[{w * (count + 1) - 1}:{w * count}];",
                  "  genvar i;",
                  "  generate",
                  f"  for (i = 0; i < {count}; i = i + 1) begin : stage",
                  f"    {unit} u (.a(chain[{w}*i+{w - 1}:{w}*i]), .y(chain[{w}*i+{2 * w - 1}:{w}*i+{w}]));",
                  "  end",
                  "  endgenerate"]
    else:
        def link(k: int) -> str:  # the bits between instance k-1 and instance k
            return "din" if k == 0 else ("dout" if k == count else f"chain[{w * k - 1}:{w * (k - 1)}]")
        lines.append(f"  wire [{w * (count - 1) - 1}:0] chain;")
        lines += [f"  {unit} u{k} (.a({link(k)}), .y({link(k + 1)}));" for k in range(count)]
    lines.append("endmodule\n")
    return "\n".join(lines)


def inject_faults(network: GateNetwork, loops: int, extra_drivers: int, seed: int) -> tuple[list[str], dict]:
    """Close ``loops`` disjoint combinational loops and add ``extra_drivers`` second drivers.

    A loop: start at a gate, follow 1-4 hops to gates that read the previous one, then make the
    start gate read the last gate's net. Each loop lives in its own slice of the gate order and the
    extra drivers in the tail beyond all slices; since every other wire runs forward in that order,
    the loops stay separate strongly connected components and the extra drivers close none.
    """
    rng = np.random.RandomState(seed + 1_000_003)
    gates = network.gates
    tail = gates // 10
    slice_len = (gates - tail - FLAT_OUTPUTS) // max(loops, 1)
    names, first = network.names, network.first_output
    slots = np.arange(3)
    found_loops = []
    for index in range(loops):
        lo, hi = index * slice_len, (index + 1) * slice_len
        for _attempt in range(100):
            start = lo + int(rng.random_sample() * (slice_len // 2))
            hops, path = 1 + int(rng.random_sample() * 4), [start]
            while len(path) <= hops:
                begin, end = path[-1] + 1, min(hi, path[-1] + 4 * RECENT_WINDOW)
                reads = ((network.terminals[begin:end] == network.output_net(path[-1]))
                         & (slots < network.arity[begin:end, None])).any(axis=1)
                if not reads.any():
                    break
                path.append(begin + int(np.argmax(reads)))
            if len(path) > hops:
                break
        else:
            raise RuntimeError(f"no loop site found in gates {lo}..{hi}")
        closing = network.output_net(path[-1])
        network.terminals[start, 0] = closing
        found_loops.append({"gates": [f"g{g}" for g in path], "start_reads": names[closing]})
    extra_lines, multi = [], []
    tail_start = gates - tail - FLAT_OUTPUTS
    for index in range(extra_drivers):
        target = tail_start + index * 2 + 1
        source = tail_start + index * 2
        extra_lines.append(f"  buf gx{index} ({names[first + target]}, {names[first + source]});")
        multi.append(names[first + target])
    expect = {"cells": gates + extra_drivers, "loops": found_loops, "multi_driven_nets": multi}
    return extra_lines, expect


_SIZE = re.compile(r"^(flat|hier|hiergen)_(\d+)([km]?)(?:_l(\d+)_d(\d+))?$")


@dataclass(frozen=True)
class DesignSpec:
    style: str
    cells: int
    loops: int = 0
    extra_drivers: int = 0

    @property
    def faulty(self) -> bool:
        return bool(self.loops or self.extra_drivers)


def parse_design(name: str) -> DesignSpec:
    match = _SIZE.match(name)
    if not match:
        raise ValueError(f"unknown design name '{name}' (want flat_SIZE, hier_SIZE or hiergen_SIZE)")
    style, digits, unit, loops, drivers = match.groups()
    cells = int(digits) * {"": 1, "k": 1000, "m": 1_000_000}[unit]
    spec = DesignSpec(style, cells, int(loops or 0), int(drivers or 0))
    if spec.faulty and style != "flat":
        raise ValueError(f"'{name}': faults can be injected into flat designs only")
    return spec


def design_name(base: str, loops: int, extra_drivers: int) -> str:
    return f"{base}_l{loops}_d{extra_drivers}" if loops or extra_drivers else base


def design_text(name: str, seed: int) -> tuple[str, dict | None]:
    spec = parse_design(name)
    if spec.style != "flat":
        return hier_text(name, spec.cells, seed, use_generate=spec.style == "hiergen"), None
    network = flat_network(spec.cells, seed)
    if not spec.faulty:
        return flat_text(name, network, seed), None
    extra, expect = inject_faults(network, spec.loops, spec.extra_drivers, seed)
    return flat_text(name, network, seed, extra), expect


def write_atomic(path: Path, text: str) -> None:
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    umask = os.umask(0)
    os.umask(umask)
    try:
        os.chmod(tmp, 0o666 & ~umask)  # mkstemp makes it private; give it a normal file's mode
        with os.fdopen(fd, "w", encoding="ascii") as handle:
            handle.write(text)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def design_path(name: str, seed: int = DEFAULT_SEED, out_dir: Path = OUT_DIR) -> Path:
    suffix = "" if seed == DEFAULT_SEED else f"_s{seed}"
    return out_dir / f"{name}{suffix}.v"


def ensure_design(name: str, seed: int = DEFAULT_SEED, out_dir: Path = OUT_DIR,
                  force: bool = False) -> tuple[Path, float | None]:
    """Write the design unless an up-to-date copy exists; returns (path, seconds or None if reused)."""
    path = design_path(name, seed, out_dir)
    if not force and path.exists():
        with path.open(encoding="ascii", errors="replace") as handle:
            if handle.readline() == header(name, seed):
                return path, None
    out_dir.mkdir(parents=True, exist_ok=True)
    began = time.perf_counter()
    text, expect = design_text(name, seed)
    write_atomic(path, text)
    if expect is not None:
        expect.update(design=name, seed=seed)
        write_atomic(path.with_suffix(".expect.json"), json.dumps(expect, indent=2, sort_keys=True) + "\n")
    return path, time.perf_counter() - began


DEFAULT_DESIGNS = ("flat_100k", "flat_1m", "hier_1m", "hiergen_1m")


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(
        description="Write deterministic, invented gate-level netlists for the benchmarks.",
        epilog="Design names: flat_SIZE, hier_SIZE, hiergen_SIZE with SIZE like 10k, 100k, 1m.")
    parser.add_argument("designs", nargs="*", default=list(DEFAULT_DESIGNS),
                        help=f"designs to write (default: {' '.join(DEFAULT_DESIGNS)})")
    parser.add_argument("--seed", type=int, default=DEFAULT_SEED, help="random seed (default %(default)s)")
    parser.add_argument("--out", type=Path, default=OUT_DIR, help="folder to write to (default benchmarks/out)")
    parser.add_argument("--loops", type=int, default=0, help="combinational loops to inject (flat only)")
    parser.add_argument("--extra-drivers", type=int, default=0, help="extra drivers to inject (flat only)")
    parser.add_argument("--force", action="store_true", help="rewrite files that are already up to date")
    args = parser.parse_args(argv)
    if args.loops < 0 or args.extra_drivers < 0:
        parser.error("--loops and --extra-drivers must not be negative")
    for base in args.designs:
        name = design_name(base, args.loops, args.extra_drivers)
        try:
            path, seconds = ensure_design(name, args.seed, args.out, args.force)
        except ValueError as error:
            sys.stderr.write(f"generate.py: error: {error}\n")
            return 2
        size = path.stat().st_size / 1e6
        took = "up to date" if seconds is None else f"written in {seconds:.2f} s"
        print(f"{path}: {size:.2f} MB, {took}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
