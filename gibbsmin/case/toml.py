"""TOML documents that remember the line of every key, read table by table with checked keys.

tomllib gives no line numbers; :class:`TomlSource` finds them by a light scan of
the text (table headers and ``key =`` lines outside strings and multi-line
values), so that every error can say "file, line n: key: problem".
"""

from __future__ import annotations

import difflib
import os
import tomllib
from collections.abc import Callable, Iterator, Mapping, Sequence
from pathlib import Path

from ..errors import InputError, UnknownSpeciesError

__all__ = ["CaseError", "Section", "TomlSource"]


class CaseError(InputError):
    """A case or unit-description file that cannot be used as written.

    Attributes
    ----------
    file : str
    line : int or None
    key : str
        The key in dotted form, e.g. ``conditions.T``.
    problem : str
    """

    def __init__(self, file: str, line: int | None, key: str, problem: str):
        self.file, self.line, self.key, self.problem = file, line, key, problem
        where = f"{file}, line {line}" if line else file
        super().__init__(f"{where}: {key}: {problem}" if key else f"{where}: {problem}")


# --- TOML with line numbers -------------------------------------------------------------------------

_KeyPath = tuple[str | int, ...]


def _scan_lines(text: str) -> Iterator[tuple[int, str, int]]:
    """Each physical line with its number and the bracket depth at its start, outside strings and comments.

    Yields (line number, the line with strings blanked and comments cut, depth at the start of the line).
    Blanking strings keeps quoted keys recognisable by their quotes while brackets and '#' inside
    strings no longer count.
    """
    depth = 0
    in_multiline: str | None = None
    for number, line in enumerate(text.splitlines(), start=1):
        start_depth = depth if in_multiline is None else -1
        out: list[str] = []
        i = 0
        while i < len(line):
            if in_multiline is not None:
                end = line.find(in_multiline, i)
                if end < 0:
                    i = len(line)
                    continue
                i = end + 3
                in_multiline = None
                continue
            ch = line[i]
            if ch == "#":
                break
            if line.startswith('"""', i) or line.startswith("'''", i):
                in_multiline = line[i : i + 3]
                out.append('""')
                i += 3
                continue
            if ch in "\"'":
                end = i + 1
                while end < len(line) and line[end] != ch:
                    end += 2 if ch == '"' and line[end] == "\\" else 1
                out.append(line[i : end + 1])
                i = end + 1
                continue
            if ch in "[{":
                depth += 1
            elif ch in "]}":
                depth = max(depth - 1, 0)
            out.append(ch)
            i += 1
        yield number, "".join(out), start_depth


def _deepest_line(text: str) -> int | None:
    """The line on which the bracket depth (outside strings and comments) is greatest."""
    deepest, line_of = 0, None
    for number, line, depth in _scan_lines(text):
        for ch in line:
            depth += 1 if ch in "[{" else -1 if ch in "]}" else 0
            if depth > deepest:
                deepest, line_of = depth, number
    return line_of


def _first_equals(line: str) -> int | None:
    """Position of the first '=' outside quotes (a quoted key may hold '=')."""
    quote = None
    for i, ch in enumerate(line):
        if quote:
            if ch == quote:
                quote = None
        elif ch in "\"'":
            quote = ch
        elif ch == "=":
            return i
    return None


def _split_key(text: str) -> tuple[str, ...] | None:
    """The parts of a (possibly dotted, possibly quoted) TOML key, read by tomllib itself; None if not a key."""
    try:
        parsed = tomllib.loads(f"{text} = 0")
    except tomllib.TOMLDecodeError:
        return None
    parts: list[str] = []
    node: object = parsed
    while isinstance(node, dict) and len(node) == 1:
        (key, node), = node.items()
        parts.append(key)
    return tuple(parts) if node == 0 else None


