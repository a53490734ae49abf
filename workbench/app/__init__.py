"""The terminal workbench (Textual): ``workbench open PROJECT``.

Nothing heavy is imported here; :func:`workbench.app.factory.make_app` builds the app.
"""
