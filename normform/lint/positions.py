"""Where each value sits in an entry's source text.

``tomllib`` and ``json`` give values but no positions, so a small scanner walks
the (already validated) source once and records, for every value path such as
``("formulas", 2, "text")``, the character span of the value and of its key.
The scanner never decides what a value *is* -- the standard parsers do that --
it only needs to find token boundaries, which keeps it small and sound.

For string values, :meth:`Located.string_offset` maps an index into the
decoded string to an offset in the source, accounting for escapes, line-ending
backslashes and the newline trimmed after an opening triple quote.  That is how
a formula parser's column inside a formula becomes a column in the file.
"""

from __future__ import annotations

from bisect import bisect_right
from dataclasses import dataclass, field

Path = tuple  # of str keys and int array indices


class ScanError(ValueError):
    """The scanner met text it cannot follow (input the real parser rejects)."""

    def __init__(self, message: str, offset: int) -> None:
        super().__init__(message)
        self.offset = offset


@dataclass
class Located:
    """Positions of every value of one source text."""

    text: str
    kind: str                                   # "toml" or "json"
    values: dict[Path, tuple[int, int]] = field(default_factory=dict)
    keys: dict[Path, tuple[int, int]] = field(default_factory=dict)
    _line_starts: list[int] = field(default_factory=list, repr=False)
    _maps: dict[Path, list[int]] = field(default_factory=dict, repr=False)

    def __post_init__(self) -> None:
        starts = [0]
        find = self.text.find
        i = find("\n")
        while i >= 0:
            starts.append(i + 1)
            i = find("\n", i + 1)
        self._line_starts = starts

    # -- offsets to line/column (both 1-based, columns in code points) ------
    def line_col(self, offset: int) -> tuple[int, int]:
        offset = max(0, min(offset, len(self.text)))
        line = bisect_right(self._line_starts, offset)
        return line, offset - self._line_starts[line - 1] + 1

    @property
    def line_count(self) -> int:
        return len(self._line_starts)

    def line_text(self, line: int) -> str:
        start = self._line_starts[line - 1]
        end = self.text.find("\n", start)
        return (self.text[start:] if end < 0 else self.text[start:end]).rstrip("\r")

    def span(self, path: Path) -> tuple[int, int] | None:
        """Span of the value at ``path``; for a missing path, its nearest ancestor."""
        path = tuple(path)
        while path:
            if path in self.values:
                return self.values[path]
            path = path[:-1]
        return None

    def key_span(self, path: Path) -> tuple[int, int] | None:
        return self.keys.get(tuple(path)) or self.span(path)

    # -- inside strings -------------------------------------------------------
    def string_offset(self, path: Path, index: int) -> int:
        """Source offset of character ``index`` of the decoded string at ``path``."""
        path = tuple(path)
        table = self._maps.get(path)
        if table is None:
            span = self.values.get(path)
            if span is None:
                return 0
            decode = _toml_string_map if self.kind == "toml" else _json_string_map
            table = decode(self.text, span[0], span[1])
            self._maps[path] = table
        if not table:
            return self.values[path][0]
        return table[max(0, min(index, len(table) - 1))]


# ---------------------------------------------------------------------------
# string decoding maps: decoded index -> source offset (last item: the end)

_TOML_SIMPLE = set('btnfr"\\e')


def _toml_string_map(text: str, start: int, end: int) -> list[int]:
    if text.startswith("'''", start) or text.startswith('"""', start):
        q = 3
    elif text[start] in "'\"":
        q = 1
    else:
        return []
    literal = text[start] == "'"
    i, stop = start + q, end - q
    if q == 3:  # a newline right after the opening delimiter is trimmed
        if text.startswith("\r\n", i):
            i += 2
        elif text.startswith("\n", i):
            i += 1
    out: list[int] = []
    while i < stop:
        c = text[i]
        if c != "\\" or literal:
            if c == "\r" and text.startswith("\r\n", i):
                out.append(i)        # CRLF decodes to one "\n" (tomllib normalises)
                i += 2
                continue
            out.append(i)
            i += 1
            continue
        nxt = text[i + 1] if i + 1 < stop else ""
        if nxt in _TOML_SIMPLE:
            out.append(i)
            i += 2
        elif nxt == "u":
            out.append(i)
            i += 6
        elif nxt == "U":
            out.append(i)
            i += 10
        elif nxt == "x":
            out.append(i)
            i += 4
        else:  # line-ending backslash: skip whitespace and newlines
            i += 1
            while i < stop and text[i] in " \t\r\n":
                i += 1
    out.append(stop)
    return out


