"""Results as plain JSON-ready dicts and rich renderables: shared by the CLI and the app.

No textual here; rich and pint (through :mod:`workbench.project.units`) only inside the
functions that build tables.
"""
