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
from tri.tui.screens.circuit_actions import CircuitActions
from tri.tui.screens.main_screens import OtherScreens
from tri.tui.screens.panel_pick import PanelPicking
from tri.tui.widgets.circuit_table import CircuitTable
from tri.tui.widgets.panel_view import Cell, PanelView
from tri.tui.widgets.results_panel import ResultsPanel
from tri.tui.wording import circuit_details

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
    "building": "the building's tree: move to another panel (buildings only)",
    "log": "the log view: current over time, demand, duration (schedules with [log])",
    "scenario": "the case the figures show: connected load or a use scenario",
    "app.save": "save (comments kept, previous file kept as .bak)",
    "app.save_as": "save as",
    "cancel_pick": "put back the breaker being moved",
    "app.quit": "quit",
}

#: Actions allowed while a breaker is being moved on the panel view.
PICKING_ACTIONS = {"cancel_pick", "quit", "help", "toggle_view"}


class MainScreen(PanelPicking, OtherScreens, CircuitActions, Screen[None]):
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
        Binding("T", "building", "Tree", id="main.building"),
        Binding("d", "log", "Log", id="main.log"),
        Binding("n", "scenario", "Case", id="main.scenario"),
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
        app: Any = self.app
        opening, app.opening_status = app.opening_status, None
        if opening:
            self.set_status(opening)
        elif not app.session.schedule.circuits:
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
        name = p.name
        building = app.building
        if building is not None:
            name = building.path_words(building.current)
            others = len([i for i in building.dirty() if i != building.current])
            if others:
                right = f"│ {session.title_name} · {mark} (+{others} panel{'s' * (others > 1)}) "
        left = f" {name} · {p.system} · {p.spaces} spaces · bus {p.bus_a:g} A · {main} "
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
        results.border_title = self._results_title()
        # Keys of buildings, logs and scenarios join the footer: keep it on one line.
        extra = app.building is not None, schedule.log is not None, len(app.cases) > 1
        self.query_one(Footer).compact = sum(extra) > 0
        self.refresh_bindings()
        if app.analysis is None:
            results.show(None, app.analysis_error or "Analysing…")
        else:
            results.show(app.analysis, stale=not app.analysis_current, checks=app.checks)

    def _results_title(self) -> str:
        app: Any = self.app
        b = app.building
        if b is not None:
            feeds = any(p.parent == b.current for p in b.tree.panels)
            parent = b.parent(b.current)
            words = ["everything it feeds included"] if feeds else []
            if parent is not None:
                words.append(f"fed from {b.sessions[parent].schedule.panel.name}")
            if len(app.cases) > 1:
                case = app.scenario_shown
                words.insert(0, "connected load" if case is None else f"scenario {case}")
            return "Results · " + ", ".join(words) + " (T: the tree)"
        if len(app.cases) < 2:
            return "Results"
        case = app.scenario_shown
        shown = "connected load" if case is None else f"scenario {case}"
        return f"Results · {shown} (n: another case; checks: every case)"

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
        problem = app.edit_problem(new)
        if problem is not None:
            self.app.bell()
            self.set_status(f"Not done: {problem}", error=True)
            return
        app.session.apply(new, label)
        app.schedule_changed(f"{label}. u undoes.")
        if keep is not None:
            self._keep = keep

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        """While a breaker is being moved, only Enter, Esc, help and quit act."""
        if self.picking is not None and action not in PICKING_ACTIONS:
            return False
        app: Any = self.app
        if action == "log":
            return app.session is not None and app.session.schedule.log is not None
        if action == "scenario":
            return len(app.cases) > 1
        if action == "building":
            return app.building is not None
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

    def panel_changed(self) -> None:
        """Another panel of the building is shown: the cursor starts at its top."""
        if self.picking is not None:
            self._end_pick()
        self.refresh_view(keep_index=0)
