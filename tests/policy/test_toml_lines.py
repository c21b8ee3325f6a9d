"""Key positions in TOML text: the scanner must agree with tomllib on what the keys are, and give the
line each is written on."""

from __future__ import annotations

import tomllib

from hypothesis import given, settings, strategies as st

from ladder.policy.toml_lines import KeyLines

TEXT = '''# a comment with [brackets] and key = "value"
title = "x"                       # line 2
"quoted.key" = 1                  # line 3: one key with a dot in it
a.b.c = 2                         # line 4: dotted
note = """
fake = "not a key"
[not.a.table]
"""                               # lines 5-8: a multi-line string
lit = \'\'\'it's [raw] = \'\'\'

[portfolio]                       # line 11
max_wam_days = 540
liquidity = [                     # line 13
  { within_days = 30, min_pct = 10 },   # line 14
  # a comment inside an array
  { within_days = 90, min_pct = 25 },   # line 16
]
when = 1979-05-27T07:32:00Z

[[runs]]                          # line 20
name = "first"
[[runs]]                          # line 22
name = "second"
[runs.detail]                     # line 24: belongs to the second run
x = 1

[sectors."commercial_paper"]      # line 27
max_pct = 25
inline = { a = { b = "}" }, c = [1, 2] }   # line 29
'''


def test_positions():
    tomllib.loads(TEXT)   # the fixture is valid TOML
    k = KeyLines(TEXT)
    assert k.find(("title",)) == (2, 1)
    assert k.find(("quoted.key",)) == (3, 1)
    assert k.find(("a", "b", "c")) == (4, 1)
    assert k.find(("a", "b")) == (4, 1)
    assert k.find(("note",)) == (5, 1)
    assert ("fake",) not in k.positions and ("not",) not in k.positions
    assert k.find(("lit",)) == (9, 1)
    assert k.find(("portfolio",)) == (11, 1)
    assert k.find(("portfolio", "max_wam_days")) == (12, 1)
    assert k.find(("portfolio", "liquidity")) == (13, 1)
    assert k.find(("portfolio", "liquidity", 0)) == (14, 3)
    assert k.find(("portfolio", "liquidity", 0, "min_pct")) == (14, 23)
    assert k.find(("portfolio", "liquidity", 1, "within_days")) == (16, 5)
    assert k.find(("portfolio", "when")) == (18, 1)
    assert k.find(("runs", 0, "name")) == (21, 1)
    assert k.find(("runs", 1)) == (22, 1)
    assert k.find(("runs", 1, "detail", "x")) == (25, 1)
    assert k.find(("sectors", "commercial_paper", "max_pct")) == (28, 1)
    assert k.find(("sectors", "commercial_paper", "inline", "a", "b")) == (29, 18)
    assert k.find(("sectors", "commercial_paper", "inline", "c", 1)) == (29, 37)


def test_missing_key_points_at_its_table():
    k = KeyLines(TEXT)
    assert k.find(("portfolio", "issuer_max_pct")) == (11, 1)
    assert k.find(("nowhere", "at_all")) == (0, 0)


def _paths(data, prefix=()):
    for key, value in data.items():
        yield prefix + (key,)
        if isinstance(value, dict):
            yield from _paths(value, prefix + (key,))


names = st.text(alphabet="abcxyz_-.", min_size=1, max_size=6)
leaf = st.one_of(st.integers(-5, 5), st.text(alphabet='ab"#[]=\\ ', max_size=5), st.booleans())
tables = st.dictionaries(names, st.one_of(leaf, st.dictionaries(names, leaf, max_size=3)), min_size=1, max_size=5)


def _quote(key: str) -> str:
    return '"' + key.replace("\\", "\\\\").replace('"', '\\"') + '"'


def _value(v) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    return _quote(v)


def _render(data: dict) -> tuple[str, dict]:
    """TOML with every key quoted: scalars first, then one [table] per sub-table; expected lines."""
    lines, expected = [], {}
    for key, value in data.items():
        if not isinstance(value, dict):
            lines.append(f"{_quote(key)} = {_value(value)}  # [x] = 1")
            expected[(key,)] = len(lines)
    for key, value in data.items():
        if isinstance(value, dict):
            lines.append(f"[{_quote(key)}]")
            expected[(key,)] = len(lines)
            for sub, leaf_value in value.items():
                lines.append(f"{_quote(sub)} = {_value(leaf_value)}")
                expected[(key, sub)] = len(lines)
    return "\n".join(lines) + "\n", expected


@settings(max_examples=60, deadline=None)
@given(tables)
def test_every_key_found_on_its_line(data):
    text, expected = _render(data)
    assert tomllib.loads(text) == data
    k = KeyLines(text)
    assert set(_paths(data)) <= set(k.positions)
    for path, line in expected.items():
        assert k.find(path)[0] == line
