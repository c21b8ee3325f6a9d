"""Where each key of a TOML text is written: key path -> (line, column), both 1-based.

``tomllib`` parses but keeps no positions, so this scans the text once more. It assumes the text is
valid TOML (parse it with ``tomllib`` first) and knows the structures that matter for positions:
table headers ``[a.b]``, arrays of tables ``[[a.b]]`` (elements numbered from 0), dotted and quoted
keys, inline tables, arrays (elements numbered from 0), the four string forms (so nothing inside a
string is taken for a key) and comments.

A path is a tuple of keys (str) and array positions (int), e.g. ``("portfolio", "liquidity", 0,
"min_pct")``. ``KeyLines.find(path)`` gives the position of the longest recorded prefix, so a problem
about a missing key points at its table.
"""

from __future__ import annotations

import bisect
import re

_BARE = re.compile(r"[A-Za-z0-9_-]+")
_SCALAR = re.compile(r"[^,\]}\n#]*")
_ESCAPES = {"b": "\b", "t": "\t", "n": "\n", "f": "\f", "r": "\r", '"': '"', "\\": "\\"}


class KeyLines:
    """Positions of the keys of one TOML text."""

    def __init__(self, text: str):
        self._text = text
        self._i = 0
        self._newlines = [m.start() for m in re.finditer("\n", text)]
        self.positions: dict[tuple, tuple[int, int]] = {}
        self._aot: dict[tuple, int] = {}
        self._scan()

    def find(self, path) -> tuple[int, int]:
        """(line, column) of ``path`` or of its longest written prefix; (0, 0) if none is written."""
        path = tuple(path)
        for end in range(len(path), 0, -1):
            if path[:end] in self.positions:
                return self.positions[path[:end]]
        return (0, 0)

    # -- scanning ---------------------------------------------------------------------------------
    def _pos(self, index: int) -> tuple[int, int]:
        line = bisect.bisect_left(self._newlines, index)
        start = self._newlines[line - 1] + 1 if line else 0
        return line + 1, index - start + 1

    def _record(self, path: tuple, index: int) -> None:
        self.positions.setdefault(path, self._pos(index))

    def _peek(self, n: int = 1) -> str:
        return self._text[self._i:self._i + n]

    def _skip(self, newlines: bool) -> None:
        """Skip blanks and comments (and newlines when ``newlines``)."""
        text = self._text
        while self._i < len(text):
            c = text[self._i]
            if c in " \t\r" or (newlines and c == "\n"):
                self._i += 1
            elif c == "#":
                end = text.find("\n", self._i)
                self._i = len(text) if end < 0 else end
            else:
                return

    def _string(self) -> str:
        """Consume a string of any of the four forms and return its value (escapes decoded)."""
        text = self._text
        quote = text[self._i]
        if self._peek(3) == quote * 3:
            end = self._i + 3
            while True:
                end = text.find(quote * 3, end)
                if quote == "'" or not _escaped(text, end):
                    break
                end += 1
            while text[end + 3:end + 4] == quote:   # up to two quotes may end the content
                end += 1
            value = text[self._i + 3:end]
            self._i = end + 3
            return value
        j = self._i + 1
        out = []
        while text[j] != quote:
            if quote == '"' and text[j] == "\\":
                nxt = text[j + 1]
                if nxt in _ESCAPES:
                    out.append(_ESCAPES[nxt])
                    j += 2
                    continue
                if nxt in "uU":
                    width = 4 if nxt == "u" else 8
                    out.append(chr(int(text[j + 2:j + 2 + width], 16)))
                    j += 2 + width
                    continue
            out.append(text[j])
            j += 1
        self._i = j + 1
        return "".join(out)

    def _key(self) -> tuple[list[str], int]:
        """A dotted key: its parts and the index where it starts."""
        start = self._i
        parts = []
        while True:
            self._skip(False)
            if self._peek() in "\"'":
                parts.append(self._string())
            else:
                m = _BARE.match(self._text, self._i)
                parts.append(m.group())
                self._i = m.end()
            self._skip(False)
            if self._peek() != ".":
                return parts, start
            self._i += 1

    def _value(self, path: tuple) -> None:
        c = self._peek()
        if c in "\"'":
            self._string()
        elif c == "{":
            self._i += 1
            while True:
                self._skip(False)
                if self._peek() == "}":
                    self._i += 1
                    return
                self._keyval(path)
                self._skip(False)
                if self._peek() == ",":
                    self._i += 1
        elif c == "[":
            self._i += 1
            index = 0
            while True:
                self._skip(True)
                if self._peek() == "]":
                    self._i += 1
                    return
                self._record(path + (index,), self._i)
                self._value(path + (index,))
                index += 1
                self._skip(True)
                if self._peek() == ",":
                    self._i += 1
        else:
            m = _SCALAR.match(self._text, self._i)
            self._i = m.end()

    def _keyval(self, table: tuple) -> None:
        parts, start = self._key()
        for end in range(1, len(parts) + 1):
            self._record(table + tuple(parts[:end]), start)
        self._i += 1   # "="
        self._skip(False)
        self._value(table + tuple(parts))

    def _resolve(self, parts: list[str]) -> tuple:
        """Header parts with the current element index after each array of tables."""
        path: tuple = ()
        for part in parts:
            path += (part,)
            if path in self._aot:
                path += (self._aot[path] - 1,)
        return path

    def _scan(self) -> None:
        table: tuple = ()
        text = self._text
        while True:
            self._skip(True)
            if self._i >= len(text):
                return
            if self._peek(2) == "[[":
                at = self._i
                self._i += 2
                parts, _ = self._key()
                self._i += 2
                parent = self._resolve(parts[:-1])
                array = parent + (parts[-1],)
                self._aot[array] = self._aot.get(array, 0) + 1
                table = array + (self._aot[array] - 1,)
                self._record(array, at)
                self._record(table, at)
            elif self._peek() == "[":
                at = self._i
                self._i += 1
                parts, _ = self._key()
                self._i += 1
                table = self._resolve(parts)
                for end in range(1, len(table) + 1):
                    self._record(table[:end], at)
            else:
                self._keyval(table)


def _escaped(text: str, index: int) -> bool:
    """True when the character at ``index`` is preceded by an odd number of backslashes."""
    count = 0
    while index - count - 1 >= 0 and text[index - count - 1] == "\\":
        count += 1
    return count % 2 == 1
