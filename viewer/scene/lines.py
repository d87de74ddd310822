"""Where a key sits in the TOML text, so that every message can name its line.

tomllib gives values, not positions; this module scans the source text once for table
headers (``[camera]``, ``[[body]]``), key assignments and the keys of one-line inline
tables, and maps each key path (``body[2].show.foci``) to its 1-based line. A path that
is not found falls back to its nearest parent (``body[2]`` -> the ``[[body]]`` header),
which is where a missing key belongs.
"""

from __future__ import annotations

import re

_BARE = r"[A-Za-z0-9_-]+"
_QUOTED = r'"(?:[^"\\]|\\.)*"|\'[^\']*\''
_PART = rf"(?:{_BARE}|{_QUOTED})"
_DOTTED = rf"{_PART}(?:\s*\.\s*{_PART})*"
_HEADER = re.compile(rf"^\s*(\[\[|\[)\s*({_DOTTED})\s*\]\]?")
_ASSIGN = re.compile(rf"^\s*({_DOTTED})\s*=\s*(.*)$")
_INLINE_KEY = re.compile(rf"(?:^|[{{,])\s*({_DOTTED})\s*=")
_SPLIT = re.compile(rf"{_PART}")
_INDEX = re.compile(r"^(.*?)(?:\[(\d+)\])?$")


def _parts(dotted: str) -> list[str]:
    out = []
    for m in _SPLIT.finditer(dotted):
        p = m.group(0)
        out.append(p[1:-1] if p[:1] in "\"'" else p)
    return out


class LineIndex:
    """Key path -> line number (1-based) of a TOML text; see the module docstring."""

    def __init__(self, text: str) -> None:
        self._lines: dict[str, int] = {}
        counts: dict[str, int] = {}
        prefix: list[str] = []
        in_string: str | None = None
        for number, line in enumerate(text.splitlines(), start=1):
            if in_string is not None:
                if line.count(in_string) % 2 == 1:
                    in_string = None
                continue
            stripped = line.lstrip()
            if not stripped or stripped.startswith("#"):
                continue
            header = _HEADER.match(line)
            if header and not _ASSIGN.match(line):
                names = _parts(header.group(2))
                prefix = self._resolve(names, counts)
                if header.group(1) == "[[":
                    key = ".".join(names)
                    counts[key] = counts.get(key, 0) + 1
                    prefix = self._resolve(names, counts)
                self._lines.setdefault(".".join(prefix), number)
                continue
            assign = _ASSIGN.match(line)
            if not assign:
                continue
            path = prefix + _parts(assign.group(1))
            self._lines.setdefault(".".join(path), number)
            rest = assign.group(2)
            for quote in ('"""', "'''"):
                if rest.count(quote) % 2 == 1:
                    in_string = quote
            if rest.lstrip().startswith("{"):
                for m in _INLINE_KEY.finditer(rest.lstrip()[1:]):
                    self._lines.setdefault(".".join(path + _parts(m.group(1))), number)

    @staticmethod
    def _resolve(names: list[str], counts: dict[str, int]) -> list[str]:
        """Header names with the current index of each array of tables along the way."""
        out: list[str] = []
        for k in range(len(names)):
            key = ".".join(names[: k + 1])
            if key in counts:
                out.append(f"{names[k]}[{counts[key] - 1}]")
            else:
                out.append(names[k])
        return out

    def line(self, path: str) -> int | None:
        """The line of ``path`` or of its nearest parent that the text shows; None if none."""
        while path:
            if path in self._lines:
                return self._lines[path]
            if path.endswith("]") and "[" in path:
                # body[2] is reached through body[2] only; "body" itself is not a line
                path = path[: path.rindex("[")]
                continue
            if "." not in path:
                return None
            path = path.rsplit(".", 1)[0]
        return None
