"""More post-labeling repairs: imprints, edition notes inside titles,
journals the labeler left unlabeled, titles cut at a serial comma.

Each ``repair_*`` function's docstring names its class of input; each is
gated by its caller in :func:`normform.refs.assemble._repairs` (a label or a
token text present) so that lines without its trigger cost nothing.  They
move labels only; the fields are built afterwards from the runs.  Word sets
used here are not labeler features, so changing them needs no retraining.
"""

from __future__ import annotations

import re

from normform.refs import lexicon as lx
from normform.refs.tokens import Token

# Regions printed after a place or standing for it ("New York, NY, USA").
# Common practice: US state codes and the usual country names of imprints.
_REGIONS = frozenset("""
al ak az ar ca co ct de dc fl ga hi id il in ia ks ky la me md ma mi mn ms mo mt ne nv nh nj nm ny nc
nd oh ok or pa ri sc sd tn tx ut vt va wa wv wi wy mass. calif. conn. ill. mich. ont. d.c. n.y. n.j.
usa u.s.a. us uk u.k. england germany switzerland france italy netherlands japan china india russia
spain austria belgium canada australia poland sweden denmark norway hungary romania singapore
""".split())
_COMPANY = frozenset(("Inc", "Ltd", "Co", "GmbH", "Corp", "LLC", "KG"))
# token texts of which one must be present for the imprint repairs to act
PLACE_GATE = frozenset(w2 for w in lx.PLACES | _REGIONS for w2 in (w.capitalize(), w.upper(), w.rstrip(".").capitalize(),
                                                                   w.rstrip(".").upper()))
IMPRINT_GATE = PLACE_GATE | _COMPANY
_ROMAN_WORD = re.compile(r"[IVXL]{1,6}")
_YEARLIKE = re.compile(r"1[5-9]\d\d|20\d\d")


def _run_end(labels: list[str], i: int) -> int:
    # a plain scan: runs are short, and this beats building a groupby
    lab = labels[i]
    n = len(labels)
    j = i + 1
    while j < n and labels[j] == lab:
        j += 1
    return j - 1


def _place_word(t: Token) -> bool:
    low = t.text.lower()
    return (low in lx.PLACES or low in _REGIONS or (t.kind == "initial" and t.text.isupper())
            or t.kind in ("punct", "dash") and t.text in ".-–")


def _imprint_word(t: Token) -> bool:
    # leftovers at the line's end that can still be part of a place list
    return t.kind in ("initial", "punct", "dash") or t.kind == "word" and t.text[:1].isupper()


def repair_joint_imprint(tokens: list[Token], labels: list[str]) -> None:
    """A joint imprint ``A Press, London; B Co., Inc., Washington, D.C.,
    1967`` is one publisher string as printed, its places included (the
    two publishers cannot be told apart from their places): the publisher
    run that reaches a ";" runs on to the next field (the year, a note),
    over the places the labeler split off."""
    n = len(labels)
    try:
        p0 = labels.index("publisher")
    except ValueError:
        return
    semi = next((k for k in range(p0 + 1, n) if tokens[k].text == ";"), -1)
    if semi < 0 or any(labels[k] not in ("publisher", "place", "O") for k in range(p0, semi)):
        return
    after = next((k for k in range(semi + 1, min(n, semi + 3)) if labels[k] == "publisher"), -1)
    if after < 0:
        return
    x = after
    while x < n and (labels[x] in ("publisher", "place", "O", "container_title")
                     or labels[x] == "note" and _imprint_word(tokens[x])) and tokens[x].kind != "num" \
            and tokens[x].text != ";" and tokens[x].ident is None:
        t = tokens[x]
        if t.text == "." and x + 1 < n and tokens[x + 1].text[:1].isupper() and tokens[x - 1].kind == "word" \
                and len(tokens[x - 1].text) >= 5 and tokens[x - 1].text.lower() + "." not in _REGIONS:
            break   # a sentence end: what follows is a note
        x += 1
    while x - 1 > after and tokens[x - 1].text in ",;:-–":
        x -= 1
    for k in range(p0, x):
        labels[k] = "publisher"


def repair_publisher_place(tokens: list[Token], labels: list[str]) -> None:
    """A place printed after the publisher and read into it (``Springer
    Berlin, Heidelberg``, ``Prentice Hall, Inc., Upper Saddle River, NJ``,
    ``Association for Computing Machinery, New York, NY, USA``): the comma
    pieces at the end of the run that are all place words or region codes,
    and anything after a company suffix, are the place."""
    n = len(labels)
    i = 0
    while i < n:
        try:
            i = labels.index("publisher", i)   # found in C, not by a Python walk
        except ValueError:
            return
        e = _run_end(labels, i)
        if any(tokens[k].text == ";" for k in range(i, e + 1)):
            return   # a joint imprint keeps its places
        commas = [k for k in range(i + 1, e) if tokens[k].text == ","]
        cut = -1
        for c in reversed(commas):
            piece = [t for t in tokens[c + 1:e + 1] if t.text != ","]
            if piece and all(_place_word(t) for t in piece) and any(t.kind == "word" for t in piece):
                if all(t.text.lower() in _REGIONS or t.kind != "word" for t in piece) \
                        and tokens[c - 1].text.lower() in lx.PLACES:
                    break   # "Springer New York, NY": the code qualifies the imprint's own place
                cut = c
            else:
                break
        for c in commas:
            # "Prentice Hall, Inc., Upper Saddle River": after the company suffix
            if c > i + 1 and (tokens[c - 1].text in _COMPANY or tokens[c - 1].text == "."
                              and tokens[c - 2].text in _COMPANY) and c + 1 <= e \
                    and tokens[c + 1].kind == "word" and tokens[c + 1].text[:1].isupper() \
                    and tokens[c + 1].text not in _COMPANY and (cut < 0 or c < cut):
                tail = [t for t in tokens[c + 1:e + 1] if t.kind == "word"]
                if tail and tail[-1].text.lower() in _REGIONS | lx.PLACES:
                    cut = c
                break
        if cut > i:
            labels[cut] = "O"
            for k in range(cut + 1, e + 1):
                labels[k] = "place"
        i = e + 1


