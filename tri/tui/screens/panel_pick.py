"""Moving a breaker on the panel view: m picks it up, the cursor chooses, Enter puts it down.

A mixin of :class:`~tri.tui.screens.main.MainScreen`. While a breaker is
held, the positions it would take show ``→`` (free) or ``✗`` (taken, with
the breaker holding them) and the status line says which pole lands where;
every pole is checked with the schedule's own rules
(:func:`~tri.tui.rules.move_problems`) before anything changes. Esc puts it
back.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from tri.tui.rules import move_problems, move_summary, moved
from tri.tui.widgets.panel_view import PanelView
from tri.tui.wording import circuit_label

if TYPE_CHECKING:
    from tri.schedule.model import Schedule


class PanelPicking:
    """Pick up, choose, put down (``query_one``, ``schedule``, ``set_status`` are the screen's)."""

    # The screen's (and CircuitActions'): query_one, set_status, refresh_bindings,
    # _movable, move_to, move_dialog. Declared only, so that the real ones are found.
    app: Any
    view: str
    picking: int | None
    query_one: Any
    set_status: Any
    refresh_bindings: Any
    _movable: Any
    move_to: Any
    move_dialog: Any

    @property
    def schedule(self) -> Schedule:
        """The schedule on screen (the screen's own property)."""
        raise NotImplementedError

    def action_move(self) -> None:
        """m: on the panel view, pick the breaker up; on the list, the move dialog."""
        if self.view != "panel":
            self.move_dialog()
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
