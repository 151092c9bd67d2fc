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
from itertools import compress

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
_COMPANY = frozenset(("Inc", "Ltd", "Co", "GmbH", "Corp", "LLC", "KG", "AG", "PLC", "plc", "Pty"))
# company suffixes typed with dots between letters ("S.A.", "B.V."), matched on
# the joined token texts; common practice in imprints
_DOTTED_COMPANY = frozenset(("s.a.", "b.v.", "n.v.", "a.g.", "s.p.a.", "s.l.", "s.r.l.", "a.s.", "k.k."))
# token texts of which one must be present for the imprint repairs to act
PLACE_GATE = frozenset(w2 for w in lx.PLACES | _REGIONS for w2 in (w.capitalize(), w.upper(), w.rstrip(".").capitalize(),
                                                                   w.rstrip(".").upper()))
IMPRINT_GATE = PLACE_GATE | _COMPANY
_ROMAN_WORD = re.compile(r"[IVXL]{1,6}")
_YEARLIKE = re.compile(r"1[5-9]\d\d|20\d\d")


def run_end(labels: list[str], i: int) -> int:
    """Last index of the run of equal labels that starts at ``i``.  A plain
    scan: runs are short, and it beats building a groupby (0.3 against 1.0
    µs on a 3-token run, 2.1 against 2.3 µs on a 40-token one)."""
    lab = labels[i]
    n = len(labels)
    j = i + 1
    while j < n and labels[j] == lab:
        j += 1
    return j - 1


def first_run(labels: list[str], label: str) -> tuple[int, int]:
    """First and last index of the first run of ``label``; (-1, -1) if none."""
    try:
        i = labels.index(label)
    except ValueError:
        return -1, -1
    return i, run_end(labels, i)


def label_after(tokens: list[Token], labels: list[str], last: int) -> int:
    """Index of what follows a run ending at ``last``: past at most two
    unlabeled punctuation tokens (``Title. | Journal``, ``Title," | Journal``)."""
    nxt = last + 1
    n = len(labels)
    while nxt < n and labels[nxt] == "O" and tokens[nxt].kind == "punct" and nxt - last < 3:
        nxt += 1
    return nxt


def company_start(tokens: list[Token], c: int, lo: int = 0) -> int:
    """Where a company suffix (``Inc.``, ``GmbH``, ``S.A.``, ``B.V.``)
    that ends tokens lo..c-1 starts, typed as one word after a space or
    comma; -1 if they end with none."""
    if c - 1 < lo:
        return -1
    t = tokens[c - 1]
    if t.text in _COMPANY:
        return c - 1
    if t.text == "." and c - 2 >= lo and tokens[c - 2].text in _COMPANY and tokens[c - 2].end == t.start:
        return c - 2
    if not t.text.endswith("."):
        return -1
    joined = ""
    for j in range(c - 1, max(lo, c - 7) - 1, -1):
        joined = tokens[j].text + joined
        if j < c - 1 and tokens[j].end != tokens[j + 1].start:
            return -1
        if joined.lower() in _DOTTED_COMPANY:
            return j if j == 0 or tokens[j].start > tokens[j - 1].end else -1
    return -1


def company_before(tokens: list[Token], c: int, lo: int = 0) -> bool:
    """Tokens lo..c-1 end with a company suffix (see :func:`company_start`)."""
    return company_start(tokens, c, lo) >= 0


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
        e = run_end(labels, i)
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
            if c > i + 1 and company_before(tokens, c, i + 1) and c + 1 <= e \
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
    i = run_end(labels, 0) + 1
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
    s0, e = first_run(labels, "container_title")
    if s0 < 0:
        return
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
    f, last = first_run(labels, "title")
    if f < 0:
        return 1.0
    nxt = label_after(tokens, labels, last)
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
    f, e = first_run(labels, "title")
    if f < 0:
        return
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
    e = run_end(labels, f)
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
    s0, e = first_run(labels, "container_title")
    if s0 < 0:
        return
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
    end = run_end(labels, 0)
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
    f, e = first_run(labels, "title")
    if f < 0:
        return
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
        e = run_end(labels, s)
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
    e = run_end(labels, s0)
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
    e = run_end(labels, f)
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
    e = run_end(labels, f)
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
    e = run_end(labels, f)
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
    e = run_end(labels, f)
    s = e + 1
    if s >= n or labels[s] != "authors" or tokens[s].start != tokens[e].end and tokens[s].kind != "word":
        return
    z = run_end(labels, s)
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
    e = run_end(labels, f)
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
    e = run_end(labels, s0)
    nxt = next((k for k in range(e + 1, n) if labels[k] == "container_title"), -1)
    if nxt > 0 and "publisher" not in labels:
        z = run_end(labels, nxt)
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
    e = run_end(labels, s0)
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
    e = run_end(labels, f)
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


# words that make a head of capitalised words an organisation's name
_ORG_WORDS = frozenset("society group committee project authors community team consortium collective institute "
                       "association council foundation office bureau collaboration academy union federation "
                       "agency board commission department laboratory".split())
_ORG_GATE = frozenset(w2 for w in _ORG_WORDS for w2 in (w, w.capitalize()))


def repair_corporate_author(tokens: list[Token], labels: list[str]) -> None:
    """A corporate author ends at its comma (``Quillfeather Society for
    Enumerative Mathematics, The QSEM catalogue of ..., Publisher``): when
    the author run holds an organisation's name (no initials, an
    organisation word) and runs on past a comma into a piece with none,
    that piece starts the title."""
    end = run_end(labels, 0)
    n = len(labels)
    cut = -1
    org = False
    for x in range(end + 1):
        t = tokens[x]
        if t.kind == "initial" or t.text in ("and", "&", ";"):
            return
        if t.text == ",":
            if not org:
                return
            cut = x
            org = False
        elif t.text in _ORG_GATE:
            org = True
    if cut < 0 or org or cut == end:
        return
    # the piece after the comma runs into the title (or is the whole
    # title, closed by a separator before the imprint)
    if not (end + 1 < n and (labels[end + 1] == "title" or tokens[end + 1].text in ",.:" and "title" not in labels)):
        return
    if not tokens[cut + 1].text[:1].isupper():
        return
    labels[cut] = "O"
    for x in range(cut + 1, end + 1):
        labels[x] = "title"


DEPARTMENT_GATE = frozenset(("Department", "Dept", "School", "Faculty", "Institute", "Laboratory", "Division",
                             "Centre", "Center"))


def repair_department_publisher(tokens: list[Token], labels: list[str]) -> None:
    """``Technical Report No. 5, Department of Mathematics, University of
    Leeds, 2007``: an unlabeled department piece right before the
    institution is part of the issuing body (the publisher of a report or
    thesis), not text to drop."""
    p = labels.index("publisher")
    if p < 3 or tokens[p - 1].text != "," or labels[p - 1] != "O" or labels[p - 2] != "O":
        return
    x = p - 2
    while x > 0 and labels[x - 1] == "O" and tokens[x - 1].text not in ",.;:" and p - x < 8:
        x -= 1
    if tokens[x].text not in DEPARTMENT_GATE or x == 0 or tokens[x - 1].text not in ",.":
        return
    for y in range(x, p):
        labels[y] = "publisher"