_TITLE_STOP = frozenset(",;(")
_GLUE = frozenset("of and the de des du der für for in la le di e et on à".split())


def _abbrev_word(tokens: list[Token], k: int) -> bool:
    """Token k is a capitalised word printed with its abbreviation period."""
    t = tokens[k]
    return t.kind == "word" and t.text[:1].isupper() and k + 1 < len(tokens) and tokens[k + 1].text == "."


def repair_unlabeled_title(tokens: list[Token], labels: list[str]) -> None:
    """No title, and the first sentence (or comma piece) after the author
    list and its year was left unlabeled or filed as a note (``A. Quill.
    Tables of THE SUMS. Berlin: Springer, 1998``): in that slot a
    reference prints its title."""
    n = len(labels)
    if not n or labels[0] not in ("authors", "editors"):
        return
    i = _run_end(labels, 0) + 1
    while i < n and (tokens[i].kind == "punct" and labels[i] == "O" or labels[i] == "date"):
        i += 1
    if i >= n or labels[i] not in ("O", "note") or tokens[i].kind != "word" or not tokens[i].text[:1].isupper():
        return
    lab = labels[i]
    j = i
    while j < n and labels[j] == lab and tokens[j].text not in _TITLE_STOP:
        if tokens[j].text in ".?!" and j + 1 < n and (tokens[j + 1].text[:1].isupper() or labels[j + 1] != lab):
            break
        j += 1
    words = sum(1 for k in range(i, j) if tokens[k].kind == "word")
    if words < 2 or (j < n and labels[j] == lab and tokens[j].text not in ".,;?!(" ):
        return
    if lab == "O" and any(tokens[k].text.lower() in lx.CONNECTORS for k in range(i, min(j, i + 1))):
        return   # "vol.", "pp.", "In": a keyword, not a title
    for k in range(i, j):
        labels[k] = "title"


def _journal_tail(tokens: list[Token], lo: int, hi: int) -> bool:
    """tokens[lo:hi] read as an abbreviated journal name: capitalised
    words, glue words and abbreviation periods, at least one abbreviated."""
    abbrev = False
    for k in range(lo, hi):
        t = tokens[k]
        if t.text == ".":
            continue
        if t.kind == "initial" and t.text[:1].isupper():
            abbrev = True
            continue
        if t.kind != "word" or not (t.text[:1].isupper() or t.text in _GLUE):
            return False
        abbrev = abbrev or _abbrev_word(tokens, k)
    return abbrev


def repair_comma_title_journal(tokens: list[Token], labels: list[str]) -> None:
    """No title, and a journal run that begins with it after a comma
    (``F. Quill, Counting inkblots in finite terms, Bull. Quill Soc. 79
    (1972)``): the abbreviated journal name after the run's last comma is
    the journal, the lower-case piece before it the title."""
    if "title" in labels:
        return
    try:
        s0 = labels.index("container_title")
    except ValueError:
        return
    e = _run_end(labels, s0)
    comma = next((k for k in range(e - 1, s0, -1) if tokens[k].text == ","), -1)
    if comma < s0 + 2 or not _journal_tail(tokens, comma + 1, e + 1):
        return
    head = tokens[s0:comma]
    if not any(t.kind == "word" and t.text[:1].islower() and t.text not in _GLUE for t in head):
        return   # "Publ. Math., Inst. Hautes Études Sci.": one journal with a comma
    for k in range(s0, comma):
        labels[k] = "title"
    labels[comma] = "O"


def repair_unlabeled_journal(tokens: list[Token], labels: list[str]) -> float:
    """Article layout with the journal left unlabeled or read as a series
    (``A. Quill. Inkblots. Astérisque, 330:13–59, 2010``, ``"Title",
    Contemporary Mathematics, vol. 480, pp. 263–288``): the capitalised
    words between the title's end and a volume that leads on to the pages
    are the journal.  Returns a confidence factor: a run the labeler
    called a series may be one (a numbered series volume printed like a
    journal), so that case is doubted."""
    n = len(labels)
    v = next((k for k in range(2, n) if labels[k] in ("volume", "series_number")), -1)
    if v < 0 or tokens[v].kind != "num":
        return 1.0
    c = v - 1
    if tokens[c].text == "." and tokens[c - 1].text in _VOL:
        c -= 1
    if tokens[c].text in _VOL:
        c -= 1
    if c < 2 or tokens[c].text != ",":
        return 1.0
    # the volume must lead on to the pages: "330:13-59", "480 (2) 1-20", "480 (2009), pp. 1-20"
    x = v + 1
    while x < n and x - v < 10 and labels[x] in ("O", "date", "issue") and tokens[x].text != ".":
        x += 1
    if x >= n or labels[x] != "pages" and not (tokens[x].text == "." and x + 1 < n and labels[x + 1] == "pages"):
        return 1.0
    s = c - 1
    while s >= 0 and labels[s] in ("O", "series") and (tokens[s].kind == "word" and (
            tokens[s].text[:1].isupper() or tokens[s].text in _GLUE) or tokens[s].text == "."
            and s > 0 and tokens[s - 1].kind == "word" and len(tokens[s - 1].text) <= 6):
        s -= 1
    s += 1
    if s >= c or tokens[s].text in _GLUE or s == 0:
        return 1.0
    b = s - 1
    if tokens[b].text == "," and b > 0 and tokens[b - 1].text in "”\"'":
        b -= 1   # '"Title", Journal'
    if not (labels[b] == "title" or tokens[b].text in ".?!”\"'" and b > 0 and labels[b - 1] == "title"):
        return 1.0
    was_series = any(labels[k] == "series" for k in range(s, c))
    for k in range(s, c):
        labels[k] = "container_title"
    labels[v] = "volume"
    return 0.85 if was_series else 1.0


