"""What the main screen's editing keys do: add, edit, copy, delete, move, take off, lock, undo.

A mixin of :class:`~tri.tui.screens.main.MainScreen`; every edit goes
through the app's session (one undoable step) and every message names the
circuit by its slot (or phases) and name.
"""

from __future__ import annotations

from dataclasses import replace
from typing import Any

from tri.schedule.model import Circuit, Schedule
from tri.tui.rules import move_summary
from tri.tui.wording import circuit_label


class CircuitActions:
    """Editing actions; the screen gives ``schedule``, ``_current``, ``_apply``, ``set_status``."""

    app: Any

    @property
    def schedule(self) -> Schedule:
        """The schedule on screen (the screen's own property)."""
        raise NotImplementedError

    def _current(self) -> int | None:
        raise NotImplementedError  # the screen's

    def _apply(self, new: Schedule, label: str, keep: int | None = None) -> None:
        raise NotImplementedError  # the screen's

    def set_status(self, text: str, error: bool = False) -> None:
        raise NotImplementedError  # the screen's

    def _added(self, what: str) -> Any:
        def done(circuit: Circuit | None) -> None:
            if circuit is None:
                self.set_status(f"Nothing {what}.")
                return
            new = self.schedule.with_added(circuit)
            index = len(new.circuits) - 1
            self._apply(new, f"Added {circuit_label(new, index)}", keep=index)

        return done

    def add_circuit(self, base: Circuit | None = None) -> None:
        """The add form, prefilled with ``base`` (default: blank, in the first free slot)."""
        from tri.tui.screens.forms import circuit_form, default_circuit

        s = self.schedule
        form = circuit_form(s, None, base or default_circuit(s))
        self.app.push_screen(form, self._added("added"))

    def action_add(self) -> None:
        self.add_circuit()

    def action_edit(self) -> None:
        from tri.tui.screens.forms import circuit_form

        index = self._current()
        if index is None:
            return

        def done(circuit: Circuit | None) -> None:
            if circuit is None:
                self.set_status("Edit cancelled; nothing changed.")
                return
            new = self.schedule.with_circuit(index, circuit)
            if new == self.schedule:
                self.set_status(f"No change to {circuit_label(new, index)}.")
                return
            self._apply(new, f"Edited {circuit_label(new, index)}", keep=index)

        self.app.push_screen(circuit_form(self.schedule, index), done)

    def action_duplicate(self) -> None:
        from tri.tui.screens.forms import circuit_form, default_circuit

        index = self._current()
        if index is None:
            return
        s = self.schedule
        original = s.circuits[index]
        copy = replace(original, name=f"{original.name} (copy)", locked=False)
        if s.panel.uses_slots:
            spot = default_circuit(s)
            copy = copy.at_slot(spot.slot)
        self.app.push_screen(circuit_form(s, None, copy), self._added("copied"))

    def action_delete(self) -> None:
        index = self._current()
        if index is None:
            return
        label = circuit_label(self.schedule, index)
        self._apply(self.schedule.without(index), f"Deleted {label}")

    def _movable(self) -> int | None:
        index = self._current()
        if index is None:
            return None
        if self.schedule.circuits[index].locked:
            label = circuit_label(self.schedule, index)
            self.set_status(f"{label} is locked; press l to unlock it first.", error=True)
            return None
        return index

    def move_to(self, index: int, target: Circuit) -> None:
        """Make the move of circuit ``index`` to ``target``'s position (checked beforehand)."""
        label = circuit_label(self.schedule, index)
        where = move_summary(self.schedule, target)
        self._apply(self.schedule.with_circuit(index, target), f"Moved {label} to {where}", index)

    def move_dialog(self) -> None:
        """The move dialog, starting at the breaker's present position (m on the list)."""
        from tri.tui.screens.forms import move_form

        index = self._movable()
        if index is None:
            return

        def done(target: Circuit | None) -> None:
            c = self.schedule.circuits[index]
            if target is None:
                self.set_status("Move cancelled.")
            elif (target.slot, target.phases) == (c.slot, c.phases):
                self.set_status(f"{circuit_label(self.schedule, index)} stays where it is.")
            else:
                self.move_to(index, target)

        self.app.push_screen(move_form(self.schedule, index), done)

    def action_take_off(self) -> None:
        """Take the breaker off the panel (it stays in the schedule, not placed), after asking."""
        from tri.tui.screens.choice import ChoiceScreen

        index = self._movable()
        if index is None:
            return
        s = self.schedule
        c = s.circuits[index]
        label = circuit_label(s, index)
        if not c.is_placed:
            self.set_status(f"{label} is not on the panel; m places it.")
            return

        def answer(value: str | None) -> None:
            if value != "off":
                self.set_status(f"{label} stays where it is.")
                return
            off = c.at_slot(None) if s.panel.uses_slots else c.on_phases(None)
            self._apply(s.with_circuit(index, off), f"Took {label} off the panel", keep=index)

        self.app.push_screen(
            ChoiceScreen(
                "Take the breaker off the panel?",
                f"{label} leaves its position and stays in the schedule as a circuit not "
                "placed yet, left out of the phase figures until it is placed again (m).",
                [("y", "yes, take it off the panel", "off")],
                cancel=None,
                cancel_label="no, keep it where it is",
            ),
            answer,
        )

    def action_lock(self) -> None:
        index = self._current()
        if index is None:
            return
        c = self.schedule.circuits[index]
        word = "Unlocked" if c.locked else "Locked"
        label = circuit_label(self.schedule, index)
        self._apply(
            self.schedule.with_circuit(index, replace(c, locked=not c.locked)),
            f"{word} {label}",
            keep=index,
        )

    def action_undo(self) -> None:
        label = self.app.session.undo()
        if label is None:
            self.set_status("Nothing to undo.")
            return
        self.app.schedule_changed(f"Undid: {label}. r redoes.")

    def action_redo(self) -> None:
        label = self.app.session.redo()
        if label is None:
            self.set_status("Nothing to redo.")
            return
        self.app.schedule_changed(f"Redid: {label}.")

    def _edit_whole(self, form_name: str, label: str) -> None:
        from tri.tui.screens import forms

        if form_name == "panel_form":  # a building's links depend on the panel's system
            form = forms.panel_form(self.schedule, outside=self.app.edit_problem)
        else:
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
