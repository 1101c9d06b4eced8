"""Phasor view: phase currents and the neutral, the sequence components, panel voltages."""

from __future__ import annotations

from typing import Any, ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal
from textual.screen import Screen
from textual.widgets import Static

from tri.tui import fmt
from tri.tui.widgets.key_footer import KeyFooter
from tri.tui.widgets.phasor_diagram import Arrow, PhasorDiagram

PHASOR_HELP = """\
Phasors of the fundamental (50/60 Hz), drawn to one scale per view, the
longest reaching the edge; phase A's voltage is at 0° (pointing right),
angles grow anticlockwise, sequence A-B-C. Views: the three line currents
and the neutral (I_N = I_A + I_B + I_C of the line-to-neutral loads); the
Fortescue sequence components I0, I1, I2 (a balanced panel has only I1);
and, when the file describes the supply, the phase voltages at the panel.
Every arrow has a head and is named beside its tip, and is listed with its
magnitude and angle. Arrows that point the same way (within 8°) are drawn
side by side a few dots apart, so none hides another; a phasor too short
to draw at the scale of the others is named at the centre ("too short to
draw"; its value is in the list). The neutral is dotted."""

PHASE_STYLES = ("magenta", "cyan", "green")
SEQ_STYLES = ("yellow", "blue", "red")
VIEWS = ("currents", "sequence", "voltages")


class PhasorScreen(Screen[None]):
    """A braille phasor diagram with a legend of the engine's figures."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape,v", "close", "Back", id="phasor.back"),
        Binding("tab,right", "next_view", "Next view", id="phasor.next"),
        Binding("shift+tab,left", "previous_view", "Prev view", show=False, id="phasor.prev"),
        Binding("q", "app.quit", "Quit", show=False),
    ]

    def __init__(self) -> None:
        super().__init__()
        self.view = "currents"

    def compose(self) -> ComposeResult:
        yield Static("", id="phasor-title", classes="title-bar")
        with Horizontal(id="phasor-body"):
            yield PhasorDiagram(id="phasor-diagram")
            yield Static("", id="phasor-legend")
        yield KeyFooter(show_command_palette=False)

    _ready = False

    def on_mount(self) -> None:
        self._ready = True
        self.refresh_view()

    def available_views(self) -> list[str]:
        app: Any = self.app
        a = app.analysis
        views = ["currents", "sequence"]
        if a is not None and a.voltage is not None:
            views.append("voltages")
        return views

    def action_next_view(self, step: int = 1) -> None:
        views = self.available_views()
        i = views.index(self.view) if self.view in views else 0
        self.view = views[(i + step) % len(views)]
        self.refresh_view()

    def action_previous_view(self) -> None:
        self.action_next_view(-1)

    def action_close(self) -> None:
        self.app.pop_screen()

    def refresh_view(self) -> None:
        """Redraw from the app's latest analysis."""
        if not self._ready:
            return
        app: Any = self.app
        a = app.analysis
        diagram = self.query_one(PhasorDiagram)
        legend = self.query_one("#phasor-legend", Static)
        views = self.available_views()
        if self.view not in views:
            self.view = "currents"
        name = app.session.schedule.panel.name
        room = max(self.size.width - 28 - sum(len(v) + 3 for v in views), 0)
        name = name if len(name) <= room else name[: max(room - 1, 0)] + "…"
        title = Text(f" Phasors{' · ' + name if name else ''} │ view:")
        for v in views:
            title.append(" ")
            title.append(
                f"[{v}]" if v == self.view else v, style="reverse" if v == self.view else ""
            )
        title.append("  Tab")
        self.query_one("#phasor-title", Static).update(title)
        if a is None:
            diagram.show([], "")
            legend.update(app.analysis_error or "Analysing…")
            return
        arrows, lines = self._content(a)
        diagram.show(arrows)
        legend.update(lines)

    def _content(self, a: Any) -> tuple[list[Arrow], Text]:
        t = Text()
        arrows: list[Arrow] = []
        if self.view == "currents":
            t.append("Line currents\n(fundamental)\n\n", style="bold")
            for ph, style in zip(a.phases, PHASE_STYLES, strict=True):
                arrows.append(Arrow(ph.label, ph.current.complex, style))
                t.append(f"{ph.label:<3}", style=f"bold {style}")
                t.append(f"{fmt.amps(ph.current_a, 8)} {fmt.deg(ph.current_deg)}\n")
            n = a.neutral
            if n.present:
                arrows.append(Arrow("N", n.current.complex, "bold", dotted=True))
                t.append("N  ", style="bold")
                t.append(f"{fmt.amps(n.current_a, 8)} {fmt.deg(n.current_deg)}\n")
                t.append(f"   true RMS {fmt.amps(n.rms_a)}\n", style="dim")
                t.append(
                    "\nN is dotted; arrows at one\nangle are drawn side by side.\n", style="dim"
                )
            else:
                t.append("No neutral (3-wire).\n", style="dim")
        elif self.view == "sequence":
            t.append("Sequence components\n(Fortescue, ref. A)\n\n", style="bold")
            for name, ph, style in zip(
                ("I0", "I1", "I2"),
                (a.sequence.i0, a.sequence.i1, a.sequence.i2),
                SEQ_STYLES,
                strict=True,
            ):
                arrows.append(Arrow(name, ph.complex, style))
                t.append(f"{name:<3}", style=f"bold {style}")
                t.append(f"{fmt.amps(ph.magnitude, 8)} {fmt.deg(ph.deg)}\n")
            cu = a.current_unbalance
            t.append(f"\n|I2|/|I1| {cu.negative_sequence_pct:.1f} %\n")
            t.append(f"|I0|/|I1| {cu.zero_sequence_pct:.1f} %\n")
            t.append("\nBalanced: I1 only.\n", style="dim")
        else:
            v = a.voltage
            t.append("Phase voltages\nat the panel\n\n", style="bold")
            for label, ph, style in zip(a.phase_labels, v.phase_v, PHASE_STYLES, strict=True):
                arrows.append(Arrow(label, ph.complex, style))
                t.append(f"{label:<3}", style=f"bold {style}")
                t.append(f"{ph.magnitude:7.1f} V {fmt.deg(ph.deg)}\n")
            t.append(f"\nVUF {v.vuf_pct:.2f} %\n")
            t.append(f"Line dev. {v.line_deviation_pct:.2f} %\n")
            if v.motor_derating is not None:
                t.append(f"Motor derating {v.motor_derating:.2f}\n")
            t.append(
                "\nDrops are small beside\nthe voltage: the arrows\nlook balanced, so read\n"
                "the figures.\n",
                style="dim",
            )
        return arrows, t