_ROMAN_INITIAL = frozenset("I. II. III. IV. V. VI. VII. VIII. IX. X.".split())
_ARTICLE_NEXT = frozenset(("volume", "issue", "pages", "container_title"))


def repair_title_into_journal(tokens: list[Token], labels: list[str], marg: list[float]) -> float:
    """A title that ran on into an abbreviated journal name (``Counting
    inkblots. II. Proc. Quill Philos. Soc., 46:209-218``, ``Title?  Pub.
    Sém. Math. Plumes, 4:1-12``): the tail of capitalised and abbreviated
    words after the title's last sentence end ("." after a plain word, "?",
    "!") is the journal when a volume, pages or the rest of the journal
    follows.  A part number ("II.") before it stays with the title."""
    n = len(labels)
    try:
        f = labels.index("title")
    except ValueError:
        return 1.0
    last = _run_end(labels, f)
    nxt = last + 1
    while nxt < n and labels[nxt] == "O" and tokens[nxt].kind == "punct" and nxt - last < 3:
        nxt += 1
    if nxt >= n or labels[nxt] not in _ARTICLE_NEXT:
        return 1.0
    k = last
    abbrev = False
    while k > f:
        t = tokens[k]
        if t.text == ".":
            prev = tokens[k - 1]
            if prev.kind == "word" and (prev.text[:1].islower() or len(prev.text) > 4
                                        and prev.text.lower() + "." not in lx.JOURNAL_WORDS):
                break   # a sentence end
            k -= 1
            continue
        if t.text in "?!":
            break
        if t.kind == "initial" and t.text[:1].isupper():
            if t.text in _ROMAN_INITIAL and k - 1 > f and tokens[k - 1].text == ".":
                break   # "Title. II. Journal": the part number is the title's
            abbrev = True
        elif t.kind == "word" and (t.text[:1].isupper() or t.text in _GLUE):
            abbrev = abbrev or _abbrev_word(tokens, k) and (k < last or labels[k + 1] == "container_title"
                                                            or k + 2 == nxt and labels[nxt] == "container_title"
                                                            and (len(t.text) <= 4
                                                                 or t.text.lower() + "." in lx.JOURNAL_WORDS))
        else:
            return 1.0
        k -= 1
    start = k + 1
    while start <= last and (tokens[start].text == "." or tokens[start].text in _GLUE):
        start += 1
    if not abbrev or start > last or k <= f + 1 or tokens[start].kind not in ("word", "initial"):
        return 1.0
    if sum(1 for x in range(f, k) if tokens[x].kind == "word") < 2:
        return 1.0
    for x in range(start, last + 1):
        labels[x] = "container_title"
        marg[x] = min(marg[x], 0.8)
    if labels[nxt] == "container_title":
        for x in range(last + 1, nxt):
            labels[x] = "container_title"
    if tokens[k].text == ".":
        labels[k] = "O"
    return 0.9


_ORDINALS = frozenset(w for o in "first second third fourth fifth sixth seventh eighth ninth tenth revised "
                      "enlarged expanded".split() for w in (o, o.capitalize()))
_ORDINAL_SUFFIX = frozenset(("st", "nd", "rd", "th"))
_VOL = VOL_WORDS = frozenset(("Vol", "vol", "Volume", "volume", "Vols", "vols"))
EDITION_GATE = _ORDINALS | _ORDINAL_SUFFIX   # a token the edition repair needs


def repair_title_edition(tokens: list[Token], labels: list[str]) -> None:
    """An edition printed as a note right after the title and read into it:
    ``Title (Second, Vol. 6)``, ``Title (1st ed.)``, ``Title, Second.``,
    ``Title. Second. Berlin`` (CSL styles print the edition field as
    typed).  The ordinal is the edition; the title ends before it."""
    n = len(labels)
    try:
        f = labels.index("title")
    except ValueError:
        return
    e = _run_end(labels, f)
    if e - f < 2:
        return
    # "(1st ed" / "(Second": the ordinal opens a bracket inside the run
    k = e
    while k > f and (tokens[k].text in ("ed", "edn", "edition", ".") or tokens[k].text in _ORDINAL_SUFFIX):
        k -= 1
    t = tokens[k]
    ordinal = t.text in _ORDINALS or t.kind == "num" and k + 1 <= e and tokens[k + 1].text in _ORDINAL_SUFFIX
    if not ordinal or k - 1 <= f:
        return
    opener = tokens[k - 1].text
    a = e + 2 if e + 2 < n and tokens[e + 1].text == "." and tokens[e + 2].text == ")" else e + 1
    after = tokens[a].text if a < n else ""
    if opener == "(" and after in (",", ")"):
        pass
    elif opener in (",", ".") and t.text in _ORDINALS and t.text[:1].isupper() and k == e and after in (",", ".", ""):
        pass
    elif opener == "." and t.kind == "num" and tokens[e].text in ("ed", "edn", "edition") and after in (",", ".", ""):
        pass   # "Title. 1st ed."
    else:
        return
    labels[k - 1] = "O"
    labels[k] = "edition"
    for x in range(k + 1, e + 1):
        labels[x] = "O"


