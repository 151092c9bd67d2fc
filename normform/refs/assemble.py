"""Labeled tokens -> a validated :class:`Reference` with provenance.

Runs of equal labels become fields; the sub-language grammars split pages,
volume/issue clusters and dates; names go through the name-list splitter.
The validation pass then repairs what a labeler typically gets wrong (a
"volume" of 1996, an author list that swallowed the title, a reversed page
range) and lowers the confidence of what it cannot repair.

Before the runs are built, ``_repairs`` moves tokens between labels for
classes of input the labeler splits wrongly (series phrases, bare edition
ordinals, title/journal boundaries, author lists that ate the title,
proceedings titles cut at a comma, volume/issue clusters, ...).  Each
``_repair_*`` function's docstring names its class of input; each has an
invented-line test in ``tests/test_refs_repairs.py``.
"""

from __future__ import annotations

import re
import unicodedata
from functools import lru_cache
from itertools import compress, groupby, repeat
from operator import eq, itemgetter

from normform.model import (Date, FieldInfo, Identifier, Kind, Pages, Provenance, Reference,
                            Span)
from normform.refs import lexicon as lx
from normform.refs.confidence import record_confidence
from normform.refs import repairs as rp
from normform.refs.labeler import ID_LABEL_SET
from normform.refs.namelist import split_names
from normform.refs.subgrammars import parse_date, parse_pages, parse_volume
from normform.refs.tokens import Token

_STRIP = " \t,;:.\"“”„«»'‘’*_()[]{}<>/|-–—"
_KEEP_DOT_FIELDS = ("container_title", "publisher", "series", "place", "edition")
_YEAR_RE = re.compile(r"(?<!\d)(?:1[5-9]|20)\d\d(?!\d)")
_DIGITS = re.compile(r"\d+")
_MARKUP = re.compile(r"\\(?:emph|textit|textbf|textsl|em|it|bf|sl|textsc|sc|mathrm)\b\s*|[*_]{1,2}")
_TEX_HINT = re.compile(r"[\\{}~]|\$")
_SPACES = re.compile(r"\s+")
_KIND_WORDS = re.compile(
    r"(?i)\b(?:(?P<thesis>ph\.?\s?d\.?|doctoral|master'?s|habilitation|diplom|thesis|dissertation|tesis)"
    r"|(?P<unpub>to appear|in press|forthcoming|submitted|in preparation|personal communication|"
    r"private communication|unpublished|manuscript)"
    r"|(?P<software>software|package|version \d|computer program|data ?set|github)"
    r"|(?P<report>technical report|tech\.? rep|report|preprint|lecture notes|course notes|notes))\b")
_THESIS = re.compile(r"(?i)\b(?:ph\.?\s?d\.?|doctoral|master'?s|habilitation|diplom|thesis|dissertation|tesis)\b")
_REPORT = re.compile(r"(?i)\b(?:technical report|tech\.? rep|report|preprint|lecture notes|course notes|notes)\b")
# The same alternatives, case-sensitive, run over the lower-cased line (much
# faster than (?i)); the lookahead rejects positions that start no keyword.
# Valid only when lower-casing maps character to character and no character
# outside ASCII case-folds onto an ASCII letter (the (?i) oddities below).
_KIND_WORDS_LOWER = re.compile(r"\b(?=[cdfghilmnprstuv])" + _KIND_WORDS.pattern.replace("(?i)\\b", "", 1))
_CASE_ODD = re.compile("[\u0130\u0131\u017f\u212a]")


def _kind_words(text: str) -> dict[str, str]:
    found: dict[str, str] = {}
    if _CASE_ODD.search(text):
        for m in _KIND_WORDS.finditer(text):
            found.setdefault(m.lastgroup, m.group().lower())
        return found
    for m in _KIND_WORDS_LOWER.finditer(text.lower()):
        found.setdefault(m.lastgroup, m.group())
    return found


_PROC = re.compile(r"(?i)\b(?:proc\.|proceedings|conference|symposium|workshop|congress|colloquium|meeting)\b")


@lru_cache(maxsize=1)
def _latex():
    from pylatexenc.latex2text import LatexNodes2Text
    return LatexNodes2Text(math_mode="verbatim", strict_latex_spaces=False)


_COMPANY_TAIL = re.compile(r"(?:,?\s?(?:Inc\.|Ltd\.|Co\.|GmbH|S\.\s?A\.|and Co\.|& Co\.|& Cie|Corp\.|LLC|KG))+")
_ACRONYM_TAIL = re.compile(r" \([A-Z][A-Za-z]{1,7}\)(?=[,.;]|\Z)")
_IN_BEFORE = re.compile(r"\b[Ii]n:?\s*\Z")
_TITLE_VOL = re.compile(r"(?:,\s*|(?<=\w)\s+|\s*\()(?:[Vv]ol\.|[Vv]olume|Band|Bd\.)\s*(?P<v>\d{1,4})\)?\Z")
_CONTAINER_VOL = re.compile(r"(?<=[a-zA-Z.'])\s+(?P<v>\d{1,4})\Z")
_ABBREVIATED = re.compile(r"\b[A-Z][a-z]{0,7}\.\s")
# a closing tag (its ">" may be cut off with the run) or a whole opening tag;
# "a<b" in a formula is neither
_HTML_PIECE = re.compile(r"</[A-Za-z][A-Za-z0-9]{0,9}>?|<[A-Za-z][A-Za-z0-9]{0,9}(?:\s[^<>]{0,300})?>")
_PLACE_ABBREV = rp.REGION_ABBREV   # region abbreviations keep their dot on the place ("Mass.")
_NEEDS_CLEAN = re.compile(r"[\\{}~$*_\t\n]|\s\s|,,|\.\.")


def clean_text(text: str) -> str:
    """TeX to Unicode, markup dropped, NFC, single spaces.  (The line itself
    is already NFC, so plain text takes the fast path.)"""
    if not _NEEDS_CLEAN.search(text):
        return text.strip()
    return _clean_tex(text)


@lru_cache(maxsize=20_000)
def _clean_tex(text: str) -> str:
    # pure function of the text; journal names, publishers and TeX-laden
    # titles recur across a batch, and pylatexenc is the slowest step here
    text = _MARKUP.sub("", text)
    if _TEX_HINT.search(text):
        try:
            text = _latex().latex_to_text(text)
        except Exception:  # pylatexenc is lenient, but never let a field kill the record
            pass
    text = unicodedata.normalize("NFC", text)
    text = _SPACES.sub(" ", text)
    text = text.replace(",,", ",").replace("..", ".")
    return text.strip()


def _strip_field(field: str, text: str) -> str:
    keep_dot = field in _KEEP_DOT_FIELDS and text.rstrip().endswith(".")
    out = text.strip(_STRIP)
    # keep a closing bracket/quote that is balanced inside the field
    for o, c in ("()", "[]"):
        if out.count(o) > out.count(c) and text.rstrip(" .,;:").endswith(c):
            out += c
    if keep_dot and out and field == "place":
        # a place keeps only a region's abbreviation dot ("Mass."), not the sentence's ("New York.")
        keep_dot = out.rsplit(" ", 1)[-1].lower() + "." in _PLACE_ABBREV
        if keep_dot:
            return out + "."    # "Pasadena, Calif.": the region's dot
    if keep_dot and out:
        words = out.split()
        last = words[-1] if words else ""
        # an abbreviation's period, not the sentence's: a short word, a
        # journal-abbreviation word, or a name abbreviated elsewhere
        if len(last) <= 4 or (last + ".").lower() in lx.JOURNAL_WORDS or (
                len(last) <= 6 and _ABBREVIATED.search(out + " ")):
            out += "."
    if field == "title" and out.endswith("?") is False and text.strip().endswith("?"):
        out += "?"
    return out


class _Run:
    __slots__ = ("label", "first", "last", "conf")

    def __init__(self, label: str, first: int, last: int, conf: float):
        self.label, self.first, self.last, self.conf = label, first, last, conf


def _runs(tokens: list[Token], labels: list[str], marg: list[float]) -> list[_Run]:
    merged: list[_Run] = []
    append = merged.append
    i = 0
    for lab, group in groupby(labels):   # C-level grouping: one Python step per run, not per token
        j = i + len(list(group))
        r = _Run(lab, i, j - 1, marg[i] if j == i + 1 else min(marg[i:j]))
        i = j
        # merge runs of one label separated only by one or two "O" punctuation
        # tokens (a quote, a bracket), not by a separator
        if (len(merged) >= 2 and lab not in _NO_MERGE and merged[-2].label == lab and merged[-1].label == "O"
                and merged[-1].last - merged[-1].first < 2
                and all(t.kind in _GAP_KINDS and t.text not in ".,;"
                        for t in tokens[merged[-1].first:merged[-1].last + 1])):
            merged.pop()
            prev = merged[-1]
            prev.last = r.last
            prev.conf = min(prev.conf, r.conf, 0.99)
        else:
            append(r)
    return merged


_GAP_KINDS = frozenset(("punct", "tex"))
_NO_MERGE = frozenset(("O", "authors", "editors"))


_run_end = rp.run_end         # last index of the run of equal labels that starts at i


_first_run = rp.first_run     # first and last index of the first run of a label; (-1, -1) if none


def _positions(tokens: list[Token], wanted: frozenset[str], lo: int, hi: int) -> list[int]:
    """Indices in [lo, hi) of the tokens whose text is in ``wanted``, in
    order (the scan runs in C; keywords are rare)."""
    keep = map(wanted.__contains__, map(_TEXT, tokens))
    return [i for i in compress(range(len(tokens)), keep) if lo <= i < hi]


def _pick(runs: dict[str, list[_Run]], label: str, longest: bool = True) -> tuple[_Run | None, list[_Run]]:
    mine = runs.get(label)
    if not mine:
        return None, []
    if len(mine) == 1:
        return mine[0], []
    best = max(mine, key=_run_length) if longest else mine[0]
    return best, [r for r in mine if r is not best]


def _run_length(r: _Run) -> int:
    return r.last - r.first


_PERIOD = frozenset(".")
_NAME_WORDS = lx.PARTICLES | {"and", "et", "al", "y", "und", "eds", "ed", "editors", "editor", "jr", "sr"}


def _repair_labels(tokens: list[Token], labels: list[str], marg: list[float]) -> float:
    """An author list that ran past a sentence period into lower-case words
    has eaten the title: give the words back.  Returns a confidence factor."""
    n = len(labels)
    if not n or labels[0] not in ("authors", "editors"):
        return 1.0
    role = labels[0]
    end = _run_end(labels, 0) + 1
    for k in _positions(tokens, _PERIOD, 1, end - 1):   # the run's periods only
        prev = tokens[k - 1]
        if prev.kind != "word" or len(prev.text) <= 3:
            continue
        tail = tokens[k + 1:end]
        if any(x.kind == "word" and x.text[:1].islower() and x.text.lower() not in _NAME_WORDS for x in tail):
            labels[k] = "O"
            for j in range(k + 1, end):
                labels[j] = "title"
                marg[j] = min(marg[j], 0.6)
            return 0.7
    return 1.0


