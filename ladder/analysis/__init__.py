"""The façade: a Book, a date and options in, frozen result dataclasses out.

Both fronts (the command line and the workstation) show only what these functions return, so the
screen and the commands cannot disagree.
"""