def repair_bracket_note(tokens: list[Token], labels: list[str]) -> None:
    """A bracketed volume note at the end of a book title, read into it
    (``Title (Vol. 96)``, APA styles): the title ends before the
    bracket."""
    f = labels.index("title")
    e = _run_end(labels, f)
    o = next((k for k in range(f + 2, e + 1) if tokens[k].text == "("), -1)
    if o < 0 or any(tokens[k].text == ")" for k in range(o, e + 1)):
        return
    inside = [t.text for t in tokens[o + 1:e + 1]]
    if not inside or inside[0] not in _VOL:
        return   # (an edition typed in brackets, "(2. ed.)", is often the title's own)
    vol = "volume" not in labels and "series_number" not in labels
    for k in range(o, e + 1):
        labels[k] = "volume" if vol and tokens[k].kind == "num" else "O"


def repair_book_volume_note(tokens: list[Token], labels: list[str]) -> None:
    """``Title, Subtitle (Vol. 77). Publisher`` (APA books): a "journal"
    run between the title's comma and a bracketed volume is the rest of
    the title -- a journal's volume is never printed "(Vol. N)"."""
    n = len(labels)
    try:
        s0 = labels.index("container_title")
    except ValueError:
        return
    e = _run_end(labels, s0)
    if s0 < 2 or tokens[s0 - 1].text != "," or labels[s0 - 2] != "title":
        return
    if e + 2 >= n or tokens[e + 1].text != "(" or tokens[e + 2].text not in _VOL:
        return
    if any(labels[k] in ("pages", "issue") for k in range(e + 1, n)):
        return
    for k in range(s0 - 1, e + 1):
        labels[k] = "title"


_NOT_FAMILY = frozenset(("al", "Jr", "Sr", "jr", "sr", "eds", "Eds", "ed", "Ed", "Hrsg", "editors", "editor"))


def repair_author_period(tokens: list[Token], labels: list[str], marg: list[float]) -> float:
    """An author list that ran past the period closing it (``Ada B
    Quillby. Knots, Folds, Plumes: a braid``, ``The Quill Tables Authors.
    Quill Tables.``): a period after a full word (a family name, not an
    initial, "Jr." or "al.") followed by a capital ends the list; the rest
    of the run is the title."""
    n = len(labels)
    role = labels[0]
    end = _run_end(labels, 0)
    if end < 3:
        return 1.0
    for k in range(2, end):
        if tokens[k].text != ".":
            continue
        prev, nxt = tokens[k - 1], tokens[k + 1]
        if prev.kind != "word" or len(prev.text) < 3 or prev.text in _NOT_FAMILY or prev.text in lx.SUFFIXES:
            continue
        if nxt.kind != "word" or not nxt.text[:1].isupper() or nxt.text in ("and", "And"):
            continue
        # the piece the period closes must be a whole name: "Ada B Quillby",
        # or the given name of an inverted first pair ("Quillby, Ada.")
        cuts = [x for x in range(0, k) if tokens[x].text in (",", "and", "&", ";")]
        lo = cuts[-1] + 1 if cuts else 0
        piece = tokens[lo:k]
        if any(t.kind == "word" and t.text[:1].islower() and t.text not in lx.PARTICLES for t in piece):
            continue
        if len(piece) == 1 and not (len(cuts) == 1 and lo == 2 or piece[0].text.lower() in lx.GIVEN_NAMES):
            continue
        if any(tokens[x].text in ("and", "&") for x in range(k + 1, end + 1)) and not any(
                tokens[x].text == ":" for x in range(k + 1, end + 1)):
            continue   # more names joined by "and" after it: a period inside the list
        labels[k] = "O"
        for x in range(k + 1, end + 1):
            labels[x] = "title"
            marg[x] = min(marg[x], 0.7)
        x = end + 1
        while x < n and labels[x] == "O" and tokens[x].kind == "punct" and tokens[x].text not in ".;" and x - end < 3:
            x += 1
        if x < n and labels[x] == "title":
            for y in range(end + 1, x):
                labels[y] = "title"
        return 0.85 if role == "authors" else 0.8
    return 1.0


