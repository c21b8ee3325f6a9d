"""Text made harmless for where it lands: one helper per destination, used by every writer.

- ``safe_cell``: a cell of a csv file or an xlsx sheet. Text a spreadsheet would run as a formula
  (starting ``=``, ``+``, ``-``, ``@``, tab or carriage return) gets a leading quote (OWASP, "CSV
  Injection"); control characters a workbook cannot hold are removed. A number-like label is left alone: a sign, digits, then at most words, spaces, ``%``
  and ``.`` (``-300 bp``, ``+25 bp about 2Y``, ``-1.5%``) cannot be a formula, and our own scenario
  names are written that way; ``-2+3+cmd|...`` is not number-like and is quoted. ``read_cell``
  takes that quote off again when a file is read, so a book's own files read back as written.
- ``safe_html``: text inside html (a report): ``& < > " '`` escaped.
- ``safe_markdown``: text inside a markdown table cell: ``& < >`` escaped, and the characters
  markdown reads as syntax (``\\ | [ ] ` * _``) escaped with a backslash, so a cell cannot close the
  table, open a link or start emphasis.
- ``safe_terminal``: text for the terminal: control characters (ESC and the rest of C0 and C1,
  DEL) removed, so an escape sequence in a file cannot move the cursor, retitle the window or hide
  text; a tab becomes a space.
"""

from __future__ import annotations

import html
import re

FORMULA_START = ("=", "+", "-", "@", "\t", "\r")
_NUMBER_LIKE = re.compile(r"[+-]\d[\d,.]*( ?%)?( [A-Za-z0-9%.]+)*")
_SHEET_ILLEGAL = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f]")     # what an xlsx cell cannot hold
_CONTROL = re.compile(r"[\x00-\x08\x0b-\x1f\x7f-\x9f]")
_MARKDOWN = re.compile(r"([\\|\[\]`*_])")


def safe_cell(value):
    """A csv or xlsx cell: control characters a workbook cannot hold removed, formula-looking text
    given a leading quote; values other than text as they are."""
    if not isinstance(value, str):
        return value
    value = _SHEET_ILLEGAL.sub("", value)
    if value.startswith(FORMULA_START) and not _NUMBER_LIKE.fullmatch(value):
        return "'" + value
    return value


def read_cell(text: str) -> str:
    """A text cell read back from a file: the quote ``safe_cell`` put before formula text is removed,
    so that what the book wrote it reads as it was (an id ``=X`` stays ``=X``, not ``'=X``)."""
    if text.startswith("'") and text[1:].startswith(FORMULA_START):
        return text[1:]
    return text


def safe_html(text) -> str:
    """``text`` for html: every character html gives a meaning to is escaped."""
    return html.escape(str(text), quote=True)


def safe_markdown(text) -> str:
    """``text`` for a markdown table cell: html-escaped, markdown syntax backslash-escaped."""
    return _MARKDOWN.sub(r"\\\1", html.escape(str(text), quote=False)).replace("\n", " ")


def safe_terminal(text) -> str:
    """``text`` for the terminal: control characters removed (a tab or newline is kept as whitespace)."""
    return _CONTROL.sub("", str(text).replace("\t", " "))