_LEFTOVER_OK = lx.CONNECTORS | {"of", "the", "pages", "page", "available", "online", "url", "isbn", "issn",
                                "edn", "edition", "ed", "eds", "retrieved", "accessed", "see", "also", "vols",
                                "vol", "nos", "s", "p", "pp", "no", "nr", "n", "et", "al", "hrsg", "thesis",
                                "series", "ser", "a", "an", "at", "on", "from", "de", "la", "des", "volume"}


def _repair_missing_title(tokens: list[Token], labels: list[str]) -> float:
    """No title but two separate container runs: the first one is the title
    (comma-separated styles such as "A. Author, Title, Journal 12, ...").
    Punctuation-and-short leftovers up to the next separator go with it."""
    if "title" in labels:
        return 1.0
    starts = [i for i, lab in enumerate(labels) if lab == "container_title" and (i == 0 or labels[i - 1] != lab)]
    if len(starts) < 2:
        return 1.0
    i = starts[0]
    n = len(labels)
    while i < n and labels[i] == "container_title":
        labels[i] = "title"
        i += 1
    # ") I" after "GL(3": leftovers before the next comma/period
    j = i
    while j < n and labels[j] == "O" and tokens[j].text not in ",.;" and j - i < 4:
        j += 1
    if j < n and tokens[j].text in ",.;" and j > i:
        for k in range(i, j):
            labels[k] = "title"
    return 0.8


def _repair_missing_publisher(tokens: list[Token], labels: list[str], words: frozenset[str] | set[str] = frozenset()
                              ) -> None:
    """No publisher, but after the title an unlabeled run of capitalised
    words sits right before ", Place" or ", Year" ("Pitman, Boston, MA,
    1984", "Quill Centre of Mathematics, 2021"): that run is the publisher.
    Unknown publisher names get no dictionary help, but the book layout is
    unambiguous.  In a chapter the run comes after the container's pages
    ("In Book, pages 1-9. Quill House, Place, 1967")."""
    if "publisher" in labels or "title" not in labels:
        return
    n = len(tokens)
    if "container_title" in labels:
        # a chapter: "In Book, pages 1-9. Quill House, Place, 1967"
        if "pages" not in labels or words.isdisjoint(_IN_WORDS):
            return
        last_title = n - 1 - labels[::-1].index("pages")
        if last_title < n - 1 - labels[::-1].index("container_title"):
            return
    else:
        last_title = n - 1 - labels[::-1].index("title")
    i = last_title + 1
    while i < n:
        if labels[i] == "O" and tokens[i].kind == "word" and tokens[i].text[:1].isupper() \
                and tokens[i].text.lower() not in lx.CONNECTORS and i > 0 and tokens[i - 1].text in ".,;:":
            j = i
            while j < n and labels[j] in ("O", "note") and (
                    tokens[j].kind == "word" and tokens[j].text[:1].isupper()
                    or tokens[j].text in ("&", "-", "–", "and")
                    or tokens[j].text in _NAME_GLUE and j + 1 < n and tokens[j + 1].text[:1].isupper()) \
                    and j - i < 10:
                j += 1
            if j + 1 < n and tokens[j].text == "," and labels[j + 1] in ("place", "date"):
                for k in range(i, j):
                    labels[k] = "publisher"
                return
            i = j + 1
        else:
            i += 1


_NAME_GLUE = frozenset(("of", "for", "de", "für", "di", "du", "des"))
_IN_WORDS = frozenset(("In", "in"))
_VOL_WORDS = frozenset(("vol", "Vol", "volume", "Volume", "Vols", "vols"))
_NUMBER_WORDS = frozenset(("Number", "number", "No", "no", "Nr", "nr"))
_NUM_FILLERS = frozenset((".", "No", "no", "Band", "Bd", "Tome", "Nr"))
_ROMAN = re.compile(r"[IVXLC]{1,6}\Z")
_BOOK_RUNS = frozenset(("title", "series", "container_title"))
_SERIES_GLUE = frozenset(("in", "of", "and", "for", "the", "der", "und", "de", "des", "en", "&"))


def _repair_series_phrase(tokens: list[Token], labels: list[str], marg: list[float]) -> None:
    """A book's place in its series printed after the title and read as part
    of it: ``Title, volume 37 of Series``, ``Title. Number 21 in Series``,
    ``Title, vol. 155.`` (BibTeX plain/abbrv/siam layouts).  The number goes
    to the series number (or the volume when no series follows), the words
    after "of"/"in" to the series."""
    n = len(tokens)
    for i in _positions(tokens, _SERIES_KEYS, 2, n - 1):
        word = tokens[i].text
        is_vol = word in _VOL_WORDS
        if not is_vol and word not in _NUMBER_WORDS:
            continue
        if tokens[i - 1].text not in ",." or labels[i - 2] != "title" or labels[i - 1] not in ("title", "O"):
            continue
        j = i + 1
        while j < n and tokens[j].text in _NUM_FILLERS and j - i < 4:
            j += 1
        if j >= n or not (tokens[j].kind == "num" or _ROMAN.match(tokens[j].text)):
            continue
        k = j + 1
        link = tokens[k].text if k < n else ""
        if link in ("of", "in") and k + 1 < n and tokens[k + 1].text[:1].isupper():
            for x in range(i - 1, j):
                labels[x] = "O"
            # "volume No. 43 of", "volume Band 179 of": the number as printed
            f = next((x for x in range(i + 1, j) if tokens[x].text != "."), j)
            for x in range(f, j + 1):
                labels[x] = "series_number"
            labels[k] = "O"
            x = k + 1
            while x < n and (labels[x] in _BOOK_RUNS or (labels[x] == "O" and (tokens[x].text in ".-"
                                                                            or tokens[x].text in _SERIES_GLUE)
                                                          and x + 1 < n and labels[x + 1] in _BOOK_RUNS)):
                labels[x] = "series"
                marg[x] = min(marg[x], 0.95)
                x += 1
            return
        if is_vol and tokens[i - 1].text == "," and (not link or link in ".,;)") \
                and all(labels[x] in ("title", "O", "volume", "series_number") for x in range(i, j + 1)):
            for x in range(i - 1, j):
                labels[x] = "O"
            if labels[j] != "series_number":
                labels[j] = "volume"
            return


_ORDINAL_WORDS = frozenset(w for o in "first second third fourth fifth sixth seventh eighth ninth tenth revised "
                           "1st 2nd 3rd 4th 5th 6th 7th 8th 9th".split() for w in (o, o.capitalize()))
_EDITION_TAIL = frozenset(("ed", "edn", "edition", "."))


def _repair_edition_word(tokens: list[Token], labels: list[str]) -> None:
    """An edition printed as a bare ordinal right after the title, in
    brackets or after a comma (CSL styles print the edition field as
    typed: ``Title (Second). Publisher``, ``Title, First, Publisher``):
    the ordinal is the edition, not part of the title or a container.
    A container run glued to the title with no separator goes back to it."""
    n = len(tokens)
    for i in _positions(tokens, _ORDINAL_WORDS, 2, n - 1):
        t = tokens[i]
        if labels[i] == "edition":
            continue
        opener = tokens[i - 1].text
        j = i + 1
        while j < n and tokens[j].text.lower() in _EDITION_TAIL and j - i < 3:
            j += 1
        if j >= n:
            continue
        closer = tokens[j].text
        if not ((opener == "(" and closer == ")") or (opener in ",." and closer == "," and t.text[:1].isupper()
                                                     and j + 1 < n and labels[j + 1] != "title"
                                                     and tokens[j + 1].text[:1].isupper())):
            continue
        if labels[i - 2] not in ("title", "container_title"):
            continue
        labels[i] = "edition"
        for x in range(i + 1, j + 1):
            labels[x] = "O"
        labels[i - 1] = "O"
        # "Title of (container)order (Second)": the piece before is the title's
        x = i - 2
        if labels[x] == "container_title":
            while x >= 0 and labels[x] == "container_title":
                x -= 1
            if x >= 0 and labels[x] == "title":
                for y in range(x + 1, i - 1):
                    labels[y] = "title"
        return


_NO_DATE = re.compile(r"(?i)\(?(?:no date|n\.\s?d\.)\)?[.,:]?\s+")
_CORR = re.compile(r"([A-Z][A-Za-z]{1,12}),?\s+abs/")


_AFTER_JOURNAL = frozenset(("volume", "issue", "pages"))
_JOURNAL_GLUE = frozenset("of and the de des du der für for in la le di e et .".split())


def _sentence_end(tokens: list[Token], k: int) -> bool:
    """Token k is a "." that ends a sentence: after a word that is no
    abbreviation (not short, not a journal-abbreviation word), before a
    capital."""
    prev = tokens[k - 1]
    return (tokens[k].text == "." and prev.kind == "word" and len(prev.text) >= 4
            and (prev.text.lower() + ".") not in lx.JOURNAL_WORDS and prev.text[:1] not in "IVX"
            and tokens[k + 1].text[:1].isupper())


def _repair_title_journal(tokens: list[Token], labels: list[str], marg: list[float]) -> float:
    """Article layouts with one run where two belong: a title that ran on
    into a journal name the labeler did not know ("Title. Algebra
    Universalis 51:287-299"), or, with no title at all, a "journal" run that
    starts with the title ("Title of paper. The Mathematical Gazette,
    84(501)").  The split is at the last sentence end inside the run, and
    the result is doubted a little."""
    n = len(labels)
    if "container_title" not in labels:
        if "title" not in labels:
            return 1.0
        first, last = _first_run(labels, "title")   # a later title run is a note's
        nxt = rp.label_after(tokens, labels, last)
        if nxt >= n or labels[nxt] not in _AFTER_JOURNAL:
            return 1.0
        first = last
        while first > 0 and labels[first - 1] == "title":
            first -= 1
        for k in range(last - 1, first + 1, -1):
            if _sentence_end(tokens, k):
                labels[k] = "O"
                for x in range(k + 1, last + 1):
                    labels[x] = "container_title"
                    marg[x] = min(marg[x], 0.8)
                return 0.9
        # "Title, Algebra Universalis 6 (1976)": a short capitalised tail
        # after the title's last comma
        for k in range(last - 1, first + 1, -1):
            if tokens[k].text == ",":
                tail = tokens[k + 1:last + 1]
                if 1 <= len(tail) <= 6 and tail[0].text[:1].isupper() and all(
                        t.text[:1].isupper() or t.text in _JOURNAL_GLUE for t in tail):
                    labels[k] = "O"
                    for x in range(k + 1, last + 1):
                        labels[x] = "container_title"
                        marg[x] = min(marg[x], 0.7)
                    return 0.8
                break
        return 1.0
    if "title" in labels:
        return 1.0
    first = labels.index("container_title")
    last = first
    last = _run_end(labels, last)
    for k in range(last - 1, first + 1, -1):
        if _sentence_end(tokens, k):
            for x in range(first, k):
                labels[x] = "title"
                marg[x] = min(marg[x], 0.8)
            labels[k] = "O"
            return 0.9
    return 1.0


