"""The ``levelcross`` command line: discovers subcommands and turns errors into one line and exit 2."""

from __future__ import annotations

import argparse
import importlib
import pkgutil
import sys
from collections.abc import Sequence

from linter import __version__, commands
from linter.errors import EXIT_BAD_INPUT, LevelcrossError

CAUTION = (
    "levelcross checks declared DC data only. Datasheets, local codes and licensed practice rule; "
    "over-voltage and back-powering can damage parts and equipment."
)


class _Parser(argparse.ArgumentParser):
    """An argument parser whose usage errors are one line and exit 2."""

    def error(self, message: str) -> None:  # type: ignore[override]
        sys.stderr.write(f"levelcross: error: {message} (see '{self.prog} --help')\n")
        raise SystemExit(EXIT_BAD_INPUT)


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(
        prog="levelcross",
        description="Check logic-level crossings between supply voltages in structural Verilog.",
        epilog=CAUTION,
    )
    parser.add_argument("--version", action="version", version=f"levelcross {__version__}")
    subparsers = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    subparsers.required = True
    for info in sorted(pkgutil.iter_modules(commands.__path__), key=lambda m: m.name):
        if info.name.startswith("_"):
            continue
        module = importlib.import_module(f"{commands.__name__}.{info.name}")
        module.register(subparsers)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    try:
        return int(args.run(args))
    except LevelcrossError as error:
        sys.stderr.write(error.one_line() + "\n")
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        sys.stderr.write("levelcross: interrupted\n")
        return EXIT_BAD_INPUT
    except BrokenPipeError:
        return EXIT_BAD_INPUT
