"""The main view: the schedule table, the results panel, a status line and the keys."""

from __future__ import annotations

from dataclasses import replace
from typing import Any, ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.screen import Screen
from textual.widgets import DataTable, Footer, Static

from tri.schedule.model import Circuit, Schedule
from tri.tui.widgets.circuit_table import CircuitTable
from tri.tui.widgets.results_panel import ResultsPanel

MAIN_HELP = """\
The main view. Move with ↑↓ (or j/k, PgUp/PgDn, Home/End) in the table;
every edit re-runs the engine and the results below update. Every edit can
be undone (u) and redone (r). Edits are kept in an autosave journal until
you save, so a crash or a dropped connection loses nothing."""


class MainScreen(Screen[None]):
    """Schedule table above, results below; all editing keys live here."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("a", "add", "Add", id="main.add"),
        Binding("e", "edit", "Edit", id="main.edit"),
        Binding("c", "duplicate", "Copy", show=False, id="main.copy"),
        Binding("x,delete", "delete", "Del", id="main.delete"),
        Binding("m", "move", "Move", show=False, id="main.move"),
        Binding("l", "lock", "Lock", show=False, id="main.lock"),
        Binding("u,ctrl+z", "undo", "Undo", id="main.undo"),
        Binding("r,ctrl+y", "redo", "Redo", show=False, id="main.redo"),
        Binding("v", "phasors", "Phasors", id="main.phasors"),
        Binding("b", "rebalance", "Balance", id="main.rebalance"),
        Binding("p", "panel", "Panel", show=False, id="main.panel"),
        Binding("s", "supply", "Supply", show=False, id="main.supply"),
        Binding("i", "readings", "Readings", show=False, id="main.readings"),
        Binding("f", "findings", "Findings", show=False, id="main.findings"),
        Binding("ctrl+s", "app.save", "Save", id="main.save"),
        Binding("w", "app.save_as", "Save as", show=False, id="main.save_as"),
        Binding("j", "cursor(1)", "Down", show=False),
        Binding("k", "cursor(-1)", "Up", show=False),
        Binding("q", "app.quit", "Quit", show=False, id="main.quit"),
    ]

    def compose(self) -> ComposeResult:
        yield Static("", id="title-bar")
        yield CircuitTable(id="circuits")
        yield ResultsPanel(id="results")
        yield Static("", id="status")
        yield Footer(show_command_palette=False)

    _ready = False

    def on_mount(self) -> None:
        self._ready = True
        self.query_one("#results", ResultsPanel).border_title = "Results"
        self.refresh_view()
        self.query_one(CircuitTable).focus()
        if not self.app.session.schedule.circuits:
            self.set_status("No circuits yet: press a to add one, ? for every key.")
        else:
            self.set_status("? lists every key. Enter edits the circuit under the cursor.")

    # ------------------------------------------------------------ drawing

    @property
    def schedule(self) -> Schedule:
        return self.app.session.schedule

    _keep: int | None = None

    def refresh_title(self) -> None:
        """Redraw the title bar only (saved / modified)."""
        app: Any = self.app
        session = app.session
        if session is None or not self._ready:
            return
        s = session.schedule
        p = s.panel
        mark = "● modified" if session.dirty else "saved"
        main = f"main {p.main_a:g} A" if p.main_a else "main lugs"
        right = f"│ {session.title_name} · {mark} "
        left = f" {p.name} · {p.system} · {p.spaces} spaces · bus {p.bus_a:g} A · {main} "
        room = max(self.size.width - len(right), 10)
        if len(left) > room:
            left = left[: room - 2] + "… "
        bar = Text(left.ljust(room))
        bar.append(right)
        self.query_one("#title-bar", Static).update(bar)

    def refresh_view(self, keep_index: int | None = None) -> None:
        """Redraw title, table and results from the app's session and analysis."""
        app: Any = self.app
        if app.session is None or not self._ready:
            return
        self.refresh_title()
        if keep_index is None:
            keep_index, self._keep = self._keep, None
        current = app.analysis_current
        table = self.query_one(CircuitTable)
        table.show(app.session.schedule, app.analysis if current else None, keep_index)
        results = self.query_one(ResultsPanel)
        if app.analysis is None:
            results.show(None, app.analysis_error or "Analysing…")
        else:
            results.show(app.analysis, stale=not current)

    def set_status(self, text: str, error: bool = False) -> None:
        """One line of feedback under the results."""
        if not self._ready:
            return
        status = self.query_one("#status", Static)
        status.update(Text(("Error: " if error else "") + text))
        status.set_class(error, "-error")

    # ------------------------------------------------------------ helpers

    def _current(self) -> int | None:
        index = self.query_one(CircuitTable).current_index
        if index is None:
            self.set_status("No circuit here: press a to add one.")
        return index

    def _apply(self, new: Schedule, label: str, keep: int | None = None) -> None:
        app: Any = self.app
        app.session.apply(new, label)
        app.schedule_changed(f"{label}. u undoes.")
        if keep is not None:
            self._keep = keep

    # ------------------------------------------------------------ actions

    def action_cursor(self, step: int) -> None:
        table = self.query_one(CircuitTable)
        table.move_cursor(row=max(table.cursor_row + step, 0))

    def on_data_table_row_selected(self, event: DataTable.RowSelected) -> None:
        event.stop()
        self.action_edit()

    def action_add(self) -> None:
        from tri.tui.screens.forms import circuit_form, default_circuit

        s = self.schedule

        def done(circuit: Circuit | None) -> None:
            if circuit is not None:
                self._apply(
                    self.schedule.with_added(circuit),
                    f"Added {circuit.name}",
                    keep=len(self.schedule.circuits),
                )
            else:
                self.set_status("Nothing added.")

        self.app.push_screen(circuit_form(s, None, default_circuit(s)), done)

    def action_edit(self) -> None:
        from tri.tui.screens.forms import circuit_form

        index = self._current()
        if index is None:
            return

        def done(circuit: Circuit | None) -> None:
            if circuit is not None:
                self._apply(self.schedule.with_circuit(index, circuit), f"Edited {circuit.name}")
            else:
                self.set_status("Edit cancelled; nothing changed.")

        self.app.push_screen(circuit_form(self.schedule, index), done)

    def action_duplicate(self) -> None:
        from tri.tui.screens.forms import circuit_form

        index = self._current()
        if index is None:
            return
        s = self.schedule
        original = s.circuits[index]
        copy = replace(original, name=f"{original.name} (copy)", locked=False)
        copy = copy.at_slot(None) if s.panel.uses_slots else copy
        from tri.tui.screens.forms import default_circuit

        spot = default_circuit(s)
        if s.panel.uses_slots and spot.slot is not None:
            copy = copy.at_slot(spot.slot)

        def done(circuit: Circuit | None) -> None:
            if circuit is not None:
                self._apply(
                    self.schedule.with_added(circuit),
                    f"Added {circuit.name}",
                    keep=len(self.schedule.circuits),
                )
            else:
                self.set_status("Nothing copied.")

        self.app.push_screen(circuit_form(s, None, copy), done)

    def action_delete(self) -> None:
        index = self._current()
        if index is None:
            return
        name = self.schedule.circuits[index].name
        self._apply(self.schedule.without(index), f"Deleted {name}")

    def action_move(self) -> None:
        from tri.tui.screens.forms import move_form

        index = self._current()
        if index is None:
            return
        circuit = self.schedule.circuits[index]
        if circuit.locked:
            self.set_status(f"{circuit.name} is locked; press l to unlock it first.")
            return

        def done(moved: Circuit | None) -> None:
            if moved is not None:
                where = (
                    f"slot {moved.slot}" if moved.slot else self.schedule.phase_text(moved.phases)
                )
                self._apply(
                    self.schedule.with_circuit(index, moved),
                    f"Moved {moved.name} to {where}",
                    keep=index,
                )
            else:
                self.set_status("Move cancelled.")

        self.app.push_screen(move_form(self.schedule, index), done)

    def action_lock(self) -> None:
        index = self._current()
        if index is None:
            return
        c = self.schedule.circuits[index]
        word = "Unlocked" if c.locked else "Locked"
        self._apply(
            self.schedule.with_circuit(index, replace(c, locked=not c.locked)),
            f"{word} {c.name}",
            keep=index,
        )

    def action_undo(self) -> None:
        app: Any = self.app
        label = app.session.undo()
        if label is None:
            self.set_status("Nothing to undo.")
            return
        app.schedule_changed(f"Undid: {label}. r redoes.")

    def action_redo(self) -> None:
        app: Any = self.app
        label = app.session.redo()
        if label is None:
            self.set_status("Nothing to redo.")
            return
        app.schedule_changed(f"Redid: {label}.")

    def _edit_whole(self, form_name: str, label: str) -> None:
        from tri.tui.screens import forms

        form = getattr(forms, form_name)(self.schedule)

        def done(new: Schedule | None) -> None:
            if new is None:
                self.set_status("Cancelled; nothing changed.")
            elif new == self.schedule:
                self.set_status("No change.")
            else:
                self._apply(new, label)

        self.app.push_screen(form, done)

    def action_panel(self) -> None:
        self._edit_whole("panel_form", "Edited the panel")

    def action_supply(self) -> None:
        self._edit_whole("supply_form", "Edited the supply")

    def action_readings(self) -> None:
        self._edit_whole("readings_form", "Edited the readings")

    def action_findings(self) -> None:
        from tri.tui.screens.findings import findings_screen

        app: Any = self.app
        if app.analysis is None or not app.analysis_current:
            self.set_status(app.analysis_error or "The results are being updated; press f again.")
            return
        self.app.push_screen(
            findings_screen(app.analysis, app.session.schedule, app.session.title_name)
        )

    def action_phasors(self) -> None:
        from tri.tui.screens.phasor import PhasorScreen

        self.app.push_screen(PhasorScreen())

    def action_rebalance(self) -> None:
        from tri.tui.screens.rebalance import RebalanceScreen

        self.app.push_screen(RebalanceScreen())