def _repair_preprint_server(tokens: list[Token], labels: list[str]) -> None:
    """CSL styles print a preprint server as the publisher: ``"Title",
    arXiv, May 2023`` or ``(arXiv:1805.11451). arXiv.``  A bare "arXiv"
    word between separators (not "arXiv preprint arXiv:...") is it."""
    if "publisher" in labels:
        return
    n = len(tokens)
    for i in range(1, n):
        t = tokens[i]
        if t.text not in ("arXiv", "ArXiv") or t.kind != "word" or labels[i] not in ("O", "container_title", "title",
                                                                                  "note"):
            continue
        if tokens[i - 1].text not in ",.)" or (i + 1 < n and tokens[i + 1].text not in ",.;"):
            continue
        if labels[i] not in ("O", "note") and ((i + 1 < n and labels[i + 1] == labels[i])
                                               or labels[i - 1] == labels[i]):
            continue
        labels[i] = "publisher"
        if i + 1 < n and labels[i + 1] == "note" and tokens[i + 1].kind == "punct":
            labels[i + 1] = "O"
        return


_STRONG_PUBLISHER = frozenset("press verlag springer springer-verlag publishers publishing publications "
                              "wiley elsevier birkhäuser dover inc. inc ltd. co. gmbh society soc.".split())
_SERIES_HINT = frozenset("lecture notes texts graduate studies series ser. tracts monographs surveys library "
                         "books classics paperbacks universitext textbooks lehrbücher collection".split())


def _publisher_score(words: list[str]) -> int:
    low = [w.lower() for w in words]
    return sum(1 for w in low if w in _STRONG_PUBLISHER) - 2 * sum(1 for w in low if w in _SERIES_HINT)


_SERIES_GATE = frozenset(w for s in (_SERIES_HINT, lx.SERIES_WORDS) for w0 in s for w in (w0, w0.capitalize()))


def _series_word(w: str) -> bool:
    low = w.lower()
    return low in _SERIES_HINT or low in lx.SERIES_WORDS


def _repair_publisher_series(tokens: list[Token], labels: list[str]) -> None:
    """A series printed inside the imprint: ``Cambridge University Press
    (Encyclopedia of Mathematics)`` (Harvard styles), ``Quill Paperbacks,
    Academic Press``, ``Contemporary inks. Polimetrica, 2006`` (a series,
    then the publisher).  The bracketed part, or a head piece with a series
    word before a piece without one, is the series."""
    if "series" in labels:
        return
    n = len(labels)
    for lab in ("publisher", "container_title"):
        try:
            s0 = labels.index(lab)
        except ValueError:
            continue
        e = _run_end(labels, s0)
        if lab == "container_title" and (any(x in labels for x in ("publisher", "volume", "pages", "issue"))
                                         or e + 2 >= n or tokens[e + 1].text != "," or labels[e + 2] != "date"):
            return   # a journal, or a book chapter's container
        opened = next((k for k in range(s0 + 1, e + 1) if tokens[k].text == "("), -1)
        if opened > s0 and e + 1 < n and tokens[e + 1].text == ")" and lab == "publisher" \
                and any(_series_word(t.text) for t in tokens[opened + 1:e + 1]):
            labels[opened] = "O"
            for k in range(opened + 1, e + 1):
                labels[k] = "series"
            return
        sep = next((k for k in range(s0 + 1, e) if tokens[k].text in ",."
                    and not (tokens[k].text == "." and len(tokens[k - 1].text) <= 4)), -1)
        if sep < 0:
            continue
        head = [t.text for t in tokens[s0:sep] if t.kind == "word"]
        tail = [t.text for t in tokens[sep + 1:e + 1] if t.kind == "word"]
        if not head or not tail or not any(map(_series_word, head)) or any(map(_series_word, tail)) \
                or all(w.lower() in lx.PLACES for w in tail) or len(tail) > 5:
            continue
        labels[sep] = "O"
        for k in range(s0, sep):
            labels[k] = "series"
        for k in range(sep + 1, e + 1):
            labels[k] = "publisher"
        return


def _repair_author_tail(tokens: list[Token], labels: list[str], marg: list[float]) -> float:
    """A leading author list that ran on into a short title: after the list's
    last name (``... and S. Vellum, Ink of Chaos``, ``Quill and
    Penrake, Folded Nibs``, ``G. Fenwick, R. Marrow, Quill
    induction ...``) a comma starts something that is no name: not an
    initial, a suffix, a known given name or "et al." of an inverted list."""
    n = len(labels)
    if not n or labels[0] != "authors":
        return 1.0
    end = 0
    end = _run_end(labels, end)
    # an inverted list ("Family, A. B., ...") has its given names after commas
    if tokens[0].kind != "initial":
        for x in range(1, end):
            if tokens[x].text == "," and tokens[x + 1].kind == "initial":
                return 1.0
    conj = [x for x in range(end + 1) if tokens[x].text in ("and", "&")]
    if conj and any(tokens[x].text == "," for x in range(conj[-1] - 1)) and not (
            tokens[0].kind == "initial" or tokens[0].text.lower() in lx.GIVEN_NAMES):
        return 1.0   # "Quill, Ada, and Vellum, Sara": may be inverted
    if conj:
        cut = next((x for x in range(conj[-1] + 1, end) if tokens[x].text == ","), None)
        if cut is None:
            return 1.0
    else:
        # given-first names ("G. Fenwick, R. Marrow, Quill ...", "P.
        # Tamsel, Inkwells: Chapter 0"): the last comma piece runs straight
        # into the rest of the line with no separator -- it is the title's start
        cut = next((x for x in range(end - 1, 0, -1) if tokens[x].text == ","), None)
        if cut is None or end - cut > 3 or end + 1 >= n or tokens[end + 1].text in ",.;([" \
                or not (tokens[0].kind == "initial" or tokens[0].text.lower() in lx.GIVEN_NAMES
                        or tokens[1].kind == "initial"):
            return 1.0
    first = tokens[cut + 1]
    if first.kind != "word" or not first.text[:1].isupper() or first.text in lx.SUFFIXES \
            or first.text.lower() in lx.GIVEN_NAMES or first.text.lower() in ("et", "jr", "sr"):
        return 1.0
    if "title" in labels[end + 1:] and labels[end + 1] != "title" and not conj:
        return 1.0
    labels[cut] = "O"
    for x in range(cut + 1, end + 1):
        labels[x] = "title"
        marg[x] = min(marg[x], 0.7)
    # unlabeled words glued to it up to the next separator (": Chapter 0,")
    x = end + 1
    while x < n and labels[x] == "O" and tokens[x].text not in ",.;" and x - end < 6:
        x += 1
    if x < n and x > end + 1 and tokens[x].text in ",.;" and "title" not in labels[x:]:
        for y in range(end + 1, x):
            labels[y] = "title"
    return 0.85


def _repair_author_edges(tokens: list[Token], labels: list[str], marg: list[float]) -> float:
    """Author-run edges in the wrong place at a sentence period:
    ``Stefan Quillby. Note: On ...`` (the run crossed the period after a
    family name and ends with no separator) gives the words after the period
    back to the title; ``T. | Penrake. Nib spaces`` (a run of bare initials
    before a capitalised word and a period) takes the family name back."""
    n = len(labels)
    if n < 4 or labels[0] != "authors":
        return 1.0
    end = 0
    end = _run_end(labels, end)
    if end + 2 < n and labels[end + 1] == "title" and tokens[end + 1].kind == "word" \
            and tokens[end + 2].text in ".," and all(tokens[x].kind == "initial" for x in range(end + 1)) \
            and tokens[end + 1].text[:1].isupper():
        labels[end + 1] = "authors"
        labels[end + 2] = "O"
        return 0.85
    if end + 1 >= n or tokens[end + 1].text in ",.;([" or labels[end + 1] in ("editors", "date"):
        return 1.0
    for k in range(2, end):
        if tokens[k].text == "." and tokens[k - 1].kind == "word" and len(tokens[k - 1].text) > 3 \
                and tokens[k + 1].kind == "word" and tokens[k + 1].text[:1].isupper() \
                and not any(tokens[x].text in (",", "and", "&") for x in range(k + 1, end + 1)):
            labels[k] = "O"
            for x in range(k + 1, end + 1):
                labels[x] = "title"
                marg[x] = min(marg[x], 0.7)
            return 0.85
    return 1.0


def _page_count_only(tokens: list[Token], labels: list[str]) -> bool:
    """The only pages run is a page count: ``xii+253 pp.``, ``253 pp.``."""
    i, e = _first_run(labels, "pages")
    if "pages" in labels[e + 1:]:
        return False
    if any(t.text == "+" for t in tokens[i:e + 1]):
        return True
    if i == e and i >= 2 and (tokens[i - 1].text == "p." or tokens[i - 2].text == "p" and tokens[i - 1].text == ".") \
            and "publisher" in labels:
        return True     # "Springer, 2005, p. 45": the page cited in a book
    return i == e and tokens[i].kind == "num" and e + 1 < len(tokens) and tokens[e + 1].text == "pp"


def _repair_lone_container(tokens: list[Token], labels: list[str]) -> None:
    """A book record with one "container" run and no title, volume, issue or
    pages ("E. Vellum, ..., Solving Ordinary Ink Equations I,
    Springer-Verlag, 1991"): the run is the title.  With an article number
    but a series_number between volume and pages, that number is the issue."""
    if "container_title" not in labels:
        return
    has = set(labels)
    if "pages" in has and "title" not in has and _page_count_only(tokens, labels):
        has.discard("pages")    # "xiv+420 pp.": a book's page count, not an article's range
    if "title" not in has and not has & {"volume", "issue", "pages", "editors"}:
        first = labels.index("container_title")
        if first > 0 and tokens[first - 1].text in ("In", "in") and (
                first == 1 or tokens[first - 2].kind == "punct"):
            return    # "..., in Proceedings": a real container
        if sum(1 for i in range(1, len(labels)) if labels[i] == "container_title"
               and labels[i - 1] != "container_title") == 1:
            for i, lab in enumerate(labels):
                if lab == "container_title":
                    labels[i] = "title"
            # unlabeled words glued before it ("M-ideals in | Banach spaces")
            x = first - 1
            while x > 0 and labels[x] == "O" and tokens[x].kind in ("word", "dash", "num") and first - x < 6:
                x -= 1
            if x < first - 1 and (labels[x] != "O" or tokens[x].text in ".,:)"):
                for y in range(x + 1, first):
                    labels[y] = "title"
        return
    if "series_number" in has and "volume" in has and "series" not in has and "issue" not in has:
        for i, lab in enumerate(labels):
            if lab == "series_number":
                labels[i] = "issue"


_ANSWER_TO = re.compile(r"(?i)^(?:an? )?answer to (?:the |a )?(?:[A-Z]{2,4} )?question:?\s+")
_SITE_TAIL = re.compile(r",\s*(?:(?:a |the )?(?:question|answer|post|comment) (?:on|at|to) )?"
                        r"(?P<site>[^\s,]+(?: [^\s,]+){0,2})\Z")
_FOLD = re.compile(r"[^a-z0-9]")


