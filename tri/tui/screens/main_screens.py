"""The main view's keys that open other screens: findings, phasors, rebalance, log, case, tree.

A mixin of :class:`~tri.tui.screens.main.MainScreen`; each opens its
screen, or says on the status line why it cannot (no ``[log]``, no
scenarios, not a building).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from tri.schedule.model import Schedule


class OtherScreens:
    """Actions that push another screen (``app`` and ``set_status`` are the screen's)."""

    app: Any
    set_status: Any  #: the screen's (declared only, so that the real one is found)

    @property
    def schedule(self) -> Schedule:
        """The schedule on screen (the screen's own property)."""
        raise NotImplementedError

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

    def action_building(self) -> None:
        """T: the building's tree (buildings only)."""
        from tri.tui.screens.building_tree import BuildingScreen

        app: Any = self.app
        if app.building is None:
            self.set_status("This panel feeds no other panel; open the top panel to see a tree.")
            return
        self.app.push_screen(BuildingScreen())

    def action_log(self) -> None:
        """d: the log view (current over time, demand, duration, the report's figures)."""
        from tri.tui.screens.log_view import LogScreen

        if self.schedule.log is None:
            self.set_status("This schedule has no [log] table (README: Loads over time).")
            return
        self.app.push_screen(LogScreen())

    def action_scenario(self) -> None:
        """n: choose the case (connected load or a scenario) the figures show."""
        from tri.tui.screens.scenario_choice import scenario_screen

        app: Any = self.app
        screen = scenario_screen(app.cases, app.case_name)
        if screen is None:
            self.set_status(
                "This schedule has no use scenarios; the figures are the connected load."
            )
            return

        def chosen(name: str | None) -> None:
            if name is None:
                return
            app.show_case(name)
            shown = "the connected load" if name == "connected" else f"scenario {name}"
            self.set_status(f"The figures show {shown}; tri check's verdicts cover every case.")

        self.app.push_screen(screen, chosen)

    def action_phasors(self) -> None:
        from tri.tui.screens.phasor import PhasorScreen

        self.app.push_screen(PhasorScreen())

    def action_rebalance(self) -> None:
        from tri.tui.screens.rebalance import RebalanceScreen

        self.app.push_screen(RebalanceScreen())