_NAME_LOWER_OK = frozenset(("and", "et", "al", "und", "y", "e")) | lx.PARTICLES


def repair_title_in_name_list(tokens: list[Token], labels: list[str], marg: list[float]) -> float:
    """``A. B. Featherstone, Quill sums, PLOS One 7 (2012)``, ``Quillson,
    T., Jr., Folded nibs, ...``: an author run that ran on past a comma
    into a piece with a lower-case word
    (no name has one, particles aside) -- that piece is the title, and a
    piece after it, right before the volume or year, is the journal."""
    end = run_end(labels, 0)
    n = len(labels)
    if end + 1 >= n:
        return 1.0
    commas = [x for x in range(1, end) if tokens[x].text == ","]
    for c in commas:
        first = tokens[c + 1]
        if first.kind != "word" or not first.text[:1].isupper() or first.text in ("and", "et") \
                or first.text in lx.SUFFIXES or first.text in ("Jr", "Sr"):
            continue
        stop = next((y for y in commas if y > c), end + 1)
        if not any(t.kind == "word" and t.text[:1].islower() and t.text not in _NAME_LOWER_OK
                   for t in tokens[c + 2:stop]) or any(t.text in _ORG_GATE for t in tokens[c + 1:stop]):
            continue    # ("Quillfeather Society, Working Group on Nibs": one body, two levels)
        labels[c] = "O"
        for x in range(c + 1, stop):
            labels[x] = "title"
        for x in range(c + 1, end + 1):
            marg[x] = min(marg[x], 0.7)   # the labeler was wrong here: doubt the fields
        if stop <= end:
            # the journal's words the labeler left unlabeled after the run
            # ("..., Mat. | Zametki 77", "..., J. Integer Seqs. | , Vol. 8")
            k = end + 1
            while k < n and k - end < 8 and labels[k] == "O" and (
                    tokens[k].text in ".," or tokens[k].text in VOLUME_WORDS
                    or tokens[k].kind == "word" and tokens[k].text[:1].isupper()):
                k += 1
            journal = k < n and labels[k] in ("volume", "date", "issue")
            rest = "container_title" if journal else "title"
            if journal:
                for x in range(end + 1, k):
                    if tokens[x].kind == "word" and tokens[x].text not in VOLUME_WORDS \
                            and all(tokens[y].text not in ",;" for y in range(end + 1, x)):
                        labels[x] = "container_title"
            if tokens[stop + 1].text.lower() in GENRE_HEADS and tokens[end + 1].text in ",.;(":
                rest = "genre"   # "Title, Dissertation, ETH Zürich": the kind of work, not more title
            labels[stop] = "title" if rest == "title" else "O"
            for x in range(stop + 1, end + 1):
                labels[x] = rest
        return 0.85
    return 1.0


# first words of a genre phrase ("PhD thesis", "lecture notes", "Technical report")
GENRE_HEADS = frozenset("dissertation thesis phd ph.d doctoral habilitation habilitationsschrift master master's "
                        "diploma diplomarbeit lecture course preprint report technical".split())


ARTICLE_WORDS = frozenset(("Art", "Article", "Paper", "art", "article", "paper"))
VOLUME_WORDS = frozenset(("Volume", "volume", "Vol", "vol", "Band", "Bd", "Tome", "tome"))
ISSUE_WORDS = frozenset(("Issue", "issue", "No", "no", "Number", "number", "Heft", "Nr", "nr"))
NUMBERING_GATE = VOLUME_WORDS | ISSUE_WORDS | ARTICLE_WORDS | frozenset(("#", ":"))


def _after_word(tokens: list[Token], i: int) -> int:
    """Index of the token after a keyword and its period."""
    return i + 2 if i + 1 < len(tokens) and tokens[i + 1].text == "." else i + 1


def repair_journal_numbering(tokens: list[Token], labels: list[str]) -> None:
    """A journal's numbers read as the wrong field:
    - ``Volume 301`` labeled a series number (no series in sight) is the volume;
    - ``Issue 3-4`` or ``no. 3`` labeled pages, with the real pages later, is the issue;
    - ``301:3 (2005) 1-20``: the number between the volume's colon and the
      year's bracket is the issue;
    - ``#P23``, ``#R12`` after the volume (no pages found) is an article
      number, the pages."""
    n = len(tokens)
    if "series" not in labels and "series_number" in labels and "volume" not in labels \
            and "publisher" not in labels:   # (a book's series number stays)
        for i in range(n - 1):
            if tokens[i].text in VOLUME_WORDS:
                j = _after_word(tokens, i)
                if j < n and labels[j] == "series_number":
                    while j < n and labels[j] == "series_number":
                        labels[j] = "volume"
                        j += 1
                    break
    if "issue" not in labels and labels.count("pages") > 1:
        for i in range(1, n - 1):
            if tokens[i].text in ISSUE_WORDS and labels[i] == "O":
                j = _after_word(tokens, i)
                if j < n and labels[j] == "pages" and tokens[j].kind == "num" and "pages" in labels[run_end(labels, j) + 1:]:
                    while j < n and labels[j] == "pages":
                        labels[j] = "issue"
                        j += 1
                    break
    if "issue" not in labels and "volume" in labels:
        k = labels.index("volume")
        k = run_end(labels, k)
        if k + 4 < n and tokens[k + 1].text == ":" and tokens[k + 2].kind == "num" and tokens[k + 3].text == "(" \
                and labels[k + 4] == "date" and labels[k + 2] in ("pages", "O") \
                and "pages" in labels[k + 4:]:
            labels[k + 2] = "issue"
    if "pages" not in labels:
        # "Art. B50a", "Paper A12": an article number glued from letters and
        # digits after its keyword, read as a note or nothing
        for i in range(1, n - 1):
            if tokens[i].text in ARTICLE_WORDS and labels[i] == "O":
                j = _after_word(tokens, i)
                k = j
                while k + 1 < n and tokens[k + 1].start == tokens[k].end and tokens[k + 1].kind in ("num", "word"):
                    k += 1
                if j < n and labels[j] in ("O", "note") and any(t.kind == "num" for t in tokens[j:k + 1]) \
                        and (k + 1 >= n or tokens[k + 1].text in ".,;"):
                    for x in range(j, k + 1):
                        labels[x] = "pages"
                break
    if "pages" not in labels and "#" in (t.text for t in tokens):
        for i in range(1, n - 1):
            if tokens[i].text == "#" and labels[i - 1] in ("O", "volume", "issue") and i >= 2 \
                    and any(lab in ("volume", "date") for lab in labels[max(0, i - 6):i]):
                j = i + 1
                if tokens[j].kind == "word" and len(tokens[j].text) == 1 and tokens[j].text.isupper() \
                        and j + 1 < n and tokens[j + 1].kind == "num" and tokens[j].end == tokens[j + 1].start:
                    j += 1
                if tokens[j].kind == "num" and labels[j] in ("O", "issue") and (
                        j + 1 >= n or tokens[j + 1].text in ".,;"):
                    for x in range(i + 1, j + 1):
                        labels[x] = "pages"
                break


