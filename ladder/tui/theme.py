"""The workstation's own colours, on Textual's theming: slate and paper, blue-green accents.

Status is never colour alone: every status colour sits beside its word (pass, near, review, breach).
"""

from textual.theme import Theme

SLATE = Theme(
    name="ladder-slate", dark=True,
    primary="#4F9DA6", secondary="#7C8DB5", accent="#9A86CF",
    foreground="#E3E8F0", background="#1B2230", surface="#222B3B", panel="#2B3547",
    success="#6DBE8C", warning="#D9C46A", error="#E06C75",
)
PAPER = Theme(
    name="ladder-paper", dark=False,
    primary="#2F6F78", secondary="#4D5F8F", accent="#6A55A8",
    foreground="#1E2533", background="#F4F1EA", surface="#FBF9F4", panel="#E6E1D6",
    success="#2E7D4F", warning="#8A6D00", error="#B3261E",
)
THEMES = (SLATE, PAPER)
