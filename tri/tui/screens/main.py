"""The main view: the schedule as a list or as the panel, the results, a status line, the keys.

Tab switches between the list (one row per breaker) and the panel view
(every position, as the panel is built). The status line says what the last
key did; once the cursor moves it gives the selected circuit in full (name,
poles and slots, rating, continuous, locked, note). On the panel view, m
picks a breaker up and Enter puts it down at the position under the cursor,
every pole checked with the schedule's own rules before anything changes.
"""

from __future__ import annotations

from typing import Any, ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.screen import Screen
from textual.widgets import DataTable, Footer, Static

from tri.schedule.model import Schedule
from tri.tui import recent
from tri.tui.rules import move_problems, move_summary, moved
from tri.tui.screens.circuit_actions import CircuitActions
from tri.tui.widgets.circuit_table import CircuitTable
from tri.tui.widgets.panel_view import Cell, PanelView
from tri.tui.widgets.results_panel import ResultsPanel
from tri.tui.wording import circuit_details, circuit_label

MAIN_HELP = """\
The main view. Tab switches between the list and the panel view. Move with
↑↓ (or j/k), PgUp/PgDn, Home/End (or g/G); ←→ change column on the panel
view. Every edit re-runs the engine and the results below update. Every edit
can be undone (u) and redone (r). The status line gives the selected circuit
in full. Edits are kept in an autosave journal until you save, so a crash or
a dropped connection loses nothing.

Panel view: two-column panels show both columns side by side, slot numbers
at the outer edges, each row's phase in the middle (left│right). A
multi-pole breaker's poles are joined by ┌ │ └; its later poles say "pole 2".
"· space" is an empty position; Brkr is the rating, * a continuous load, #
locked. Rail boards list the circuits under each phase they take. m picks
the breaker under the cursor up: move the cursor to the new first slot (or
phase) and press Enter; the positions it would take show → (free) or ✗
(taken, with the breaker that holds it). Esc puts it back. Enter on a space
adds a circuit there."""

#: What each key does, in words, for the help page (the footer keeps the short labels).
KEY_WORDS = {
    "toggle_view": "the list or the panel view (as built)",
    "add": "add a circuit",
    "duplicate": "copy the circuit (the copy goes to the first free slot)",
    "delete": "delete the circuit (u undoes)",
    "move": "move (list: a dialog; panel view: pick up, choose, Enter)",
    "take_off": "take the breaker off the panel (asks first; it stays, not placed)",
    "lock": "lock or unlock (the rebalancer never moves a locked breaker)",
    "undo": "undo",
    "redo": "redo",
    "phasors": "phasor diagram",
    "rebalance": "rebalance: fewest moves to a target, and more",
    "panel": "edit the panel (name, system, spaces, ratings, labels)",
    "supply": "edit the supply (transformer and feeder)",
    "readings": "edit the site readings",
    "findings": "findings, checks (as tri check) and the full report",
    "app.save": "save (comments kept, previous file kept as .bak)",
    "app.save_as": "save as",
    "cancel_pick": "put back the breaker being moved",
    "app.quit": "quit",
}

#: Actions allowed while a breaker is being moved on the panel view.
PICKING_ACTIONS = {"cancel_pick", "quit", "help", "toggle_view"}


