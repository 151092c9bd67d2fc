"""Split a free-form author (or editor) list into names.

Handles the shapes legacy lists use: ``A. B. Family``, ``Family, A. B.``,
``Family A B``, full given names, ``and`` / ``&`` / ``;`` / commas between
names, ``et al.``, hyphenated initials ``J.-P.``, lower-case particles
(``van der``, ``de la``) and suffixes (``Jr.``, ``III``).  The one real
ambiguity -- does a comma separate two names or a family name from its
given names? -- is decided once per list from the shape of the pieces.
"""

from __future__ import annotations

import re
from functools import lru_cache

from normform.model import Name
from normform.refs import lexicon as lx

_SEP = re.compile(r"\s*;\s*|\s*,?\s+(?:and|&|und|et|y|e)\s+|\s*,?\s*&\s*|\s*\band\b\s*")
_ETAL = re.compile(r"[,;]?\s*(?:et\.?\s*al\.?|and others|y otros|u\.\s?a\.)\s*$", re.I)
_ROLE = re.compile(
    r"[,;]?\s*\(?\b(?:eds?\.?|editors?|(?:edited|compiled|translated)\s+by|hrsg\.?|transl?\.|translators?)(?!\w)\)?[.,]?\s*",
    re.I)   # (?!\w): a whole word only, else "ed" is cut off "editors"
# "QSEM editors", "The Quill Tables editors": capitalised words (no initials)
# then a bare plural role word, no comma: a corporate author, not a role
_CORPORATE_ROLE = re.compile(r"(?:[A-Z][\w&'-]+\s+)+(?:editors|translators)")
# one given-name piece: "A.", "A", "J.-P.", "Ch.", "A.B."
_INITIALS = re.compile(r"(?:[^\W\d_][a-z]?\.?(?:-[^\W\d_]\.?)?)+\Z")
_INITIAL_ONLY = re.compile(r"(?:[^\W\d_][a-z]?\.(?:\s?-?[^\W\d_][a-z]?\.)*|[A-Z]{1,3}(?:-[A-Z])?)\Z")


_GLUED_INITIAL = re.compile(r"(?<![^\s.-])([A-Z]\.)(?=[A-Z][a-z])")
_CORPORATE = re.compile(
    r"(?i)^the\s|\b(?:group|society|committee|project|authors|community|team|consortium|collective|"
    r"editors|institute|association|council|foundation|office|bureau|collaboration|working)\b")


# A match of _SEP needs one of these (see its alternatives).
_SEP_GATE = re.compile(r"[;&]|and|\s(?:und|et|y|e)\s")
_CORPORATE_WORDS = ("group", "society", "committee", "project", "authors", "community", "team", "consortium",
                    "collective", "editors", "institute", "association", "council", "foundation", "office",
                    "bureau", "collaboration", "working")
# non-ASCII characters that re.IGNORECASE folds onto ASCII letters (dotted
# and dotless i, long s, Kelvin sign): with one of them, skip the gates
_CASE_ODD = re.compile("[\u0130\u0131\u017f\u212a]")


def _caps_initials(w: str) -> bool:
    # "DŽ", "ÉG": one to three capitals of any script
    return len(w) <= 3 and w.isalpha() and w.isupper()


def _is_initials(piece: str) -> bool:
    words = piece.split()
    return bool(words) and all(_INITIAL_ONLY.match(w) for w in words)


def _given_word(w: str) -> bool:
    """A known given name ("Ada", "Jean-Pierre") or an initial."""
    if w in lx.SUFFIXES:
        return False
    return bool(_INITIAL_ONLY.match(w)) or all(p.lower() in lx.GIVEN_NAMES for p in w.split("-") if p)


def _core_words(piece: str) -> int:
    return sum(1 for w in piece.split() if w not in lx.PARTICLES)


def _ends_initial(piece: str) -> bool:
    words = piece.split()
    while len(words) > 1 and words[-1] in lx.PARTICLES:
        words.pop()   # "B. L. van der": the particles of an inverted name follow its initials
    return bool(words) and bool(_INITIAL_ONLY.match(words[-1])) and piece not in lx.SUFFIXES


