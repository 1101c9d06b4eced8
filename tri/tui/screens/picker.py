"""The start screen of bare ``tri``: demo panels, recent files, open a path."""

from __future__ import annotations

from pathlib import Path
from typing import Any, ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical
from textual.screen import Screen
from textual.widgets import OptionList, Static
from textual.widgets.option_list import Option

from tri.schedule.errors import ScheduleError
from tri.schedule.load import load_schedule
from tri.schedule.model import PanelInfo, Schedule
from tri.tui import recent
from tri.tui.demos import demo_files, demo_labels
from tri.tui.screens.form import Field, FormScreen, Values
from tri.tui.widgets.key_footer import KeyFooter

INTRO = (
    "tri balances three-phase panels: it shows each phase's current, the neutral and "
    "the unbalance, and finds the fewest breaker moves to even them out. "
    "Choose a demo panel (opened as an unsaved copy) or a recent file; ↑↓ and Enter. "
    "Figures are estimates; panel work is for qualified persons on de-energised "
    "equipment, and the local electrical code decides."
)


def blank_schedule(path: Path | None = None) -> Schedule:
    """A new, empty 42-space 208Y/120 panel (the form lets the user change it)."""
    name = path.stem.replace("_", " ").replace("-", " ") if path else "New panel"
    return Schedule(
        PanelInfo(name=name, system="208Y/120", frequency_hz=60.0, spaces=42, bus_a=225.0)
    )


class PickerScreen(Screen[None]):
    """Choose what to open."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("o", "open_path", "Open path", id="picker.open"),
        Binding("q,escape", "app.quit", "Quit", show=False, id="picker.quit"),
    ]

    def compose(self) -> ComposeResult:
        with Vertical(id="picker"):
            yield Static("tri · three-phase panel balancing", classes="dialog-title")
            yield Static(INTRO, id="picker-intro")
            yield OptionList(id="picker-list")
        yield KeyFooter(show_command_palette=False)

    def on_mount(self) -> None:
        options = self.query_one(OptionList)
        demos = demo_files()
        options.add_option(Option("── Demo panels ──", disabled=True))
        if demos:
            for p, label in zip(demos, demo_labels(demos), strict=True):
                options.add_option(Option(Text(f"  {label}"), id=f"demo:{p}"))
        else:
            options.add_option(Option("  (no demo panels in this installation)", disabled=True))
        options.add_option(Option("── Recent files ──", disabled=True))
        recents = recent.load_recent()
        for p in recents:
            options.add_option(Option(Text(f"  {p.name}  ({p.parent})"), id=f"file:{p}"))
        if not recents:
            options.add_option(Option("  (none yet)", disabled=True))
        options.add_option(Option("── Other ──", disabled=True))
        options.add_option(Option("  Open or create a file by path…", id="open"))
        options.add_option(Option("  Quit", id="quit"))
        options.focus()
        options.highlighted = next(
            (i for i, o in enumerate(options.options) if not o.disabled), None
        )

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        app: Any = self.app
        oid = event.option.id or ""
        if oid == "quit":
            app.exit(0)
        elif oid == "open":
            self.action_open_path()
        elif oid.startswith("file:"):
            app.open_path(Path(oid[5:]))
        elif oid.startswith("demo:"):
            path = Path(oid[5:])
            try:
                loaded = load_schedule(path)
            except ScheduleError as exc:
                app.show_problems(f"Cannot open {path.name}", exc)
                return
            app.open_copy(loaded, path.stem)

    def action_open_path(self) -> None:
        app: Any = self.app

        def validate(values: Values) -> tuple[Path | None, dict[str, str]]:
            text = values["path"].strip()
            if not text:
                return None, {"path": "type the path of a .toml schedule"}
            path = Path(text).expanduser()
            if path.is_dir():
                return None, {"path": "that is a folder; expected a .toml file"}
            if not path.exists() and path.suffix.lower() != ".toml":
                return None, {"path": "a new schedule's name must end in .toml"}
            return path, {}

        def chosen(path: Path | None) -> None:
            if path is None:
                return
            if path.exists():
                app.open_path(path)
            else:
                app.offer_create(path)

        form = FormScreen(
            "Open or create a schedule",
            [Field("path", "File", "", hint="e.g. panels/bakery.toml")],
            validate,
            help_text="An existing file opens; a new name offers to create it.",
        )
        self.app.push_screen(form, chosen)

    def set_status(self, text: str, error: bool = False) -> None:
        """Messages from the app show in the intro line."""
        self.query_one("#picker-intro", Static).update(Text(("Error: " if error else "") + text))