class MainScreen(CircuitActions, Screen[None]):
    """Schedule (list or panel) above, results below; all editing keys live here."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("tab", "toggle_view", "View", id="main.view"),
        Binding("a", "add", "Add", id="main.add"),
        Binding("e", "edit", "Edit", show=False, id="main.edit"),
        Binding("c", "duplicate", "Copy", show=False, id="main.copy"),
        Binding("x,delete", "delete", "Del", show=False, id="main.delete"),
        Binding("m", "move", "Move", id="main.move"),
        Binding("o", "take_off", "Take off", show=False, id="main.take_off"),
        Binding("l", "lock", "Lock", show=False, id="main.lock"),
        Binding("u,ctrl+z", "undo", "Undo", show=False, id="main.undo"),
        Binding("r,ctrl+y", "redo", "Redo", show=False, id="main.redo"),
        Binding("v", "phasors", "Phasors", id="main.phasors"),
        Binding("b", "rebalance", "Balance", id="main.rebalance"),
        Binding("p", "panel", "Panel", show=False, id="main.panel"),
        Binding("s", "supply", "Supply", show=False, id="main.supply"),
        Binding("i", "readings", "Readings", show=False, id="main.readings"),
        Binding("f", "findings", "Findings", show=False, id="main.findings"),
        Binding("ctrl+s", "app.save", "Save", id="main.save"),
        Binding("w", "app.save_as", "Save as", show=False, id="main.save_as"),
        Binding("escape", "cancel_pick", "Put back", id="main.cancel_pick"),
        Binding("j", "cursor(1)", "Down", show=False),
        Binding("k", "cursor(-1)", "Up", show=False),
        Binding("q", "app.quit", "Quit", show=False, id="main.quit"),
    ]

    KEY_WORDS = KEY_WORDS
    view = "list"
    picking: int | None = None
    _ready = False
    _keep: int | None = None

    def compose(self) -> ComposeResult:
        yield Static("", id="title-bar")
        yield CircuitTable(id="circuits")
        yield PanelView(id="panel-view")
        yield ResultsPanel(id="results")
        yield Static("", id="status")
        yield Footer(show_command_palette=False)

    def on_mount(self) -> None:
        self._ready = True
        self.query_one("#results", ResultsPanel).border_title = "Results"
        self.view = "panel" if recent.load_settings().get("view") == "panel" else "list"
        self._show_view()
        self.refresh_view()
        if not self.app.session.schedule.circuits:
            self.set_status("No circuits yet: press a to add one, ? for every key.")
        else:
            self.set_status("? lists every key. Tab: list or panel view. Enter edits.")

    # ------------------------------------------------------------ drawing

    @property
    def schedule(self) -> Schedule:
        return self.app.session.schedule

    def refresh_title(self) -> None:
        """Redraw the title bar only (saved / modified)."""
        app: Any = self.app
        session = app.session
        if session is None or not self._ready:
            return
        p = session.schedule.panel
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
        """Redraw title, the schedule (list or panel) and results from the app's state."""
        app: Any = self.app
        if app.session is None or not self._ready:
            return
        self.refresh_title()
        if keep_index is None:
            keep_index, self._keep = self._keep, None
        analysis = app.analysis if app.analysis_current else None
        schedule = app.session.schedule
        if self.picking is not None and self.picking >= len(schedule.circuits):
            self._end_pick()
        # Only the view on screen is redrawn; the other catches up when Tab shows it.
        if self.view == "list":
            self.query_one(CircuitTable).show(schedule, analysis, keep_index)
        else:
            self.query_one(PanelView).show(schedule, analysis, keep_index)
        results = self.query_one(ResultsPanel)
        if app.analysis is None:
            results.show(None, app.analysis_error or "Analysing…")
        else:
            results.show(app.analysis, stale=not app.analysis_current, checks=app.checks)

    def set_status(self, text: str, error: bool = False) -> None:
        """One line of feedback under the results (it stays until the cursor moves)."""
        if not self._ready:
            return
        status = self.query_one("#status", Static)
        prefix = "Error: " if error and not text.startswith("✗") else ""
        status.update(Text(prefix + text))
        status.set_class(error, "-error")

    # ------------------------------------------------------------ the two views

    def _show_view(self) -> None:
        table, panel = self.query_one(CircuitTable), self.query_one(PanelView)
        table.display = self.view == "list"
        panel.display = self.view == "panel"
        (table if self.view == "list" else panel).focus()

    def action_toggle_view(self) -> None:
        """Tab: the list or the panel view, the cursor staying on the same circuit."""
        if self.picking is not None:
            self.set_status("Put the breaker down first (Enter) or back (Esc).", error=True)
            return
        index = self._current(quiet=True)
        self.view = "panel" if self.view == "list" else "list"
        recent.store_setting("view", self.view)
        self._show_view()
        self.refresh_view(keep_index=index)
        if index is not None:
            if self.view == "list":
                self.query_one(CircuitTable).select_index(index)
            else:
                self.query_one(PanelView).select_index(index)
        name = "panel view (as built)" if self.view == "panel" else "list"
        self.set_status(f"The {name}; Tab switches back.")

    def _current(self, quiet: bool = False) -> int | None:
        if self.view == "panel":
            index = self.query_one(PanelView).current_index
        else:
            index = self.query_one(CircuitTable).current_index
        if index is None and not quiet:
            self.set_status("No breaker here: a adds a circuit.")
        return index

    def _apply(self, new: Schedule, label: str, keep: int | None = None) -> None:
        app: Any = self.app
        app.session.apply(new, label)
        app.schedule_changed(f"{label}. u undoes.")
        if keep is not None:
            self._keep = keep

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        """While a breaker is being moved, only Enter, Esc, help and quit act."""
        if self.picking is not None and action not in PICKING_ACTIONS:
            return False
        return not (action == "cancel_pick" and self.picking is None)

    # ------------------------------------------------------------ cursor and status line

    def action_cursor(self, step: int) -> None:
        table = self.query_one(CircuitTable)
        table.action_cursor_down() if step > 0 else table.action_cursor_up()

    def on_circuit_table_navigated(self, event: CircuitTable.Navigated) -> None:
        self._describe(self.query_one(CircuitTable).current_index, None)

    def on_panel_view_cursor_moved(self, event: PanelView.CursorMoved) -> None:
        if self.picking is not None:
            self._pick_status()
        else:
            self._describe(event.cell.circuit if event.cell else None, event.cell)

    def _describe(self, index: int | None, cell: Cell | None) -> None:
        s = self.schedule
        if index is not None and index < len(s.circuits):
            self.set_status(circuit_details(s, index))
        elif cell is not None and cell.kind == "slot" and cell.position is not None:
            phase = s.labels[cell.position.phase]
            self.set_status(
                f"slot {cell.position.slot} (phase {phase}) is a space: Enter or a adds a circuit."
            )
        elif cell is not None and cell.kind == "group" and cell.phase is not None:
            self.set_status(f"phase {s.labels[cell.phase]}: Enter adds a circuit on it.")

    def action_add(self) -> None:
        """a: add a circuit; on a space of the panel view, in that space."""
        cell = self.query_one(PanelView).current if self.view == "panel" else None
        if cell is not None and cell.circuit is None:
            self._add_at(cell)
        else:
            self.add_circuit()

    def _add_at(self, cell: Cell) -> None:
        from tri.tui.screens.forms import default_circuit

        base = default_circuit(self.schedule)
        if cell.kind == "slot" and cell.position is not None:
            self.add_circuit(base.at_slot(cell.position.slot))
        elif cell.kind == "group" and cell.phase is not None:
            self.add_circuit(base.on_phases((cell.phase,)))
        else:
            self.add_circuit()

    def on_data_table_row_selected(self, event: DataTable.RowSelected) -> None:
        event.stop()
        self.action_edit()

    def on_panel_view_chosen(self, event: PanelView.Chosen) -> None:
        event.stop()
        cell = event.cell
        if self.picking is not None:
            self._put_down()
        elif cell is None:
            return
        elif cell.circuit is not None:
            self.action_edit()
        else:
            self._add_at(cell)

    # ------------------------------------------------------------ moving on the panel view

    def action_move(self) -> None:
        """m: on the panel view, pick the breaker up; on the list, the move dialog."""
        if self.view != "panel":
            super().action_move()
            return
        index = self._movable()
        if index is None:
            return
        c = self.schedule.circuits[index]
        if not self.schedule.panel.uses_slots and c.poles == 3 and c.is_placed:
            label = circuit_label(self.schedule, index)
            self.set_status(f"{label} takes every phase; it has no other place on a rail board.")
            return
        self.picking = index
        view = self.query_one(PanelView)
        view.picking = index
        view.refresh()
        self.refresh_bindings()
        self._pick_status()

    def _pick_target(self) -> Any:
        view = self.query_one(PanelView)
        target = view.pick_target()
        if target is None or self.picking is None:
            return None
        s = self.schedule
        if s.panel.uses_slots:
            return moved(s, self.picking, slot=target)
        return moved(s, self.picking, phases=target)

    def _pick_status(self) -> None:
        if self.picking is None:
            return
        s = self.schedule
        label = circuit_label(s, self.picking)
        c = s.circuits[self.picking]
        target = self._pick_target()
        keys = "↑↓←→ choose, Enter puts it here, Esc puts it back"
        if target is None:
            self.set_status(f"Moving {label}: choose a position ({keys}).")
        elif (target.slot, target.phases) == (c.slot, c.phases):
            self.set_status(f"Moving {label} ({c.poles}-pole): choose where it goes ({keys}).")
        else:
            problems = move_problems(s, self.picking, target)
            where = move_summary(s, target)
            if problems:
                self.set_status(f"✗ {label} to {where}: {'; '.join(problems)}", error=True)
            else:
                self.set_status(f"✓ {label} to {where}: all free. {keys}.")

    def _put_down(self) -> None:
        index, target = self.picking, self._pick_target()
        if index is None:
            return
        c = self.schedule.circuits[index]
        if target is None or (target.slot, target.phases) == (c.slot, c.phases):
            self.set_status("Choose another position, or Esc to put it back.", error=True)
            self.app.bell()
            return
        problems = move_problems(self.schedule, index, target)
        if problems:
            self._pick_status()
            self.app.bell()
            return
        self._end_pick()
        self.move_to(index, target)

    def _end_pick(self) -> None:
        self.picking = None
        view = self.query_one(PanelView)
        view.picking = None
        view.refresh()
        self.refresh_bindings()

    def action_cancel_pick(self) -> None:
        if self.picking is None:
            return
        label = circuit_label(self.schedule, self.picking)
        index = self.picking
        self._end_pick()
        self.query_one(PanelView).select_index(index)
        self.set_status(f"{label} stays where it was.")

    # ------------------------------------------------------------ other screens

    def action_findings(self) -> None:
        from tri.tui.screens.findings import findings_screen

        app: Any = self.app
        if app.analysis is None or not app.analysis_current:
            self.set_status(app.analysis_error or "The results are being updated; press f again.")
            return
        self.app.push_screen(
            findings_screen(
                app.analysis, app.session.schedule, app.session.title_name, self.app.size.width
            )
        )

    def action_phasors(self) -> None:
        from tri.tui.screens.phasor import PhasorScreen

        self.app.push_screen(PhasorScreen())

    def action_rebalance(self) -> None:
        from tri.tui.screens.rebalance import RebalanceScreen

        self.app.push_screen(RebalanceScreen())
