"""Labeled tokens -> a validated :class:`Reference` with provenance.

Runs of equal labels become fields; the sub-language grammars split pages,
volume/issue clusters and dates; names go through the name-list splitter.
The validation pass then repairs what a labeler typically gets wrong (a
"volume" of 1996, an author list that swallowed the title, a reversed page
range) and lowers the confidence of what it cannot repair.
"""

from __future__ import annotations

import re
import unicodedata
from functools import lru_cache

from normform.model import (Date, FieldInfo, Identifier, Kind, Pages, Provenance, Reference,
                            Span)
from normform.refs import lexicon as lx
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
_TITLE_VOL = re.compile(r",\s*(?:[Vv]ol\.|[Vv]olume)\s*(?P<v>\d{1,4})\Z")
_CONTAINER_VOL = re.compile(r"(?<=[a-zA-Z.'])\s+(?P<v>\d{1,4})\Z")
_ABBREVIATED = re.compile(r"\b[A-Z][a-z]{0,7}\.\s")
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
    if keep_dot and out:
        words = out.split()
        last = words[-1] if words else ""
        if len(last) <= 6 or (last + ".").lower() in lx.JOURNAL_WORDS:
            out += "."
    if field == "title" and out.endswith("?") is False and text.strip().endswith("?"):
        out += "?"
    return out


class _Run:
    __slots__ = ("label", "first", "last", "conf")

    def __init__(self, label: str, first: int, last: int, conf: float):
        self.label, self.first, self.last, self.conf = label, first, last, conf


def _runs(tokens: list[Token], labels: list[str], marg: list[float]) -> list[_Run]:
    runs: list[_Run] = []
    n = len(labels)
    i = 0
    while i < n:
        lab = labels[i]
        j = i + 1
        while j < n and labels[j] == lab:
            j += 1
        runs.append(_Run(lab, i, j - 1, marg[i] if j == i + 1 else min(marg[i:j])))
        i = j
    # merge runs of one label separated only by "O" punctuation (a quote, a bracket)
    merged: list[_Run] = []
    for r in runs:
        if (len(merged) >= 2 and merged[-1].label == "O" and merged[-2].label == r.label
                and r.label not in ("O", "authors", "editors")
                and all(tokens[j].kind in ("punct", "tex") for j in range(merged[-1].first, merged[-1].last + 1))
                and merged[-1].last - merged[-1].first < 2
                and not any(tokens[j].text in ".,;" for j in range(merged[-1].first, merged[-1].last + 1))):
            gap = merged.pop()
            prev = merged[-1]
            prev.last = r.last
            prev.conf = min(prev.conf, r.conf, 0.99)
            del gap
        else:
            merged.append(r)
    return merged


def _pick(runs: dict[str, list[_Run]], label: str, longest: bool = True) -> tuple[_Run | None, list[_Run]]:
    mine = runs.get(label)
    if not mine:
        return None, []
    best = max(mine, key=lambda r: r.last - r.first) if longest else mine[0]
    return best, [r for r in mine if r is not best]


_NAME_WORDS = lx.PARTICLES | {"and", "et", "al", "y", "und", "eds", "ed", "editors", "editor", "jr", "sr"}


def _repair_labels(tokens: list[Token], labels: list[str], marg: list[float]) -> float:
    """An author list that ran past a sentence period into lower-case words
    has eaten the title: give the words back.  Returns a confidence factor."""
    n = len(labels)
    if not n or labels[0] not in ("authors", "editors"):
        return 1.0
    role = labels[0]
    end = 0
    while end < n and labels[end] == role:
        end += 1
    for k in range(1, end - 1):
        t, prev = tokens[k], tokens[k - 1]
        if t.text != "." or prev.kind != "word" or len(prev.text) <= 3:
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