_RANGE_LABELS = frozenset(("issue", "O", "note"))


def repair_issue_as_pages(tokens: list[Token], labels: list[str]) -> None:
    """A range right after the year's bracket, labeled issue or nothing,
    in an article with no pages (``301 (2005), 1-20; erratum ...``,
    ``196 (2005), 1-20; English transl., ...``) is the pages."""
    n = len(tokens)
    d = labels.index("date")
    e = run_end(labels, d)
    i = e + 3
    if i + 2 >= n or tokens[e + 1].text != ")" or tokens[e + 2].text != ",":
        return
    a, dash, b = tokens[i], tokens[i + 1], tokens[i + 2]
    if not (a.text.isdigit() and b.text.isdigit() and dash.kind == "dash" and int(b.text) > int(a.text)):
        return
    if any(lab not in _RANGE_LABELS for lab in labels[i:i + 3]) or i + 3 < n and tokens[i + 3].text not in ".;,":
        return
    labels[i] = labels[i + 1] = labels[i + 2] = "pages"


def repair_vancouver_journal(tokens: list[Token], labels: list[str]) -> None:
    """Vancouver layout with the journal left unlabeled (``Title. PLoS
    One. 2012;7(4):e1234``): the capitalised words between the title's
    closing period and a year followed by ``;volume`` are the journal."""
    n = len(labels)
    d = labels.index("date")
    e = run_end(labels, d)
    if e + 2 >= n or tokens[e + 1].text != ";" or labels[e + 2] != "volume":
        return
    s = d - 1
    if s > 0 and tokens[s].text == ".":
        s -= 1
    k = s
    while k > 0 and labels[k] == "O" and (tokens[k].kind == "word" and (tokens[k].text[:1].isupper() or
                                                                        tokens[k].text in _GLUE)
                                          or tokens[k].text == "." and tokens[k - 1].kind == "word"
                                          and len(tokens[k - 1].text) <= 6):
        k -= 1
    # k is now the title's closing period (or the title's last word, its period taken for an abbreviation's)
    if labels[k] == "title" and tokens[k + 1].text in ".?!":
        k += 1
    if k >= s or not (tokens[k].text in ".?!" and labels[k - 1] == "title"):
        return
    if tokens[k + 1].kind != "word" or not tokens[k + 1].text[:1].isupper():
        return
    for x in range(k + 1, s + 1):
        labels[x] = "container_title"


def repair_abbreviation_into_title(tokens: list[Token], labels: list[str]) -> None:
    """``On quill partitions, Disc. Math. 301``, ``Quill sums. Europ. J.
    Combin.``: the title run took the journal's first abbreviated word.
    A title run ending in a separator, one short capitalised word and its
    period, right before an abbreviated journal run, gives that word back."""
    c = labels.index("container_title")
    if c < 4 or labels[c - 1] not in ("O", "title") or tokens[c - 1].text != "." \
            or labels[c - 2] != "title":
        return
    w = tokens[c - 2]
    if w.kind != "word" or not (2 <= len(w.text) <= 6) or not w.text[:1].isupper() or w.text[1:].isupper() \
            or _ROMAN_WORD.fullmatch(w.text) or tokens[c - 3].text not in ",." or labels[c - 4] != "title":
        return
    e = run_end(labels, c)
    if not (c + 1 <= e and tokens[c + 1].text == "." or tokens[c].kind == "initial"):
        return      # the journal run must itself start abbreviated ("Math.", "J.")
    labels[c - 3] = "O"
    labels[c - 2] = labels[c - 1] = "container_title"


def _full_name_at(tokens: list[Token], k: int) -> bool:
    """Tokens from k are a name typed initials first (``E. Vellum``,
    ``E. F. van Vellum``): one or more initials, then a capitalised word."""
    n = len(tokens)
    j = k
    while j < n and tokens[j].kind == "initial":
        j += 1
    while j < n and tokens[j].kind == "word" and tokens[j].text in lx.PARTICLES:
        j += 1
    return j > k and j < n and tokens[j].kind == "word" and tokens[j].text[:1].isupper() \
        and tokens[j].text not in _ED_WORDS


def repair_book_in_editors(tokens: list[Token], labels: list[str]) -> None:
    """``in Handbook of Quills, C. D. Inkwell, ed., CRC Press``: an editor
    run right after "in" whose first comma piece is no name (a lower-case
    word, no initial) -- that piece is the book's title, the container."""
    e0 = labels.index("editors")
    if e0 < 2 or tokens[e0 - 1].text not in ("in", "In", ":") or tokens[e0 - 1].text == ":" \
            and tokens[e0 - 2].text not in ("in", "In"):
        return
    end = run_end(labels, e0)
    stop = next((x for x in range(e0, end + 1) if tokens[x].text == ","), -1)
    if stop < 0 or stop == end:
        # "in: Handbook of Quills, Eds. C. D. Inkwell and ...": the book's
        # title is a run of its own, the names follow after a role word
        if "editors" not in labels[end + 1:end + 5]:
            return
        stop, rest = end + 1, range(end + 1, min(len(labels), end + 12))
    else:
        rest = range(stop + 1, end + 1)
    seg = tokens[e0:stop]
    if any(t.kind == "initial" for t in seg):
        return
    if not any(t.kind == "word" and t.text[:1].islower() and t.text not in _NAME_LOWER_OK for t in seg) \
            and not (seg and seg[0].text.lower() not in lx.GIVEN_NAMES and _full_name_at(tokens, stop + 1)):
        # "in: Nib Studies, E. Vellum (ed.)": no lower-case word, but the next
        # piece is a whole name with its initials first -- in such a list a
        # piece without initials is no name ("Vellum, E." would have only
        # initials after the comma)
        return
    if not any(tokens[x].kind == "initial" and labels[x] == "editors" for x in rest):
        return      # the rest must still be names
    for x in range(e0, stop):
        labels[x] = "container_title"
    if labels[stop] == "editors":
        labels[stop] = "O"


# status phrases that name the venue to come; the phrase itself is no field
# (the record's kind and literal date carry it)
_STATUS_HEADS = {("submitted", "to"), ("submitted", "for"), ("forthcoming", "in"), ("accepted", "in"),
                 ("accepted", "for"), ("accepted", "by"), ("appear", "in")}
_STATUS_ONLY = {("in", "preparation"), ("in", "press")}
STATUS_GATE = frozenset(("submitted", "forthcoming", "accepted", "appear", "preparation", "press"))
_VENUE_OK = frozenset(("O", "series", "title", "authors", "publisher", "container_title", "note"))


