"""BibTeX name strings <-> :class:`normform.model.Name`, with pybtex's name rules.

Splitting follows BibTeX's "First von Last", "von Last, First" and
"von Last, Jr, First" forms as pybtex implements them; the parts are then
turned from TeX into Unicode.  A name that is one braced group
(``{The Quillfeather Society}``) is a literal (corporate) name.

Writing uses the comma form ``von Last, Jr, First`` so that lower-case given
names are never mistaken for a von part; lower-case words inside a family
name and the word ``and`` are braced so that BibTeX reads them back unchanged.
BibTeX has no slot for a dropping particle: it is written after the given
names and comes back as part of them.
"""

from __future__ import annotations

from functools import lru_cache

from normform.model import Name
from normform.texconv import to_latex, to_unicode


def _is_single_group(text: str) -> bool:
    """True when ``text`` is exactly one brace group, ``{...}``."""
    if not (text.startswith("{") and text.endswith("}")):
        return False
    depth = 0
    for i, ch in enumerate(text):
        if ch == "{":
            depth += 1
        elif ch == "}":
            depth -= 1
            if depth == 0 and i != len(text) - 1:
                return False
    return depth == 0


def _join(parts: list[str]) -> str | None:
    text = to_unicode(" ".join(parts)) if parts else ""
    return text or None


def split_name(text: str) -> Name:
    """One BibTeX name (TeX allowed) as a :class:`Name`."""
    from pybtex.database import Person

    raw = " ".join(text.split())
    if _is_single_group(raw) and not raw.startswith("{\\"):
        inner = to_unicode(raw[1:-1])
        return Name(literal=inner)
    person = Person(raw)
    return Name(
        family=_join(person.last_names),
        given=_join(person.first_names + person.middle_names),
        particle=_join(person.prelast_names),
        suffix=_join(person.lineage_names),
    )


def split_name_list(field: str) -> list[str]:
    """Split a name list at top-level ``and`` (brace-aware, BibTeX's rule via pybtex)."""
    from pybtex.bibtex.utils import split_name_list as _split
    return [p for p in _split(field) if p.strip()]


ET_AL = Name(literal="others")  # BibTeX's "and others": the list goes on


def split_names(field: str) -> tuple[Name, ...]:
    """A BibTeX name list as names; a final ``and others`` becomes :data:`ET_AL`."""
    parts = split_name_list(field)
    return tuple(ET_AL if part.strip() == "others" else split_name(part) for part in parts)


def _protect_word(word: str, ascii: bool) -> str:
    tex = to_latex(word, ascii)
    first = next((ch for ch in word if ch.isalpha()), "")
    if (first and first.islower()) or word.lower() == "and" or not first:
        return "{" + tex + "}"
    return tex


def _words(text: str, ascii: bool, protect: bool) -> str:
    words = text.split()
    if protect:
        return " ".join(_protect_word(w, ascii) for w in words)
    return " ".join("{" + to_latex(w, ascii) + "}" if w.lower() == "and" else to_latex(w, ascii)
                    for w in words)


@lru_cache(maxsize=1 << 16)
def format_name(name: Name, ascii: bool = False) -> str:
    """BibTeX string for ``name``; ``ascii`` writes non-ASCII letters as TeX commands.
    Memoised: a collection names the same people again and again."""
    if name == ET_AL:
        return "others"
    if name.literal is not None:
        return "{" + to_latex(name.literal, ascii) + "}"
    family = _words(name.family or "", ascii, protect=True) or "{}"
    if name.particle:
        family = _words(name.particle, ascii, protect=False) + " " + family
    given = " ".join(p for p in (name.given, name.dropping_particle) if p)
    given_tex = _words(given, ascii, protect=False)
    if name.suffix:
        return f"{family}, {_words(name.suffix, ascii, protect=False)}, {given_tex}".rstrip()
    if given_tex:
        return f"{family}, {given_tex}"
    words = (name.family or "").split()
    if (len(words) == 1 and not name.particle and words[0][:1].isalpha()
            and words[0].lower() not in ("and", "others")):
        # A lone word is the family name under BibTeX's rules even in lower case;
        # braces would make it read back as a literal (corporate) name.
        return to_latex(words[0], ascii)
    # A bare multi-word family needs the comma form, or its first word becomes a given name.
    return f"{family}," if len((name.family or "").split()) > 1 else family


def format_names(names: tuple[Name, ...] | list[Name], ascii: bool = False) -> str:
    return " and ".join(format_name(n, ascii) for n in names)


__all__ = ["ET_AL", "split_name", "split_names", "split_name_list", "format_name", "format_names"]
