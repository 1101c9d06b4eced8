"""The building's tree: every panel with its figures, to move between them from the keyboard.

Each panel's figures are its node of the engine's building analysis
(:func:`tri.schedule.tree_to_engine.analyse_building`, as ``tri report``
gives them): a parent's currents include everything it feeds, and they
follow every edit of any panel, saved or not. Under the tree the panel
under the cursor is described in full: where it is fed from, what it draws
at its parent's feeder breaker, its transformer's loading, and whether it
has unsaved edits. Enter opens the panel in the main view.
"""

from __future__ import annotations

from typing import Any, ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.screen import Screen
from textual.widgets import Footer, Static, Tree
from textual.widgets.tree import TreeNode

from tri.engine.limits import NEAR, OVER, loading_word
from tri.tui import fmt

TREE_HELP = """\
The building: the top panel and every panel it feeds, at any depth, each
with its largest phase current and loading (OVER above 100 %, NEAR above
the design headroom) and its neutral, everything it feeds included. ↑↓
move, ← → fold and unfold, Enter opens the panel in the main view, r
rebalances the panel under the cursor and every panel below it (the fewest
breakers relocated, in any of them, that bring each within its target). With
use scenarios in any panel, n chooses the case the figures show (the
connected load or a scenario of the whole building, as tri report rolls it
up); the main view then shows the same case. Every
panel keeps its own file, undo and journal: Ctrl+S saves the panel shown,
● marks a panel with unsaved edits, and quitting asks about every one."""


def panel_label(app: Any, index: int, width: int) -> Text:
    """One panel on one line: name, largest phase current and loading, neutral, unsaved mark."""
    b = app.building
    s = b.sessions[index]
    t = Text()
    name = s.schedule.panel.name
    room = max(width - 36 - 4 * b.depth(index), 12)
    t.append(name if len(name) <= room else name[: room - 1] + "…", style="bold")
    node = None if app.tree_shown is None else app.tree_shown.nodes[index]
    if node is not None:
        a = node.analysis
        top = max(a.phases, key=lambda p: p.rms_a)
        word = loading_word(top.loading_pct)
        t.append(f"  {top.label} {fmt.amps(top.rms_a)} {top.loading_pct:.0f} %")
        if word in (OVER, NEAR):
            t.append(f" {word}", style="bold")
        if a.neutral.present:
            t.append(f"  N {fmt.amps(a.neutral.rms_a)}")
    if s.dirty:
        t.append("  ● modified", style="bold")
    return t


def panel_details(app: Any, index: int) -> Text:
    """The panel under the cursor in full (file, feeder, transformer, every phase)."""
    b = app.building
    s = b.sessions[index]
    p = s.schedule.panel
    t = Text(f"{p.name} · {b.name(index)} · {p.system}", style="bold")
    parent = b.parent(index)
    node = None if app.tree_shown is None else app.tree_shown.nodes[index]
    if parent is not None:
        t.append(f" · fed from {b.sessions[parent].schedule.panel.name}")
        circuits = b.sessions[parent].schedule.circuits
        row = None if node is None or node.feeder is None else node.feeder.feeder_row
        if row is not None and row < len(circuits):
            c = circuits[row]
            where = f"slot {c.slot}" if c.slot is not None else "not placed"
            t.append(f' ({where} "{c.name}")')
    if node is None:
        t.append("\nFigures are being worked out…")
        return t
    a = node.analysis
    t.append("\nWith everything it feeds: " if node.children else "\n")
    t.append(
        "  ".join(f"{ph.label} {fmt.amps(ph.rms_a)} {ph.loading_pct:.0f} %" for ph in a.phases)
    )
    if a.neutral.present:
        t.append(f"  N {fmt.amps(a.neutral.rms_a)}")
    t.append(f"  deviation {a.current_unbalance.max_deviation_pct:.1f} %")
    f = node.feeder
    if f is not None:
        labels = b.sessions[parent].schedule.labels if parent is not None else a.phase_labels
        at = "  ".join(f"{lab} {fmt.amps(x)}" for lab, x in zip(labels, f.rms_a, strict=True))
        t.append(f"\nAt its feeder breaker: {at}, neutral {fmt.amps(f.neutral_rms_a)} (RMS)")
        if f.transformer is not None:
            tx = f.transformer
            t.append(f"\nTransformer {tx.kva:g} kVA {tx.group}: {tx.loading_pct:.0f} % loaded")
    t.append("\n" + ("● unsaved edits (Ctrl+S in the main view saves)" if s.dirty else "saved"))
    return t