def repair_serial_comma(tokens: list[Token], labels: list[str]) -> None:
    """A title that lists things (``Knots, Folds, Plumes, and Braids``) is
    cut by the labeler at a comma; a piece after the title's comma that
    begins with "and" or holds the list's ", and" belongs to the title --
    no venue, series or publisher reads ``..., and ...``."""
    n = len(labels)
    try:
        f = labels.index("title")
    except ValueError:
        return
    e = _run_end(labels, f)
    if e + 2 >= n or tokens[e + 1].text != "," or labels[e + 1] != "O":
        return
    x = e + 2
    stop = x
    while stop < n and labels[stop] in ("O", "container_title", "edition", "series", "publisher") \
            and tokens[stop].text not in ".;()" and tokens[stop].kind not in ("num",) and tokens[stop].ident is None:
        stop += 1
    seg = range(x, stop)
    if not seg:
        return
    serial = tokens[x].text in ("and", "&") or any(
        tokens[k].text in ("and", "&") and tokens[k - 1].text == "," for k in range(x + 1, stop))
    if not serial or stop >= n or tokens[stop].text != "." or not any(tokens[k].text == "," for k in range(f, e)) \
            and tokens[x].text not in ("and", "&"):
        return
    if any(labels[k] == "publisher" for k in seg) and not all(labels[k] in ("publisher", "O") for k in seg):
        return
    if all(labels[k] == "publisher" for k in seg if tokens[k].kind == "word"):
        return   # "Title, Chapman and Hall": the publisher's own "and"
    for k in range(e + 1, stop):
        labels[k] = "title"


_IN = frozenset(("In", "in", "In:", "in:"))
_ED_WORDS = frozenset(("editors", "editor", "eds", "Eds", "ed", "Ed", "Hrsg", "hrsg"))


def repair_in_book(tokens: list[Token], labels: list[str]) -> float:
    """The book a chapter is in, read as a series or as a second title:
    ``In A. Quill, editors, Ink Theory and Its Uses, pages 144-157`` (the
    run after "In" and the editors), ``Inkblots. Handbook of Plumes, pages
    319-472`` (a second title run right before the pages).  With no
    journal or book title labeled, that run is the container (returns a
    confidence factor: it may still be the book's series)."""
    n = len(labels)
    for s in range(2, n):
        lab = labels[s]
        if lab not in ("series", "title") or labels[s - 1] == lab:
            continue
        e = _run_end(labels, s)
        if lab == "series":
            # after "In" (and the editors with their role word)
            p = s - 1
            while p >= 0 and tokens[p].text in ",:." and labels[p] == "O":
                p -= 1
            if p < 0 or not (tokens[p].text in _IN or tokens[p].text in _ED_WORDS and labels[p] == "O"):
                continue
            q = p - 1 if p > 0 and tokens[p - 1].text != "." else p - 2
            if tokens[p].text in _IN and q >= 0 and tokens[q].kind == "num" or "pages" not in labels:
                continue   # "Number 1 in Series", "vol. 100. in Series": the book's own series
            if e + 1 < n and tokens[e + 1].text == "of":
                continue
        else:
            # a second title run followed by the pages
            if "title" not in labels[:s] or tokens[s - 1].text != "." or labels[s - 1] != "O":
                continue
            x = e + 1
            while x < n and labels[x] == "O" and (tokens[x].kind == "punct" or tokens[x].text in ("pages", "page", "pp", "p")):
                x += 1
            if x >= n or labels[x] != "pages":
                continue
        for k in range(s, e + 1):
            labels[k] = "container_title"
        return 0.9
    return 1.0


def _acronym_year(tokens: list[Token], lo: int, hi: int) -> bool:
    piece = tokens[lo:hi + 1]
    return (len(piece) == 2 and piece[0].kind == "word" and piece[0].text.isupper() and 2 <= len(piece[0].text) <= 8
            and piece[1].kind == "num" and len(piece[1].text) == 4)


def repair_meeting_short_name(tokens: list[Token], labels: list[str]) -> None:
    """``In Proceedings of the 10th Quill Conference on Inks, QCI 2021,
    pages ...``: the meeting's short name and year printed after the
    proceedings title (BibTeX styles print the series there) are not part
    of the title; they go to the series when there is none."""
    n = len(labels)
    s0 = labels.index("container_title")
    e = _run_end(labels, s0)
    if e - s0 < 4 or tokens[e - 2].text != "," or not _acronym_year(tokens, e - 1, e):
        return
    if any(tokens[k].text == "," for k in range(s0, e - 2)):
        return   # "..., QCI 2019, June 3-7, 2019, Ghent": the acronym sits inside a long title
    labels[e - 2] = "O"
    tag = "series" if "series" not in labels else "O"
    labels[e - 1] = labels[e] = tag


def repair_title_ate_publisher(tokens: list[Token], labels: list[str]) -> None:
    """A book imprint ``Title. Vol. 2. Quill House, Colchester, 2010``
    whose unknown publisher name the labeler read into the title: the
    title's last piece, a few capitalised words after a sentence end (or
    after a comma, when a labeled place follows), standing right before
    ", Place, Year", is the publisher."""
    n = len(labels)
    f = labels.index("title")
    e = _run_end(labels, f)
    if e + 3 >= n or tokens[e + 1].text != "," or labels[e + 1] != "O":
        return
    # ", Place" then ", Year" / "." / end
    p = e + 2
    q = p
    while q < n and q - p < 3 and tokens[q].kind == "word" and tokens[q].text[:1].isupper() \
            and labels[q] in ("place", "O", "publisher"):
        q += 1
    if q == p or q < n and not (tokens[q].text == "." or tokens[q].text == "," and q + 1 < n
                                and labels[q + 1] == "date"):
        return
    placed = all(labels[k] == "place" or tokens[k].text.lower() in lx.PLACES for k in range(p, q))
    # the title's last piece
    k = e
    while k > f and (tokens[k].kind == "word" and (tokens[k].text[:1].isupper() or tokens[k].text in _GLUE)
                     or tokens[k].text in ("&", "-")):
        k -= 1
    if k == e or k <= f or tokens[k].text not in ".,":
        return
    if tokens[k].text == "," and not (placed and tokens[k - 1].kind == "num"):
        return   # "Groups, Rings and Fields, Berlin": a list inside the title
    if tokens[k].text == "." and tokens[k - 1].kind == "word" and (
            len(tokens[k - 1].text) <= 4 or tokens[k - 1].text.lower() + "." in lx.JOURNAL_WORDS):
        return   # an abbreviation's period, not a sentence end
    piece = range(k + 1, e + 1)
    if len(piece) > 5 or tokens[k + 1].text in _GLUE or any(tokens[x].text in _ORDINALS for x in piece):
        return
    labels[k] = "O"
    for x in piece:
        labels[x] = "publisher"
    for x in range(p, q):
        labels[x] = "place"