@lru_cache(maxsize=100_000)
def split_names(text: str) -> tuple[tuple[Name, ...], bool]:
    """Names in ``text`` and whether the list ended with *et al.*"""
    text = _GLUED_INITIAL.sub(r"\1 ", " ".join(text.split()))   # "V.Quillby" -> "V. Quillby"
    etal = False
    m = _ETAL.search(text)
    if m:
        etal = True
        text = text[: m.start()]
    # cheap necessary conditions first: most lists have no role word, no
    # corporate word and often no separator, and the full patterns are slow
    odd = not text.isascii() and _CASE_ODD.search(text) is not None
    low = text.lower()
    if odd or "ed" in low or "trans" in low or "hrsg" in low:
        if _CORPORATE_ROLE.fullmatch(text):
            return (Name(literal=text),), etal
        text = _ROLE.sub(" ", text)
    text = text.strip(" ,;:")
    if not text:
        return (), etal
    has_sep = _SEP_GATE.search(text) is not None
    low = text.lower()
    if (odd or low.startswith("the") or any(w in low for w in _CORPORATE_WORDS)) \
            and _CORPORATE.search(text) and not (has_sep and _SEP.search(text)):
        # "QSEM Working Group", "The Stacks Project Authors": one literal name
        return (Name(literal=text),), etal
    groups = [g.strip(" ,") for g in (_SEP.split(text) if has_sep else (text,)) if g and g.strip(" ,")]
    if not groups:  # only separators ("and", "&"): no names at all
        return (), etal
    chunks: list[str] = []
    for g in groups:
        chunks.extend(c.strip() for c in g.split(",") if c.strip())
    names: list[Name] = []
    # Family-first with comma ("Family, A. B., Other, C.")?  Decide from the
    # first two chunks: a family chunk followed by an initials chunk.
    inverted = len(chunks) >= 2 and not _is_initials(chunks[0]) and _ends_initial(chunks[1]) \
        and _core_words(chunks[0]) <= 3 and not _ends_initial(chunks[0])
    if not inverted and len(chunks) >= 2 and "," in groups[0] and not _is_initials(chunks[0]) \
            and _core_words(chunks[0]) <= 3 and chunks[0].split()[-1].lower() not in lx.GIVEN_NAMES \
            and not _ends_initial(chunks[0]) and not _INITIAL_ONLY.match(chunks[0].split()[0]) \
            and all(_given_word(w) for w in chunks[1].split()):
        # "Quillfeather, Ada": the second piece starts with a known given name
        inverted = True
    if not inverted and len(chunks) % 2 == 0 and groups[-1].count(",") == 1 and \
            all(_core_words(c) <= 3 and c[:1].isupper() and not c.endswith(".") for c in chunks[1::2]) and \
            (len(groups) >= 2 or (len(chunks) == 2 and _core_words(chunks[1]) == 1
                                  # "P. Tamsel, Inkwells", "Ehrhard Vellum, M-structure": a
                                  # given-first name and a stray word, not "Penković, Ranko"
                                  and _core_words(chunks[0]) == 1 and not _ends_initial(chunks[0].split()[0]))):
        # "Quill, Zur, Fenwick, Manfred, and Marrow, Louis"; "Penković, Ranko"
        inverted = True
    if not inverted and len(chunks) >= 2 and len(groups) >= 2 and all(g.count(",") == 1 for g in groups):
        # "Quillby, Peter and Vellum, Jared": one comma inside every group
        inverted = all(len(g.split(",")[0].split()) <= 3 for g in groups)
    i = 0
    while i < len(chunks):
        c = chunks[i]
        if inverted and i + 1 < len(chunks) and chunks[i + 1] not in lx.SUFFIXES and (_ends_initial(chunks[i + 1]) or
                                                 _looks_given(chunks[i + 1], c)):
            given = chunks[i + 1]
            suffix = None
            if i + 2 < len(chunks) and chunks[i + 2].rstrip(".") + "." in lx.SUFFIXES | {"Jr.", "Sr."} \
                    and not (i + 3 < len(chunks) and _is_initials(chunks[i + 3])):
                # ("Quill, J. and Jun, J.": "Jun" before initials is a family name)
                suffix = chunks[i + 2]
                i += 1
            names.append(_family_given(c, given, suffix))
            i += 2
            continue
        if c in lx.SUFFIXES and names:
            last = names[-1]
            names[-1] = Name(family=last.family, given=last.given, particle=last.particle, suffix=c)
            i += 1
            continue
        names.append(parse_one(c))
        i += 1
    return tuple(_dotted_suffix(n) for n in names if n.family or n.literal), etal


