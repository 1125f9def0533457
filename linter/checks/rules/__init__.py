"""One module per rule; each registers itself with :func:`linter.checks.registry.rule`."""