class TomlSource:
    """A TOML document with the line of every key, so that errors can point at the line.

    Parameters
    ----------
    text : str
    name : str
        How to call the document in messages (its file name).
    """

    def __init__(self, text: str, name: str = "<case>"):
        self.name = name
        try:
            self.data = tomllib.loads(text)
        except tomllib.TOMLDecodeError as exc:
            raise CaseError(name, None, "", f"is not valid TOML: {exc}") from None
        except RecursionError:
            # tomllib reads nested arrays and inline tables recursively; thousands of levels exhaust the stack.
            raise CaseError(name, _deepest_line(text), "", "nests arrays or inline tables too deeply to read (a case "
                            "file needs a few levels); check for unclosed or repeated brackets") from None
        self._lines: dict[_KeyPath, int] = {}
        self._index_lines(text)

    @classmethod
    def from_file(cls, path: str | os.PathLike[str]) -> TomlSource:
        path = Path(path)
        try:
            text = path.read_text(encoding="utf-8")
        except FileNotFoundError:
            raise CaseError(str(path), None, "", "no such file; check the path") from None
        except IsADirectoryError:
            raise CaseError(str(path), None, "", "is a directory, not a file") from None
        except UnicodeDecodeError:
            raise CaseError(str(path), None, "", "is not UTF-8 text; save it as UTF-8") from None
        except OSError as exc:
            raise CaseError(str(path), None, "", f"cannot be read ({exc.strerror})") from None
        return cls(text, path.name)

    def _index_lines(self, text: str) -> None:
        table: _KeyPath = ()
        counters: dict[_KeyPath, int] = {}
        for number, line, depth in _scan_lines(text):
            stripped = line.strip()
            if depth != 0 or not stripped:
                continue
            if stripped.startswith("[["):
                parts = _split_key(stripped[2:].split("]]")[0])
                if parts is not None:
                    index = counters.get(parts, -1) + 1
                    counters[parts] = index
                    table = (*parts, index)
                    self._lines.setdefault(table, number)
                continue
            if stripped.startswith("["):
                parts = _split_key(stripped[1:].split("]")[0])
                if parts is not None:
                    table = self._with_array_indices(parts, counters)
                    self._lines.setdefault(table, number)
                continue
            equals = _first_equals(stripped)
            if equals is not None:
                parts = _split_key(stripped[:equals])
                if parts is not None:
                    self._lines.setdefault((*table, *parts), number)

    @staticmethod
    def _with_array_indices(parts: tuple[str, ...], counters: Mapping[_KeyPath, int]) -> _KeyPath:
        """[stage.approach] under [[stage]] means the latest stage's table: insert the array index."""
        path: list[str | int] = []
        for part in parts:
            path.append(part)
            key = tuple(p for p in path if isinstance(p, str))
            if key in counters:
                path.append(counters[key])
        return tuple(path)

    def line(self, path: _KeyPath) -> int | None:
        """Line of a key, or of the nearest enclosing key or table that has one (inline tables)."""
        for end in range(len(path), 0, -1):
            found = self._lines.get(tuple(path[:end]))
            if found is not None:
                return found
        return None

    def root(self) -> Section:
        return Section(self, (), self.data)


def _describe_path(path: _KeyPath) -> str:
    text = ""
    for part in path:
        if isinstance(part, int):
            text += f"[{part + 1}]"
        else:
            bare = part.replace("_", "").replace("-", "").isalnum()
            text += ("." if text else "") + (part if bare else f'"{part}"')
    return text


#: Sentinel: the key is required.
_REQUIRED = object()


class Section:
    """One table of a TOML document, read key by key; keys never read are errors (:meth:`finish`).

    Each reader converts a value and, when it fails, raises a :class:`CaseError`
    naming the file, the line and the key.
    """

    def __init__(self, source: TomlSource, path: _KeyPath, data: Mapping[str, object]):
        self.source, self.path, self.data = source, path, data
        self._used: set[str] = set()

    @property
    def name(self) -> str:
        return _describe_path(self.path) or "the top level"

    def error(self, key: str | int | None, problem: str, cls: type[CaseError] = CaseError) -> CaseError:
        path = self.path if key is None else (*self.path, key)
        return cls(self.source.name, self.source.line(path), _describe_path(path), problem)

    def __contains__(self, key: str) -> bool:
        return key in self.data

    def keys(self) -> list[str]:
        return list(self.data)

    def get(self, key: str, reader: Callable[[object], object] | None = None, default: object = _REQUIRED,
            hint: str = "") -> object:
        """The value of ``key`` passed through ``reader``; ``default`` when absent (required when not given)."""
        self._used.add(key)
        if key not in self.data:
            if default is _REQUIRED:
                raise self.error(None, f"needs the key {key!r}{'; ' + hint if hint else ''}")
            return default
        value = self.data[key]
        if reader is None:
            return value
        try:
            return reader(value)
        except CaseError:
            raise
        except (InputError, UnknownSpeciesError) as exc:
            raise self.error(key, str(exc)) from None

    def section(self, key: str, required: bool = False) -> Section | None:
        self._used.add(key)
        value = self.data.get(key)
        if value is None:
            if required:
                raise self.error(None, f"needs a table [{_describe_path((*self.path, key))}]")
            return None
        if not isinstance(value, dict):
            raise self.error(key, f"must be a table (a [{key}] header or {{...}}), not {kind(value)}")
        return Section(self.source, (*self.path, key), value)

    def sections(self, key: str) -> list[Section]:
        """An array of tables ([[key]]), or an empty list when absent."""
        self._used.add(key)
        value = self.data.get(key)
        if value is None:
            return []
        if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
            raise self.error(key, f"must be an array of tables, written [[{key}]], not {kind(value)}")
        return [Section(self.source, (*self.path, key, i), v) for i, v in enumerate(value)]

    def mark_used(self, key: str) -> None:
        self._used.add(key)

    def unused(self) -> list[str]:
        return [k for k in self.data if k not in self._used]

    def finish(self, allowed: Sequence[str]) -> None:
        """Refuse any key that was not read, suggesting the nearest allowed one."""
        for key in self.unused():
            close = difflib.get_close_matches(key, list(allowed), n=1, cutoff=0.6)
            folded = [a for a in allowed if a.casefold() == key.casefold()]
            suggestion = folded or close
            hint = f"did you mean {suggestion[0]!r}?" if suggestion else f"allowed keys: {', '.join(allowed)}"
            where = f"in [{self.name}]" if self.path else "at the top level (a table name)"
            raise self.error(key, f"unknown key {where}; {hint}")


def kind(value: object) -> str:
    kinds = {bool: "true/false", int: "a number", float: "a number", str: "a text", list: "a list", dict: "a table"}
    return kinds.get(type(value), type(value).__name__)