def repair_family_in_title(tokens: list[Token], labels: list[str]) -> None:
    """The last author's family name read as the title's first word (``Ada
    B. | Featherstone. Inkblots``, ``Th. | Quillby. The ink``): a title
    never starts right after a given name with no separator, and a lone
    word closed by a period before the real title is the family name."""
    n = len(labels)
    f = labels.index("title")
    if f < 1 or f + 2 >= n or labels[f + 1] != "title" or labels[f + 2] != "title":
        return
    t, dot, nxt = tokens[f], tokens[f + 1], tokens[f + 2]
    if t.kind != "word" or not t.text[:1].isupper() or dot.text != "." or not nxt.text[:1].isupper():
        return
    prev = tokens[f - 1]
    glued = labels[f - 1] == "authors" and prev.kind in ("word", "initial") and prev.text not in ("and", "&")
    short = (labels[f - 1] == "O" and prev.text == "." and f >= 2 and labels[f - 2] == "authors"
             and tokens[f - 2].kind == "word" and len(tokens[f - 2].text) <= 2 and tokens[f - 2].text[:1].isupper())
    if not (glued or short):
        return
    if glued and prev.kind == "initial" and any(tokens[x].text == "," and tokens[x + 1].kind == "initial"
                                                for x in range(0, f - 1)):
        return   # "Quillby, R. Inkblots.": an inverted name ends with its initials
    if short:
        labels[f - 1] = "authors"
    labels[f] = "authors"
    labels[f + 1] = "O"


def repair_dash_note(tokens: list[Token], labels: list[str]) -> None:
    """A remark set off from the title by a spaced dash and shaped "label:
    value" (``Title — format: book, Publisher``, common in reading lists):
    the title ends at the dash, the remark is the note.  Unlabeled words
    between the title run and the dash, with no separator, are the
    title's."""
    n = len(labels)
    d = next((k for k in range(1, n - 2) if tokens[k].text in ("—", "–") and tokens[k].start > tokens[k - 1].end
              and tokens[k + 1].start > tokens[k].end), -1)
    if d < 0 or not (tokens[d + 1].kind == "word" and tokens[d + 2].text == ":"
                     or d + 3 < n and tokens[d + 2].kind == "word" and tokens[d + 3].text == ":"):
        return
    try:
        f = labels.index("title")
    except ValueError:
        return
    if f > d:
        return
    e = _run_end(labels, f)
    if e < d:
        if any(labels[k] != "O" or tokens[k].text in ".,;:" for k in range(e + 1, d)):
            return
        for k in range(e + 1, d):
            labels[k] = "title"
    labels[d] = "O"
    k = d + 1
    while k < n and tokens[k].text not in ",;" and labels[k] in ("title", "O", "note"):
        labels[k] = "note"
        k += 1


_GAP_OK = frozenset(("O", "container_title", "authors", "edition"))


def repair_split_title(tokens: list[Token], labels: list[str]) -> None:
    """One title cut into pieces inside its sentence (``Le théorème de
    Plume, | d'adjonction des encres``, ``Room, I: | Real Inks | : Pages
    from | Year Three``): when a later title run starts before the sentence
    ends, what lies between -- unlabeled words, commas, colons, a stray
    "journal" -- is the title too."""
    n = len(labels)
    f = labels.index("title")
    e = _run_end(labels, f)
    try:
        labels.index("title", e + 1, e + 13)   # a later title run near enough: found in C
    except ValueError:
        return
    x = e + 1
    while x < n and labels[x] in _GAP_OK and tokens[x].text not in ".;()[]" and tokens[x].ident is None \
            and x - e < 12:
        x += 1
    if x >= n or labels[x] != "title" or x == e + 1:
        return
    gap = range(e + 1, x)
    if all(tokens[k].text == "," for k in gap) and tokens[x].text[:1].isupper():
        return   # "Title, Capitalised Words, Publisher": a series may sit there
    if any(labels[k] == "authors" and tokens[k].kind == "word" and tokens[k].text[:1].isupper() for k in gap):
        return   # a real name list between two titles: leave it
    for k in gap:
        labels[k] = "title"