def repair_status_venue(tokens: list[Token], labels: list[str]) -> None:
    """``Title, submitted to J. Combin. Theory Ser. A, 2012``, ``forthcoming
    in Discrete Math.``, ``Title, in preparation``: the venue after a
    status phrase is the journal it goes to; a bare status ("in
    preparation", "in press") ends the title and is the note."""
    n = len(tokens)
    for i in range(1, n - 1):
        pair = (tokens[i].text.lower(), tokens[i + 1].text.lower())
        if pair in _STATUS_ONLY and labels[i] in ("title", "O", "note"):
            if i >= 2 and labels[i - 1] == "title" and tokens[i - 1].text == ",":
                labels[i - 1] = "O"
            labels[i] = labels[i + 1] = "note"
            return
        if pair not in _STATUS_HEADS or labels[i - 1] not in _VENUE_OK:
            continue
        h = i - 1 if pair[0] == "appear" and tokens[i - 1].text.lower() == "to" else i
        j = i + 2
        if j < n and tokens[j].text == ":":
            j += 1
        if j >= n or not tokens[j].text[:1].isupper() or labels[j] not in _VENUE_OK:
            return
        k = j
        while k < n and labels[k] in _VENUE_OK and tokens[k].text not in ",;()" and not (
                tokens[k].text == "." and k + 1 < n and tokens[k + 1].text[:1].isupper()
                and tokens[k - 1].kind == "word" and len(tokens[k - 1].text) > 6):
            k += 1
        if h >= 1 and tokens[h - 1].text == "," and labels[h - 1] == "title":
            labels[h - 1] = "O"
        for x in range(h, j):
            labels[x] = "O"
        for x in range(j, k):
            labels[x] = "container_title"
        return


def repair_vancouver_single(tokens: list[Token], labels: list[str], marg: list[float]) -> float:
    """``Quöllmann K. Quill polynomials. J Comb Theory A. 2013``: one
    Vancouver name (family, then initials) and no separator before the
    title -- the author run ends at the initials when the words after them
    hold a lower-case word (no name does)."""
    end = run_end(labels, 0)
    n = len(labels)
    if end < 3 or end + 1 >= n or tokens[end + 1].text not in ".:":
        return 1.0
    k = 2 if tokens[2].text != "." else 3
    if not tokens[k].text[:1].isupper() or tokens[k].kind != "word" or any(
            tokens[x].text in (",", "and", "&", ";") for x in range(k, end + 1)):
        return 1.0
    if not any(t.kind == "word" and t.text[:1].islower() and t.text not in _NAME_LOWER_OK
               for t in tokens[k + 1:end + 1]):
        return 1.0
    if k == 3:
        labels[2] = "O"
    for x in range(k, end + 1):
        labels[x] = "title"
        marg[x] = min(marg[x], 0.7)
    return 0.85


def repair_series_letter(tokens: list[Token], labels: list[str]) -> None:
    """``J Comb Theory A. 2013``: a lone capital letter between the journal
    and the year, read into the date, is the journal's series letter."""
    c = labels.index("container_title")
    e = run_end(labels, c)
    if e + 2 < len(tokens) and labels[e + 1] == "date" and tokens[e + 1].kind == "initial" \
            and len(tokens[e + 1].text) == 2 and labels[e + 2] == "date" and tokens[e + 2].kind == "num":
        labels[e + 1] = "container_title"


_ROLE_WORDS = frozenset(("edited", "ed", "eds", "Ed", "Eds", "editor", "editors", "Editor", "Editors"))


def repair_title_before_editors(tokens: list[Token], labels: list[str]) -> None:
    """``Handbook of Quills, edited by C. D. Inkwell, CRC Press``: a record
    that opens with a book's title, read as its authors -- no initial, a
    lower-case word, and the editors' role right after its comma."""
    end = run_end(labels, 0)
    n = len(labels)
    if end + 3 >= n or tokens[end + 1].text != "," or tokens[end + 2].text not in _ROLE_WORDS \
            or "editors" not in labels[end + 2:end + 6]:
        return
    seg = tokens[:end + 1]
    if any(t.kind == "initial" or t.text in ("and", "&") for t in seg) or not any(
            t.kind == "word" and t.text[:1].islower() and t.text not in _NAME_LOWER_OK for t in seg):
        return
    for x in range(end + 1):
        labels[x] = "title"


def repair_event_bracket(tokens: list[Token], labels: list[str]) -> None:
    """``Proceedings of the ... Congress (Zürich, 1994), Birkhäuser, Basel,
    1995``: the bracket after a proceedings title holds the meeting's place
    and year; when the book's own imprint and year follow, the bracket is
    part of the proceedings title, and the year of the record is the
    book's."""
    c = labels.index("container_title")
    e = run_end(labels, c)
    n = len(labels)
    if e + 4 >= n or tokens[e + 1].text != "(":
        return
    k = e + 2
    while k < n and k - e < 12 and tokens[k].text != ")" and (labels[k] in ("place", "date")
                                                              or tokens[k].text == ","):
        k += 1
    if k >= n or tokens[k].text != ")" or "date" not in labels[e + 2:k]:
        return
    after = labels[k + 1:]
    if "publisher" not in after or "date" not in after:
        return
    for x in range(e + 1, k + 1):
        labels[x] = "container_title"


def repair_genre_institution(tokens: list[Token], labels: list[str]) -> None:
    """``Lecture notes, Quillfeather Summer School, 2009``: a genre run that
    ran past its comma into capitalised words -- with no publisher found,
    those words are the issuing body."""
    g = labels.index("genre")
    e = run_end(labels, g)
    c = next((x for x in range(g + 1, e) if tokens[x].text == ","), -1)
    if c < 0 or not tokens[c + 1].text[:1].isupper() or tokens[c + 1].kind != "word":
        return
    if any(t.text.lower() in GENRE_HEADS for t in tokens[c + 1:e + 1]):
        return      # "Technical report, Preprint": still the genre
    labels[c] = "O"
    for x in range(c + 1, e + 1):
        labels[x] = "publisher"


# Cities of mathematical meetings beyond the imprint places of the lexicon
# (which is a labeler feature: changing it would need a retrain).  Common practice.
MEETING_PLACES = frozenset("""beijing shanghai seoul hyderabad madras chennai kolkata calcutta rio janeiro
sao paulo são santiago buenos aires mexico lisbon porto granada seville sevilla valencia florence firenze
naples napoli pisa trieste turin torino munich münchen hamburg dresden bielefeld oberwolfach luminy marseille
lyon grenoble bordeaux nice strasbourg toulouse brussels leuven ghent antwerp utrecht leiden copenhagen
stockholm uppsala oslo helsinki reykjavik dublin edinburgh glasgow manchester warwick durham athens
istanbul ankara jerusalem haifa tel aviv cairo tehran sydney melbourne canberra auckland wellington
vancouver seattle montréal ottawa quebec atlanta austin houston dallas denver pittsburgh minneapolis
ann arbor madison urbana champaign ithaca kyiv kiev minsk novosibirsk st. petersburg leningrad sofia
bucharest belgrade zagreb ljubljana bratislava kraków krakow poznań wrocław taipei hong kong osaka
nagoya sendai hanoi bangkok kuala lumpur""".split())


def _meeting_place(t: Token) -> bool:
    return _place_word(t) or t.text.lower() in MEETING_PLACES


def repair_place_after_volume(tokens: list[Token], labels: list[str]) -> None:
    """``Proc. Int. Congress of Mathematicians, Vol. 2, Beijing, 2002``: a
    second journal/proceedings run after the volume that is only a known
    place is the meeting's place, not more of the title (the longer run
    would win and the place be lost)."""
    v = labels.index("volume")
    n = len(labels)
    x = v + 1
    while x < n and labels[x] != "container_title":
        if labels[x] not in ("O", "volume"):
            return
        x += 1
    if x >= n:
        return
    e = run_end(labels, x)
    words = [t for t in tokens[x:e + 1] if t.kind == "word"]
    if not words or not all(_meeting_place(t) for t in tokens[x:e + 1] if t.text != ","):
        return
    for y in range(x, e + 1):
        labels[y] = "O" if tokens[y].text == "," else "place"


