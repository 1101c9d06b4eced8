"""Load a building: a schedule and every schedule its feeder circuits feed, at any depth.

:func:`load_tree` reads the root file, follows each feeder circuit's
``feeds`` (a path relative to the file that names it) and reads every panel
once. Every problem of every file is collected and raised together as a
:class:`~tri.schedule.errors.ScheduleError`; a problem that involves two
files (a file that feeds itself, directly or through others; a missing
child; a child whose system does not match its parent or its transformer's
secondary; a child fed twice) is located at the feeder circuit's key in the
parent and names both files. Nothing is written.
"""

from __future__ import annotations

import os
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path

from tri.schedule.errors import ScheduleError, ScheduleIssue, name_circuit
from tri.schedule.load import ScheduleFile, load_schedule
from tri.schedule.locate import LineIndex
from tri.schedule.model import Circuit, Schedule
from tri.schedule.tree_links import check_link

#: Called after each file is read with (files read so far, the file's name).
LoadProgress = Callable[[int, str], None]
#: A building larger than this is refused (a guard against runaway input) [-].
MAX_PANELS = 20_000


@dataclass(frozen=True, eq=False)
class TreePanel:
    """One panel of a building.

    Attributes
    ----------
    loaded : ScheduleFile
        The schedule with its document (for saving).
    path : Path
        The file, resolved.
    shown : str
        The file as messages and reports name it (as written, joined to its
        parent's folder).
    parent : int or None
        Index of the panel that feeds it; None for the root.
    feeder_index : int or None
        Index of the feeder circuit in the parent's schedule.
    """

    loaded: ScheduleFile
    path: Path
    shown: str
    parent: int | None = None
    feeder_index: int | None = None

    @property
    def schedule(self) -> Schedule:
        """The panel's schedule."""
        return self.loaded.schedule


@dataclass(frozen=True, eq=False)
class ScheduleTree:
    """Every panel of a building, the root first and each parent before its children."""

    panels: tuple[TreePanel, ...]

    @property
    def root(self) -> TreePanel:
        """The panel the command was given (the service, when it is the top)."""
        return self.panels[0]

    def feeder_circuit(self, index: int) -> Circuit | None:
        """The parent's circuit that feeds panel ``index`` (None for the root)."""
        p = self.panels[index]
        if p.parent is None or p.feeder_index is None:
            return None
        return self.panels[p.parent].schedule.circuits[p.feeder_index]


def feeder_circuits(schedule: Schedule) -> list[int]:
    """Indices of the schedule's feeder circuits (those with ``feeds``)."""
    return [i for i, c in enumerate(schedule.circuits) if c.feed is not None]


def _place(c: Circuit, schedule: Schedule) -> str:
    if c.slot is not None:
        return name_circuit(c.name, f"slot {c.slot}")
    if c.phases is not None:
        return name_circuit(c.name, f"phases {schedule.phase_text(c.phases)}")
    return name_circuit(c.name, None)


class _Builder:
    """Walks the files depth first, collecting panels and located issues."""

    def __init__(self, progress: LoadProgress | None) -> None:
        self.panels: list[TreePanel] = []
        self.issues: list[ScheduleIssue] = []
        self.by_path: dict[Path, int] = {}
        self.progress = progress
        self.lines: dict[int, LineIndex] = {}

    def at_feeder(self, parent: int, index: int, key: str, message: str) -> None:
        """An issue located at ``key`` of feeder circuit ``index`` of panel ``parent``."""
        p = self.panels[parent]
        c = p.schedule.circuits[index]
        table = ("circuit", c.source_index if c.source_index is not None else index)
        if parent not in self.lines:
            self.lines[parent] = LineIndex(p.loaded.document.as_string())
        line = self.lines[parent].key_line(table, key)
        where = _place(c, p.schedule)
        self.issues.append(ScheduleIssue(message, p.shown, line, where, key, index))

    def read(self, path: Path, shown: str, parent: int | None, feeder: int | None) -> int | None:
        try:
            loaded = load_schedule(shown)
        except ScheduleError as exc:
            if parent is not None and feeder is not None:
                first = exc.issues[0].message if exc.issues else "cannot be read"
                what = (
                    first if len(exc.issues) == 1 else f"{len(exc.issues)} problems, listed below"
                )
                self.at_feeder(parent, feeder, "feeds", f"feeds {shown}: {what}")
            if parent is None or len(exc.issues) > 1 or exc.issues[0].line is not None:
                self.issues.extend(exc.issues)
            return None
        self.panels.append(TreePanel(loaded, path, shown, parent, feeder))
        index = len(self.panels) - 1
        self.by_path[path] = index
        if self.progress is not None:
            self.progress(len(self.panels), shown)
        return index

    def ancestors(self, index: int) -> list[int]:
        chain = [index]
        while (p := self.panels[chain[-1]].parent) is not None:
            chain.append(p)
        return chain[::-1]


def _shown(parent_shown: str, child: str) -> str:
    folder = os.path.dirname(parent_shown)
    return os.path.normpath(os.path.join(folder, child)) if folder else os.path.normpath(child)


