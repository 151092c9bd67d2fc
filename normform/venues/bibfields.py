"""Find and replace one field's value inside BibTeX text, leaving the rest byte for byte.

Rewriting a collection's ``journal`` fields must not reformat its file (comments,
field order, string macros, spacing all survive), so instead of a
parse-and-print round trip we scan the entries for the field's value span and
splice in the new value.  pybtex still validates the file in the command.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, Iterator

from normform.venues.errors import VenueTableError


class BibScanError(VenueTableError):
    """The BibTeX text is malformed where a field value was expected."""


@dataclass(frozen=True, slots=True)
class FieldValue:
    entry_key: str
    name: str                # field name, lower-case
    start: int               # span of the value in the text, delimiters included
    end: int
    text: str                # the value without its outer delimiters
    delimited: bool          # False for a bare macro or number (not rewritten)
    line: int


def _position(text: str, offset: int) -> tuple[int, int]:
    line = text.count("\n", 0, offset) + 1
    return line, offset - (text.rfind("\n", 0, offset) + 1) + 1


def _error(text: str, offset: int, message: str, expected: tuple[str, ...] = ()) -> BibScanError:
    line, column = _position(text, offset)
    return BibScanError(message, line=line, column=column, source=text, expected=expected)


def _skip_space(text: str, i: int) -> int:
    n = len(text)
    while i < n and text[i].isspace():
        i += 1
    return i


def _balanced(text: str, i: int, close: str) -> int:
    """Index just past the delimiter closing the one at ``i`` (braces nest inside)."""
    depth = 0
    j = i + 1
    n = len(text)
    while j < n:
        c = text[j]
        if c == "\\":
            j += 2
            continue
        if c == "{":
            depth += 1
        elif c == "}":
            if depth == 0:
                if close == "}":
                    return j + 1
                raise _error(text, j, "unbalanced '}' in a field value")
            depth -= 1
        elif c == close and depth == 0:
            return j + 1
        j += 1
    raise _error(text, i, "field value is never closed", expected=(f"'{close}'",))


def fields(text: str, on_error: Callable[[BibScanError], None] | None = None) -> Iterator[FieldValue]:
    """Every field value of every regular entry (``@string``/``@comment``/``@preamble`` skipped).

    A malformed entry yields nothing: it goes to ``on_error`` and the scan goes
    on at the next ``@`` that starts a line (without a handler it raises).
    """
    i, n = 0, len(text)
    while True:
        at = text.find("@", i)
        if at < 0:
            return
        try:
            found, i = _entry(text, at)
        except BibScanError as exc:
            if on_error is None:
                raise
            on_error(exc)
            nxt = text.find("\n@", at + 1)
            if nxt < 0:
                return
            i = nxt + 1
            continue
        yield from found


def _entry(text: str, at: int) -> tuple[list[FieldValue], int]:
    """The fields of the entry starting at ``at``, and the index after it."""
    n = len(text)
    out: list[FieldValue] = []
    j = at + 1
    while j < n and (text[j].isalnum() or text[j] in "_-"):
        j += 1
    kind = text[at + 1:j].lower()
    j = _skip_space(text, j)
    if j >= n or text[j] not in "{(":
        return out, at + 1   # a stray '@' in free text between entries
    close = "}" if text[j] == "{" else ")"
    if kind in ("comment", "preamble", "string"):
        return out, _balanced(text, j, close)
    j += 1
    comma = text.find(",", j)
    if comma < 0:
        raise _error(text, j, "entry has no key followed by ','", expected=("','",))
    entry_key = text[j:comma].strip()
    j = comma + 1
    while True:
        j = _skip_space(text, j)
        if j < n and text[j] == close:
            return out, j + 1
        if j >= n:
            raise _error(text, at, "entry is never closed", expected=(f"'{close}'",))
        start_name = j
        while j < n and (text[j].isalnum() or text[j] in "_-:."):
            j += 1
        name = text[start_name:j].lower()
        if not name:
            raise _error(text, j, "expected a field name", expected=(f"a field 'name = value' or '{close}'",))
        j = _skip_space(text, j)
        if j >= n or text[j] != "=":
            raise _error(text, j, f"expected '=' after field name {name!r}", expected=("'='",))
        j = _skip_space(text, j + 1)
        v_start = j
        pieces: list[tuple[int, int, bool]] = []
        while True:
            if j < n and text[j] in "{\"":
                end = _balanced(text, j, "}" if text[j] == "{" else "\"")
                pieces.append((j, end, True))
            else:
                k = j
                while k < n and (text[k].isalnum() or text[k] in "_-:.+/'"):
                    k += 1
                if k == j:
                    raise _error(text, j, f"expected a value for field {name!r}",
                                 expected=("'{...}', '\"...\"' or a macro name",))
                end = k
                pieces.append((j, end, False))
            j = _skip_space(text, end)
            if j < n and text[j] == "#":
                j = _skip_space(text, j + 1)
                continue
            break
        v_end = pieces[-1][1]
        simple = len(pieces) == 1 and pieces[0][2]
        inner = text[v_start + 1:v_end - 1] if simple else text[v_start:v_end]
        out.append(FieldValue(entry_key, name, v_start, v_end, inner, simple,
                              _position(text, v_start)[0]))
        if j < n and text[j] == ",":
            j += 1
        elif j < n and text[j] == close:
            continue
        else:
            raise _error(text, j, "the field value is not followed by ',' or the end of the entry",
                         expected=(f"',' or '{close}'",))


def replace_values(text: str, changes: dict[int, str]) -> str:
    """Splice new values (keyed by the value's start offset) into ``text``; each in braces."""
    spans = {f.start: f for f in fields(text, on_error=lambda exc: None) if f.start in changes}
    out: list[str] = []
    last = 0
    for start in sorted(spans):
        f = spans[start]
        out.append(text[last:f.start])
        out.append("{" + changes[start] + "}")
        last = f.end
    out.append(text[last:])
    return "".join(out)
