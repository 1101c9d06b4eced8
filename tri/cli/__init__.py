"""The ``tri`` command line.

``tri FILE`` opens the terminal UI; ``tri COMMAND ...`` runs a headless
command. Each command lives in its own module with ``add_parser`` and
``run``; this module dispatches and makes sure no traceback reaches a user.
"""

from __future__ import annotations

import argparse
import importlib
import os
import sys
from collections.abc import Sequence
from types import ModuleType
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from _typeshed import SupportsWrite

from tri import __version__
from tri.schedule.errors import ScheduleError
from tri.schedule.text import escaped

#: Command name -> its module, imported only when that command runs (or for
#: ``tri --help``), so ``tri --version`` and each command start without the
#: others' libraries (scipy for ``suggest``, textual for the UI).
COMMANDS: dict[str, str] = {
    "new": "tri.cli.new",
    "report": "tri.cli.report",
    "check": "tri.cli.check",
    "suggest": "tri.cli.suggest",
    "open": "tri.cli.open_ui",
}

DESCRIPTION = """\
Balance three-phase distribution panels from a schedule kept as TOML.

  tri FILE                 open FILE in the terminal UI (same as 'tri open FILE')
  tri                      choose a demo panel or a recent file
  tri new FILE ...         start a new schedule
  tri report FILE          phase, neutral and voltage figures (text, json, markdown, csv)
  tri check FILE           exit 0 when within limits, 1 when not (for scripts and CI)
  tri suggest FILE         fewest breaker moves to rebalance; best slots for new circuits

Figures are engineering estimates. Panel work can kill: de-energise, let a
qualified person do it, and let the local electrical code and the authority
having jurisdiction decide."""


class _Parser(argparse.ArgumentParser):
    """argparse, with whatever it quotes from the command line shown escaped."""

    def _print_message(self, message: str, file: SupportsWrite[str] | None = None) -> None:
        super()._print_message(escaped(message, keep_newlines=True), file)


def command_module(name: str) -> ModuleType:
    """The module of command ``name`` (imported on first use)."""
    return importlib.import_module(COMMANDS[name])


def build_parser(only: str | None = None) -> argparse.ArgumentParser:
    """The argument parser: every command as a sub-parser, or ``only`` that one.

    ``only`` keeps start-up short: the other commands' modules (and what they
    import) are not loaded; ``tri --help`` builds the full parser.
    """
    parser = _Parser(
        prog="tri",
        description=DESCRIPTION,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    parser.add_argument("--version", action="version", version=f"tri {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name in COMMANDS if only is None else (only,):
        command_module(name).add_parser(sub)
    return parser


def _normalise(argv: list[str]) -> list[str]:
    """``tri FILE`` and bare ``tri`` mean ``tri open ...``."""
    if not argv:
        return ["open"]
    first = argv[0]
    if first in COMMANDS or first.startswith("-"):
        return argv
    return ["open", *argv]


def _silence_stdout() -> None:
    """Point standard output at the null device so the exit flush cannot fail again."""
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
    except (OSError, ValueError):
        pass


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit status (0 ok, 1 check failed, 2 bad input)."""
    args_list = _normalise(list(sys.argv[1:] if argv is None else argv))
    first = args_list[0]
    if args_list == ["--version"]:
        print(f"tri {__version__}")
        return 0
    from tri.cli.common import EXIT_ERROR, EXIT_INTERNAL, CliError, print_error

    try:
        parser = build_parser(first if first in COMMANDS else None)
        args = parser.parse_args(args_list)
        module = command_module(args.command)
        status = int(module.run(args) or 0)
        sys.stdout.flush()  # a full disk or closed pipe shows here, not at exit
        return status
    except ScheduleError as exc:
        print_error(exc.summary())
        return EXIT_ERROR
    except CliError as exc:
        print_error(str(exc))
        return EXIT_ERROR
    except KeyboardInterrupt:
        print_error("interrupted")
        return 130
    except BrokenPipeError:
        # Output piped into something that stopped reading (e.g. `head`).
        _silence_stdout()
        return 0
    except SystemExit as exc:
        return int(exc.code) if isinstance(exc.code, int) else (0 if exc.code is None else 2)
    except OSError as exc:
        # Writing standard output failed (a full disk, /dev/full, a closed terminal).
        _silence_stdout()
        print_error(f"cannot write the output: {exc.strerror or exc}")
        return EXIT_ERROR
    except Exception as exc:  # never show a traceback to a user
        print_error(
            f"internal error: {type(exc).__name__}: {exc}\n"
            "Nothing was written. Please report this with the file that caused it."
        )
        if os.environ.get("TRI_DEBUG"):
            raise
        return EXIT_INTERNAL
