"""The footer: one line listing the keys that work now, drawn as text.

Textual's Footer rebuilds a widget per key whenever the bindings change, which on every view switch
costs more than drawing the rest of the screen; this one redraws a single line. Keys of one
``Binding.Group`` are shown together; groups named in ``hidden_groups`` (keys shown elsewhere, such
as the view bar's) are left out; keys that ``check_action`` greys out are dimmed.
"""

from __future__ import annotations

from rich.text import Text
from textual.binding import Binding
from textual.widget import Widget


class KeyFooter(Widget):
    COMPONENT_CLASSES = {"key-footer--key", "key-footer--disabled"}
    DEFAULT_CSS = """
    KeyFooter { dock: bottom; height: 1; }
    """

    def __init__(self, hidden_groups: tuple[str, ...] = ()) -> None:
        super().__init__()
        self.hidden_groups = hidden_groups

    def on_mount(self) -> None:
        self.screen.bindings_updated_signal.subscribe(self, lambda screen: self.refresh())

    def on_unmount(self) -> None:
        self.screen.bindings_updated_signal.unsubscribe(self)

    def render(self) -> Text:
        key_style = self.get_component_rich_style("key-footer--key")
        off_style = self.get_component_rich_style("key-footer--disabled")
        line = Text(no_wrap=True, overflow="ellipsis")
        groups: dict[str, list] = {}
        items: list = []
        for _, binding, enabled, _ in self.screen.active_bindings.values():
            if not binding.show:
                continue
            if binding.group is not None:
                if binding.group.description in self.hidden_groups:
                    continue
                if binding.group.description not in groups:
                    groups[binding.group.description] = []
                    items.append(("group", binding.group.description))
                groups[binding.group.description].append((binding, enabled))
            else:
                items.append(("key", (binding, enabled)))
        for kind, item in items:
            if kind == "group":
                members = groups[item]
                line.append(" ")
                for binding, enabled in members:
                    line.append(self.app.get_key_display(binding), key_style if enabled else off_style)
                line.append(f" {item} ")
            else:
                binding, enabled = item
                line.append(" ")
                line.append(self.app.get_key_display(binding), key_style if enabled else off_style)
                line.append(f" {binding.description} ", None if enabled else off_style)
        line.append(" ")
        line.append(self.app.get_key_display(Binding(self.app.COMMAND_PALETTE_BINDING, "command_palette")),
                    key_style)
        line.append(" Palette ")
        return line
