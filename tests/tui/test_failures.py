"""A failure the workstation did not expect says what happened and where its traceback was written."""

from pathlib import Path

from ladder.errors import InputError, Problem
from ladder.tui.tasks import describe


def test_an_unexpected_error_names_its_type_message_and_log_file(tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_STATE_HOME", str(tmp_path))       # platformdirs' user log folder on Linux
    try:
        raise ZeroDivisionError("no holdings to weight")
    except ZeroDivisionError as error:
        text = describe(error)
    assert text.startswith("ZeroDivisionError: no holdings to weight (details in ")
    log = Path(text.split("details in ")[1].rstrip(")"))
    assert log.is_relative_to(tmp_path)
    written = log.read_text(encoding="utf-8")
    assert "Traceback" in written and "test_an_unexpected_error_names_its_type" in written


def test_input_problems_are_shown_as_they_are_without_a_log(tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_STATE_HOME", str(tmp_path))
    text = describe(InputError([Problem("ticket", 2, 3, "face must be positive")]))
    assert text == "ticket:2:3: face must be positive"
    assert not any(tmp_path.rglob("*.log"))
