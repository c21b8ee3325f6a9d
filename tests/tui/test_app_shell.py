"""The app shell: keys switch views, the palette lists every view, bindings carry ids and
descriptions, unavailable actions are greyed out, stale results are dropped, quitting with changes
asks, and the command line never loads Textual for the reporting commands."""

from __future__ import annotations

import subprocess
import sys

from conftest import drive
from ladder import CAUTION
from ladder.demo import demo_files, demo_source


def test_keys_switch_every_view_and_focus_follows(demo_book):
    from ladder.tui.app import VIEWS

    seen = {}

    async def script(app, pilot):
        for name, key, _ in VIEWS:
            await pilot.press(key)
            await pilot.pause()
            seen[name] = (app.query_one("#views").current, app.current_view.id,
                          app.focused is not None and app.current_view in app.focused.ancestors_with_self)
        await pilot.press(VIEWS[0][1])

    drive(demo_book, script)
    assert seen == {name: (name, name, True) for name, _, _ in VIEWS}


def test_palette_lists_every_view_and_bindings_have_ids(demo_book):
    from ladder.tui.app import VIEWS, LadderApp

    titles = []

    async def script(app, pilot):
        titles.extend(command.title for command in app.get_system_commands(app.screen))

    drive(demo_book, script)
    for _, _, cls in VIEWS:
        assert f"Show {cls.TITLE}" in titles
    keys = {b.key for b in LadderApp.BINDINGS}
    assert {key for _, key, _ in VIEWS} <= keys and "question_mark" in keys
    from ladder.tui.screens import ConfirmScreen, DetailScreen, QuitScreen
    from ladder.tui.widgets.frame_table import FrameTable

    for owner in [LadderApp, FrameTable, DetailScreen, QuitScreen, ConfirmScreen] + [cls for _, _, cls in VIEWS]:
        for binding in owner.BINDINGS:
            assert binding.id and binding.description, (owner.__name__, binding.key)


def test_caution_is_always_on_screen_and_keys_panel_toggles(demo_book):
    shown = []

    async def script(app, pilot):
        shown.append(str(app.query_one("#caution").render()))
        await pilot.press("question_mark")
        await pilot.pause()
        shown.append(bool(app.screen.query("HelpPanel")))
        await pilot.press("question_mark")
        await pilot.pause()
        shown.append(bool(app.screen.query("HelpPanel")))

    drive(demo_book, script)
    assert shown == [CAUTION, True, False]


def test_save_is_greyed_out_until_something_changes_and_stale_results_are_dropped(demo_book):
    from ladder.tui.app import Computed

    seen = {}

    async def script(app, pilot):
        seen["save_before"] = app.check_action("save", ())
        current = app.results
        app.post_message(Computed(current.generation - 1, "valuation", result="stale"))
        await pilot.pause()
        seen["kept"] = app.results is current and app.results.valuation != "stale"

    drive(demo_book, script)
    assert seen == {"save_before": None, "kept": True}


def test_every_task_of_the_demo_book_lands_without_error(demo_book):
    state = {}

    async def script(app, pilot):
        state["errors"] = dict(app.results.errors)
        state["pending"] = set(app.results.pending)
        state["tasks"] = set(app.results.values)

    drive(demo_book, script)
    assert state == {"errors": {}, "pending": set(),
                     "tasks": {"valuation", "check", "shock", "plan", "cash", "history"}}


def test_quitting_with_changes_asks_and_stay_keeps_the_app(demo_book):
    from ladder.tui.screens import QuitScreen

    state = {}

    async def script(app, pilot):
        await pilot.press("y")                      # Curve view
        await pilot.pause()
        await pilot.press("plus")                   # +1 bp on the first tenor: an unsaved change
        await pilot.pause()
        state["unsaved"] = dict(app.unsaved)
        await pilot.press("q")
        await pilot.pause()
        state["asked"] = isinstance(app.screen, QuitScreen)
        await pilot.press("escape")                 # stay
        await pilot.pause()
        state["stayed"] = not isinstance(app.screen, QuitScreen) and app.is_running
        await pilot.press("q")
        await pilot.pause()
        await pilot.press("d")                      # quit without saving
        await pilot.pause()

    app = drive(demo_book, script)
    assert state["unsaved"] == {"curve": "par yields edited"}
    assert state["asked"] and state["stayed"]
    assert not app.is_running