GENRE_GATE = frozenset(("thesis", "Thesis", "dissertation", "Dissertation", "notes", "report", "Report", "preprint",
                        "Preprint", "Diplomarbeit", "Habilitationsschrift"))


def repair_unlabeled_genre(tokens: list[Token], labels: list[str]) -> None:
    """``Quill sums. PhD thesis. University of Leeds. 2004.``: a genre phrase
    standing alone between separators, left unlabeled, is the genre (it
    says which kind of work the record is, and would be lost)."""
    n = len(tokens)
    for i in range(1, n):
        if tokens[i].text not in GENRE_GATE or labels[i] != "O":
            continue
        a = i
        while a > 0 and labels[a - 1] == "O" and tokens[a - 1].kind in ("word", "initial") and i - a < 3:
            a -= 1
        b = i
        while b + 1 < n and labels[b + 1] == "O" and tokens[b + 1].kind == "word" and b - i < 2:
            b += 1
        if a == 0 or tokens[a - 1].text not in ",.;" or b + 1 < n and tokens[b + 1].text not in ",.;(":
            return
        if labels[a - 1] != "O" or not any(lab in ("title", "authors") for lab in labels[:a]):
            return
        for x in range(a, b + 1):
            labels[x] = "genre"
        return


def repair_abbreviated_publisher(tokens: list[Token], labels: list[str]) -> None:
    """``Master Thesis, Univ. Leeds 2005``: a publisher run cut at the period
    of its abbreviated word; the capitalised words glued after it, up to
    the year or a separator, belong to it."""
    p = labels.index("publisher")
    e = run_end(labels, p)
    n = len(tokens)
    if e + 2 >= n or tokens[e + 1].text != "." or labels[e + 1] != "O" or len(tokens[e].text) > 5:
        return
    k = e + 2
    while k < n and labels[k] == "O" and tokens[k].kind == "word" and tokens[k].text[:1].isupper() and k - e < 5:
        k += 1
    if k == e + 2 or k < n and not (labels[k] == "date" or tokens[k].text in ",.;"):
        return
    for x in range(e + 1, k):
        labels[x] = "publisher"


_PART_WORDS = frozenset(("Chapter", "chapter", "Ch", "ch", "Section", "Part", "Appendix"))


def repair_part_in_book(tokens: list[Token], labels: list[str]) -> None:
    """``Title, Chapter 3 in Handbook of Quills, CRC Press``, ``Title,
    pp. 1-30 in Handbook of Quills, ...``: "in" after a part of a book (a
    chapter number or the pages) introduces the book -- its words, up to
    the comma, are the container; the chapter number is the note."""
    n = len(tokens)
    for i in range(2, n - 1):
        if tokens[i].text not in ("in", "In") or not tokens[i + 1].text[:1].isupper():
            continue
        prev = i - 1
        part = None
        if tokens[prev].kind == "num":
            k = prev - 1 if tokens[prev - 1].text != "." else prev - 2
            if k >= 0 and tokens[k].text in _PART_WORDS:
                part = k
        if part is None and labels[prev] != "pages":
            continue
        if part is not None and (part == 0 or tokens[part - 1].text != ","):
            continue
        j = i + 1
        while j < n and tokens[j].text not in ",;(" and labels[j] in ("title", "O", "container_title") and j - i < 20:
            j += 1
        if j >= n or tokens[j].text not in ",;(" or j == i + 1:
            return
        if part is not None:
            labels[part - 1] = "O"
            for x in range(part, prev + 1):
                labels[x] = "note"
        labels[i] = "O"
        for x in range(i + 1, j):
            labels[x] = "container_title"
        return


_ACRONYM = re.compile(r"[A-Z][A-Z&]{1,6}\Z")
_TWO_CAPS = re.compile(r"[A-Z][A-Za-z&]{0,6}[A-Z]")
# the gate for the whole line: a word opening with two capitals close together
SERIES_ACRONYM_GATE = re.compile(r"(?<![A-Za-z])[A-Z][A-Za-z&]{0,6}[A-Z]")
_ACRONYM_NUM_KEYS = frozenset((",", ".", "vol", "Vol", "volume", "Volume", "no", "No", "Nr", "nr"))
_ACRONYM_AFTER = frozenset(",.;)")


def repair_series_acronym(tokens: list[Token], labels: list[str]) -> None:
    """``Title, LNM 1234, Springer, 1987`` (``GTM 52``, ``(LNCS 4567)``,
    ``Springer LNM 1234``): a book series cited by its acronym alone, the
    number right after it.  The labeler finds the number (as the series
    number, a volume, or even a year) but leaves the acronym unlabeled, and
    the series is lost.  In a record with a publisher, an unlabeled
    all-capitals word before a lone number is the series, kept as typed
    (``lexicon.SERIES_ACRONYMS`` lists the usual ones, which pass the
    stricter tests too: a known acronym may take over a journal-like
    volume).  Region codes, roman numerals and report numbers are left
    alone."""
    n = len(tokens)
    # candidates found in C: a capitalised word with a second capital ("LNM", "LIPIcs")
    for i in compress(range(n), map(_TWO_CAPS.match, [t.text for t in tokens])):
        t = tokens[i]
        if i == 0 or i == n - 1 or t.kind != "word":
            continue
        known = t.text in lx.SERIES_ACRONYMS
        if known and labels[i] in ("title", "container_title") and i + 2 < n and tokens[i - 1].text == "(" \
                and tokens[i + 1].kind == "num" and tokens[i + 2].text == ")" and labels[i - 1] == labels[i] \
                and (i + 3 == n or labels[i + 3] != labels[i]):
            # "Title (LNCS 4567), Springer": the bracket read as the end of the title
            labels[i - 1] = labels[i + 2] = "O"
            labels[i] = "series"
            labels[i + 1] = "series_number"
            return
        if labels[i] != "O":
            continue
        if not known and (not _ACRONYM.match(t.text) or _ROMAN_WORD.fullmatch(t.text)
                          or t.text.lower() in _REGIONS or t.text.lower() in lx.PLACES or "genre" in labels):
            continue
        if tokens[i - 1].text not in ",.;(:" and labels[i - 1] != "publisher":
            continue
        j = i + 1
        while j < n and j - i <= 3 and tokens[j].text in _ACRONYM_NUM_KEYS and labels[j] == "O":
            j += 1
        if j >= n or tokens[j].kind != "num" or not tokens[j].text.isdigit() or len(tokens[j].text) > 5:
            continue
        if j + 1 < n and tokens[j + 1].text not in _ACRONYM_AFTER:
            continue
        lab = labels[j]
        if _YEARLIKE.fullmatch(tokens[j].text) and not (known and lab in ("series_number", "volume")):
            continue    # "AMS 1998", "ICALP 2005": a publisher or a meeting and its year
        if lab == "date":
            pass
        elif lab == "volume":
            if not known and "container_title" in labels:
                continue    # "JCTA 12": a journal's volume
        elif lab not in ("series_number", "O"):
            continue
        labels[i] = "series"
        labels[j] = "series_number"
        return


