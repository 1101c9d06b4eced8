"""Check that an installed wheel offers and opens the demo panels.

``python .ci/wheel_check.py`` (from the checkout, in the venv ``.ci/run``
made) builds a wheel from a copy of the sources (so the checkout's
``build/`` cannot leak into it), installs it without dependencies into a
throwaway venv that borrows this venv's libraries through a ``.pth`` line
(this venv's editable ``tri`` is not on that path), and runs itself there
with ``--inside``, from outside the checkout. Inside, it checks that
``tri`` is imported from the throwaway venv, that every demo the start
screen lists is inside the installed package, then opens bare ``tri``'s
start screen headless at 80x24, presses Enter on the first demo and checks
that the panel opens with the engine's figures; last, the installed ``tri``
command reports that demo. Exits 1 with the reason when anything fails.

No network beyond what ``pip install -e .`` already used: the wheel build
gets setuptools the same way.
"""

from __future__ import annotations

import asyncio
import shutil
import subprocess
import sys
import sysconfig
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def fail(why: str) -> None:
    """Print ``why`` and exit 1."""
    print(f"wheel check: {why}", file=sys.stderr)
    raise SystemExit(1)


def run(*args: str | Path, cwd: Path | None = None) -> None:
    """Run a command; exit 1 when it fails."""
    done = subprocess.run([str(a) for a in args], cwd=cwd, check=False)
    if done.returncode != 0:
        fail(f"{' '.join(str(a) for a in args)} exited {done.returncode}")


def build_and_install(tmp: Path) -> Path:
    """Build the wheel in ``tmp`` and install it into ``tmp/venv``; that venv's python."""
    src = tmp / "src"
    src.mkdir()
    shutil.copytree(ROOT / "tri", src / "tri", ignore=shutil.ignore_patterns("__pycache__"))
    for name in ("pyproject.toml", "README.md", "LICENSE"):
        shutil.copy2(ROOT / name, src / name)
    pip = (sys.executable, "-m", "pip")
    run(*pip, "wheel", "--quiet", "--no-deps", "-w", tmp / "dist", src)
    run(sys.executable, "-m", "venv", "--without-pip", tmp / "venv")
    python = tmp / "venv" / "bin" / "python"
    (wheel,) = (tmp / "dist").glob("tri-*.whl")
    run(*pip, "--python", python, "install", "--quiet", "--no-deps", wheel)
    purelib = subprocess.run(
        [python, "-c", "import sysconfig; print(sysconfig.get_paths()['purelib'])"],
        capture_output=True,
        text=True,
        check=True,
    ).stdout.strip()
    (Path(purelib) / "ci_borrowed_libraries.pth").write_text(
        sysconfig.get_paths()["purelib"] + "\n", encoding="utf-8"
    )
    return python


async def open_first_demo() -> str:
    """Open bare ``tri``, press Enter on the first demo; the panel's name."""
    from tri.schedule.to_engine import analyse_schedule
    from tri.tui.app import TriApp
    from tri.tui.screens.main import MainScreen
    from tri.tui.screens.picker import PickerScreen

    app = TriApp(None, journal=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        if not isinstance(app.screen, PickerScreen):
            fail(f"bare tri shows {type(app.screen).__name__}, not the start screen")
        await pilot.press("enter")
        await pilot.pause()
        await app.workers.wait_for_complete()
        await pilot.pause()
        if not isinstance(app.screen, MainScreen):
            fail(f"Enter on the first demo shows {type(app.screen).__name__}")
        if app.analysis != analyse_schedule(app.session.schedule):
            fail("the opened demo does not show the engine's figures")
        name = app.session.schedule.panel.name
        await pilot.press("ctrl+q")
    return name


def inside(venv: Path) -> None:
    """The checks, run by the throwaway venv's python."""
    import tri
    from tri.tui.demos import demo_files, demo_folder, demo_label

    where = Path(tri.__file__).resolve()
    if venv not in where.parents:
        fail(f"tri imported from {where}, not from the wheel in {venv}")
    demos = demo_files()
    if not demos:
        fail(f"no demo panels in {demo_folder()}")
    for p in demos:
        if venv not in p.resolve().parents:
            fail(f"demo {p} is outside the installed package")
        print(f"  demo: {demo_label(p)}  ({p.relative_to(venv)})")
    print(f"  opened from the start screen: {asyncio.run(open_first_demo())}")
    command = venv / "bin" / "tri"
    report = subprocess.run(
        [command, "report", demos[0]], capture_output=True, text=True, check=False
    )
    if report.returncode not in (0, 1) or not report.stdout:
        fail(f"installed tri report {demos[0].name} exited {report.returncode}: {report.stderr}")
    print(f"  installed tri report {demos[0].name}: exit {report.returncode}")


def main() -> None:
    if sys.argv[1:2] == ["--inside"]:
        inside(Path(sys.argv[2]).resolve())
        return
    start = time.perf_counter()
    with tempfile.TemporaryDirectory(prefix="tri-wheel-") as name:
        tmp = Path(name)
        python = build_and_install(tmp)
        (tmp / "state").mkdir()
        env = {"PATH": "/usr/bin:/bin", "XDG_STATE_HOME": str(tmp / "state"), "HOME": name}
        done = subprocess.run(
            [python, Path(__file__).resolve(), "--inside", tmp / "venv"],
            cwd=tmp,
            env=env,
            check=False,
        )
        if done.returncode != 0:
            raise SystemExit(done.returncode)
    print(f"wheel check: demos ship in the wheel ({time.perf_counter() - start:.1f} s)")


if __name__ == "__main__":
    main()
