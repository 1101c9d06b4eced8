"""A keyboard form in a dialog, validated as you type by the schedule loader's own rules.

Each form is a list of :class:`Field` and a ``validate`` function that turns
the typed values into a result or a message per key. Invalid input is never
thrown away: the form stays open with the field marked ✗ and the reason
written under it, until it is fixed or the user presses Escape.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import Any, ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widget import Widget
from textual.widgets import Input, Label, Static

from tri.tui.widgets.cycle import Cycle
from tri.tui.widgets.in_order import OrderedInput
from tri.tui.widgets.toggle import Toggle

Values = dict[str, Any]
#: validate(values) -> (result or None, {key or "": message})
Validator = Callable[[Values], tuple[Any, dict[str, str]]]


@dataclass(frozen=True)
class Field:
    """One row of a form.

    Attributes
    ----------
    key : str
        Name used in ``values`` and in messages (the file's key where there is one).
    label : str
        Shown left of the input.
    value : str or bool
        Initial value (text for inputs and choices, bool for checkboxes).
    kind : {"text", "choice", "bool"}
    choices : tuple of (label, value)
        For ``choice``.
    hint : str
        Placeholder text (units, examples).
    disabled : bool
        Shown but not editable.
    """

    key: str
    label: str
    value: str | bool = ""
    kind: str = "text"
    choices: tuple[tuple[str, str], ...] = ()
    hint: str = ""
    disabled: bool = False


class FormScreen(ModalScreen[Any]):
    """A dialog with fields; returns the validated result, or ``None`` when cancelled."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "cancel", "Cancel", id="form.cancel"),
        Binding("ctrl+s", "accept", "Accept", id="form.accept"),
        Binding("enter", "accept", "Accept", show=False),
        # Priority: field-to-field keys act when they arrive, before the keys
        # after them are handed to a field (a burst over SSH stays in order).
        Binding("down,tab", "app.focus_next", "Next", show=False, priority=True),
        Binding("up,shift+tab", "app.focus_previous", "Previous", show=False, priority=True),
    ]

    def __init__(
        self,
        title: str,
        fields: list[Field],
        validate: Validator,
        help_text: str = "",
        describe: Callable[[Any], str] | None = None,
    ):
        super().__init__()
        self.form_title = title
        self.fields = fields
        self.validate = validate
        self.help_text = help_text
        self.describe = describe
        self.problems: dict[str, str] = {}
        self.result: Any = None
        self.moved_to: str | None = None
        #: What each one-cell mark shows now, by widget id (only changes are drawn).
        self._marks = {f"{kind}-{f.key}": " " for f in fields for kind in ("focus", "mark")}
        self._message: tuple[str, bool] | None = None

    def compose(self) -> ComposeResult:
        with Vertical(id="form-box", classes="dialog"):
            yield Static(self.form_title, classes="dialog-title", markup=False)
            with VerticalScroll(id="form-fields"):
                for f in self.fields:
                    with Horizontal(classes="form-row", id=f"row-{f.key}"):
                        yield Label(" ", classes="form-focus", id=f"focus-{f.key}")
                        yield Label(" ", classes="form-mark", id=f"mark-{f.key}")
                        yield Label(f.label, classes="form-label")
                        yield self._widget(f)
            yield Static("", id="form-message", classes="form-message")
            yield Static(
                "Enter accept · Esc cancel · ↑↓ field (▶ is here) · ←→ change",
                classes="dialog-keys",
            )

    def _widget(self, f: Field) -> Widget:
        wid = f"field-{f.key}"
        if f.kind == "bool":
            return Toggle(bool(f.value), id=wid, disabled=f.disabled, classes="form-input")
        if f.kind == "choice":
            return Cycle(f.choices, str(f.value), id=wid, disabled=f.disabled, classes="form-input")
        widget = OrderedInput(
            str(f.value),
            placeholder=f.hint,
            id=wid,
            compact=True,
            disabled=f.disabled,
            classes="form-input",
        )
        widget.cursor_blink = False
        return widget

    def on_mount(self) -> None:
        self._revalidate()
        for f in self.fields:
            if not f.disabled:
                self.query_one(f"#field-{f.key}").focus()
                break

    def values(self) -> Values:
        """What is typed now, by key."""
        out: Values = {}
        for f in self.fields:
            w = self.query_one(f"#field-{f.key}")
            if isinstance(w, (Input, Toggle, Cycle)):
                out[f.key] = w.value
        return out

    def _revalidate(self) -> None:
        try:
            self.result, self.problems = self.validate(self.values())
        except Exception as exc:  # a validator bug must not lose the user's input
            self.result, self.problems = None, {"": f"cannot check this input: {exc}"}
        keys = {f.key for f in self.fields}
        for f in self.fields:
            bad = f.key in self.problems
            self._mark(f"mark-{f.key}", "✗" if bad else " ")
            self.query_one(f"#row-{f.key}").set_class(bad, "-invalid")
        if self.problems:
            first_key = next(iter(self.problems))
            label = next((f.label.strip() for f in self.fields if f.key == first_key), "")
            text = self.problems[first_key]
            more = len(self.problems) - 1
            prefix = f"✗ {label}: " if first_key in keys and label else "✗ "
            tail = f" (+{more} more)" if more > 0 else ""
            if self.moved_to == first_key:
                tail += f" ▶ The cursor is on {label} now."
            self._say(prefix + text + tail, error=True)
        else:
            described = self.describe(self.result) if self.describe is not None else ""
            self._say(described or self.help_text or "✓ Every field is valid.", error=False)

    def _mark(self, widget_id: str, text: str) -> None:
        """Show ``text`` in a one-cell mark (▶ or ✗), redrawn only when it changes.

        A mark keeps its width, so no new layout of the dialog is asked for.
        """
        if self._marks.get(widget_id) != text:
            self._marks[widget_id] = text
            self.query_one(f"#{widget_id}", Label).update(text, layout=False)

    def _say(self, text: str, error: bool) -> None:
        """The message under the fields, redrawn only when it changes (its height may)."""
        if self._message != (text, error):
            self._message = (text, error)
            message = self.query_one("#form-message", Static)
            message.update(Text(text))
            message.set_class(error, "-error")

    def on_input_changed(self, event: Input.Changed) -> None:
        event.stop()
        self._revalidate()

    def on_toggle_changed(self, event: Toggle.Changed) -> None:
        event.stop()
        self._revalidate()

    def on_cycle_changed(self, event: Cycle.Changed) -> None:
        event.stop()
        self._revalidate()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.action_accept()

    def on_descendant_focus(self, event: Any) -> None:
        """Mark the row being typed in with ▶ (colour is never the only sign of focus)."""
        focused = getattr(event, "widget", None)
        for f in self.fields:
            here = focused is not None and focused.id == f"field-{f.key}"
            self._mark(f"focus-{f.key}", "▶" if here else " ")
            self.query_one(f"#row-{f.key}").set_class(here, "-focused")

    def action_accept(self) -> None:
        self.moved_to = None
        self._revalidate()
        if self.problems:
            first = next(iter(self.problems))
            for f in self.fields:
                if f.key == first and not f.disabled:
                    widget = self.query_one(f"#field-{f.key}")
                    if not widget.has_focus:
                        self.moved_to = f.key
                        widget.focus()
            self._revalidate()
            self.app.bell()
            return
        self.dismiss(self.result)

    def action_cancel(self) -> None:
        self.dismiss(None)
