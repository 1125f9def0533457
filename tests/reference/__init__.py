"""Independent, test-only readers that the front end's results are checked against.

Nothing here imports ``linter``: a reference that shared code with the tool under test could
share its bugs too.
"""
