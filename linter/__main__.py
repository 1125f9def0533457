"""Entry point for ``python -m linter``."""

from linter.cli import console_main

console_main()