def _follow(b: _Builder, index: int, stack: list[int]) -> None:
    """Read the panels fed from panel ``index`` and push them on ``stack``."""
    panel = b.panels[index]
    folder = panel.path.parent
    for k in feeder_circuits(panel.schedule):
        feed = panel.schedule.circuits[k].feed
        assert feed is not None
        child_path = (folder / feed.path).resolve()
        shown = _shown(panel.shown, feed.path)
        chain = b.ancestors(index)
        on_chain = [i for i in chain if b.panels[i].path == child_path]
        if on_chain:
            names = [b.panels[i].shown for i in chain[chain.index(on_chain[0]) :]]
            loop = " → ".join([*names, shown])
            b.at_feeder(
                index,
                k,
                "feeds",
                f"feeds {shown}, which feeds this file ({loop}); a file cannot feed "
                "itself, directly or through others",
            )
            continue
        if child_path in b.by_path:
            other = b.panels[b.by_path[child_path]]
            # the root is on every chain, so a panel already read has a parent
            assert other.parent is not None and other.feeder_index is not None
            first = b.panels[other.parent]
            circuit = first.schedule.circuits[other.feeder_index]
            b.at_feeder(
                index,
                k,
                "feeds",
                f"feeds {shown}, which is already fed from {first.shown} "
                f"({_place(circuit, first.schedule)}); a panel has one feeder",
            )
            continue
        if len(b.panels) >= MAX_PANELS:
            b.at_feeder(index, k, "feeds", f"more than {MAX_PANELS} panels in one building")
            return
        child = b.read(child_path, shown, index, k)
        if child is not None:
            check_link(b, index, k, child)
            stack.append(child)


def load_tree(path: str | Path, *, progress: LoadProgress | None = None) -> ScheduleTree:
    """Read a schedule and every panel it feeds.

    Parameters
    ----------
    path : str or Path
        The root schedule (the service panel, or any panel: its subtree).
    progress : callable, optional
        ``progress(files_read, name)`` after each file.

    Returns
    -------
    ScheduleTree
        Panels in depth-first order (root first, every parent before its
        children, a parent's children in the order of its feeder circuits).

    Raises
    ------
    ScheduleError
        With every problem of every file.
    """
    b = _Builder(progress)
    root = b.read(Path(path).resolve(), str(path), None, None)
    if root is None:
        raise ScheduleError(b.issues)
    stack = [root]
    while stack:
        index = stack.pop()
        before = len(b.panels)
        _follow(b, index, [])
        # depth first, children in file order: visit the newest first-born first
        stack.extend(reversed(range(before, len(b.panels))))
    if b.issues:
        raise ScheduleError(b.issues)
    return ScheduleTree(_depth_first(b.panels))


def _depth_first(panels: list[TreePanel]) -> tuple[TreePanel, ...]:
    """Panels re-ordered depth first (pre-order), indices of parents remapped."""
    children: dict[int | None, list[int]] = {}
    for i, p in enumerate(panels):
        children.setdefault(p.parent, []).append(i)
    order: list[int] = []
    stack = [0]
    while stack:
        i = stack.pop()
        order.append(i)
        stack.extend(reversed(children.get(i, [])))
    new_index = {old: new for new, old in enumerate(order)}
    out = []
    for old in order:
        p = panels[old]
        parent = None if p.parent is None else new_index[p.parent]
        out.append(TreePanel(p.loaded, p.path, p.shown, parent, p.feeder_index))
    return tuple(out)


def with_schedules(tree: ScheduleTree, schedules: Sequence[Schedule]) -> ScheduleTree:
    """The same building with each panel's schedule replaced (edited in memory, not yet saved).

    The files and their order stay those of ``tree``; each link is found
    again from the edited parents' feeder circuits (``feeds`` resolved
    against the parent's folder), so moving a feeder breaker or adding and
    deleting circuits before it keeps its child. The loader's link rules are
    checked again (a child's system against its parent's or the
    transformer's secondary, the frequency, the neutral of the windings).

    Parameters
    ----------
    tree : ScheduleTree
        The building as read by :func:`load_tree`.
    schedules : sequence of Schedule
        One per panel of ``tree``, in its order.

    Returns
    -------
    ScheduleTree

    Raises
    ------
    ScheduleError
        A panel no longer fed (its feeder circuit deleted, or its ``feeds``
        changed), a ``feeds`` naming a file that is not in the building as
        read, a panel fed twice or feeding the root, or a link rule broken;
        each located at the parent's feeder circuit and naming both files.
    """
    b = _Builder(None)
    for p, schedule in zip(tree.panels, schedules, strict=True):
        loaded = ScheduleFile(schedule, p.loaded.document, p.loaded.path)
        b.panels.append(TreePanel(loaded, p.path, p.shown))
    index_of = {p.path: i for i, p in enumerate(b.panels)}
    links: dict[int, tuple[int, int]] = {}
    for i, p in enumerate(b.panels):
        for k in feeder_circuits(p.schedule):
            feed = p.schedule.circuits[k].feed
            assert feed is not None
            j = index_of.get((p.path.parent / feed.path).resolve())
            shown = _shown(p.shown, feed.path)
            if j is None:
                b.at_feeder(
                    i,
                    k,
                    "feeds",
                    f"feeds {shown}, which is not in the building as it was opened; save, "
                    "then open the top panel again to read it",
                )
            elif j <= i or j in links:
                b.at_feeder(i, k, "feeds", f"feeds {shown}, which is already fed in this building")
            else:
                links[j] = (i, k)
    for j in range(1, len(b.panels)):
        if j not in links:
            before = tree.panels[tree.panels[j].parent or 0]
            b.issues.append(
                ScheduleIssue(
                    f"no circuit feeds {b.panels[j].shown} any more (it was fed from this "
                    "panel): its feeder circuit was deleted or its feeds changed",
                    before.shown,
                )
            )
    if b.issues:
        raise ScheduleError(b.issues)
    out = list(b.panels)
    for j, (i, k) in links.items():
        out[j] = TreePanel(out[j].loaded, out[j].path, out[j].shown, i, k)
    b.panels = out
    for j, (i, k) in links.items():
        check_link(b, i, k, j)
    if b.issues:
        raise ScheduleError(b.issues)
    return ScheduleTree(tuple(out))
