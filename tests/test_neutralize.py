"""Text neutralized for where it lands, and used by the writers that put input text there.

Source for the formula prefixes: OWASP, "CSV Injection" (cells starting = + - @ tab or carriage
return are run by spreadsheet programs; a leading single quote makes them text). HTML: the five
characters the HTML standard gives a meaning to in text and attributes. Terminal: ECMA-48 control
functions start with a C0 or C1 control character (ESC is 0x1B, CSI 0x9B).
"""


import pytest
from hypothesis import given
from hypothesis import strategies as st

from ladder.neutralize import read_cell, safe_cell, safe_html, safe_markdown, safe_terminal

FORMULAS = ["=HYPERLINK(\"http://x\",\"y\")", "@SUM(A1:A9)", "+1+2", "-2+3+cmd|' /C calc'!A0", "\tcmd", "\rcmd",
            "=1", "-", "+"]
LABELS = ["-300 bp", "+25 bp", "-1.5%", "+100 bp about 2Y", "-50 bp", "-1,000"]


@pytest.mark.parametrize("text", FORMULAS)
def test_formula_text_gets_a_leading_quote_and_reads_back_as_it_was(text):
    assert safe_cell(text) == "'" + text
    assert read_cell(safe_cell(text)) == text


@pytest.mark.parametrize("text", LABELS)
def test_number_like_labels_are_left_alone(text):
    assert safe_cell(text) == text


def test_other_values_pass_and_xlsx_illegal_controls_go():
    assert safe_cell(-5.0) == -5.0 and safe_cell(None) is None and safe_cell("Invented Bank") == "Invented Bank"
    assert safe_cell("A\x00B\x1bC") == "ABC"


def test_html_escapes_every_meaningful_character():
    assert safe_html("<script>alert('x')</script> & \"q\"") == (
        "&lt;script&gt;alert(&#x27;x&#x27;)&lt;/script&gt; &amp; &quot;q&quot;")


def test_markdown_cell_cannot_close_the_table_link_or_run_html():
    text = safe_markdown("<script>x</script> | [a](javascript:y) `c` *d* _e_\nf")
    assert "<" not in text and "\n" not in text
    assert text == ("&lt;script&gt;x&lt;/script&gt; \\| \\[a\\](javascript:y) \\`c\\` \\*d\\* \\_e\\_ f")


def test_terminal_text_loses_every_control_character():
    assert safe_terminal("A\x1b[31mB\x1b]0;title\x07C\x9b2J\x7fD\tE\r") == "A[31mB]0;titleC2JD E"
    assert safe_terminal("line one\nline two") == "line one\nline two"


@given(st.text())
def test_no_control_character_survives_for_the_terminal(text):
    out = safe_terminal(text)
    assert not any(ord(c) < 32 and c != "\n" or 0x7F <= ord(c) <= 0x9F for c in out)


@given(st.text(min_size=1))
def test_a_neutralized_cell_never_starts_a_formula_unless_number_like(text):
    out = safe_cell(text)
    assert not out.startswith(("=", "@", "\t", "\r")) or out.startswith("'")
