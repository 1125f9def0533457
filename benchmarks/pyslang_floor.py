"""The floor for ``levelcross inspect``: pyslang's own parse and elaboration, and nothing else.

No front end can read a netlist through pyslang faster than this, so the benchmark reports
levelcross's time and memory as a ratio to it. Prints one JSON line with the diagnostic counts.

    python benchmarks/pyslang_floor.py FILE...
"""

from __future__ import annotations

import json
import sys

import pyslang
from pyslang import ast, syntax


def parse_and_elaborate(paths: list[str]) -> dict[str, int]:
    bag = pyslang.Bag()
    sources = pyslang.SourceManager()
    trees = [syntax.SyntaxTree.fromFile(path, sources, bag) for path in paths]
    compilation = ast.Compilation(bag)
    for tree in trees:
        compilation.addSyntaxTree(tree)
    root = compilation.getRoot()
    diagnostics = compilation.getAllDiagnostics()  # forces full elaboration
    return {
        "top_instances": len(root.topInstances),
        "diagnostics": len(diagnostics),
        "errors": sum(1 for d in diagnostics if d.isError()),
    }


def main(argv: list[str]) -> int:
    if not argv or argv[0] in ("-h", "--help"):
        sys.stdout.write(__doc__)
        return 0 if argv else 2
    counts = parse_and_elaborate(argv)
    print(json.dumps(counts, sort_keys=True))
    return 1 if counts["errors"] else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