def repair_lowercase_names(tokens: list[Token], labels: list[str]) -> None:
    """A name run right after the title whose words are all lower case
    (``The generalized plume-ink-quill lemma``, a hyphenated title read
    as names) is the rest of the title: names are capitalised."""
    n = len(labels)
    f = labels.index("title")
    e = _run_end(labels, f)
    s = e + 1
    if s >= n or labels[s] != "authors" or tokens[s].start != tokens[e].end and tokens[s].kind != "word":
        return
    z = _run_end(labels, s)
    words = [t for t in tokens[s:z + 1] if t.kind in ("word", "initial")]
    if not words or any(t.text[:1].isupper() or t.kind == "initial" for t in words):
        return
    for k in range(s, z + 1):
        labels[k] = "title"


def repair_series_head(tokens: list[Token], labels: list[str]) -> None:
    """The first words of a series name read into the title before it
    (``Analysis in inkwells. A Series | of Modern Surveys in Quills``):
    the title's last sentence, when it holds a series word and runs
    straight into the series run (at most a glue word between), is the
    series'."""
    n = len(labels)
    f = labels.index("title")
    e = _run_end(labels, f)
    x = e + 1
    while x < n and labels[x] == "O" and tokens[x].text in _GLUE and x - e <= 2:
        x += 1
    if x >= n or labels[x] != "series":
        return
    k = e
    while k > f and tokens[k].text not in ".,":
        k -= 1
    if k <= f + 1 or k == e:
        return
    piece = tokens[k + 1:e + 1]
    if len(piece) > 4 or not any(t.text.lower() in lx.SERIES_WORDS for t in piece) \
            or not all(t.kind == "word" and (t.text[:1].isupper() or t.text in _GLUE) for t in piece):
        return
    labels[k] = "O"
    for y in range(k + 1, x):
        labels[y] = "series"


def _pieces(tokens: list[Token], lo: int, hi: int, seps: str = ",") -> list[tuple[int, int]]:
    out, a = [], lo
    for k in range(lo, hi + 1):
        if tokens[k].text in seps:
            if k > a:
                out.append((a, k - 1))
            a = k + 1
    if a <= hi:
        out.append((a, hi))
    return out


def _all_places(tokens: list[Token], a: int, b: int) -> bool:
    words = [t for t in tokens[a:b + 1] if t.kind in ("word", "initial")]
    return bool(words) and all(t.text.lower() in lx.PLACES or t.text.lower() in _REGIONS
                               or t.kind == "initial" for t in words)


def _label_imprint(tokens: list[Token], labels: list[str], lo: int, hi: int) -> bool:
    """Label tokens[lo:hi+1] as an imprint: ``Publisher, City, Country`` or
    ``City, Country: Publisher``.  The piece right before a country may be
    a city the place list does not know."""
    colon = next((k for k in range(lo, hi + 1) if tokens[k].text == ":"), -1)
    if colon > lo:
        places = _pieces(tokens, lo, colon - 1)
        if not places or not _all_places(tokens, *places[-1]) and len(places) < 2:
            return False
        if not _all_places(tokens, *places[-1]):
            return False
        for k in range(lo, colon):
            labels[k] = "place"
        labels[colon] = "O"
        for k in range(colon + 1, hi + 1):
            labels[k] = "publisher"
        return True
    pieces = _pieces(tokens, lo, hi)
    if len(pieces) < 2 or not _all_places(tokens, *pieces[-1]):
        return False
    first_place = len(pieces) - 1
    while first_place > 1 and _all_places(tokens, *pieces[first_place - 1]):
        first_place -= 1
    a, b = pieces[first_place - 1]
    if b - a == 0 and tokens[a].kind == "word" and tokens[a].text[:1].isupper():
        # "Dagstuhl, Germany": a city before a country
        if first_place == 1:
            for k in range(lo, hi + 1):
                labels[k] = "place"
            return True
        first_place -= 1
    if first_place < 1 or not tokens[pieces[0][0]].text[:1].isupper():
        return False
    pub_end = pieces[first_place - 1][1]
    for k in range(lo, pub_end + 1):
        labels[k] = "publisher"
    labels[pub_end + 1] = "O"
    for k in range(pub_end + 2, hi + 1):
        labels[k] = "place"
    return True


def repair_container_imprint_place(tokens: list[Token], labels: list[str]) -> None:
    """Proceedings imprints read as part of the book title or as a second
    "journal" (``In Proc. Quill Meeting (QM 2019). Quill House – Centre for
    Inks, Dagstuhl, Germany, pp. 1-9``; ``..., vol. 141 of Quill Series.
    Dagstuhl, Germany: Quill House, 2019``): after the title's sentence
    end, or as a later container run, a piece list ending in a place (or
    country) is the publisher and its place."""
    n = len(labels)
    s0 = labels.index("container_title")
    e = _run_end(labels, s0)
    nxt = next((k for k in range(e + 1, n) if labels[k] == "container_title"), -1)
    if nxt > 0 and "publisher" not in labels:
        z = _run_end(labels, nxt)
        if any(labels[k] in ("series", "series_number", "volume", "editors") for k in range(e + 1, nxt)):
            if not _label_imprint(tokens, labels, nxt, z) and labels[nxt - 2] == "pages" \
                    and tokens[nxt - 1].text == "." and (z + 1 >= n or tokens[z + 1].text in ",." and (
                        z + 2 >= n or labels[z + 2] == "date" or tokens[z + 1].text == ".")):
                # "..., pages 1-9. Quill House, 2019.": the imprint after the pages
                for k in range(nxt, z + 1):
                    labels[k] = "publisher"
        return
    if "publisher" in labels:
        return
    for k in range(e - 1, s0 + 1, -1):
        if tokens[k].text == "." and tokens[k - 1].text in (")",) or tokens[k].text == "." \
                and tokens[k - 1].kind == "word" and len(tokens[k - 1].text) >= 4 \
                and tokens[k - 1].text.lower() + "." not in lx.JOURNAL_WORDS and tokens[k + 1].text[:1].isupper():
            if _label_imprint(tokens, labels, k + 1, e):
                labels[k] = "O"
            return


