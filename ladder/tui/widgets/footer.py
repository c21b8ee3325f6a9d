"""The footer, rebuilt only when the keys it shows change, and once per burst of changes."""

from __future__ import annotations

from textual.widgets import Footer


class KeyFooter(Footer):
    """Textual's Footer. A view switch changes bindings several times in one frame (display,
    focus, check_action), and each change would rebuild every key; here a burst folds into one
    rebuild, skipped when the keys, their descriptions and their enabled state are as shown."""

    _pending = False
    _shown: tuple | None = None

    def bindings_changed(self, screen) -> None:
        self._bindings_ready = True
        if not screen.app.app_focus or self._pending:
            return
        if self.is_attached and screen is self.screen:
            self._pending = True
            self.call_after_refresh(self._rebuild)

    def _signature(self) -> tuple:
        return tuple((b.key, b.description, enabled) for _, b, enabled, _ in self.screen.active_bindings.values()
                     if b.show)

    async def _rebuild(self) -> None:
        self._pending = False
        signature = self._signature()
        if signature != self._shown:
            self._shown = signature
            await self.recompose()