def _dotted_suffix(n: Name) -> Name:
    # "Jr" lost its period to the labeler (it was the line's punctuation)
    if n.suffix in ("Jr", "Sr", "jr", "sr", "Jun"):
        return Name(family=n.family, given=n.given, particle=n.particle, suffix=n.suffix + ".")
    return n


def _looks_given(chunk: str, family_chunk: str) -> bool:
    # "Quillby, Peter": one or two capitalised words, no particles (but
    # "Plume, Joris van der": the particles of the family may follow)
    words = chunk.split()
    while len(words) > 1 and words[-1] in lx.PARTICLES:
        words.pop()
    return 1 <= len(words) <= 3 and all(w[:1].isupper() for w in words) and _core_words(family_chunk) <= 3


def _family_given(family: str, given: str, suffix: str | None) -> Name:
    words = family.split()
    particle = []
    while len(words) > 1 and words[0] in lx.PARTICLES:
        particle.append(words.pop(0))
    # particles written after the given names: "Waerden, B. L. van der"
    gwords = given.split()
    tail = []
    while gwords and gwords[-1] in lx.PARTICLES:
        tail.insert(0, gwords.pop())
    particle = tail + particle
    return Name(family=" ".join(words), given=" ".join(gwords) or None,
                particle=" ".join(particle) or None, suffix=suffix)


def parse_one(text: str) -> Name:
    """One name without a comma: ``A. B. van der Family Jr.``, ``Family A B``."""
    words = text.split()
    if not words:
        return Name()
    suffix = None
    if len(words) > 1 and words[-1] in lx.SUFFIXES:
        suffix = words.pop()
    if len(words) == 1:
        return Name(family=words[0], suffix=suffix)
    # "Family A B" / "Family A.B.": initials after a long word; also with a
    # particle before the family ("de Plume L", "van der Marrow J") and
    # non-ASCII capitals ("Penković DŽ")
    lead = 0
    while lead < len(words) - 2 and words[lead] in lx.PARTICLES:
        lead += 1
    head, rest = words[lead], words[lead + 1:]
    if rest and not _INITIAL_ONLY.match(head) and head not in lx.PARTICLES \
            and all(_INITIAL_ONLY.match(w) or _caps_initials(w) for w in rest) \
            and (not any(w.endswith(".") for w in rest)
                 # "Quöllmann K.": a family name is never a bare initial, so a
                 # long word that is no known given name before initials is one
                 or _INITIAL_ONLY.match(words[-1]) and len(head) > 3 and head.lower() not in lx.GIVEN_NAMES
                 and "-" not in head):
        return Name(family=head, given=" ".join(rest), particle=" ".join(words[:lead]) or None, suffix=suffix)
    # given-first: family is the last word, particles (lower case) precede it
    j = len(words) - 1
    k = j
    while k > 1 and words[k - 1] in lx.PARTICLES:
        k -= 1
    # lower-case words in the middle that are particles
    first_particle = k
    for idx in range(1, j):
        if words[idx] in lx.PARTICLES:
            first_particle = idx
            break
    given = words[:first_particle]
    end = first_particle
    while end < j and words[end] in lx.PARTICLES:
        end += 1
    particle = words[first_particle:end]
    family = words[end:]
    if not given:
        given, particle = particle[:1], particle[1:]
    return Name(family=" ".join(family), given=" ".join(given) or None,
                particle=" ".join(particle) or None, suffix=suffix)
