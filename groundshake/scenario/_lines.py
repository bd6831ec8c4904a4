"""Line numbers of keys in a TOML text, for error messages.

``tomllib`` returns plain dicts without positions, so the loader finds the line
of a key by scanning the source text itself. The heuristic:

- a table header ``[a.b]`` or ``[[a]]`` sets the current table; array tables
  count their elements, so ``[[parts]]`` number two maps to ``("parts", 1)``
  and a later ``[parts.x]`` to ``("parts", 1, "x")``;
- a line ``key = value`` (dotted keys allowed) records ``current + key``;
- keys of an inline table on the same line (``x = { file = "a" }``) record
  ``("motion", "x", "file")`` at that line;
- multi-line arrays and multi-line strings are skipped with a string- and
  comment-aware bracket count, so their continuation lines are never taken for
  headers.

:func:`line_of` looks up a key path, falling back to the longest prefix that
was seen (the table header's line), and returns ``None`` when nothing matches.
Keys inside arrays of inline tables are not indexed; they fall back to the
array's own line.
"""
from __future__ import annotations

import re

__all__ = ["key_lines", "line_of", "split_dotted"]

_BARE = r"[A-Za-z0-9_-]+"
_QUOTED = r'"(?:[^"\\\n]|\\.)*"|\'[^\'\n]*\''
_KEY = rf"(?:{_BARE}|{_QUOTED})"
_DOTTED = rf"{_KEY}(?:[ \t]*\.[ \t]*{_KEY})*"
_HEADER_ARRAY = re.compile(rf"^[ \t]*\[\[[ \t]*({_DOTTED})[ \t]*\]\]")
_HEADER = re.compile(rf"^[ \t]*\[[ \t]*({_DOTTED})[ \t]*\]")
_KEY_LINE = re.compile(rf"^[ \t]*({_DOTTED})[ \t]*=")
_INLINE_KEY = re.compile(rf"[{{,][ \t]*({_DOTTED})[ \t]*=")
_ONE_KEY = re.compile(_KEY)

Path = tuple  # a key path: str keys and int array indices


def split_dotted(text: str) -> tuple[str, ...]:
    """Split a dotted TOML key (``a."b.c".d``) into its parts, quotes removed."""
    out = []
    for part in _ONE_KEY.findall(text):
        if len(part) >= 2 and part[0] == part[-1] and part[0] in "\"'":
            part = part[1:-1]
            if part and "\\" in part:
                part = part.encode("utf-8", "backslashreplace").decode("unicode_escape", "replace")
        out.append(part)
    return tuple(out)


class _Scan:
    """String- and comment-aware bracket depth across lines."""

    def __init__(self) -> None:
        self.depth = 0
        self.open_string: str | None = None  # '"""' or "'''" while inside one

    def feed(self, s: str) -> None:
        i, n = 0, len(s)
        while i < n:
            if self.open_string:
                j = s.find(self.open_string, i)
                if j < 0:
                    return
                i = j + 3
                self.open_string = None
                continue
            c = s[i]
            if c == "#":
                return
            if c in "\"'":
                triple = s[i:i + 3]
                if triple in ('"""', "'''"):
                    self.open_string = triple
                    i += 3
                    continue
                j = i + 1
                while j < n and s[j] != c:
                    j += 2 if (c == '"' and s[j] == "\\") else 1
                i = j + 1
                continue
            if c in "[{":
                self.depth += 1
            elif c in "]}":
                self.depth = max(0, self.depth - 1)
            i += 1

    @property
    def busy(self) -> bool:
        return self.depth > 0 or self.open_string is not None


def key_lines(text: str) -> dict[Path, int]:
    """Map each key path seen in ``text`` to its first line (1-based)."""
    lines: dict[Path, int] = {}
    counts: dict[tuple[str, ...], int] = {}
    current: Path = ()
    scan = _Scan()

    def resolve(keys: tuple[str, ...]) -> Path:
        out: list = []
        for i, k in enumerate(keys):
            out.append(k)
            n = counts.get(keys[: i + 1])
            if n:
                out.append(n - 1)
        return tuple(out)

    for lineno, raw in enumerate(text.splitlines(), 1):
        if scan.busy:
            scan.feed(raw)
            continue
        m = _HEADER_ARRAY.match(raw)
        if m:
            keys = split_dotted(m.group(1))
            counts[keys] = counts.get(keys, 0) + 1
            current = resolve(keys)
            lines.setdefault(current, lineno)
            continue
        m = _HEADER.match(raw)
        if m:
            current = resolve(split_dotted(m.group(1)))
            lines.setdefault(current, lineno)
            continue
        m = _KEY_LINE.match(raw)
        if m:
            path = current + split_dotted(m.group(1))
            lines.setdefault(path, lineno)
            rest = raw[m.end():]
            if rest.lstrip().startswith("{"):
                for sub in _INLINE_KEY.finditer(rest):
                    lines.setdefault(path + split_dotted(sub.group(1)), lineno)
            scan.feed(rest)
    return lines


def line_of(lines: dict[Path, int] | None, path: Path) -> int | None:
    """Line of ``path``, else of its longest recorded prefix, else ``None``."""
    if not lines:
        return None
    path = tuple(path)
    for n in range(len(path), 0, -1):
        line = lines.get(path[:n])
        if line is not None:
            return line
    return None
