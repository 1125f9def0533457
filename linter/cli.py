"""The ``levelcross`` command line: discovers subcommands and turns errors into one line and exit 2."""

from __future__ import annotations

import argparse
import importlib
import os
import pkgutil
import sys
from collections.abc import Sequence
from typing import NoReturn

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


def console_main() -> NoReturn:
    """The installed command and ``python -m linter``: :func:`main`, then the process ends at once.

    Tearing the interpreter down frees every object one by one: a quarter of a second after a
    million-cell check, for memory nobody uses again. Output is flushed first, and every file
    was written atomically and closed, so nothing is lost by skipping it.
    """
    try:
        code: int = main()
    except SystemExit as stop:  # --help, --version, usage errors
        if isinstance(stop.code, str):
            sys.stderr.write(stop.code + "\n")
        code = stop.code if isinstance(stop.code, int) else (0 if stop.code is None else 1)
    try:
        sys.stdout.flush()
        sys.stderr.flush()
    except BrokenPipeError:
        code = EXIT_BAD_INPUT
    os._exit(code)