# Words that make a comma piece of an imprint an organisation, not a place
# (common practice in imprints: "Quill Press, Quillfeather Society, 1990").
_NOT_PLACE = (lx.PUBLISHER_WORDS - lx.PLACES) | lx.SERIES_WORDS | lx.GENRE_WORDS | frozenset("""
university univ univ. universität universite université università universidad department dept dept.
school college centre center laboratory laboratories lab foundation group books editions éditions
edizioni verlag media house sons brothers bros company corporation corp corp. limited inc llc gmbh press
publishers publisher publishing publications printing printers office bureau academy akademie academia
council committee club institut instituto institute research conference proceedings symposium workshop
meeting congress journal series volume vol edition edn ed eds editor editors lectures lecture library
classics paperbacks textbooks handbook reports papers memoirs annals transactions bulletin letters review
magazine quarterly news chapter part
""".split())
_KNOWN_PUBLISHERS = frozenset(p.lower() for p, _ in lx.PUBLISHERS)
_PLACE_GLUE = frozenset(("upon", "on", "am", "an", "der", "de", "sur", "en", "im", "del", "la", "le", "les", "di"))
# a publisher named with one of these is a publisher beyond doubt
_PUBLISHER_HEAD = frozenset("""press verlag publishers publishing publications books university univ. society
soc. institute inc. inc ltd. ltd co. gmbh company""".split())
# what the labeler may have made of an unknown place
_PLACE_FROM = frozenset(("O", "container_title", "series", "note", "title", "publisher"))


def _place_like(tokens: list[Token], a: int, b: int) -> bool:
    """Tokens a..b could be a place name: one to five capitalised words
    (with "upon", "am", "-" between them), no organisation word, no known
    publisher's name."""
    if b < a or b - a > 5:
        return False
    words = []
    for k in range(a, b + 1):
        t = tokens[k]
        if t.kind == "word" and t.text[:1].isupper() and t.text.replace("-", "").replace("'", "").isalpha():
            words.append(t.text)
        elif k > a and (t.kind == "dash" and t.text == "-" or t.kind == "word" and t.text in _PLACE_GLUE):
            continue
        else:
            return False
    if not words or any(w.lower() in _NOT_PLACE or w.lower().rstrip(".") in _NOT_PLACE for w in words):
        return False
    if all(w.isupper() or w.lower() in _REGIONS for w in words):
        return False   # "Springer New York, NY": a region code qualifies the imprint (repair_publisher_place)
    typed = "".join((" " if k > a and tokens[k].start > tokens[k - 1].end else "") + tokens[k].text
                    for k in range(a, b + 1)).lower()
    # "North-Holland" is a publisher's name, as typed
    return typed not in _KNOWN_PUBLISHERS and not any(w in _NOT_PLACE for w in typed.split())


def _date_next(tokens: list[Token], labels: list[str], b: int) -> bool:
    """The year follows token b, past a separator (", 1996", " (1996)")."""
    n = len(labels)
    k = b + 1
    while k < n and labels[k] == "O" and tokens[k].text in ",.;:(" and k - b <= 2:
        k += 1
    return k < n and k > b + 1 and labels[k] == "date"


def repair_place_before_year(tokens: list[Token], labels: list[str]) -> None:
    """``Quill Press, Ink Harbour, 1996``: a capitalised run between the
    publisher and the year is the imprint's place, known place name or not
    (the imprint repairs above only know the lexicon's places).  The
    labeler reads an unknown place as a second journal or title run, or
    into the publisher after a comma; either way it was lost or glued.
    Only when the record has no place after its publisher yet; a meeting's
    place inside a proceedings title "(Dovecote, 1995)" is not touched
    (it is no run of its own after the publisher)."""
    n = len(labels)
    i = n - 1
    while i >= 0 and labels[i] != "publisher":
        i -= 1
    if i < 0:
        return
    e = i
    while i > 0 and labels[i - 1] == "publisher":
        i -= 1
    if "place" in labels[e + 1:] or "place" in labels[max(0, i - 4):i]:
        return
    # a run after the publisher's comma
    if e + 2 < n and tokens[e + 1].text == "," and labels[e + 1] in ("O", "publisher"):
        a = e + 2
        b = a
        while b + 1 < n and labels[b + 1] == labels[a] and tokens[b + 1].text not in ",.;:()":
            b += 1
        if labels[a] in _PLACE_FROM and labels[a] != "publisher" and _place_like(tokens, a, b) \
                and _date_next(tokens, labels, b):
            for k in range(a, b + 1):
                labels[k] = "place"
            return
    # the last comma piece of the publisher run itself
    c = e
    while c > i and tokens[c].text != ",":
        c -= 1
    if c <= i + 0 or c == e:
        return
    # "Quill Press, Inc., Dovecote": a company suffix ends the publisher's name,
    # the comma before it is inside the name; "Harcourt, Brace, Ink Harbour":
    # other comma pieces cannot be told apart
    if not _publisher_head(tokens, i, c):
        return
    if _place_like(tokens, c + 1, e) and _date_next(tokens, labels, e):
        labels[c] = "O"
        for k in range(c + 1, e + 1):
            labels[k] = "place"


# Regions typed as dotted abbreviations after a place ("Providence, R.I.",
# "Boston, Mass."), matched on the joined token texts, lower case.  Common
# practice: the traditional US state abbreviations, a few Canadian and
# Australian ones, and the country abbreviations of imprints.
REGION_ABBREV = frozenset("""
ala. ariz. ark. cal. calif. colo. conn. del. d.c. fla. ga. ill. ind. kan. kans. ky. la. md. mass. mich.
minn. miss. mo. mont. neb. nebr. nev. n.h. n.j. n.m. n.y. n.c. n.d. okla. ore. oreg. pa. penn. penna. r.i.
s.c. s.d. tenn. tex. vt. va. wash. w.va. wis. wisc. wyo. ont. que. b.c. alta. sask. man. n.s. n.s.w. qld.
vic. u.s.a. u.s. u.k.
""".split())
_NOT_REGION_LABELS = frozenset(("date", "pages", "volume", "issue", "title", "container_title"))


def _region_chunk(tokens: list[Token], a: int) -> int:
    """Last index of a region abbreviation starting at token a (``R.I.``,
    ``Mass.``, ``NY``, ``USA``), typed as one word; -1 if none."""
    n = len(tokens)
    t = tokens[a]
    if t.kind == "word" and t.text.isupper() and t.text.lower() in _REGIONS:
        return a if a + 1 >= n or tokens[a + 1].text != "." or tokens[a + 1].start > t.end else a + 1
    joined = ""
    best = -1
    for j in range(a, min(n, a + 6)):
        if j > a and tokens[j].start != tokens[j - 1].end:
            break
        if tokens[j].kind not in ("word", "initial", "punct") or tokens[j].kind == "punct" and tokens[j].text != ".":
            break
        joined += tokens[j].text
        if joined.lower() in REGION_ABBREV:
            best = j
    if best >= 0 and best + 1 < n and tokens[best + 1].start == tokens[best].end \
            and tokens[best + 1].kind in ("word", "initial"):
        return -1   # part of a longer word
    return best