def _json_string_map(text: str, start: int, end: int) -> list[int]:
    i, stop = start + 1, end - 1
    out: list[int] = []
    while i < stop:
        if text[i] != "\\":
            out.append(i)
            i += 1
            continue
        out.append(i)
        if text[i + 1] == "u":
            code = int(text[i + 2:i + 6], 16)
            i += 6
            # a surrogate pair decodes to one code point
            if 0xD800 <= code < 0xDC00 and text.startswith("\\u", i):
                low = int(text[i + 2:i + 6], 16)
                if 0xDC00 <= low < 0xE000:
                    i += 6
        else:
            i += 2
    out.append(stop)
    return out


# ---------------------------------------------------------------------------
# TOML scanner

_BARE = set("ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789_-")


class _TomlScanner:
    def __init__(self, text: str, out: Located) -> None:
        self.t = text
        self.n = len(text)
        self.out = out
        self.aot_count: dict[Path, int] = {}   # array-of-tables path -> last index
        self.aot_paths: set[Path] = set()

    # low-level helpers
    def ws(self, i: int, newlines: bool = False) -> int:
        t, n = self.t, self.n
        while i < n:
            c = t[i]
            if c in " \t":
                i += 1
            elif newlines and c in "\r\n":
                i += 1
            elif newlines and c == "#":
                j = t.find("\n", i)
                i = n if j < 0 else j + 1
            else:
                break
        return i

    def end_of_line(self, i: int) -> int:
        i = self.ws(i)
        if i < self.n and self.t[i] == "#":
            j = self.t.find("\n", i)
            return self.n if j < 0 else j + 1
        if i < self.n and self.t[i] in "\r\n":
            return i + 1
        if i >= self.n:
            return i
        raise ScanError("expected end of line", i)

    def string_end(self, i: int) -> int:
        t = self.t
        if t.startswith('"""', i) or t.startswith("'''", i):
            q = t[i]
            j = i + 3
            while j < self.n:
                c = t[j]
                if c == "\\" and q == '"':
                    j += 2
                    continue
                if t.startswith(q * 3, j):
                    k = j + 3
                    while k < self.n and t[k] == q and k - j < 5:  # up to 2 extra quotes
                        k += 1
                    return k
                j += 1
            raise ScanError("unterminated string", i)
        q = t[i]
        j = i + 1
        while j < self.n:
            c = t[j]
            if c == "\\" and q == '"':
                j += 2
                continue
            if c == q:
                return j + 1
            if c == "\n":
                break
            j += 1
        raise ScanError("unterminated string", i)

    def key(self, i: int) -> tuple[list[str], list[tuple[int, int]], int]:
        """A dotted key at ``i``: its parts, their spans, the index after it."""
        import tomllib

        parts: list[str] = []
        spans: list[tuple[int, int]] = []
        while True:
            i = self.ws(i)
            if i < self.n and self.t[i] in "\"'":
                j = self.string_end(i)
                parts.append(tomllib.loads("k=" + self.t[i:j])["k"])
            else:
                j = i
                while j < self.n and self.t[j] in _BARE:
                    j += 1
                if j == i:
                    raise ScanError("expected a key", i)
                parts.append(self.t[i:j])
            spans.append((i, j))
            i = self.ws(j)
            if i < self.n and self.t[i] == ".":
                i += 1
                continue
            return parts, spans, i

    def value(self, i: int, path: Path) -> int:
        t = self.t
        c = t[i] if i < self.n else ""
        if c in "\"'":
            j = self.string_end(i)
        elif c == "[":
            j = i + 1
            index = 0
            while True:
                j = self.ws(j, newlines=True)
                if j < self.n and t[j] == "]":
                    j += 1
                    break
                j = self.value(j, path + (index,))
                index += 1
                j = self.ws(j, newlines=True)
                if j < self.n and t[j] == ",":
                    j += 1
                elif j < self.n and t[j] == "]":
                    j += 1
                    break
                else:
                    raise ScanError("expected , or ] in array", j)
        elif c == "{":
            j = self.ws(i + 1, newlines=True)
            if j < self.n and t[j] == "}":
                j += 1
            else:
                while True:
                    j = self.keyval(j, path)
                    j = self.ws(j, newlines=True)
                    if j < self.n and t[j] == ",":
                        j = self.ws(j + 1, newlines=True)
                        if j < self.n and t[j] == "}":   # TOML 1.1 trailing comma
                            j += 1
                            break
                        continue
                    if j < self.n and t[j] == "}":
                        j += 1
                        break
                    raise ScanError("expected , or } in inline table", j)
        else:  # number, boolean, date-time: runs to a delimiter
            j = i
            while j < self.n and t[j] not in ",]}#\r\n":
                j += 1
            while j > i and t[j - 1] in " \t":
                j -= 1
            if j == i:
                raise ScanError("expected a value", i)
        self.out.values[path] = (i, j)
        return j

    def keyval(self, i: int, prefix: Path) -> int:
        parts, spans, i = self.key(i, )
        if i >= self.n or self.t[i] != "=":
            raise ScanError("expected =", i)
        path = prefix
        for part, span in zip(parts, spans):
            path = path + (part,)
            self.out.keys.setdefault(path, span)
            self.out.values.setdefault(path, (span[0], span[1]))  # dotted parents
        i = self.ws(i + 1)
        end = self.value(i, path)
        return end

    def resolve(self, keys: list[str]) -> Path:
        path: Path = ()
        for part in keys:
            path = path + (part,)
            if path in self.aot_paths:
                path = path + (self.aot_count[path],)
        return path

    def run(self) -> None:
        t = self.t
        i = 0
        if t.startswith("\ufeff"):
            i = 1
        prefix: Path = ()
        while True:
            i = self.ws(i, newlines=True)
            if i >= self.n:
                break
            if t.startswith("[[", i):
                parts, spans, j = self.key(i + 2)
                if not t.startswith("]]", j):
                    raise ScanError("expected ]]", j)
                parent = self.resolve(parts[:-1])
                array = parent + (parts[-1],)
                self.aot_paths.add(array)
                index = self.aot_count.get(array, -1) + 1
                self.aot_count[array] = index
                prefix = array + (index,)
                self.out.keys.setdefault(array, spans[-1])
                self.out.values.setdefault(array, (i, j + 2))
                self.out.values[prefix] = (i, j + 2)
                self.out.keys[prefix] = spans[-1]
                i = self.end_of_line(j + 2)
            elif t[i] == "[":
                parts, spans, j = self.key(i + 1)
                if not t.startswith("]", j):
                    raise ScanError("expected ]", j)
                prefix = self.resolve(parts)
                self.out.values[prefix] = (i, j + 1)
                self.out.keys[prefix] = spans[-1]
                i = self.end_of_line(j + 1)
            else:
                j = self.keyval(i, prefix)
                i = self.end_of_line(j)