def _site_from_title(title: str, idents: list[Identifier]) -> tuple[str, str] | None:
    """Q&A-site posts: "Title, question on mathoverflow" or "Title,
    mathoverflow" next to a URL of that site.  The trailing piece is the
    site (the container) when its letters are part of the URL's host."""
    urls = [i.value for i in idents if i.scheme == "url"]
    if not urls:
        return None
    m = _SITE_TAIL.search(title)
    if not m or m.start() < 3:
        return None
    site = m.group("site")
    key = _FOLD.sub("", site.lower())
    if len(key) < 4:
        return None
    for u in urls:
        host = u.split("//", 1)[-1].split("/", 1)[0].lower()
        if key in _FOLD.sub("", host):
            return title[: m.start()].rstrip(" ,"), site
    return None


_VOL_KEYS = frozenset(("vol", "Vol", "volume", "Volume", "Bd", "Band", "tome", "Tome"))
_ISSUE_KEYS = frozenset(("no", "No", "nos", "Nos"))


_SERIES_VOL = re.compile(r"\bs\d{1,2}-\d")


def _repair_volume(text: str, tokens: list[Token], labels: list[str], words: set[str]) -> None:
    """Volume numbers the labeler misfiled:
    - a series-prefixed volume ``s1-29(2)`` (London Mathematical Society
      style) is one volume, the bracket its issue;
    - ``vol. 5`` after a journal, labeled as a second title, is the volume;
    - ``no. 14`` read as the volume of a journal with no other issue is the
      issue;
    - a number right after a book's series (``Lecture Notes in
      Mathematics, No. 41``) is the series number."""
    n = len(tokens)
    has_vol = "volume" in labels
    for i in (range(n - 3) if "s" in words and _SERIES_VOL.search(text) else ()):
        t = tokens[i]
        if t.text == "s" and tokens[i + 1].kind == "num" and tokens[i + 2].kind == "dash" \
                and tokens[i + 3].kind == "num" and t.end == tokens[i + 1].start \
                and tokens[i + 1].end == tokens[i + 2].start and tokens[i + 2].end == tokens[i + 3].start \
                and i > 0 and labels[i - 1] in ("container_title", "O"):
            for x in range(i, i + 4):
                labels[x] = "volume"
            if i + 6 < n and tokens[i + 4].text == "(" and tokens[i + 5].kind == "num" and tokens[i + 6].text == ")" \
                    and not _YEAR_RE.fullmatch(tokens[i + 5].text):
                labels[i + 5] = "issue"
            return
    if not has_vol and "container_title" in labels:
        if words.isdisjoint(_VOL_KEYS):
            return
        for i in range(1, n - 1):
            if tokens[i].text in _VOL_KEYS:
                j = i + 1 if tokens[i + 1].text != "." else i + 2
                if j < n and tokens[j].kind == "num" and labels[j] in ("title", "container_title", "O") \
                        and labels[i - 1] in ("container_title", "title", "O"):
                    if i >= 2 and labels[i - 1] == "title" and labels[i - 2] == "container_title" \
                            or labels[i - 1] in ("container_title", "O"):
                        for x in range(i - 1 if labels[i - 1] == "title" else i, j):
                            labels[x] = "O"
                        labels[j] = "volume"
                        return
        return
    if has_vol and "issue" not in labels and "container_title" in labels:
        k = labels.index("volume")
        if k >= 2 and labels[k - 1] == "O" and tokens[k - 1].text == "." and tokens[k - 2].text in _ISSUE_KEYS \
                and labels.count("volume") == 1:
            labels[k] = "issue"
        return
    if has_vol and "series" in labels and "container_title" not in labels and "series_number" not in labels:
        k = labels.index("volume")
        x = k - 1
        while x > 0 and labels[x] == "O" and (tokens[x].kind == "punct" or tokens[x].text in _ISSUE_KEYS
                                              or tokens[x].text in _VOL_KEYS) and k - x < 4:
            x -= 1
        if labels[x] == "series" and x < k - 1 and not (k + 1 < n and tokens[k + 1].text == "("):
            for y in range(k, n):
                if labels[y] != "volume":
                    break
                labels[y] = "series_number"


def _repair_issue_cluster(tokens: list[Token], labels: list[str]) -> None:
    """Volume/issue clusters the labeler split:
    - ``84(501)``, ``8(1–2)``, ``58(III)``: the bracket right after a volume
      is its issue (unless it holds a year);
    - ``no. III``: a roman issue number;
    - ``Appl. 10 (1979), no. 2`` with no volume: the first of two issue runs,
      right after the journal, is the volume."""
    n = len(tokens)
    if "container_title" in labels and "volume" in labels:   # an issue belongs to a journal
        i = labels.index("volume")
        while i < n - 3:
            if tokens[i].kind == "num" and tokens[i + 1].text == "(" and labels[i + 2] != "volume":
                j = i + 2
                while j < n and j - i < 6 and tokens[j].text != ")" and (
                        tokens[j].kind in ("num", "dash") or _is_roman(tokens[j])):
                    j += 1
                if j < n and j > i + 2 and tokens[j].text == ")" and not (
                        j == i + 3 and _YEAR_RE.fullmatch(tokens[i + 2].text)):
                    for x in range(i + 2, j):
                        labels[x] = "issue"
                    return
            try:
                i = labels.index("volume", i + 1)
            except ValueError:
                break
    if "issue" not in labels:
        for i in _positions(tokens, _ISSUE_KEYS, 0, n - 2):
            if tokens[i + 1].text == "." and _ROMAN.match(tokens[i + 2].text) \
                    and labels[i + 2] == "O":
                labels[i + 2] = "issue"
                return
        return
    if "volume" not in labels and "container_title" in labels:
        starts = [i for i in range(n) if labels[i] == "issue" and (i == 0 or labels[i - 1] != "issue")]
        if len(starts) == 2 and starts[0] > 0 and (labels[starts[0] - 1] == "container_title"
                                                   or tokens[starts[0] - 1].text == "." and
                                                   labels[starts[0] - 2] == "container_title"):
            x = starts[0]
            while x < n and labels[x] == "issue":
                labels[x] = "volume"
                x += 1


_TAIL_LABELS = frozenset(("O", "publisher", "place", "note", "container_title", "series"))


def _repair_container_tail(tokens: list[Token], labels: list[str]) -> None:
    """A journal name cut short before its last abbreviated words or a
    bracketed qualifier (``Bull. Quill Soc. | Math. Ink., vol. 42``,
    ``Appl. Math. E | -Notes``, ``Arch. Math. | (Basel), 22``,
    ``... Folding | (QSF 2022)``): in an article layout the capitalised
    words glued to the journal run, up to the comma or the volume, belong
    to it."""
    n = len(labels)
    first, e = _first_run(labels, "container_title")
    if first < 0:
        return
    if not any(lab in ("volume", "pages") for lab in labels[e + 1:]):
        return
    x = e + 1
    depth = 0
    words = 0
    while x < n and labels[x] in _TAIL_LABELS and x - e <= 9:
        t = tokens[x]
        if t.text == "(":
            depth += 1
        elif t.text == ")":
            if depth == 0:
                break
            depth -= 1
        elif t.text == "." or t.kind == "dash" and t.start == tokens[x - 1].end:
            pass
        elif t.kind in ("word", "initial") and t.text[:1].isupper() and t.text not in rp.VOLUME_WORDS:
            words += 1   # ("Band 301", "Vol 3": the volume's keyword, not the name's)
        elif t.kind == "num" and depth:
            pass
        else:
            break
        x += 1
    if depth or not words or x >= n or x == e + 1:
        return
    stop = tokens[x]
    if not (stop.text in (",", ";") or labels[x] in ("volume", "pages", "issue") or stop.text in _VOL_KEYS):
        return
    seg = tokens[e + 1:x]
    if all(t.kind == "num" or t.text in "()." for t in seg):
        return
    if any(t.kind == "num" and _YEAR_RE.fullmatch(t.text) for t in seg) and not any(
            t.text[:1].isupper() and t.kind == "word" and t.text.isupper() for t in seg):
        return   # "(1990)": a date, not a qualifier -- unless with an acronym "(QSF 2022)"
    if any(t.text == "." for t in seg) and seg[-1].text == "." and labels[e + 1:x].count("O") == len(seg):
        return   # only periods and O words: a sentence, not a name
    while x - 1 > e and tokens[x - 1].text == ".":
        x -= 1
    for y in range(e + 1, x):
        labels[y] = "container_title"


_ROMAN_GAP = frozenset((".", ",", ":", "and", "&"))
_NO_GLUE = frozenset(".,;:()[]{}”’\"'“‘«»")


def _is_roman(t: Token) -> bool:
    return (t.kind == "word" and _ROMAN.match(t.text) is not None) or (
        t.kind == "initial" and t.text[0] in "IVX")


def _repair_title_edges(tokens: list[Token], labels: list[str]) -> None:
    """Title runs that stop one piece short:
    - a part number after the title (``Basic algebra. I, Publisher``,
      ``... theory. VI. The idea of ...``, ``... theorems. I. Proc. ...``);
    - math glued to the last word with no space (``characteristic p>0.``);
    - a last word read as a second author list (``... cohomologie |
      bornée, Contemporary ...``)."""
    n = len(labels)
    i = 0
    while i < n:
        if labels[i] != "title":
            try:
                i = labels.index("title", i)
            except ValueError:
                return
        e = i
        e = _run_end(labels, e)
        x = e + 1
        # part numbers
        romans = 0
        while x < n and x - e <= 6 and (labels[x] in ("O", "container_title") and (
                tokens[x].text in _ROMAN_GAP or _is_roman(tokens[x]))):
            romans += _is_roman(tokens[x])
            x += 1
        if romans and x < n:
            if labels[x] == "title":
                for y in range(e + 1, x):
                    labels[y] = "title"
                i = x
                continue
            # the piece up to the last roman numeral joins the title
            last = max(y for y in range(e + 1, x) if _is_roman(tokens[y]))
            if tokens[e + 1].text in ".,:" and labels[e + 1] == "O" and (
                    last + 1 >= n or tokens[last + 1].text in ".,:;" or tokens[last].kind == "initial"):
                for y in range(e + 1, last + 1):
                    labels[y] = "title"
                e = last
        # "Measure Theory: Second Edition": an edition named in a subtitle
        if e + 2 < n and tokens[e + 1].text == ":" and labels[e + 2] == "edition":
            x = e + 2
            while x < n and (labels[x] == "edition" or labels[x] == "O" and tokens[x].text.lower() in ("edition", "ed")):
                x += 1
            for y in range(e + 1, x):
                labels[y] = "title"
            e = x - 1
        # glued math
        x = e + 1
        while x < n and labels[x] in ("O", "note") and tokens[x].start == tokens[x - 1].end \
                and tokens[x].text not in _NO_GLUE and tokens[x].kind != "initial":
            x += 1
        if x > e + 1 and (x >= n or tokens[x].text in ".,;" or tokens[x].start > tokens[x - 1].end):
            for y in range(e + 1, x):
                labels[y] = "title"
            e = x - 1
        # a "journal" glued to the title with no separator or after a colon
        # is its subtitle ("Quill objects, i. | first notions", "... I: |
        # Plumes pliées, volume 100 of ...")
        x = e + 1
        if x < n and labels[x] == "O" and tokens[x].text == ":":
            x += 1
        if x < n and labels[x] == "container_title" and (x == e + 1 or tokens[e + 1].text == ":"):
            y = x
            while y < n and labels[y] == "container_title":
                y += 1
            if y >= n or tokens[y].text in ",." and not (y + 1 < n and labels[y + 1] in ("volume", "pages")) \
                    and not (y + 2 < n and tokens[y + 1].text == "," and labels[y + 2] in ("volume", "pages")):
                for z in range(e + 1, y):
                    labels[z] = "title"
                e = y - 1
        # a last word read as a second author list
        if e + 2 < n and labels[e + 1] == "authors" and i > 0 and labels[e + 2] != "authors" \
                and tokens[e + 2].text in ",." and tokens[e + 1].kind == "word" and tokens[e + 1].text[:1].islower():
            labels[e + 1] = "title"
            e += 1
        i = e + 1