class BuildingScreen(Screen[None]):
    """The tree of panels; Enter opens one in the main view."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape,T", "close", "Back", id="tree.back"),
        Binding("o", "open", "Open", id="tree.open"),
        Binding("r", "rebalance", "Rebalance", id="tree.rebalance"),
        Binding("n", "scenario", "Case", id="tree.scenario"),
        Binding("q", "app.quit", "Quit", show=False),
    ]
    KEY_WORDS: ClassVar[dict[str, str]] = {
        "close": "back to the panel shown",
        "open": "open the panel under the cursor (Enter does the same)",
        "rebalance": "rebalance the panel under the cursor and every panel below it",
        "scenario": "the case the figures show: connected load or a scenario of the building",
    }

    _ready = False

    def compose(self) -> ComposeResult:
        yield Static("", id="tree-title", classes="title-bar")
        yield Tree("building", id="tree-panels")
        yield Static("", id="tree-details")
        yield Footer(show_command_palette=False)

    def on_mount(self) -> None:
        app: Any = self.app
        b = app.building
        tree: Tree[int] = self.query_one(Tree)
        tree.show_root = False
        tree.guide_depth = 3
        nodes: dict[int, TreeNode[int]] = {}
        for i in range(len(b.sessions)):
            parent = b.parent(i)
            under = tree.root if parent is None else nodes[parent]
            nodes[i] = under.add("", data=i, expand=True, allow_expand=False)
        for i, node in nodes.items():
            if any(b.parent(j) == i for j in nodes):
                node.allow_expand = True
        self.nodes = nodes
        self._ready = True
        self.refresh_view()
        tree.focus()
        self.call_after_refresh(self._to_current)

    def _to_current(self) -> None:
        """The cursor on the panel shown (once the tree has laid out its lines)."""
        app: Any = self.app
        self.query_one(Tree).move_cursor(self.nodes[app.building.current])
        self._details()

    def refresh_view(self) -> None:
        """Relabel every panel from the latest building analysis."""
        if not self._ready:
            return
        app: Any = self.app
        b = app.building
        if b is None:
            return
        width = self.size.width or 80
        for i, node in self.nodes.items():
            node.set_label(panel_label(app, i, width))
        title = f" Building · {len(b.sessions)} panels · {b.name(0)}"
        if len(app.tree_cases) > 1:
            case = app.scenario_shown
            title += " · " + ("connected load" if case is None else f"scenario {case}")
            title += "  (n: another case)"
        else:
            title += "  (Enter opens a panel, Esc back)"
        self.query_one("#tree-title", Static).update(Text(title))
        self._details()

    def _details(self) -> None:
        tree: Tree[int] = self.query_one(Tree)
        node = tree.cursor_node
        index = node.data if node is not None and node.data is not None else 0
        self.query_one("#tree-details", Static).update(panel_details(self.app, index))

    def on_tree_node_highlighted(self, event: Tree.NodeHighlighted[int]) -> None:
        if self._ready:
            self._details()

    def on_tree_node_selected(self, event: Tree.NodeSelected[int]) -> None:
        event.stop()
        if event.node.data is not None:
            self._open(event.node.data)

    def action_open(self) -> None:
        node = self.query_one(Tree).cursor_node
        if node is not None and node.data is not None:
            self._open(node.data)

    def _open(self, index: int) -> None:
        app: Any = self.app
        self.app.pop_screen()
        app.switch_panel(index)

    def action_rebalance(self) -> None:
        from tri.tui.screens.tree_rebalance import TreeRebalanceScreen

        node = self.query_one(Tree).cursor_node
        index = node.data if node is not None and node.data is not None else 0
        self.app.push_screen(TreeRebalanceScreen(index))

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        """n only where the building has use scenarios."""
        if action == "scenario":
            app: Any = self.app
            return len(app.tree_cases) > 1
        return True

    def action_scenario(self) -> None:
        """n: choose the case of the whole building that the figures show."""
        from tri.tui.screens.scenario_choice import scenario_screen

        app: Any = self.app
        node = self.query_one(Tree).cursor_node
        index = node.data if node is not None and node.data is not None else 0
        screen = scenario_screen(app.panel_cases(index), app.case_name)
        if screen is None:
            return

        def chosen(name: str | None) -> None:
            if name is not None:
                app.show_case(name)

        self.app.push_screen(screen, chosen)

    def action_close(self) -> None:
        self.app.pop_screen()
