"""The workstation: a keyboard-driven Textual app over the façade (``ladder.analysis``).

``make_app(book)`` (in ``ladder.tui.app``) builds the app for the command line and the tests. The
app holds the Book; every figure on a screen comes from a façade function run in a worker thread.
Importing this package imports nothing else, so the reporting commands never load Textual.
"""