def _repair_authors_ate_title(tokens: list[Token], labels: list[str], marg: list[float]) -> float:
    """No title at all and a leading author run: the run ate it.  The name
    list ends where its shape breaks -- in an inverted list at the first
    capitalised word right after a name's initials (``Quillby, R.
    Algebraic Inkwells``), in a given-first list at the first comma piece
    that starts with no initial or known given name, or has lower-case words
    (``G. Fenwick, L. Marrow-Penn, Plumes algébriques``)."""
    n = len(labels)
    if n < 3 or labels[0] != "authors" or "title" in labels:
        return 1.0
    end = 0
    end = _run_end(labels, end)
    cut = start = None
    inverted = tokens[0].kind != "initial" and any(
        tokens[x].text == "," and tokens[x + 1].kind == "initial" for x in range(1, end))
    if inverted:
        for k in range(2, end):
            t, nxt = tokens[k], tokens[k + 1]
            if t.kind == "initial" and nxt.kind == "word" and nxt.text[:1].isupper() \
                    and nxt.text not in lx.SUFFIXES and nxt.text.rstrip(".") not in ("Jr", "Sr") \
                    and nxt.text not in lx.PARTICLES and nxt.text not in ("and", "et") \
                    and not (k + 2 <= end and tokens[k + 2].text == ","):
                cut, start = None, k + 1
                break
            if t.text in ("Jr", "Sr") and nxt.text == "." and k + 2 <= end and tokens[k - 1].text == "," \
                    and tokens[k + 2].kind == "word" and tokens[k + 2].text[:1].isupper():
                cut, start = k + 1, k + 2   # "Family, A. B., Jr. Title": the suffix closes the name
                break
    else:
        piece = 0
        for k in range(end):
            if tokens[k].text != ",":
                continue
            piece += 1
            first = tokens[k + 1]
            if first.text in ("and", "&", "et") or first.kind == "initial":
                continue
            words = [t for t in tokens[k + 1:end + 1] if t.text != ","]
            stop = next((y for y in range(k + 1, end + 1) if tokens[y].text == ","), end + 1)
            seg = tokens[k + 1:stop]
            lower = any(t.kind == "word" and t.text[:1].islower() and t.text not in lx.PARTICLES
                        and t.text not in ("and", "et", "al") for t in seg)
            if lower or (tokens[0].kind == "initial" and first.text.lower() not in lx.GIVEN_NAMES
                         and first.text not in lx.SUFFIXES and words):
                cut, start = k, k + 1
                break
    if start is None or start > end:
        return 1.0
    if cut is not None:
        labels[cut] = "O"
    for x in range(start, end + 1):
        labels[x] = "title"
        marg[x] = min(marg[x], 0.7)
    return 0.85


_PROC_WORDS = frozenset("conference proceedings symposium workshop congress colloquium meeting proc "
                        "conf seminar school".split())
_CONTAINER_STOP = frozenset("volume Volume vol Vol vols Vols pages Pages page pp p edited eds Eds editors ed".split())
_CONTAINER_STOP_LABELS = frozenset(("editors", "pages", "publisher", "series", "title", "authors", "series_number",
                                    "translators", "volume")) | frozenset("doi arxiv mr zbl isbn issn url handle".split())


_EVENT_LABELS = frozenset(("place", "date"))


def _repair_proceedings(tokens: list[Token], labels: list[str]) -> None:
    """Proceedings titles are full of commas, dates and places (``In 10th
    Meeting on Quill Folding, QSF 2019, June 3-7, 2019, Ghent, Belgium,
    volume 14 of Lecture Notes in Ink, pages ...``); the labeler cuts them at the
    first comma.  A container introduced by "In" (or naming a meeting) runs
    on to the first thing that ends such a title: a volume or pages
    keyword, the editors, "edited by", a series or the publisher."""
    n = len(labels)
    s0, e = _first_run(labels, "container_title")
    if s0 < 0:
        return
    intro = s0 > 0 and (tokens[s0 - 1].text in ("In", "in") or tokens[s0 - 1].text == ":" and s0 > 1
                        and tokens[s0 - 2].text in ("In", "in") or labels[s0 - 1] in ("O",) and s0 > 2
                        and tokens[s0 - 2].text in ("editors", "eds", "Eds"))
    if not intro and not any(t.text.lower().rstrip(".") in _PROC_WORDS for t in tokens[s0:e + 1]):
        return
    x = e + 1
    depth = 0
    while x < n:
        t, lab = tokens[x], labels[x]
        if t.text in _CONTAINER_STOP or lab in _CONTAINER_STOP_LABELS:
            break
        if t.text == "(":
            if x + 1 < n and labels[x + 1] == "editors":
                break
            depth += 1
        elif t.text == ")":
            if depth == 0:
                break
            depth -= 1
        elif t.text == "." and not (tokens[x - 1].kind == "word" and len(tokens[x - 1].text) <= 5
                                    and tokens[x - 1].text[:1].isupper()):
            return   # a sentence end before any terminator: not sure where the title ends
        x += 1
    if x >= n or depth or x == e + 1:
        return
    stop = x
    # back off the separator, and a short series acronym before "vol." ("..., LNCS, vol. 2987")
    y = stop - 1
    while y > e and tokens[y].text in ",;:" or (y > e and tokens[y].text == "(" ):
        y -= 1
    j = stop + 2 if stop + 1 < n and tokens[stop + 1].text == "." else stop + 1
    series_after = j + 1 < n and tokens[j + 1].text == "of"     # "volume 14 of Lecture Notes in Ink"
    if tokens[stop].text in ("vol", "Vol", "volume", "Volume") and not series_after and y - 1 > e \
            and tokens[y - 1].text == "," \
            and tokens[y].kind == "word" and tokens[y].text[:1].isupper() and labels[y] == "O" and len(tokens[y].text) <= 6:
        y -= 2
    if y <= e or not any(tokens[z].kind == "word" for z in range(e + 1, y + 1)):
        return
    if labels[stop] == "volume" or sum(1 for z in range(e + 1, y + 1) if tokens[z].text == ",") < 2:
        return   # "..., CPP 2019, pages": one acronym piece may be the meeting's short name, not the title's
    if labels[y] == "date" and all(labels[z] in _EVENT_LABELS or tokens[z].text == ","
                                   for z in range(e + 1, y + 1)):
        return   # "Proceedings of ..., Moscow, 2000, pp.": the meeting's place and year, not its title
    for z in range(e + 1, y + 1):
        labels[z] = "container_title"


_COLON_PAGE = re.compile(r"\d{1,4}:\d{1,4}\s?[-–—]{1,2}\s?\d{1,4}:\d{1,4}")


def _repair_colon_pages(text: str, tokens: list[Token], labels: list[str]) -> None:
    """Article-number pages ``12:1–12:17`` (LIPIcs style) after "pages" /
    "pp": one page range, not an issue and a range."""
    n = len(tokens)
    for i in range(1, n - 6):
        if tokens[i - 1].text in ("pages", "pp", ".", ",") and tokens[i].kind == "num" and tokens[i + 1].text == ":" \
                and tokens[i + 2].kind == "num" and tokens[i + 3].kind == "dash" and tokens[i + 4].kind == "num" \
                and tokens[i + 5].text == ":" and tokens[i + 6].kind == "num" \
                and _COLON_PAGE.fullmatch(text, tokens[i].start, tokens[i + 6].end):
            for x in range(i, i + 7):
                labels[x] = "pages"
            return


def _repair_container_imprint(tokens: list[Token], labels: list[str]) -> None:
    """A proceedings title that swallowed the imprint printed after it
    (``In: Proceedings of ... Proofs. ACM``, ``Types for Proofs and
    Programs. Springer Berlin Heidelberg, Berlin``): after the title's
    sentence end, words that are all publisher words, acronyms or places
    are the publisher (or the place)."""
    n = len(labels)
    if "publisher" in labels:
        return
    try:
        s0 = labels.index("container_title")
    except ValueError:
        return
    e = s0
    e = _run_end(labels, e)
    for k in range(e - 1, s0 + 1, -1):
        if tokens[k].text != ".":
            continue
        prev = tokens[k - 1]
        if prev.kind != "word" or len(prev.text) < 4 or (prev.text.lower() + ".") in lx.JOURNAL_WORDS:
            return
        tail = [t for t in tokens[k + 1:e + 1] if t.text not in ",-"]
        if not 1 <= len(tail) <= 5:
            return
        places = all(t.text.lower() in lx.PLACES for t in tail)
        if not places and not all(t.text.lower() in lx.PUBLISHER_WORDS or t.text.lower() in lx.PLACES
                                  or (t.text.isupper() and 2 <= len(t.text) <= 5) for t in tail):
            return
        labels[k] = "O"
        for x in range(k + 1, e + 1):
            labels[x] = "place" if places else "publisher"
        return


_OPEN_QUOTES = {"`": "'", "‘": "’'", "“": "”\"", "„": "“”\"", "«": "»", "\"": "\"", "'": "'", "``": "''"}


def _repair_quoted_title(tokens: list[Token], labels: list[str]) -> None:
    """A quoted title ends at its closing quote: words the title run took
    after it (```Title', lecture notes of a course given ...``) are a note."""
    n = len(labels)
    try:
        i = labels.index("title")
    except ValueError:
        return
    if i == 0 or tokens[i - 1].text not in _OPEN_QUOTES:
        return
    closers = _OPEN_QUOTES[tokens[i - 1].text]
    e = i
    e = _run_end(labels, e)
    for k in range(i + 1, e):
        if tokens[k].text in closers and tokens[k].kind == "punct":
            labels[k] = "O"
            x = k + 1
            while x <= e and tokens[x].kind == "punct":
                labels[x] = "O"
                x += 1
            for y in range(x, e + 1):
                labels[y] = "note"
            return


_SERIES_TAIL = re.compile(r"(?:,|\.)\s+((?:[A-Z][\w'-]*\.?|of|in|and|for|der|de|des|the)"
                          r"(?:\s+(?:[A-Z][\w'-]*\.?|of|in|and|for|der|de|des|the)){0,7})\Z")