def test_quitting_without_changes_does_not_ask(demo_book):
    async def script(app, pilot):
        await pilot.press("q")
        await pilot.pause()

    assert not drive(demo_book, script).is_running


def test_open_is_the_default_command_on_a_working_copy_of_the_demo(tmp_path, monkeypatch):
    # issue 12: `ladder` alone opens a copy in the user's data folder (XDG_DATA_HOME on Linux, as
    # platformdirs reads it), made on first use, never the installed files.
    from ladder.cli import _parser
    from ladder.demo import working_demo

    args = _parser().parse_args(["open"])
    assert args.book is None and args.run.__module__ == "ladder.commands.open"
    monkeypatch.setenv("XDG_DATA_HOME", str(tmp_path))
    folder = working_demo()
    assert folder.is_relative_to(tmp_path) and (folder / "book.toml").is_file()
    assert sorted(p.name for p in folder.iterdir()) == sorted(p.name for p in demo_files())
    (folder / "holdings.csv").write_text("changed by the user", encoding="utf-8")
    assert working_demo() == folder and (folder / "holdings.csv").read_text(encoding="utf-8") == "changed by the user"
    assert "changed" not in (demo_source() / "holdings.csv").read_text(encoding="utf-8")


def test_reporting_commands_never_load_textual():
    code = ("import sys; from ladder.cli import _parser; p = _parser(); p.parse_args(['value', 'x']); "
            "import ladder.commands.open, ladder.tui; print(any(m.startswith('textual') for m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_palette_answers_to_the_command_verbs(demo_book):
    # issue 19: typing a command's name finds the view that shows it (best fuzzy match first)
    from textual.fuzzy import Matcher

    opened, said = {}, []

    async def script(app, pilot):
        commands = list(app.get_system_commands(app.screen))
        for verb in ("value", "shock", "check", "plan", "build", "risk", "cash", "report"):
            best = max(commands, key=lambda c: Matcher(verb).match(c.title))
            if verb == "report":
                app.notify = lambda message, **kw: said.append(message)
            best.callback()
            await pilot.pause()
            opened[verb] = app.query_one("#views").current

    drive(demo_book, script)
    assert opened == {"value": "holdings", "shock": "rates", "check": "policy", "plan": "plan", "build": "builder",
                      "risk": "rates", "cash": "cash", "report": "history"}
    assert said and "ladder report" in said[0]


def test_old_figures_stay_dimmed_while_new_ones_compute_and_the_top_line_times_it(demo_book):
    from ladder.tui.results import TASKS

    seen = {}

    async def script(app, pilot):
        table = app.query_one("#holdings-table")
        rows = table.row_count
        # the state right after a change of book, before any task has landed (no worker started)
        app.results = app.results.next_book(app.book).started(TASKS)
        app._hand_down()
        await pilot.pause()
        view = app.query_one("#holdings")
        seen["rows"] = (rows, table.row_count)
        seen["stale"] = view.has_class("-stale")
        seen["notice"] = str(view.query_one("Notice").render())
        seen["top"] = str(app.query_one("#book-line").render())
        seen["inputs"] = app.results.valuation        # never the old book's figures as an input

    drive(demo_book, script)
    assert seen["rows"][1] == seen["rows"][0] == len(demo_book.holdings)
    assert seen["stale"] and "dimmed figures are from before the change" in seen["notice"]
    assert "computing valuation (1 of 6)" in seen["top"] and " s, Esc stops  ·  " in seen["top"]
    assert seen["inputs"] is None


def test_charts_fold_on_short_screens_and_g_shows_them(demo_book):
    seen = []

    async def script(app, pilot):
        await pilot.press("y")
        await pilot.pause()
        chart = app.query_one("#curve-chart")
        seen.append(chart.display and chart.region.height > 0)
        await pilot.press("g")
        await pilot.pause()
        seen.append(chart.region.height > 0)

    drive(demo_book, script, size=(80, 24))
    assert seen == [False, True]
