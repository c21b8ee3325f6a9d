"""Widgets of the workstation: the row table, the caution line, the status line."""