def repair_trailing_publisher(tokens: list[Token], labels: list[str]) -> None:
    """BibTeX's paper-in-proceedings layout ends with the publisher as a
    sentence of its own after the year (``In Proc. Quill Meeting, pages
    1-9, Ghent, 2019. Quill House - Centre for Inks.``): a last sentence of
    capitalised words after the date, in a record with a container and
    pages but no publisher, is the publisher."""
    n = len(labels)
    end = n - 1
    while end > 0 and tokens[end].kind == "punct" and tokens[end].text in ".":
        end -= 1
    k = end
    while k > 0 and labels[k] in ("O", "note") and (
            tokens[k].kind == "word" and (tokens[k].text[:1].isupper() or tokens[k].text in _GLUE)
            or tokens[k].kind == "dash"):
        k -= 1
    if k == end or tokens[k].text != "." or labels[k - 1] not in ("date", "pages"):
        return
    words = [t for t in tokens[k + 1:end + 1] if t.kind == "word"]
    if len(words) < 2 or tokens[k + 1].kind != "word" or words[0].text.lower() in lx.CONNECTORS:
        return
    for x in range(k + 1, end + 1):
        labels[x] = "publisher"


def repair_journal_series_mark(tokens: list[Token], labels: list[str]) -> None:
    """``Ann. Quill Math. (2), 96:98-173``: a bracketed number right after
    the journal name and before the volume is the journal's series (part
    of its name, as in "Ann. of Math. (2)"), not an issue -- an issue
    follows the volume."""
    n = len(labels)
    s0 = labels.index("container_title")
    e = _run_end(labels, s0)
    if e + 4 >= n or tokens[e + 1].text != "(" or tokens[e + 3].text != ")" or labels[e + 2] not in ("issue", "O"):
        return
    mark = tokens[e + 2]
    if not (mark.kind == "num" and len(mark.text) == 1 or mark.text in ("I", "II", "III", "IV")):
        return
    after = e + 4
    if tokens[after].text == ",":
        after += 1
    if after >= n or labels[after] != "volume":
        return
    for k in range(e + 1, e + 4):
        labels[k] = "container_title"


def repair_volume_extras(tokens: list[Token], labels: list[str]) -> None:
    """What follows a volume number in ``58(III):81-106`` and ``144:1,``:
    a bracketed roman or number is the issue; a lone number after the
    volume's colon, with no pages anywhere, is the page (an article
    number)."""
    n = len(labels)
    v = labels.index("volume")
    while v + 1 < n and labels[v + 1] == "volume":
        v += 1
    if v + 3 < n and tokens[v + 1].text == "(" and tokens[v + 3].text == ")" and labels[v + 2] == "O" \
            and (tokens[v + 2].kind == "num" and not _YEARLIKE.fullmatch(tokens[v + 2].text)
                 or _ROMAN_WORD.fullmatch(tokens[v + 2].text)):   # "301 (2005)" is the year
        labels[v + 2] = "issue"
        return
    if "pages" not in labels and v + 2 < n and tokens[v + 1].text == ":" and tokens[v + 2].kind == "num" \
            and labels[v + 2] in ("O", "issue") and (v + 3 >= n or tokens[v + 3].text in ",.;"):
        labels[v + 2] = "pages"


def repair_colon_subtitle(tokens: list[Token], labels: list[str]) -> None:
    """``Title: Briefwechsel 1729–1764. Publisher``: unlabeled words after
    the title's colon, up to the sentence end, are its subtitle (a year
    range there is no page range when no journal or book holds it)."""
    n = len(labels)
    f = labels.index("title")
    e = _run_end(labels, f)
    if e + 2 >= n or tokens[e + 1].text != ":" or labels[e + 1] != "O" or tokens[e + 2].kind != "word":
        return
    ok = ("O", "pages") if "container_title" not in labels and "volume" not in labels else ("O",)
    x = e + 2
    while x < n and labels[x] in ok and tokens[x].text not in ".;,(" and tokens[x].ident is None:
        x += 1
    if x >= n or tokens[x].text != "." or x - e > 12:
        return
    for k in range(e + 1, x):
        labels[k] = "title"


def repair_publisher_head(tokens: list[Token], labels: list[str]) -> None:
    """The first words of a publisher name left unlabeled (``Walter de |
    Gruyter GmbH``, ``John | Wiley & Sons``): capitalised words and
    particles between a sentence end (or comma) and the publisher run are
    part of it."""
    p0 = labels.index("publisher")
    k = p0 - 1
    while k > 0 and labels[k] == "O" and tokens[k].kind == "word" and (
            tokens[k].text[:1].isupper() or tokens[k].text in lx.PARTICLES) and p0 - k <= 3:
        k -= 1
    if k == p0 - 1 or tokens[k].text not in ".,:;" or labels[k] != "O" or tokens[k + 1].text in lx.PARTICLES:
        return
    for x in range(k + 1, p0):
        labels[x] = "publisher"
