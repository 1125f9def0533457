"""Benchmark of the full ``levelcross check`` (every rule) against ``inspect``, the pyslang floor and yosys.

Run from the repository root: ``python benchmarks/bench_check.py`` (``--quick`` for 10k and 100k
cells only). For each generated flat netlist it writes a design file with three rails and a family
assignment by cell-name globs (invented benchmark data: about 10 % of the cells on a 1.8 V rail,
10 % on a 5 V rail with TTL-compatible inputs, the rest LVCMOS33), so that every rule has real
crossings to judge, then measures, each as its own process (wall time, and peak memory of the
process tree as ``measure.py`` takes it):

* ``check``: ``python -m linter check DESIGN.yaml --format json -o OUT`` (all rules);
* ``inspect``: ``python -m linter inspect FILE --format json`` (front end only);
* ``floor``: pyslang parse + elaborate of the same file;
* ``yosys``: ``read_verilog; hierarchy -auto-top; proc; check`` where a yosys is available.

It prints the ratios check / inspect (target at most 1.3), check / floor and yosys / check (target
at least 10), and the absolute figures against the 1M-cell target (under 20 s and 3.5 GB).
Timings on a shared 2-core machine vary by about +-30 %: use ``--repeat 3`` (the default).
"""

from __future__ import annotations

import argparse
import json
import statistics
import sys
from pathlib import Path

BENCH_DIR = Path(__file__).resolve().parent
sys.path.insert(0, str(BENCH_DIR))

import bench_inspect  # noqa: E402  (sibling script: shares the yosys finder and the floor)
import generate  # noqa: E402
from measure import OK, run_measured  # noqa: E402

REPO = BENCH_DIR.parent
OUT_DIR = BENCH_DIR / "out"
DESIGNS = ("flat_100k", "flat_1m")
QUICK = ("flat_10k", "flat_100k")

SPARSE = """\
# invented benchmark design for benchmarks/bench_check.py ("sparse"): three rails whose families
# are compatible, so the rules judge every crossing and report almost nothing, as on a good board
netlist:
  files: [{file}]
  top: {top}
rails:
  VCC3V3: {{nominal: 3.3, tolerance_percent: 5}}
  VCC3V3_AUX: {{nominal: 3.3, tolerance_percent: 5}}
  VCC5V0: {{nominal: 5.0, tolerance_percent: 5}}
default: {{family: LVCMOS33-5VT, rail: VCC3V3}}
cells:
  "{top}.g1*": {{family: LVCMOS33-5VT, rail: VCC3V3_AUX}}
  "{top}.g2*": {{family: CMOS5-TTLIN, rail: VCC5V0}}
ports:
  "*": {{family: LVCMOS33-5VT, rail: VCC3V3}}
"""

DENSE = """\
# invented benchmark design for benchmarks/bench_check.py ("dense"): three rails with failing
# crossings on most nets between them, and a power state, so findings themselves cost time
netlist:
  files: [{file}]
  top: {top}
rails:
  VCC1V8: {{nominal: 1.8, tolerance_percent: 5}}
  VCC3V3: {{nominal: 3.3, tolerance_percent: 5}}
  VCC5V0: {{nominal: 5.0, tolerance_percent: 5}}
power_states:
  run: {{default: on}}
  standby: {{default: on, rails: {{VCC5V0: off}}}}
default: {{family: LVCMOS33, rail: VCC3V3}}
cells:
  "{top}.g1*": {{family: LVCMOS18, rail: VCC1V8}}
  "{top}.g2*": {{family: CMOS5-TTLIN, rail: VCC5V0}}
ports:
  "*": {{family: LVCMOS33, rail: VCC3V3}}
noise_margin: 0.1
"""
SCENARIOS = {"sparse": SPARSE, "dense": DENSE}


def design_yaml(netlist: Path, scenario: str) -> Path:
    top = netlist.stem
    path = netlist.with_name(f"{netlist.stem}.{scenario}.design.yaml")
    text = SCENARIOS[scenario].format(file=netlist.name, top=top)
    if not path.exists() or path.read_text() != text:
        path.write_text(text)
    return path