_REGION_FROM = frozenset(("O", "place", "authors", "editors", "note", "publisher"))


def _publisher_head(tokens: list[Token], i: int, c: int) -> bool:
    """Tokens i..c-1 (before the comma at c) name a publisher beyond doubt:
    a publisher word, a known publisher, or a company suffix; commas inside
    only before a company suffix (``Quill Press, Inc.``)."""
    if c <= i:
        return False
    head = [t.text.lower() for t in tokens[i:c]]
    company = company_before(tokens, c, i + 1)
    if not company and not any(w in _PUBLISHER_HEAD for w in head) and " ".join(head) not in _KNOWN_PUBLISHERS:
        return False
    inner = [k for k in range(i, c) if tokens[k].text == ","]
    return not inner or company and all(company_before(tokens, k2, k + 1) for k, k2 in zip(inner, inner[1:] + [c]))


def _regions_piece(tokens: list[Token], a: int, b: int) -> bool:
    """Tokens a..b are one region abbreviation."""
    return _region_chunk(tokens, a) == b


def repair_region_in_publisher(tokens: list[Token], labels: list[str]) -> None:
    """``Quill Press, Dovecote, N.Y., 1995``, ``Quill Press, Ink Harbour,
    NJ, 1995``: a place with its region read into the publisher (or only
    the region split off as the place).  When the publisher run ends with
    comma pieces that are region abbreviations, right after a place-like
    piece, and what is left names a publisher beyond doubt, the place
    piece and its regions are the place."""
    n = len(labels)
    run = "publisher"
    if "publisher" not in labels:
        # "Quill Press, Dovecote, Ill., 1995" read as a journal: no journal's numbers, not after "in"
        if any(lab in labels for lab in ("volume", "issue", "pages", "editors")):
            return
        run = "container_title"
    e = n - 1
    while e >= 0 and labels[e] != run:
        e -= 1
    if e < 0:
        return
    i = e
    while i > 0 and labels[i - 1] == run:
        i -= 1
    if run != "publisher" and (tokens[i - 1].text in _IN or i > 1 and tokens[i - 2].text in _IN):
        return
    if any(t.text == ";" for t in tokens[i:e + 1]):
        return      # a joint imprint keeps its places
    # regions after the run, split off or left out ("Ink Harbour, NJ", "Dovecote, N.J.")
    end = e
    c = e
    while c > i and tokens[c].text != ",":
        c -= 1
    if c > i and _region_chunk(tokens, c + 1) == e + 1 and labels[e + 1] == "O":
        end = e + 1     # "Ill." with its period outside the run
    while end + 2 < n and tokens[end + 1].text == ",":
        b = _region_chunk(tokens, end + 2)
        if b < 0 or any(labels[x] not in _REGION_FROM for x in range(end + 1, b + 1)):
            break
        end = b
    pieces = _pieces(tokens, i, end)
    r = len(pieces)
    while r > 0 and _regions_piece(tokens, *pieces[r - 1]):
        r -= 1
    if r == len(pieces) or r < 2:
        return
    a, b = pieces[r - 1]
    if not (_place_like(tokens, a, b) or _all_places(tokens, a, b)) or not _publisher_head(tokens, i, a - 1):
        return
    nxt = end + 1
    while nxt < n and labels[nxt] == "O" and tokens[nxt].text in ".,;":
        nxt += 1
    if not (nxt >= n or labels[nxt] == "date" or tokens[nxt].text == "("):
        return
    labels[a - 1] = "O"
    for k in range(i, a - 1):
        labels[k] = "publisher"
    for k in range(a, end + 1):
        labels[k] = "place"


def repair_region_after_place(tokens: list[Token], labels: list[str]) -> None:
    """A region abbreviation after the place, ``Providence, R.I., 1995``,
    ``Boston, Mass.: Quill Press``, ``Ink Harbour, NJ``: the labeler reads
    the dotted letters as a name or leaves them out.  The comma and the
    region belong to the place run (``Providence, RI`` already does); a
    region is taken only when the year, a colon, another region or the
    line's end follows it."""
    n = len(tokens)
    try:
        p1 = len(labels) - 1 - labels[::-1].index("place")
    except ValueError:
        return
    while p1 + 2 < n and tokens[p1 + 1].text == ",":
        a = p1 + 2
        b = _region_chunk(tokens, a)
        if b < 0 or any(labels[k] in _NOT_REGION_LABELS for k in range(a, b + 1)):
            return
        nxt = b + 1
        while nxt < n and labels[nxt] == "O" and tokens[nxt].text in ".;" :
            nxt += 1
        ok = nxt >= n or labels[nxt] == "date" or tokens[nxt].text in (":", "(") \
            or tokens[nxt].text == "," and (nxt + 1 >= n or labels[nxt + 1] == "date" or tokens[nxt + 1].kind == "num"
                                            or _region_chunk(tokens, nxt + 1) >= 0)
        if not ok:
            return
        for k in range(p1 + 1, b + 1):
            labels[k] = "place"
        p1 = b


# a company suffix in a line; gates :func:`repair_company_imprint`
COMPANY_GATE = re.compile(r"\b(?:Inc|Ltd|Co|GmbH|Corp|LLC|KG|AG|PLC|plc|Pty)\b|(?<![\w.])(?:S\.A|B\.V|N\.V|A\.G|S\.p\.A"
                          r"|S\.L|S\.r\.l|A\.S|K\.K)\.")
_COMPANY_NAME_GLUE = frozenset(("&", "and", "of", "the", "und", "et", "y", "-", "'"))
_COMPANY_FROM = frozenset(("O", "publisher", "place", "container_title", "title", "series", "note", "authors",
                           "editors"))


