"""Find the line of a table or key in TOML text.

tomlkit keeps comments and layout but not line numbers, so error messages
get their line numbers from this light scan of the text. It understands
table headers, arrays of tables, ``key =`` lines and multi-line arrays;
where it cannot tell, it answers ``None`` and the message goes without a line.
"""

from __future__ import annotations

import re

_HEADER = re.compile(r"^\s*(\[\[?)\s*([^\[\]]+?)\s*\]\]?\s*(#.*)?$")
_KEY = re.compile(r"""^\s*("[^"]*"|'[^']*'|[A-Za-z0-9_\-.]+)\s*=""")

TableKey = tuple[str | int, ...]


_ESCAPES = {"b": "\b", "t": "\t", "n": "\n", "f": "\f", "r": "\r", '"': '"', "\\": "\\"}
_ESCAPE = re.compile(r"\\(u[0-9A-Fa-f]{4}|U[0-9A-Fa-f]{8}|.)")


def _unescape(text: str) -> str:
    r"""A TOML basic string's escapes decoded (``\u001b``, ``\t``...), as tomlkit reads it."""

    def one(m: re.Match[str]) -> str:
        code = m.group(1)
        if code[0] in "uU" and len(code) > 1:
            value = int(code[1:], 16)
            return chr(value) if value <= 0x10FFFF else m.group(0)
        return _ESCAPES.get(code, m.group(0))

    return _ESCAPE.sub(one, text)


def _split_dotted(name: str) -> tuple[str, ...]:
    parts = re.findall(r'"((?:[^"\\]|\\.)*)"|\'([^\']*)\'|([^.\s]+)', name)
    out: list[str] = []
    for basic, literal, bare in parts:
        out.append(_unescape(basic) if basic else (literal or bare))
    return tuple(out)


def _bracket_delta(line: str) -> int:
    """Net open brackets on a line, outside strings and comments."""
    depth = 0
    quote = ""
    for ch in line:
        if quote:
            if ch == quote:
                quote = ""
            continue
        if ch in "\"'":
            quote = ch
        elif ch == "#":
            break
        elif ch in "[{":
            depth += 1
        elif ch in "]}":
            depth -= 1
    return depth


class LineIndex:
    """Line numbers of tables and keys in one TOML text.

    Table keys are tuples: ``()`` for the top level, ``("panel",)``,
    ``("circuit", 3)`` for the fourth ``[[circuit]]`` (0-based), and
    ``("profiles", "office")``.
    """

    def __init__(self, text: str) -> None:
        self._tables: dict[TableKey, int] = {}
        self._keys: dict[tuple[TableKey, str], int] = {}
        aot_count: dict[tuple[str, ...], int] = {}
        current: TableKey = ()
        depth = 0
        for number, line in enumerate(text.splitlines(), start=1):
            if depth > 0:
                depth = max(0, depth + _bracket_delta(line))
                continue
            header = _HEADER.match(line)
            if header and "=" not in line.split("#", 1)[0]:
                names = _split_dotted(header.group(2))
                if header.group(1) == "[[":
                    k = aot_count.get(names, 0)
                    aot_count[names] = k + 1
                    current = (*names, k)
                else:
                    current = names
                self._tables.setdefault(current, number)
                continue
            key = _KEY.match(line)
            if key:
                name = key.group(1).strip("\"'")
                self._keys.setdefault((current, name), number)
                depth = max(0, _bracket_delta(line.split("=", 1)[1]))

    def table_line(self, table: TableKey) -> int | None:
        """Line of a table's header, or ``None``."""
        return self._tables.get(table)

    def key_line(self, table: TableKey, key: str) -> int | None:
        """Line of ``key =`` in ``table``, else the table's header line, else ``None``."""
        return self._keys.get((table, key), self._tables.get(table))