def commands(netlist: Path, yosys: list[str] | None) -> dict[str, list[str]]:
    found = {
        f"check {scenario}": [sys.executable, "-m", "linter", "check", str(design_yaml(netlist, scenario)),
                              "--format", "json", "-o", str(OUT_DIR / f"{netlist.stem}.{scenario}.check.json")]
        for scenario in SCENARIOS
    }
    found.update({
        "inspect": [sys.executable, "-m", "linter", "inspect", str(netlist), "--format", "json"],
        "floor": [sys.executable, str(BENCH_DIR / "pyslang_floor.py"), str(netlist)],
    })
    if yosys:
        found["yosys"] = [*yosys, "-q", "-p", f"read_verilog {netlist}; hierarchy -auto-top; proc; check"]
    return found


def measure(name: str, args: argparse.Namespace, yosys: list[str] | None) -> dict:
    netlist, _ = generate.ensure_design(name, args.seed)
    results: dict = {"design": name}
    tools = commands(netlist, yosys)
    # the tools take turns within each repeat, so load that drifts during the run hits all alike
    runs_of: dict[str, list] = {tool: [] for tool in tools}
    for i in range(args.repeat):
        for tool, command in tools.items():
            if runs_of[tool] and runs_of[tool][-1].status != OK:
                continue  # a failed or timed-out tool is not run again
            runs_of[tool].append(run_measured(command, REPO, OUT_DIR / "logs" / f"check_{name}_{tool}_{i}",
                                              args.timeout, accepted_exit_codes=(0, 1)))
    for tool, runs in runs_of.items():
        good = [r for r in runs if r.status == OK]
        if len(good) < len(runs):
            bad = next(r for r in runs if r.status != OK)
            results[tool] = {"status": bad.status, "detail": bad.last_error_line()}
            continue
        results[tool] = {"status": OK, "seconds": round(statistics.median(r.seconds for r in good), 2),
                         "peak_mib": round(statistics.median(r.peak_mib for r in good), 1)}
    for scenario in SCENARIOS:
        report = OUT_DIR / f"{netlist.stem}.{scenario}.check.json"
        if report.exists() and results.get(f"check {scenario}", {}).get("status") == OK:
            results[f"check {scenario}"]["findings"] = json.loads(report.read_text()).get("summary", {})
    return results


def ratio(results: dict, top: str, bottom: str, key: str = "seconds") -> str:
    a, b = results.get(top, {}), results.get(bottom, {})
    if a.get("status") != OK or b.get("status") != OK or not b.get(key):
        return "-"
    return f"{a[key] / b[key]:.2f}"


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="10k and 100k cells only")
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--timeout", type=float, default=600.0)
    parser.add_argument("--no-yosys", action="store_true")
    parser.add_argument("--seed", type=int, default=generate.DEFAULT_SEED)
    args = parser.parse_args(argv)
    OUT_DIR.mkdir(parents=True, exist_ok=True)
    yosys = None if args.no_yosys else (bench_inspect.find_yosys() or (None, None))[0]
    rows = [measure(name, args, yosys) for name in (QUICK if args.quick else DESIGNS)]
    header = ("design", "tool", "wall s", "peak MiB", "/inspect", "/floor", "yosys/this", "errors", "warnings")
    lines = ["  ".join(f"{h:>14}" for h in header)]
    for r in rows:
        for tool in [k for k in r if k != "design"]:
            entry = r[tool]
            findings = entry.get("findings", {})
            lines.append("  ".join(f"{v:>14}" for v in (
                r["design"], tool, entry.get("seconds", entry.get("status")), entry.get("peak_mib", "-"),
                ratio(r, tool, "inspect"), ratio(r, tool, "floor"), ratio(r, "yosys", tool),
                findings.get("errors", ""), findings.get("warnings", ""))))
    print("\n".join(lines))
    print("targets: check/inspect <= 1.3; 1M cells: check < 20 s and < 3.5 GB; yosys/check >= 10")
    (OUT_DIR / "check.json").write_text(json.dumps(rows, indent=2, sort_keys=True) + "\n")
    return 0


if __name__ == "__main__":
    sys.exit(main())