# series words beyond the feature lexicon (kept here so the shipped model's
# features stay as trained)
_SERIES_TAIL_WORDS = lx.SERIES_WORDS | frozenset(
    "classics paperbacks library perspectives memoirs publications collection lehrbücher textbooks".split())


def _series_tail(title: str, runs: dict) -> str | None:
    """A book title that swallowed the series printed after it ("Finite
    permutation groups, Academic Paperbacks" before the publisher): the
    capitalised tail after the last comma or period with a series word."""
    if "series" in runs or "publisher" not in runs or "container_title" in runs:
        return None
    m = _SERIES_TAIL.search(title)
    if not m or m.start() < 8:
        return None
    words = m.group(1).split()
    if len(words) < 2 or not any(w.lower() in _SERIES_TAIL_WORDS for w in words):
        return None
    return title[m.start():]


def _name_shape_factor(names) -> float:
    """Name lists of uneven shape are often mis-split ("Quillby, Stefan,
    Note: ..." read as three names; "Barry Vellum, Convexity" read as family
    "Barry Vellum"): some names with given names and some without, or a
    two-word family name with no particle.  Doubt, do not repair."""
    persons = [n for n in names if not n.is_literal]
    if not persons:
        return 1.0
    factor = 1.0
    with_given = sum(1 for n in persons if n.given)
    if 0 < with_given < len(persons):
        factor *= 0.7
    elif with_given == 0 and len(persons) >= 2:
        factor *= 0.8    # bare family names only: the commas may have been read wrongly
    if any(n.family and " " in n.family.strip() and not n.particle for n in persons):
        factor *= 0.85
    return factor


def _leftover_penalty(tokens: list[Token], labels: list[str]) -> float:
    """Content words the labeler could not place anywhere lower the record
    confidence: something in the line is not understood."""
    # compress/map walk the lists in C and hand back only the "O" tokens
    left = [t.text for t in compress(tokens, map(eq, labels, repeat("O"))) if t.kind == "word" or t.kind == "num"]
    k = sum(1 for w in left if w.lower() not in _LEFTOVER_OK) if left else 0
    return 0.85 ** k


def _ends_book(tokens: list[Token], labels: list[str], crun: _Run) -> bool:
    """The "container" is followed only by a place and/or the year, as a
    book's imprint is ("Title, Worldwide Center of Mathematics, 2021."),
    and it is no lone bracketed or abbreviated journal name."""
    n = len(labels)
    x = crun.last + 1
    seen_date = False
    while x < n:
        lab = labels[x]
        if lab == "date":
            seen_date = True
        elif lab not in ("O", "place") and lab not in ID_LABEL_SET:
            return False
        x += 1
    words = [t.text for t in tokens[crun.first:crun.last + 1] if t.kind == "word"]
    return seen_date and len(words) >= 1 and not any(t.text == "." for t in tokens[crun.first:crun.last + 1])


def _merge_publishers(tokens: list[Token], labels: list[str], runs: dict[str, list[_Run]]) -> bool:
    """Several publisher runs.  Joint imprints ``A Press, London; B Co.,
    Inc., New York, 1967`` are one publisher string with their places (the
    string as the record has it); otherwise the run that looks least like a
    series (``Cambridge Mathematical Library. Cambridge University Press``)
    is the publisher, and a series-looking one becomes the series."""
    pubs = runs["publisher"]
    n = len(tokens)
    for a, b in zip(pubs, pubs[1:]):
        between = range(a.last + 1, b.first)
        if any(tokens[x].text == ";" for x in between) and all(labels[x] in ("O", "place") for x in between):
            end = b.last
            x = end + 1
            while x < n and labels[x] in ("O", "place") and tokens[x].text != ";" and tokens[x].kind != "num":
                x += 1
            while x - 1 > end and (tokens[x - 1].kind in ("punct", "dash") and tokens[x - 1].text != "."
                                   or tokens[x - 1].text == "." and x - 2 > end and labels[x - 2] == "O"):
                x -= 1
            last = pubs[-1] if pubs[-1].first <= x - 1 else b
            merged = _Run("publisher", a.first, max(x - 1, last.last), min(a.conf, b.conf))
            runs["publisher"] = [merged] + [r for r in pubs if r.first > merged.last]
            runs["place"] = [r for r in runs.get("place", ()) if not a.first <= r.first <= merged.last]
            if not runs["place"]:
                del runs["place"]
            return True
    scored = [(_publisher_score([t.text for t in tokens[r.first:r.last + 1]]), r.last - r.first, r) for r in pubs]
    best = max(scored, key=lambda x: (x[0], x[1]))
    if best[0] <= 0:
        return False
    runs["publisher"] = [best[2]] + [r for r in pubs if r is not best[2]]
    if "series" not in runs:
        for sc, _, r in scored:
            if sc < 0:
                runs["series"] = [r]
                runs["publisher"] = [x for x in runs["publisher"] if x is not r]
                break
    return True


_SERIES_KEYS = _VOL_WORDS | _NUMBER_WORDS
_TEXT = itemgetter(0)   # Token.text
_IDENT = itemgetter(4)  # Token.ident
_ISSUE_GATE = _ISSUE_KEYS | frozenset("(")


def _repairs(text: str, tokens: list[Token], labels: list[str], marg: list[float]) -> float:
    """All label repairs, in order; returns the confidence factor.  Each
    repair is gated by a C-speed test (a token text, a label, a substring)
    so that lines without its trigger cost nothing."""
    words = set(map(_TEXT, tokens))
    repair = _repair_labels(tokens, labels, marg) * _repair_missing_title(tokens, labels)
    if labels and labels[0] in ("authors", "editors") and "." in words:
        repair *= rp.repair_author_period(tokens, labels, marg)
        if "title" in labels:
            rp.repair_family_in_title(tokens, labels)
    if labels and labels[0] == "authors" and "title" not in labels and len(tokens) > 4 \
            and tokens[1].kind == "initial" and tokens[0].kind == "word":
        repair *= rp.repair_vancouver_single(tokens, labels, marg)
    if labels and labels[0] == "authors":
        if "," in words and not words.isdisjoint(rp._ORG_GATE):
            rp.repair_corporate_author(tokens, labels)
        if "," in words:
            repair *= rp.repair_title_in_name_list(tokens, labels, marg)
        repair *= _repair_author_tail(tokens, labels, marg) * _repair_author_edges(tokens, labels, marg)
        repair *= _repair_authors_ate_title(tokens, labels, marg)
    if not words.isdisjoint(rp.STATUS_GATE):
        rp.repair_status_venue(tokens, labels)
    if labels[0] == "authors" and "editors" in labels and "title" not in labels:
        rp.repair_title_before_editors(tokens, labels)
    if "container_title" not in labels and ("in" in words or "In" in words) and "title" in labels \
            and ("pages" in labels or not words.isdisjoint(rp._PART_WORDS)):
        rp.repair_part_in_book(tokens, labels)
    if "editors" in labels and "container_title" not in labels and ("in" in words or "In" in words):
        rp.repair_book_in_editors(tokens, labels)
    if "title" in labels and ":" in words and not words.isdisjoint(rp._IN):
        rp.repair_in_inside_title(tokens, labels)
    if "editors" in labels and "container_title" not in labels and "(" in words:
        rp.repair_title_in_bracketed_editors(tokens, labels)
    if "container_title" in labels and ("editors" in labels or "edited" in words) and not words.isdisjoint(rp._IN):
        rp.repair_split_book_title(tokens, labels)
    if "container_title" in labels:
        _repair_lone_container(tokens, labels)
    if "publisher" not in labels and "container_title" not in labels and "title" in labels and "," in words:
        rp.repair_title_ate_publisher(tokens, labels)
    _repair_missing_publisher(tokens, labels, words)
    if not words.isdisjoint(_SERIES_KEYS):
        _repair_series_phrase(tokens, labels, marg)
    if not words.isdisjoint(_ORDINAL_WORDS):
        _repair_edition_word(tokens, labels)
    if "title" in labels:
        if "volume" in labels or "pages" in labels or "container_title" in labels or "issue" in labels:
            repair *= rp.repair_title_into_journal(tokens, labels, marg)
    else:
        rp.repair_unlabeled_title(tokens, labels)
        if "container_title" in labels:
            rp.repair_comma_title_journal(tokens, labels)
    repair *= _repair_title_journal(tokens, labels, marg)
    if "arXiv" in words or "ArXiv" in words:
        _repair_preprint_server(tokens, labels)
    _repair_volume(text, tokens, labels, words)
    if not words.isdisjoint(_ISSUE_GATE):
        _repair_issue_cluster(tokens, labels)
    if "title" in labels:
        if "—" in words or " – " in text:
            rp.repair_dash_note(tokens, labels)
        if "," in words and ("and" in words or "&" in words):
            rp.repair_serial_comma(tokens, labels)
        rp.repair_split_title(tokens, labels)
        if ":" in words:
            rp.repair_colon_subtitle(tokens, labels)
        if "series" in labels:
            rp.repair_series_head(tokens, labels)
        if "-" in words and "authors" in labels:
            rp.repair_lowercase_names(tokens, labels)
        if not words.isdisjoint(rp.EDITION_GATE):
            rp.repair_title_edition(tokens, labels)
        if "(" in words and not words.isdisjoint(rp.VOL_WORDS):
            rp.repair_bracket_note(tokens, labels)
            if "container_title" in labels:
                rp.repair_book_volume_note(tokens, labels)
        _repair_title_edges(tokens, labels)
        if not words.isdisjoint(_SERIES_KEYS):
            # a part number joined to the title can bring "Number 2 in Series" next to it
            _repair_series_phrase(tokens, labels, marg)
        _repair_quoted_title(tokens, labels)
    if "container_title" in labels:
        _repair_container_tail(tokens, labels)
        _repair_proceedings(tokens, labels)
        _repair_container_imprint(tokens, labels)
        if "publisher" not in labels and "," in words and not words.isdisjoint(rp.PLACE_GATE):
            rp.repair_container_imprint_place(tokens, labels)
        if "publisher" not in labels and "pages" in labels and labels[-1] in ("O", "note"):
            rp.repair_trailing_publisher(tokens, labels)
    if ":" in words and _COLON_PAGE.search(text):
        _repair_colon_pages(text, tokens, labels)
    if "container_title" not in labels and ("volume" in labels or "series_number" in labels):
        repair *= rp.repair_unlabeled_journal(tokens, labels)
        if ";" in words and "date" in labels and "title" in labels and "container_title" not in labels:
            rp.repair_vancouver_journal(tokens, labels)
    elif "container_title" in labels and "title" in labels and "." in words:
        rp.repair_abbreviation_into_title(tokens, labels)
    if "container_title" not in labels and ("series" in labels or "pages" in labels):
        repair *= rp.repair_in_book(tokens, labels)
    elif "container_title" in labels and "," in words:
        rp.repair_meeting_short_name(tokens, labels)
    if "volume" in labels and ("(" in words or ":" in words):
        rp.repair_volume_extras(tokens, labels)
    if "container_title" in labels and ";" in words and "date" in labels:
        rp.repair_series_letter(tokens, labels)
    if "volume" in labels and "container_title" in labels and "place" not in labels \
            and "container_title" in labels[labels.index("volume"):]:
        rp.repair_place_after_volume(tokens, labels)
    if "(" in words and "container_title" in labels and "publisher" in labels and "place" in labels:
        rp.repair_event_bracket(tokens, labels)
    if "container_title" in labels and not words.isdisjoint(rp.NUMBERING_GATE):
        rp.repair_journal_numbering(tokens, labels)
    if "pages" not in labels and "container_title" in labels and "date" in labels and "volume" in labels:
        rp.repair_issue_as_pages(tokens, labels)
    if "container_title" in labels and "(" in words:
        rp.repair_journal_series_mark(tokens, labels)
    if "series" not in labels and not words.isdisjoint(_SERIES_GATE) \
            and ("publisher" in labels or "container_title" in labels):
        _repair_publisher_series(tokens, labels)
    if "genre" in labels and "publisher" not in labels and "," in words:
        rp.repair_genre_institution(tokens, labels)
    if "genre" not in labels and not words.isdisjoint(rp.GENRE_GATE):
        rp.repair_unlabeled_genre(tokens, labels)
    if "publisher" in labels and "." in words and "container_title" not in labels:
        rp.repair_abbreviated_publisher(tokens, labels)
    if "series" not in labels and "publisher" in labels and "O" in labels and rp.SERIES_ACRONYM_GATE.search(text):
        rp.repair_series_acronym(tokens, labels)
    if "date" in labels and "," in words and rp.COMPANY_GATE.search(text):
        rp.repair_company_imprint(tokens, labels)
    if "publisher" in labels:
        if not words.isdisjoint(rp.DEPARTMENT_GATE):
            rp.repair_department_publisher(tokens, labels)
        rp.repair_publisher_head(tokens, labels)
        if ";" in words:
            rp.repair_joint_imprint(tokens, labels)
        if not words.isdisjoint(rp.IMPRINT_GATE):
            rp.repair_publisher_place(tokens, labels)
        if "date" in labels and "," in words:
            if "container_title" in labels:
                rp.repair_event_after_proceedings(tokens, labels)
            rp.repair_place_before_year(tokens, labels)
    if ("publisher" in labels or "container_title" in labels) and "," in words:
        rp.repair_region_in_publisher(tokens, labels)
    if "place" in labels and "," in words:
        rp.repair_region_after_place(tokens, labels)
    return repair


