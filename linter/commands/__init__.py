"""Subcommands of the ``levelcross`` command line.

Each module here defines ``register(subparsers)``, which adds one subcommand whose parser has a
``run`` default: a function taking the parsed arguments and returning the exit code. The command
line discovers the modules by name, so adding a subcommand touches no shared file.
"""
