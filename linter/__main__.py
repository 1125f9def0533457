"""Entry point for ``python -m linter``."""

import sys

from linter.cli import main

sys.exit(main())