def assemble(text: str, tokens: list[Token], labels: list[str], marg: list[float],
             seq_prob: float, truncated: bool = False) -> Reference:
    labels = list(labels)
    marg = list(marg)
    repair = _repairs(text, tokens, labels, marg)
    runs: dict[str, list[_Run]] = {}
    for r in _runs(tokens, labels, marg):
        runs.setdefault(r.label, []).append(r)
    infos: list[FieldInfo] = []
    late_infos: list[FieldInfo] = []   # spans of leftovers kept as the note; no part of the record score
    values: dict[str, object] = {}
    notes: list[str] = []
    pub_first = len(runs.get("publisher", ())) >= 2 and _merge_publishers(tokens, labels, runs)
    penalty = repair * _leftover_penalty(tokens, labels)

    def raw(r: _Run) -> str:
        return text[tokens[r.first].start:tokens[r.last].end]

    def span(r: _Run) -> Span:
        return Span(tokens[r.first].start, tokens[r.last].end)

    def note_info(name: str, r: _Run, conf: float | None = None) -> None:
        infos.append(FieldInfo(name, round(r.conf if conf is None else conf, 4), span(r)))

    # --- identifiers -------------------------------------------------------
    idents: list[Identifier] = []
    for tok in compress(tokens, map(_IDENT, tokens)):   # identifier tokens only, found in C
        if tok.ident is not None:
            idents.append(tok.ident)
            conf = 0.99 if tok.ident.valid else 0.5
            infos.append(FieldInfo(tok.ident.scheme, conf, Span(tok.start, tok.end)))
            if tok.kind == "arxiv" and "container_title" not in runs:
                # "CoRR, abs/1207.6692": BibTeX exports file an arXiv paper under
                # a journal name with the id as its volume
                m = _CORR.match(tok.text)
                if m:
                    values["container_title"] = m.group(1)
                    infos.append(FieldInfo("container_title", conf, Span(tok.start, tok.start + m.end(1))))

    # --- names -------------------------------------------------------------
    etal = False
    for field in ("authors", "editors", "translators"):
        if field not in runs:
            continue
        best, rest = _pick(runs, field, longest=False)
        if best is None:
            continue
        # authors are usually one run; a second run glued by "and" belongs to it
        last = best
        for r in rest:
            if r.first > last.last and all(labels[j] == "O" for j in range(last.last + 1, r.first)) \
                    and r.first - last.last <= 3:
                last = r
        chunk = text[tokens[best.first].start:tokens[last.last].end]
        conf = min(best.conf, last.conf)
        names, etal_here = split_names(clean_text(chunk))
        etal = etal or etal_here
        # also an "et al." right after the run
        after = text[tokens[last.last].end:tokens[last.last].end + 10].lower()
        if "et al" in after:
            etal = True
        if not names:
            continue
        words = chunk.split()
        lower_words = sum(1 for w in words if w[:1].islower() and w not in lx.PARTICLES
                          and w.lower() not in ("and", "et", "al.", "eds.", "ed.", "y", "und"))
        if lower_words >= 3 or len(names) > 40:
            # an author list full of lower-case words ate the title
            conf *= 0.5
            penalty *= 0.6
        conf *= _name_shape_factor(names)
        values[field] = names
        infos.append(FieldInfo(field, round(conf, 4), Span(tokens[best.first].start, tokens[last.last].end)))

    # --- plain text fields ----------------------------------------------------
    for field in ("title", "container_title", "series", "publisher", "place", "edition", "genre",
                  "series_number"):
        if field not in runs:
            continue
        best, rest = _pick(runs, field, longest=(field != "place" and not (field == "publisher" and pub_first)))
        if best is None:
            continue
        if field == "title" and rest and best is not runs["title"][0]:
            # a title run printed after the imprint or the venue is a note
            # ("Title, Series, Publisher, 2013. A subtitle-like remark.")
            first = runs["title"][0]
            if any(lab in _IMPRINT for lab in labels[first.last + 1:best.first]):
                best, rest = first, [r for r in runs["title"] if r is not first]
        value = _strip_field(field, clean_text(raw(best)))
        if "</" in value or "<" in value and ">" in value:
            # pasted web markup ("Quill sums</a"): the tags are no part of the field
            value = _strip_field(field, _SPACES.sub(" ", _HTML_PIECE.sub(" ", value)))
        if field == "edition" and "^" in value:
            value = value.replace("^", "").replace("{", "").replace("}", "")   # "2^nd", "2^{nd}": a typed superscript
        if field == "edition" and value.isdigit():
            # "2nd": the tokenizer splits the ordinal suffix off
            tail = text[tokens[best.last].end:tokens[best.last].end + 2]
            if tail in ("st", "nd", "rd", "th"):
                value += tail
        end = tokens[best.last].end
        if field in _KEEP_DOT_FIELDS and text[end:end + 1] == "." and not value.endswith(".") and (
                field != "place" or value.rsplit(" ", 1)[-1].lower() + "." in _PLACE_ABBREV):
            last = value.rsplit(" ", 1)[-1]
            if len(last) <= 4 and last[:1].isupper() or (last.lower() + ".") in lx.JOURNAL_WORDS \
                    or field == "place" \
                    or (_ABBREVIATED.search(value) and last.isalpha() and last[:1].isupper()):
                # the abbreviation's period was labeled as punctuation; in a
                # name abbreviated elsewhere ("Bull. Quill Soc. Math. Ink.")
                # the last word is abbreviated too -- keep the period as typed
                value += "."
        if field == "publisher" and ". " in value and "series" not in runs:
            # "Modern Birkhäuser Classics. Birkhäuser Verlag": a series printed
            # just before the publisher, read into it
            head, _, tail = value.partition(". ")
            if tail and any(w.lower() in _SERIES_HINT for w in head.split()) \
                    and not any(w.lower() in _SERIES_HINT for w in tail.split()):
                values["series"] = head
                value = tail
        if value.count("(") > value.count(")") and text[end:end + 1] == ")":
            value += ")"   # "Society (AMS)": the closing bracket was left out of the run
        if field == "publisher":
            # company suffixes the labeler tends to leave out: ", Inc.", "and Co."
            m = _COMPANY_TAIL.match(text, tokens[best.last].end)
            if m:
                value = value + m.group().rstrip(",; ")
            else:
                # a place or an acronym printed inside the publisher string, with
                # no separator ("Springer-Verlag Berlin", "Society (AMS)"), is
                # part of the name as typed
                m = _ACRONYM_TAIL.match(text, tokens[best.last].end)
                if m:
                    value = value + m.group()
                else:
                    glued = next((pr for pr in runs.get("place", ()) if pr.first == best.last + 1
                                  and not text[tokens[best.last].end:tokens[pr.first].start].strip()), None)
                    if glued is not None:
                        value = value + " " + clean_text(raw(glued)).rstrip(" ,.;")
                        runs["place"] = [pr for pr in runs["place"] if pr is not glued]
                        values.pop("place", None)
        if field == "title" and value.lower() in _STATUS_TITLES and not ("container_title" in runs
                                                                          or "publisher" in runs):
            notes.append(value)     # "A. B. Featherstone, Personal communication, 2010": no title at all
            note_info("note", best)
            continue
        if field == "title":
            value = value.rstrip(".")
            m = _NO_DATE.match(value)
            if m and m.end() < len(value):
                # Harvard-style "(no date)" read into the title
                value = value[m.end():]
                if "date" not in runs:
                    values["date"] = Date(literal="n.d.")
            tail = _series_tail(value, runs)
            if tail:
                value = value[: -len(tail)].rstrip(" ,.")
                values["series"] = tail.strip(" ,.")
                infos.append(FieldInfo("series", round(best.conf * 0.8, 4), None))
        if not value:
            continue
        values[field] = value
        conf = best.conf
        if rest:
            # a second, separate run of the same field: keep it, but doubt it;
            # its words go to the note rather than vanish (an unknown place
            # read as a second journal run, a stray remark)
            extra = [(_strip_field(field, clean_text(raw(r))), r) for r in rest]
            extra = [(e, r) for e, r in extra if e]
            if extra:
                if field in ("publisher", "place", "series"):
                    values[field] = value
                for e, r in extra:
                    if field == "title" or e not in value and e not in notes:
                        notes.append(e)
                        if field != "title":
                            late_infos.append(FieldInfo("note", round(r.conf * 0.8, 4), span(r)))
                conf *= 0.8
        note_info(field, best, conf)

    # Q&A posts: "answer to the question Title, mathoverflow" + the site's URL
    if isinstance(values.get("title"), str) and "container_title" not in values and idents:
        t = values["title"]
        m = _ANSWER_TO.match(t)
        if m and m.end() < len(t):
            t = t[m.end():]
            values["genre"] = values.get("genre") or m.group().strip(" :").lower()
        split = _site_from_title(t, idents)
        if split and split[0]:
            t = split[0]
            values["container_title"] = split[1]
            infos.append(FieldInfo("container_title", 0.8, None))
        values["title"] = t

    # A volume glued to the end of a title ("Number fields, Vol. 8") or of a
    # journal name ("Journal de l'IMA 3") belongs in volume.
    if "volume" not in runs:
        for field, pattern in (("title", _TITLE_VOL), ("container_title", _CONTAINER_VOL)):
            val = values.get(field)
            m = pattern.search(val) if isinstance(val, str) else None
            if m and m.start() > 3 and not _YEAR_RE.fullmatch(m.group("v")):
                values[field] = val[: m.start()].rstrip(" ,.")
                values["volume"] = m.group("v")
                infos.append(FieldInfo("volume", 0.7, None))
                break

    # --- volume / issue ----------------------------------------------------------
    vrun, _ = _pick(runs, "volume", longest=False)
    irun, _ = _pick(runs, "issue", longest=False)
    volume = issue = None
    if vrun is not None:
        parsed = parse_volume(clean_text(raw(vrun)))
        if parsed and (parsed[0] or parsed[1]):
            volume, issue = parsed
        else:
            m = _DIGITS.search(raw(vrun))
            volume = _strip_field("volume", raw(vrun)) if not m else m.group()
        conf = vrun.conf
        if volume and _YEAR_RE.fullmatch(volume) and "date" not in labels:
            # a "volume" of 1996 is a year
            labels_date = Date(year=int(volume))
            values["date"] = labels_date
            infos.append(FieldInfo("date", round(conf * 0.8, 4), span(vrun)))
            volume = None
        elif volume and _YEAR_RE.fullmatch(volume):
            conf *= 0.6
        if volume:
            values["volume"] = volume
            note_info("volume", vrun, conf)
    if irun is not None:
        parsed = parse_volume(clean_text(raw(irun)))
        iss = None
        if parsed and (parsed[1] or parsed[0]):
            iss = parsed[1] or parsed[0]
        else:
            iss = _strip_field("issue", clean_text(raw(irun))) or None
        if iss:
            issue = iss
            note_info("issue", irun)
    if issue:
        values["issue"] = issue

    # --- pages ------------------------------------------------------------------
    prun, _ = _pick(runs, "pages")
    if prun is not None:
        ptxt = clean_text(raw(prun))
        pages = parse_pages(ptxt)
        conf = prun.conf
        if pages is None:
            stripped = _strip_field("pages", ptxt)
            # (a lone letter is no page: the "e" of "e-prints" read as one)
            pages = Pages(first=stripped) if stripped and (len(stripped) > 1 or stripped.isdigit()) else None
            conf *= 0.6
        elif pages.first and pages.last and pages.first.isdigit() and pages.last.isdigit() \
                and int(pages.last) < int(pages.first):
            conf *= 0.4   # reversed range: suspect
        if pages is not None:
            values["pages"] = pages
            note_info("pages", prun, conf)

    # --- date -------------------------------------------------------------------
    if "date" not in values:
        drun, drest = _pick(runs, "date", longest=False)
        if drun is not None:
            dtxt = clean_text(raw(drun))
            date = parse_date(dtxt)
            conf = drun.conf
            if date is None:
                m = _YEAR_RE.search(dtxt)
                date = Date(year=int(m.group())) if m else Date(literal=_strip_field("date", dtxt) or None)
                conf *= 0.7
            if date.year is not None and not 1500 <= date.year <= 2100:
                conf *= 0.3
            values["date"] = date
            note_info("date", drun, conf)

    # --- note ------------------------------------------------------------------------
    nrun, nrest = _pick(runs, "note", longest=False)
    for r in ([nrun] + nrest) if nrun is not None else []:
        t = _strip_field("note", clean_text(raw(r)))
        if t:
            notes.append(t)
            note_info("note", r)
    if truncated:
        notes.append("[line cut: too many tokens]")
        penalty *= 0.2

    # A "container" in a book-like record (publisher, no volume, issue, pages
    # or editors, not introduced by "In") is the book's series.
    crun, _ = _pick(runs, "container_title", longest=True)
    if crun is not None and (_forthcoming_after(text, tokens[crun.last].end) or _STATUS_BEFORE.search(
            text, max(0, tokens[crun.first].start - 16), tokens[crun.first].start)):
        crun = None   # the journal of a paper still to come: no book's publisher or series
    if (crun is not None and values.get("container_title") and not values.get("publisher")
            and not any(values.get(k) for k in ("volume", "issue", "pages", "editors"))
            and (_publisher_score(values["container_title"].split()) > 0 or _ends_book(tokens, labels, crun))
            and not _PROC.search(values["container_title"])
            and not _IN_BEFORE.search(text, max(0, tokens[crun.first].start - 5), tokens[crun.first].start)):
        # "Title, American Mathematical Soc., 1997": a book's publisher read as a journal
        values["publisher"] = values.pop("container_title")
        infos = [FieldInfo("publisher", round(i.confidence * 0.8, 4), i.span) if i.field == "container_title"
                 else i for i in infos]
    if (crun is not None and values.get("container_title") and values.get("publisher")
            and not values.get("series") and (
                not any(values.get(k) for k in ("volume", "issue", "pages", "editors"))
                and not _IN_BEFORE.search(text, max(0, tokens[crun.first].start - 5), tokens[crun.first].start)
                # "Title. in Classics in Mathematics. Springer": a series word, no pages
                or not any(values.get(k) for k in ("issue", "pages"))
                and any(w.lower() in _SERIES_HINT for w in values["container_title"].split()))):
        values["series"] = values.pop("container_title")
        infos = [FieldInfo("series", round(i.confidence * 0.8, 4), i.span) if i.field == "container_title" else i
                 for i in infos]

    if (crun is not None and values.get("container_title") and not values.get("series")
            and not any(values.get(k) for k in ("issue", "pages", "editors"))
            and any(w.lower() in _SERIES_HINT for w in values["container_title"].split())
            and not _PROC.search(values["container_title"])
            and not _IN_BEFORE.search(text, max(0, tokens[crun.first].start - 5), tokens[crun.first].start)):
        # "Title, Translations of Quill Monographs 91 (1991)": a book in a
        # numbered series, no pages -- the number is the series number
        values["series"] = values.pop("container_title")
        if values.get("volume") and not values.get("series_number"):
            values["series_number"] = values.pop("volume")
        infos = [FieldInfo("series", round(i.confidence * 0.8, 4), i.span) if i.field == "container_title" else i
                 for i in infos]
    found = _kind_words(text)
    # Literal dates written in words: "to appear", "in press"
    if "date" not in values and found.get("unpub") in ("to appear", "in press", "forthcoming", "submitted",
                                                        "in preparation"):
        values["date"] = Date(literal=found["unpub"])

    kind = _kind(text, values, idents, found)
    rec_conf = record_confidence(values, infos, seq_prob, penalty, kind)
    infos.extend(late_infos)
    prov = Provenance(raw=text, fields=tuple(infos), confidence=round(rec_conf, 4))
    extra: tuple[tuple[str, str], ...] = (("et-al", "true"),) if etal else ()
    return Reference(
        kind=kind,
        authors=values.get("authors", ()),
        editors=values.get("editors", ()),
        translators=values.get("translators", ()),
        title=values.get("title"),
        container_title=values.get("container_title"),
        series=values.get("series"),
        series_number=values.get("series_number"),
        volume=values.get("volume"),
        issue=values.get("issue"),
        pages=values.get("pages"),
        date=values.get("date"),
        publisher=values.get("publisher"),
        place=values.get("place"),
        edition=values.get("edition"),
        genre=values.get("genre"),
        identifiers=tuple(idents),
        note="; ".join(notes) if notes else None,
        extra=extra,
        provenance=prov,
    )