def _repair_missing_publisher(tokens: list[Token], labels: list[str]) -> None:
    """No publisher, but after the title an unlabeled run of capitalised
    words sits right before ", Place" or ", Year" ("Pitman, Boston, MA,
    1984"): that run is the publisher.  Unknown publisher names get no
    dictionary help, but the book layout is unambiguous."""
    if "publisher" in labels or "title" not in labels or "container_title" in labels:
        return
    last_title = max(i for i, lab in enumerate(labels) if lab == "title")
    n = len(tokens)
    i = last_title + 1
    while i < n:
        if labels[i] == "O" and tokens[i].kind == "word" and tokens[i].text[:1].isupper() \
                and tokens[i].text.lower() not in lx.CONNECTORS and i > 0 and tokens[i - 1].text in ".,;:":
            j = i
            while j < n and labels[j] == "O" and (tokens[j].kind == "word" and tokens[j].text[:1].isupper()
                                                  or tokens[j].text in ("&", "-", "and")) and j - i < 6:
                j += 1
            if j + 1 < n and tokens[j].text == "," and labels[j + 1] in ("place", "date"):
                for k in range(i, j):
                    labels[k] = "publisher"
                return
            i = j + 1
        else:
            i += 1


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
    """Name lists of uneven shape are often mis-split ("Brandt, Stephan,
    Note: ..." read as three names; "Barry Simon, Convexity" read as family
    "Barry Simon"): some names with given names and some without, or a
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
    k = 0
    for tok, lab in zip(tokens, labels):
        if lab == "O" and tok.kind in ("word", "num") and tok.text.lower() not in _LEFTOVER_OK:
            k += 1
    return 0.85 ** k


def assemble(text: str, tokens: list[Token], labels: list[str], marg: list[float],
             seq_prob: float, truncated: bool = False) -> Reference:
    labels = list(labels)
    marg = list(marg)
    repair = _repair_labels(tokens, labels, marg) * _repair_missing_title(tokens, labels)
    _repair_missing_publisher(tokens, labels)
    runs: dict[str, list[_Run]] = {}
    for r in _runs(tokens, labels, marg):
        runs.setdefault(r.label, []).append(r)
    infos: list[FieldInfo] = []
    values: dict[str, object] = {}
    notes: list[str] = []
    penalty = repair * _leftover_penalty(tokens, labels)

    def raw(r: _Run) -> str:
        return text[tokens[r.first].start:tokens[r.last].end]

    def span(r: _Run) -> Span:
        return Span(tokens[r.first].start, tokens[r.last].end)

    def note_info(name: str, r: _Run, conf: float | None = None) -> None:
        infos.append(FieldInfo(name, round(r.conf if conf is None else conf, 4), span(r)))

    # --- identifiers -------------------------------------------------------
    idents: list[Identifier] = []
    for i, tok in enumerate(tokens):
        if tok.ident is not None:
            idents.append(tok.ident)
            conf = 0.99 if tok.ident.valid else 0.5
            infos.append(FieldInfo(tok.ident.scheme, conf, Span(tok.start, tok.end)))

    # --- names -------------------------------------------------------------
    etal = False
    for field in ("authors", "editors", "translators"):
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
        best, rest = _pick(runs, field, longest=(field != "place"))
        if best is None:
            continue
        value = _strip_field(field, clean_text(raw(best)))
        if field == "edition" and value.isdigit():
            # "2nd": the tokenizer splits the ordinal suffix off
            tail = text[tokens[best.last].end:tokens[best.last].end + 2]
            if tail in ("st", "nd", "rd", "th"):
                value += tail
        end = tokens[best.last].end
        if field in _KEEP_DOT_FIELDS and text[end:end + 1] == "." and not value.endswith("."):
            last = value.rsplit(" ", 1)[-1]
            if len(last) <= 5 and last[:1].isupper() or (last.lower() + ".") in lx.JOURNAL_WORDS \
                    or (_ABBREVIATED.search(value) and last.isalpha() and last[:1].isupper()):
                # the abbreviation's period was labeled as punctuation; in a
                # name abbreviated elsewhere ("Comment. Math. Univ. Carolin.")
                # the last word is abbreviated too -- keep the period as typed
                value += "."
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
        if field == "title":
            value = value.rstrip(".")
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
            # a second, separate run of the same field: keep it, but doubt it
            extra = [_strip_field(field, clean_text(raw(r))) for r in rest]
            extra = [e for e in extra if e]
            if extra:
                if field in ("publisher", "place", "series"):
                    values[field] = value
                notes.extend(extra) if field == "title" else None
                conf *= 0.8
        note_info(field, best, conf)

    # A volume glued to the end of a title ("Number fields, Vol. 8") or of a
    # journal name ("Journal de l'IMA 3") belongs in volume.
    if "volume" not in runs:
        for field, pattern in (("title", _TITLE_VOL), ("container_title", _CONTAINER_VOL)):
            val = values.get(field)
            m = pattern.search(val) if isinstance(val, str) else None
            if m and m.start() > 3:
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
            pages = Pages(first=stripped) if stripped else None
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
    if (crun is not None and values.get("container_title") and values.get("publisher")
            and not values.get("series") and not any(values.get(k) for k in ("volume", "issue", "pages", "editors"))
            and not _IN_BEFORE.search(text, max(0, tokens[crun.first].start - 5), tokens[crun.first].start)):
        values["series"] = values.pop("container_title")
        infos = [FieldInfo("series", round(i.confidence * 0.8, 4), i.span) if i.field == "container_title" else i
                 for i in infos]

    found = _kind_words(text)
    # Literal dates written in words: "to appear", "in press"
    if "date" not in values and found.get("unpub") in ("to appear", "in press", "forthcoming", "submitted",
                                                        "in preparation"):
        values["date"] = Date(literal=found["unpub"])

    kind = _kind(text, values, idents, found)
    rec_conf = calibrated(_record_confidence(values, infos, seq_prob, penalty, kind, etal))
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


_IN_WORD = re.compile(r"(?:^|[.,]\s*)In[: ]")


def _kind(text: str, v: dict, idents: list[Identifier], found: dict[str, str]) -> Kind:
    genre = v.get("genre") or ""
    if (genre and _THESIS.search(genre)) or (not v.get("container_title") and "thesis" in found):
        return Kind.THESIS
    if "unpub" in found and not v.get("volume"):
        return Kind.UNPUBLISHED
    if "software" in found and not v.get("container_title"):
        return Kind.SOFTWARE
    container = v.get("container_title") or ""
    if container:
        if v.get("editors") or _IN_WORD.search(text):
            return Kind.PAPER if _PROC.search(container) else Kind.CHAPTER
        if _PROC.search(container) and not v.get("volume"):
            return Kind.PAPER
        return Kind.ARTICLE
    if (genre and _REPORT.search(genre)) or "report" in found and not v.get("publisher"):
        return Kind.REPORT
    if v.get("publisher") or v.get("series") or v.get("edition") or any(i.scheme == "isbn" for i in idents):
        return Kind.BOOK
    schemes = {i.scheme for i in idents}
    if "arxiv" in schemes:
        return Kind.REPORT
    if "url" in schemes:
        return Kind.WEBPAGE
    return Kind.OTHER


def _record_confidence(v: dict, infos: list[FieldInfo], seq_prob: float, penalty: float,
                       kind: Kind, etal: bool) -> float:
    """Record confidence: the record is right only if every field is, so the
    field confidences multiply (identifiers, checked by their own grammar,
    do not count); then the labeling's overall probability and the
    validation penalties.  A record with neither a title nor authors is
    never trusted."""
    if not infos:
        return 0.0
    conf = 1.0
    for info in infos:
        if info.field not in _ID_FIELDS:
            conf *= info.confidence
    conf = min(conf, seq_prob ** 0.5 if seq_prob > 0 else 0.0) * penalty
    if not v.get("title"):
        conf *= 0.5
    if not v.get("authors") and not v.get("editors"):
        conf *= 0.7
    if kind is Kind.OTHER:
        conf *= 0.8
    # an incomplete record for its kind is worth a look
    missing = {Kind.ARTICLE: ("volume", "date"), Kind.BOOK: ("publisher", "date"),
               Kind.CHAPTER: ("container_title", "date"), Kind.PAPER: ("container_title", "date")}.get(kind, ())
    for key in missing:
        if not v.get(key):
            conf *= 0.85
    return max(0.0, min(1.0, conf))


_ID_FIELDS = frozenset(("doi", "arxiv", "mr", "zbl", "isbn", "issn", "url", "handle"))


# --- calibration -------------------------------------------------------------
# The raw record confidence is a product of field marginals and penalties; a
# monotone map fitted on held-out *synthetic* lines (scripts/calibrate_refs.py,
# normform/data/refs-calibration.json) turns it into "share of records this
# confident that are exactly right".  No map file: identity.
CALIBRATE = True


@lru_cache(maxsize=1)
def _calibration_knots() -> tuple[tuple[float, ...], tuple[float, ...]] | None:
    import json

    from normform.resources import data_path
    try:
        with open(data_path("refs-calibration.json"), encoding="utf-8") as fh:
            data = json.load(fh)
        xs, ys = tuple(float(x) for x in data["raw"]), tuple(float(y) for y in data["calibrated"])
    except (OSError, ValueError, KeyError):
        return None
    return (xs, ys) if len(xs) == len(ys) and len(xs) >= 2 else None


def calibrated(raw: float) -> float:
    knots = _calibration_knots() if CALIBRATE else None
    if knots is None:
        return raw
    from bisect import bisect_right
    xs, ys = knots
    if raw <= xs[0]:
        return ys[0] * (raw / xs[0]) if xs[0] > 0 else ys[0]
    if raw >= xs[-1]:
        return ys[-1]
    k = bisect_right(xs, raw)
    x0, x1, y0, y1 = xs[k - 1], xs[k], ys[k - 1], ys[k]
    return y0 + (y1 - y0) * (raw - x0) / (x1 - x0) if x1 > x0 else y1