# ---------------------------------------------------------------------------
# JSON scanner

class _JsonScanner:
    def __init__(self, text: str, out: Located) -> None:
        self.t = text
        self.n = len(text)
        self.out = out

    def ws(self, i: int) -> int:
        while i < self.n and self.t[i] in " \t\r\n":
            i += 1
        return i

    def string_end(self, i: int) -> int:
        j = i + 1
        t = self.t
        while j < self.n:
            c = t[j]
            if c == "\\":
                j += 2
            elif c == '"':
                return j + 1
            else:
                j += 1
        raise ScanError("unterminated string", i)

    def value(self, i: int, path: Path) -> int:
        import json

        t = self.t
        i = self.ws(i)
        c = t[i] if i < self.n else ""
        if c == '"':
            j = self.string_end(i)
        elif c == "[":
            j = self.ws(i + 1)
            index = 0
            if j < self.n and t[j] == "]":
                j += 1
            else:
                while True:
                    j = self.ws(self.value(j, path + (index,)))
                    index += 1
                    if j < self.n and t[j] == ",":
                        j += 1
                        continue
                    if j < self.n and t[j] == "]":
                        j += 1
                        break
                    raise ScanError("expected , or ]", j)
        elif c == "{":
            j = self.ws(i + 1)
            if j < self.n and t[j] == "}":
                j += 1
            else:
                while True:
                    j = self.ws(j)
                    k = self.string_end(j)
                    key = json.loads(t[j:k])
                    self.out.keys[path + (key,)] = (j, k)
                    j = self.ws(k)
                    if j >= self.n or t[j] != ":":
                        raise ScanError("expected :", j)
                    j = self.ws(self.value(j + 1, path + (key,)))
                    if j < self.n and t[j] == ",":
                        j += 1
                        continue
                    if j < self.n and t[j] == "}":
                        j += 1
                        break
                    raise ScanError("expected , or }", j)
        else:
            j = i
            while j < self.n and t[j] not in ",]} \t\r\n":
                j += 1
            if j == i:
                raise ScanError("expected a value", i)
        self.out.values[path] = (i, j)
        return j


def locate_toml(text: str) -> Located:
    out = Located(text, "toml")
    out.values[()] = (0, len(text))
    _TomlScanner(text, out).run()
    return out


def locate_json(text: str) -> Located:
    out = Located(text, "json")
    _JsonScanner(text, out).value(0, ())
    return out
