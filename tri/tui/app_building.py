"""The app's side of a building: open the tree, move between panels, analyse the whole tree.

A mixin of :class:`~tri.tui.app.TriApp`. When the opened schedule feeds other
panels, every panel of the tree is read and gets its own session
(:class:`~tri.tui.building.Building`); ``app.session`` is the panel on
screen. Each edit re-runs the engine on the whole tree as it is on screen
(:func:`tri.schedule.tree_to_engine.analyse_building`, the call ``tri
report`` makes), so a parent's figures follow its children's edits. An edit
that would break the building (a feeder circuit deleted, a child's system
no longer its transformer's secondary) is refused with the loader's words.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

from textual import work

from tri.schedule.errors import ScheduleError
from tri.schedule.model import Schedule
from tri.schedule.to_scenarios import Case
from tri.tui import compute
from tri.tui.building import Building
from tri.tui.messages import AnalysisDone
from tri.tui.wording import issue_text


class BuildingActions:
    """Building methods of the app (``session``, ``generation`` ... are the app's)."""

    building: Building | None = None
    tree_result: Any = None  #: the engine's TreeAnalysis of the building on screen
    #: the building in every case: (name, TreeAnalysis), the connected load first
    tree_cases: Any = ()
    session: Any
    generation: int
    journal_enabled: bool

    def open_building(self, path: Path) -> bool:
        """Read the building below ``path`` and show its top panel; problems as a message."""
        app: Any = self
        try:
            building = Building.open(path)
        except ScheduleError as exc:
            app.show_problems(f"Cannot open the building below {path.name}", exc)
            return False
        for s in building.sessions:
            s.journal_enabled = self.journal_enabled
        n = len(building.sessions)
        app.opening_status = f"A building of {n} panels: T shows the tree to move between them."
        app.start_session(building.session, building)
        return True

    def switch_panel(self, index: int) -> None:
        """Show panel ``index`` of the building in the main view (its edits are kept)."""
        app: Any = self
        b = self.building
        if b is None or not 0 <= index < len(b.sessions):
            return
        b.current = index
        self.session = b.session
        if self.tree_result is not None:
            app.connected_analysis = self.tree_result.nodes[index].analysis
            app.cases = self.panel_cases(index)
            app.analysis = app._case_analysis()
        while len(app.screen_stack) > 2:
            app.pop_screen()
        app.request_analysis()
        app.refresh_screens()
        main = app.screen_stack[-1]
        reset = getattr(main, "panel_changed", None)
        if reset is not None:
            reset()
        where = b.path_words(index)
        app.set_status(f"{where} ({b.name(index)}). T: the tree; Ctrl+S saves this panel.")
        if index not in b.visited:
            b.visited.add(index)
            app.offer_recovery()

    def reload_panel(self, path: Path) -> bool:
        """Read panel ``path`` of the open building again from disk, the others kept as they are.

        Returns False when no building is open or ``path`` is not one of its
        panels (the caller opens it as usual). The panel's unsaved edits stay
        in its journal, which is offered for recovery.
        """
        from tri.schedule.load import load_schedule
        from tri.tui.session import Session

        app: Any = self
        b = self.building
        if b is None:
            return False
        target = path.expanduser().resolve()
        index = next((i for i, p in enumerate(b.tree.panels) if p.path == target), None)
        if index is None:
            return False
        try:
            loaded = load_schedule(path)
        except ScheduleError as exc:
            app.show_problems(f"Cannot read {path.name} again", exc)
            return True
        session = Session.from_file(loaded)
        session.journal_enabled = self.journal_enabled
        b.sessions[index] = session
        b.visited.discard(index)
        self.switch_panel(index)
        return True

    def edit_problem(self, new: Schedule) -> str | None:
        """Why ``new`` (the panel on screen, edited) would break the building; ``None`` if fine."""
        b = self.building
        if b is None:
            return None
        problems = b.problems_with(b.current, new)
        if not problems:
            return None
        words = b.short(issue_text(problems[0], b.name(b.current)))
        return f"the building would break: {words}"

    def analyse_building(self) -> None:
        """Run the engine on the whole tree as it is on screen (a worker thread)."""
        b = self.building
        assert b is not None
        try:
            tree = b.edited_tree()
        except ScheduleError as exc:
            text = b.short("; ".join(issue_text(i, b.name(b.current)) for i in exc.issues))
            message = AnalysisDone(
                self.generation, None, f"The building cannot be analysed: {text}"
            )
            self.post_message(message)  # type: ignore[attr-defined]
            return
        self._analyse_tree(self.generation, tree, b.current)

    def panel_cases(self, index: int, tree_cases: Any = None) -> tuple[Case, ...]:
        """Panel ``index`` in every case of the building (its node of each tree analysis)."""
        pairs = self.tree_cases if tree_cases is None else tree_cases
        return tuple(Case(n, n == "connected", tr.nodes[index].analysis) for n, tr in pairs)

    @property
    def tree_shown(self) -> Any:
        """The building's analysis in the case the figures show (the connected load if gone)."""
        app: Any = self
        for name, tr in self.tree_cases:
            if name == app.case_name:
                return tr
        return self.tree_result

    @work(thread=True, exclusive=True, group="analysis", exit_on_error=False)
    def _analyse_tree(self, generation: int, tree: Any, index: int) -> None:
        """The whole tree in the connected load and in every scenario of the building.

        As ``tri report`` does (:mod:`tri.schedule.tree_scenarios`): a
        scenario scales every panel's loads by their use factors and rolls
        the tree up again; the checks of the panel shown judge every case.
        """
        from tri.schedule.tree_scenarios import building_scenario_names
        from tri.schedule.tree_to_engine import analyse_building

        app: Any = self
        try:
            result = analyse_building(tree)
            names = building_scenario_names(tree)
            scenarios = [(n, analyse_building(tree, scenario=n)) for n in names]
            pairs = (("connected", result), *scenarios)
            node = result.nodes[index].analysis
            cases = self.panel_cases(index, pairs)
            checks = compute.check_results(node, tree.panels[index].schedule, cases)
            done = AnalysisDone(generation, node, None, checks, cases, result, pairs)
        except Exception as exc:  # an engine failure is a message, not a crash
            done = AnalysisDone(
                generation, None, f"The engine could not analyse the building: {exc}"
            )
        app.call_from_thread(app.post_message, done)

    def unsaved_sessions(self) -> list[Any]:
        """Every open panel with unsaved edits (one panel, or the building's)."""
        if self.building is not None:
            return [self.building.sessions[i] for i in self.building.dirty()]
        return [self.session] if self.session is not None and self.session.dirty else []

    def save_all_then_quit(self) -> None:
        """Save every panel with unsaved edits, then quit; stop at the first that cannot be saved.

        The panel that could not be saved is shown with its problem (or the
        changed-on-disk question), and tri keeps running.
        """
        app: Any = self
        b = self.building
        dirty = [] if b is None else b.dirty()
        for i in dirty:
            assert b is not None
            if b.current != i:
                self.switch_panel(i)
            if not app._save_to(self.session.path):
                return
        app.exit(0)