def repair_company_imprint(tokens: list[Token], labels: list[str]) -> None:
    """A company suffix (``Inc.``, ``Ltd.``, ``GmbH``, ``S.A.``, ``B.V.``)
    ends a publisher's name: ``Quill Press, Inc., Dovecote, 1990``,
    ``Quill Uitgevers B.V., Ink Harbour, 1990``.  The comma piece that ends
    with the suffix (with the piece before it when the suffix stands alone
    after a comma) is the publisher, and a place-like piece between it and
    the year is the place -- known place name or not.  The labeler reads
    such lines in pieces (the suffix's initials as a name, the name as a
    journal); only a piece after the record's title and before its year is
    taken, and only when no other publisher run is labeled."""
    n = len(tokens)
    for c in range(2, n):
        if tokens[c].text != ",":
            continue
        s0 = company_start(tokens, c, 1)
        if s0 < 0:
            continue
        a = s0
        while a >= 2 and tokens[a - 1].text == ",":
            s1 = company_start(tokens, a - 1, 1)
            if s1 < 0:
                break
            a = s1      # suffixes in a row: "Quill Publishing Co., Inc."
        if tokens[a - 1].text == "," and a >= 2:
            a -= 1      # "Quill Press, Inc.": the comma is inside the name
        s1 = a
        while a - 1 >= 0 and (tokens[a - 1].kind in ("word", "initial") and tokens[a - 1].text[:1].isupper()
                              or tokens[a - 1].text in _COMPANY_NAME_GLUE):
            a -= 1
        if a < 1 or tokens[a - 1].text not in ",.;:" or a == s0:
            continue
        if not any(tokens[k].kind == "word" and tokens[k].text[:1].isupper() for k in range(a, s0)):
            continue
        if not any(lab in ("title", "container_title") for lab in labels[:a - 1]):
            continue    # the record's title comes first
        if any(labels[k] not in _COMPANY_FROM for k in range(a, c)) \
                or any(labels[k] in ("authors", "editors") for k in range(a, s1)):
            continue    # a name's initials ("Vellum, S. A.") are no company
        # what follows: a place piece (with its regions) and the year, or the year itself
        b = c
        while b + 1 < n and tokens[b + 1].text not in ",;:()" and tokens[b + 1].kind != "num":
            b += 1
        r = b
        while b > c and r + 2 < n and tokens[r + 1].text == "," and _region_chunk(tokens, r + 2) >= 0 \
                and all(labels[x] in _REGION_FROM for x in range(r + 2, _region_chunk(tokens, r + 2) + 1)):
            r = _region_chunk(tokens, r + 2)
        if b > c and _place_like(tokens, c + 1, b) and _date_next(tokens, labels, r):
            place = range(c + 1, r + 1)
            b = r
        elif _date_next(tokens, labels, c - 1):
            place = range(0)
            b = c - 1
        else:
            continue
        if any(lab == "publisher" for k, lab in enumerate(labels) if not a <= k <= b) \
                or any(t.text == ";" for t in tokens[a:b + 1]):
            return      # another publisher, or a joint imprint (repair_joint_imprint)
        for k in range(a, c):
            labels[k] = "publisher"
        labels[c] = "O"
        for k in place:
            labels[k] = "place"
        return


_MEETING_WORDS = frozenset("conference proceedings symposium workshop congress colloquium meeting proc conf symp "
                           "seminar school".split())


def repair_event_after_proceedings(tokens: list[Token], labels: list[str]) -> None:
    """``Proceedings of the Quill Symposium, Dovecote, 1995, Quill Press,
    Ink Harbour, 1996``: the place and year right after a proceedings title
    are the meeting's, when the book's own publisher and year follow -- the
    unbracketed form of :func:`repair_event_bracket`.  They stay in the
    proceedings title; the meeting's place is no place of publication, and
    its year no year of the record."""
    s0 = labels.index("container_title")
    e = run_end(labels, s0)
    n = len(labels)
    intro = s0 >= 1 and tokens[s0 - 1].text in ("In", "in") or s0 >= 2 and tokens[s0 - 1].text == ":" \
        and tokens[s0 - 2].text in ("In", "in")
    if not intro and not any(t.text.lower().rstrip(".") in _MEETING_WORDS for t in tokens[s0:e + 1]):
        return
    x = e + 1
    while x < n and x - e < 12 and (labels[x] in ("place", "date") or labels[x] == "O" and tokens[x].text == ","):
        x += 1
    if x >= n or labels[x] != "publisher" or "date" not in labels[e + 1:x] or "date" not in labels[x:]:
        return
    y = x - 1
    while y > e and labels[y] == "O":
        y -= 1
    for k in range(e + 1, y + 1):
        labels[k] = "container_title"


def repair_split_book_title(tokens: list[Token], labels: list[str]) -> None:
    """``in: Partitions, Quills and Inks (O. Vellum, ed.)``: a book title
    with a comma, cut by the labeler at the comma.  When the first container
    run opens right after "in" / "in:" and a second one follows after only
    that comma and runs up to the editors' bracket (or to ", edited by" /
    ", ed."), the two are one title and the comma is part of it."""
    n = len(labels)
    s = labels.index("container_title")
    if not (s >= 1 and tokens[s - 1].text in _IN or s >= 2 and tokens[s - 1].text == ":" and tokens[s - 2].text in _IN):
        return
    e = run_end(labels, s)
    c = e + 1
    if c + 1 >= n or tokens[c].text != "," or labels[c] != "O" or labels[c + 1] != "container_title":
        return
    e2 = run_end(labels, c + 1)
    k = e2 + 1
    if k >= n:
        return
    bracket = tokens[k].text == "(" and any(labels[j] == "editors" for j in range(k + 1, min(n, k + 4)))
    role = tokens[k].text == "," and k + 1 < n and tokens[k + 1].text.lower().rstrip(".") in ("ed", "eds", "edited")
    if bracket or role:
        labels[c] = "container_title"


def repair_title_in_bracketed_editors(tokens: list[Token], labels: list[str]) -> None:
    """``in: Quill Studies (O. Vellum, ed.)``: the labeler ran the editors'
    run back over the bracket into the book's title.  A name list never
    holds an opening bracket: when an editors run does, and the words before
    the bracket hold no initial, they are the book's title."""
    n = len(labels)
    s = labels.index("editors")
    e = run_end(labels, s)
    try:
        b = next(k for k in range(s + 1, e + 1) if tokens[k].text == "(")
    except StopIteration:
        return
    head = range(s, b)
    # capitalised words, with commas and "and" between them ("Partitions, Quills and Inks"), no initial
    if not head or not all(tokens[k].kind == "word" and (tokens[k].text[:1].isupper() or tokens[k].text == "and")
                           or tokens[k].text in (",", "&") for k in head) \
            or tokens[s].kind != "word" or tokens[b - 1].kind != "word" or tokens[s].text.lower() in lx.GIVEN_NAMES:
        return   # ("Edith (E.) Vellum": a given name, not a title)
    if not any(tokens[k].kind == "initial" for k in range(b + 1, e + 1)):
        return
    for k in head:
        labels[k] = "container_title"
    labels[b] = "O"


def repair_in_inside_title(tokens: list[Token], labels: list[str]) -> None:
    """``Nib words, in: Partitions, Quills and Inks (O. Vellum, ed.)``: the
    first comma piece of the book's title read as (more of) the chapter's
    title.  When ", in:" follows the title and the piece after the colon is
    labelled title, while a book's title or its editors follow that piece,
    the piece opens the book's title (and the comma after it is inside it)."""
    n = len(labels)
    s = labels.index("title")
    for k in range(s + 1, n - 2):
        if tokens[k].text in ("in", "In") and tokens[k - 1].text in ",." and tokens[k + 1].text == ":" \
                and labels[k] in ("title", "O") and labels[k + 2] == "title":
            break
    else:
        return
    a = k + 2
    e = run_end(labels, a)
    x = e + 1
    while x < n and labels[x] == "O" and tokens[x].text in ",(":
        x += 1
    if x >= n or labels[x] not in ("container_title", "editors"):
        return
    for j in range(k - 1, k + 2):
        labels[j] = "O"
    for j in range(a, e + 1):
        labels[j] = "container_title"
    if labels[x] == "container_title" and x == e + 2 and tokens[e + 1].text == ",":
        labels[e + 1] = "container_title"   # the comma inside the book's title
