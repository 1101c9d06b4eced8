"""A building open in the UI: every panel of the tree, each its own editing session (no textual).

When the opened schedule feeds other panels (``feeds``), the whole tree
below it is read (:func:`tri.schedule.tree.load_tree`) and every panel gets
a :class:`~tri.tui.session.Session` of its own: its own file, undo, journal,
comments kept and changed-on-disk check when saved. The engine always runs
on the whole tree as it is on screen (:func:`edited_tree`, the file
layer's :func:`~tri.schedule.tree.with_schedules`), so a parent's figures
include its children's edits before anything is saved.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

from tri.schedule.errors import ScheduleError, ScheduleIssue
from tri.schedule.model import Schedule
from tri.schedule.tree import LoadProgress, ScheduleTree, load_tree, with_schedules
from tri.tui.session import Session


@dataclass
class Building:
    """The panels of a building and which one is on screen.

    Attributes
    ----------
    tree : ScheduleTree
        The building as read (files, order, links as opened).
    sessions : list of Session
        One per panel, in the tree's order (the top panel first).
    current : int
        Index of the panel shown in the main view.
    visited : set of int
        Panels already shown (a panel's unsaved-edits journal is offered the
        first time it is shown).
    """

    tree: ScheduleTree
    sessions: list[Session]
    current: int = 0
    visited: set[int] = field(default_factory=set)

    @classmethod
    def open(cls, path: str | Path, progress: LoadProgress | None = None) -> Building:
        """Read the building below ``path`` (raises ``ScheduleError`` with every problem)."""
        tree = load_tree(path, progress=progress)
        return cls(tree, [Session.from_file(p.loaded) for p in tree.panels])

    @property
    def session(self) -> Session:
        """The session of the panel on screen."""
        return self.sessions[self.current]

    def name(self, index: int) -> str:
        """A panel's file name (never a full path)."""
        return Path(self.tree.panels[index].shown).name

    def parent(self, index: int) -> int | None:
        """Index of the panel that feeds panel ``index`` (``None`` for the top)."""
        return self.tree.panels[index].parent

    def depth(self, index: int) -> int:
        """0 for the top panel, 1 for the panels it feeds, ..."""
        depth, parent = 0, self.parent(index)
        while parent is not None:
            depth, parent = depth + 1, self.parent(parent)
        return depth

    def path_words(self, index: int) -> str:
        """``"MDP › LP-1"``: the panels from the top down to ``index``, by name."""
        chain = [index]
        while (p := self.parent(chain[-1])) is not None:
            chain.append(p)
        return " › ".join(self.sessions[i].schedule.panel.name for i in reversed(chain))

    def edited_tree(
        self, index: int | None = None, schedule: Schedule | None = None
    ) -> ScheduleTree:
        """The tree as it is on screen (with panel ``index`` as ``schedule`` when given).

        Raises
        ------
        ScheduleError
            When the edits break the building (a feeder circuit gone, a
            child's system no longer matching), located at the feeder.
        """
        schedules = [s.schedule for s in self.sessions]
        if index is not None and schedule is not None:
            schedules[index] = schedule
        return with_schedules(self.tree, schedules)

    def problems_with(self, index: int, schedule: Schedule) -> list[ScheduleIssue]:
        """What panel ``index`` becoming ``schedule`` would break in the building (empty: fine)."""
        try:
            self.edited_tree(index, schedule)
        except ScheduleError as exc:
            return list(exc.issues)
        return []

    def short(self, text: str) -> str:
        """``text`` with every panel's file named by its name only (never a full path)."""
        for p in sorted(self.tree.panels, key=lambda p: -len(p.shown)):
            text = text.replace(p.shown, Path(p.shown).name)
        return text

    def dirty(self) -> list[int]:
        """Panels with unsaved edits, the top first."""
        return [i for i, s in enumerate(self.sessions) if s.dirty]