_IMPRINT = frozenset(("publisher", "container_title", "pages", "volume", "series"))
_STATUS_TITLES = frozenset(("personal communication", "private communication", "personal communication.",
                            "unpublished", "unpublished manuscript", "unpublished notes", "in preparation"))
_FORTHCOMING = ("to appear", "in press", "forthcoming", "accepted", "submitted")
_STATUS_BEFORE = re.compile(r"(?i)(?:submitted|forthcoming|appear|accepted)\s+(?:to|in|for|by):?\s*\Z")


def _forthcoming_after(text: str, end: int) -> bool:
    """"Trans. Amer. Math. Soc., to appear": a venue followed by a
    forthcoming phrase is the journal an article will appear in, not a
    book's publisher (no volume or pages yet is why it looks book-like)."""
    return text[end:end + 16].lstrip(" .,;:([").lower().startswith(_FORTHCOMING)
_IN_WORD = re.compile(r"(?:^|[.,]\s*)In[: ]")
# "..., Chapter 3 in Handbook ..., CRC Press": a book's part (with its publisher)
_IN_ANY = re.compile(r"[\d.,]\s*[Ii]n:?\s(?=[A-Z])(?!(?:Russian|English|French|German|Chinese|Japanese|Italian|"
                     r"Spanish|Polish|Hungarian|Czech|Portuguese|Dutch|Ukrainian|Romanian)\b)")
_IN_LOWER = re.compile(r"[.,]\s*in:?\s(?=[A-Z])")
# "Proc. 12th Conf. ...", "Proc. Int. Congress": an abbreviated meeting, not
# a society's journal ("Proc. Amer. Math. Soc.")
_PROC_ABBR = re.compile(r"\d(?:st|nd|rd|th)\b|\b(?:Conf|Symp|Int|Internat|Colloq)\.")


def _kind(text: str, v: dict, idents: list[Identifier], found: dict[str, str]) -> Kind:
    genre = v.get("genre") or ""
    if (genre and _THESIS.search(genre)) or (not v.get("container_title") and "thesis" in found):
        return Kind.THESIS
    if "unpub" in found and not v.get("volume") and not (
            v.get("container_title") and found["unpub"] in _FORTHCOMING[:3]):
        # (an accepted paper with its venue is that venue's article, still forthcoming)
        return Kind.UNPUBLISHED
    if "software" in found and not v.get("container_title"):
        return Kind.SOFTWARE
    container = v.get("container_title") or ""
    if container:
        proc = _PROC.search(container) or "Proc." in container and _PROC_ABBR.search(container)
        if v.get("editors") or _IN_WORD.search(text) or v.get("publisher") and _IN_ANY.search(text):
            return Kind.PAPER if proc else Kind.CHAPTER
        if proc and (not v.get("volume") or _IN_LOWER.search(text)):
            return Kind.PAPER
        return Kind.ARTICLE
    if (genre and _REPORT.search(genre)) or "report" in found and not v.get("publisher") and not v.get("series"):
        return Kind.REPORT
    if v.get("publisher") or v.get("series") or v.get("edition") or any(i.scheme == "isbn" for i in idents) \
            or v.get("place") and v.get("title"):
        return Kind.BOOK     # (a place of publication is a book's imprint, even without a publisher)
    schemes = {i.scheme for i in idents}
    if "arxiv" in schemes:
        return Kind.REPORT
    if "url" in schemes:
        return Kind.WEBPAGE
    return Kind.OTHER


