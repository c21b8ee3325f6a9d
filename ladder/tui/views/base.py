"""What every view shares: the results it shows and how it says a figure is not ready."""

from __future__ import annotations

from textual.containers import Vertical
from textual.reactive import reactive
from textual.widgets import Static

from ladder.tui.results import Results


class View(Vertical):
    """A view. The app sets ``results`` (attributes down); the view posts messages up.

    ``NEEDS`` are the tasks whose results it shows; ``refresh_view`` runs when the view is on screen
    and its results changed (hidden views catch up when they are shown).
    """

    TITLE = ""
    SHORT = ""          # the view bar's name on narrow screens
    NEEDS: tuple[str, ...] = ()
    results: reactive[Results | None] = reactive(None)

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self._shown: Results | None = None

    def watch_results(self) -> None:
        if self.display:
            self.catch_up()

    def catch_up(self) -> None:
        if self.results is not None and self.results is not self._shown:
            self._shown = self.results
            self.refresh_view(self.results)

    def refresh_view(self, results: Results) -> None:  # pragma: no cover - each view overrides
        raise NotImplementedError

    def show_state(self, results: Results, task: str) -> bool:
        """Say in the view's Notice why ``task``'s figures are missing; True when they are there."""
        text = self.state_text(results, task)
        self.query_one(Notice).say(text, "error" if task in results.errors else "computing")
        return text is None

    def figures(self, results: Results, task: str):
        """``task``'s result to show, or None; while it computes the previous figures stay on screen
        dimmed (class ``-stale``) and the Notice says so, or why there are none."""
        value, stale = results.latest(task)
        if task in results.errors:
            text, state = f"Not available: {results.errors[task]}", "error"
        elif task in results.stopped:
            text, state = ("Stopped (Esc): " + ("the dimmed figures are from before the change; " if value is not None
                                                else "") + "ctrl+r computes again."), "stale"
        elif value is None:
            text, state = "Computing…", "computing"
        elif stale:
            text, state = "Recomputing: the dimmed figures are from before the change (time on the top line).", "stale"
        else:
            text, state = None, "computing"
        self.query_one(Notice).say(text, state)
        self.set_class(stale or task in results.errors, "-stale")
        return value

    def state_text(self, results: Results, task: str) -> str | None:
        """Why ``task``'s figures are not on screen (computing, failed, unavailable), or None."""
        if task in results.errors:
            return f"Not available: {results.errors[task]}"
        if task in results.stopped and results.get(task) is None:
            return "Stopped (Esc): ctrl+r computes again."
        if task in results.pending or results.get(task) is None:
            return "Computing…"
        return None


class Notice(Static):
    """A one-line state message in a view (computing, stale, failed), shown only when set."""

    def say(self, text: str | None, state: str = "computing") -> None:
        self.set_classes("-" + state if text else "")
        self.display = bool(text)
        self.update(text or "")
