"""Label repairs run between the labeler and :func:`assemble.assemble`.

Each repair handles one class of input the labeler splits wrongly but whose
shape is unambiguous in the text itself (a full date, a translator phrase,
a report number, "Journal 8 (2013), e1234").  They only move tokens between
labels; the fields, the spans and the confidences are then built by
``assemble`` as for any other line.  None is keyed to a particular line.
"""

from __future__ import annotations

import re
from bisect import bisect_left

from normform.refs.labeler import ID_LABEL_SET
from normform.refs.tokens import Token

_MONTH = (r"(?:Jan(?:uary)?|Feb(?:ruary)?|Mar(?:ch)?|Apr(?:il)?|May|June?|July?|Aug(?:ust)?|"
          r"Sept?(?:ember)?|Oct(?:ober)?|Nov(?:ember)?|Dec(?:ember)?)")
_YEAR = r"(?:1[5-9]|20)\d\d"
# Full dates as bibliography styles print them: "15 March 2005", "March 15,
# 2005", "2005-03-15" (ISO 8601 calendar date).
_FULL_DATE = re.compile(
    r"(?<![\w-])(?:\d{1,2}\.?\s+" + _MONTH + r"\.?,?\s+" + _YEAR
    + r"|" + _MONTH + r"\.?\s+\d{1,2},\s*" + _YEAR
    + r"|" + _YEAR + r"-[01]\d-[0-3]\d)(?![\w-])")
# A date introduced by one of these is when a web page was read, not when
# the work appeared (common practice in web citations).
_ACCESS = re.compile(r"(?i)\b(?:last\s+)?(?:accessed|retrieved|visited|viewed|consulted)(?:\s+on)?:?\s*"
                     r"(?:(?:\d{1,2}\.?\s+)?" + _MONTH + r"\.?(?:\s+\d{1,2},)?\s+" + _YEAR
                     + r"|" + _YEAR + r"-[01]\d-[0-3]\d|\d{1,2}/\d{1,2}/" + _YEAR + r")")
# "v. 12" is a volume in older styles: only a glued "v2.1" counts
_ACCESS_BEFORE = re.compile(r"(?i)(?:accessed|retrieved|visited|viewed|consulted)(?:\s+on)?:?\s*\Z")
_VERSION = re.compile(r"(?<![\w.])(?:[Vv]ersion\s|[Vv]er\.\s?|[Vv](?=\d))\d+(?:\.\d+){0,3}(?![\w])")
# "Tech. Rep. TR-2007-13", "Technical Report No. 5", "Report No. 12",
# "Preprint 2004-17": the report's own number (CSL "number").
_REPORT_NO = re.compile(
    r"\b(?P<word>Tech(?:nical)?\.?\s?Rep(?:ort)?\.?|(?:Research |Technical )?Report|Preprint)"
    r"\s*(?P<num>(?:(?:No|Nr|no|nr|Number|number)\.?\s?|#\s?)[A-Z]{0,4}-?\d[\w./-]*"
    r"|[A-Z]{1,5}-\d[\w./-]*|\d{2,4}[-/]\d[\w./-]*)")
# lower-case "trans." only: "Trans. Amer. Math. Soc." is a journal (Transactions)
_TRANSL = re.compile(r"\b(?:[Tt]ranslated(?:\s+from\s+(?:the\s+)?[A-Za-zäöüé]+)?\s+by"
                     r"|transl?\.(?:\s+from\s+(?:the\s+)?[A-Za-zäöüé]+)?(?:\s+by)?"
                     r"|[Tt]r\.\s+by)\s+")
_EDITED_BY = re.compile(r"[,.]\s*(?:edited|ed\.|eds\.|translated)\s+by\s+")
_NAME_GLUE = frozenset(("and", "&", "-", "van", "von", "der", "den", "de", "la", "du", "di", "da", "le"))


def _index(tokens: list[Token], starts: list[int], lo: int, hi: int) -> range:
    """Tokens lying inside the character span [lo, hi)."""
    i = bisect_left(starts, lo)
    j = i
    while j < len(tokens) and tokens[j].end <= hi:
        j += 1
    return range(i, j)


_ISO_GATE = re.compile(r"\d-[01]\d-[0-3]\d")


def _month_gate(text: str) -> bool:
    # unrolled: a generator over 12 names costs more than the whole test
    return ("Jan" in text or "Feb" in text or "Mar" in text or "Apr" in text or "May" in text or "Jun" in text
            or "Jul" in text or "Aug" in text or "Sep" in text or "Oct" in text or "Nov" in text or "Dec" in text)


def _version_gate(text: str) -> bool:
    if "ersion" in text or "er." in text:
        return True
    for v in "vV":   # a glued "v2.1": few v's per line, str.find beats a regex scan
        i = text.find(v)
        while i >= 0:
            if text[i + 1:i + 2].isdigit():
                return True
            i = text.find(v, i + 1)
    return False


def repair(text: str, tokens: list[Token], labels: list[str], marg: list[float]) -> None:
    """Apply every repair in place (labels and marginals).  Each runs only
    when cheap substring tests say its input class can be present (this
    runs on every line)."""
    if not tokens:
        return
    starts = None

    def st() -> list[int]:
        nonlocal starts
        if starts is None:
            starts = [t.start for t in tokens]
        return starts

    if text.islower() and len(tokens) >= 4:
        _lowercase_line(text, tokens, labels, marg)
    access = "ccess" in text or "etriev" in text or "isited" in text or "iewed" in text or "onsulted" in text
    version = _version_gate(text)
    if access or version:
        _access_and_version(text, tokens, st(), labels, marg, access, version)
    if _month_gate(text) or text.count("-") >= 2 and _ISO_GATE.search(text):
        _full_dates(text, tokens, st(), labels, marg)
    if "date" not in labels:
        _odd_year(tokens, labels, marg)
    if "ep" in text or "rint" in text:
        _report_number(text, tokens, st(), labels)
    if "rans" in text or "r. by" in text:
        _translators(text, tokens, st(), labels, marg)
    if "rans" in text or "tr." in text or "Tr." in text:
        _translators_after(text, tokens, st(), labels, marg)
    if "hesis" in text or "issert" in text or "Diss." in text:
        _thesis_degree(text, tokens, st(), labels)
    if " by " in text:
        _title_before_role(text, tokens, st(), labels, marg)
    if "(" in text and not ("container_title" in labels and "volume" in labels):
        # (with a journal and a volume found, the usual right case, nothing to do)
        _journal_volume_year(text, tokens, st(), labels, marg)
    if labels[0] == "O":
        _unlabeled_head(tokens, labels, marg)
    if labels[0] == "authors":
        _vancouver_initials(tokens, labels)
    if "doi" in text or "DOI" in text or "Doi" in text:
        _junk_after_doi(text, tokens, st(), labels)
    if ("-" in text or "–" in text) and ("issue" in labels or "note" in labels or "pages" in labels
                                         or "O" in labels):
        _page_ranges(tokens, labels, marg)
    if _attribution_gate(text):
        _attribution(text, tokens, st(), labels)
    elif _pinpoint_gate(text):
        _pinpoint(text, tokens, st(), labels)
    if "</" in text or "<a " in text:
        _html_tags(text, tokens, st(), labels)
    if ((" - " in text or " -- " in text or "—" in text or " – " in text) and labels[-1] != "pages"
            or text.rstrip().endswith("]")):
        _signature(text, tokens, st(), labels)
    if labels[-1] == "O" or labels[-1] in ID_LABEL_SET:
        _leftover_tail(tokens, labels)


def _lowercase_line(text: str, tokens: list[Token], labels: list[str], marg: list[float]) -> None:
    """A line typed all in lower case (``a. b. featherstone, on quill
    partitions, discrete math 301 (2005) 1-20``) gives the labeler no
    capitals to go by: label a copy with every word capitalised instead
    (same length, same tokens); the fields keep the typed text, and the
    labels are doubted a little."""
    from normform.refs.labeler import label
    from normform.refs.tokens import tokenize
    cased = text.title()
    if len(cased) != len(text):
        return          # (a character whose capital is longer: offsets would move)
    twin = tokenize(cased, len(tokens) + 1)
    if len(twin) != len(tokens) or any(a.start != b.start or a.end != b.end for a, b in zip(twin, tokens)):
        return
    labs, mg, _ = label(twin, cased)
    labels[:] = labs
    marg[:] = [min(m, 0.8) for m in mg]


def _unlabeled_head(tokens, labels, marg) -> None:
    """Capitalised words at the very start that the labeler left to no field,
    right before the title (``QSEM editors, The Quill Tables, ...``): in
    every common layout the line opens with its authors (a corporate name
    here), so they are kept as authors, with a lowered confidence, rather
    than lost."""
    k = 0
    while k < len(tokens) and labels[k] == "O":
        k += 1
    if k == 0 or k >= len(tokens) or labels[k] != "title":
        return
    words = [i for i in range(k) if tokens[i].kind in ("word", "initial")]
    if not words or not tokens[words[0]].text[:1].isupper() or words[0] > 1:
        return
    for i in range(words[0], words[-1] + 1):
        labels[i] = "authors"
        marg[i] = min(marg[i], 0.7)


def _access_and_version(text, tokens, starts, labels, marg, access: bool = True, version: bool = True) -> None:
    """``accessed 3 May 2020`` and ``version 2.1`` are labeled note (the CRF
    has no label for them; ``kinds.details`` moves them into the record's
    accessed date and version), and neither is the issued date nor a page."""
    if access:
        for m in _ACCESS.finditer(text):
            for i in _index(tokens, starts, m.start(), m.end()):
                labels[i] = "note"
                marg[i] = min(marg[i], 0.9)
    if version:
        for m in _VERSION.finditer(text):
            idx = _index(tokens, starts, m.start(), m.end())
            if not idx or any(labels[i] in ("authors", "container_title", "pages") for i in idx) \
                    or idx[0] > 0 and labels[idx[0]] == "title" and labels[idx[0] - 1] == "title":
                continue   # "... version 2 of the conjecture": part of a title
            for i in idx:
                labels[i] = "note"
                marg[i] = min(marg[i], 0.9)


def _full_dates(text, tokens, starts, labels, marg) -> None:
    """A full date whose day and month the labeler left unlabeled (or filed
    as a note): the whole date is the date.  A bare year elsewhere that
    repeats its year is then dropped (the first date run wins in assembly)."""
    for m in _FULL_DATE.finditer(text):
        if _ACCESS_BEFORE.search(text, max(0, m.start() - 30), m.start()):
            continue   # an access date (see _access_and_version)
        idx = _index(tokens, starts, m.start(), m.end())
        if not idx or not any(labels[i] == "date" for i in idx):
            # only a date the labeler saw (partly) as one: "15 May 2020" can
            # also be an access date or sit inside a title
            if not idx or not all(labels[i] in ("O", "note") for i in idx) or not (
                    _bracketed(tokens, idx) or not text[m.end():].strip(" .;,")):
                continue   # not "(15 March 2005)" nor ", 15 March 2005." at the end
        if not all(labels[i] in ("O", "date", "note") for i in idx):
            continue
        known = [marg[i] for i in idx if labels[i] == "date"]
        conf = min(known) if known else 0.8
        for i in idx:
            labels[i] = "date"
            marg[i] = conf
        year = m.group()[-4:] if not m.group()[4:5] == "-" else m.group()[:4]
        for j, t in enumerate(tokens):
            if j not in idx and labels[j] == "date" and t.text == year and t.kind == "num" \
                    and (j == 0 or labels[j - 1] != "date") and (j + 1 >= len(tokens) or labels[j + 1] != "date"):
                labels[j] = "O"
        return


def _bracketed(tokens: list[Token], idx: range) -> bool:
    return idx[0] > 0 and idx[-1] + 1 < len(tokens) and tokens[idx[0] - 1].text == "(" \
        and tokens[idx[-1] + 1].text == ")"


def _odd_year(tokens, labels, marg) -> None:
    """``(1450)`` or ``(2095)`` after a volume: a year outside the range the
    labeler knows is still the date (validation doubts it later)."""
    if "date" in labels:
        return
    for i in range(1, len(tokens) - 1):
        t = tokens[i]
        if t.kind == "num" and len(t.text) == 4 and t.text[0] in "12" and tokens[i - 1].text == "(" \
                and tokens[i + 1].text == ")" and labels[i] in ("O", "container_title", "volume", "issue", "title") \
                and i >= 2 and tokens[i - 2].kind == "num":
            labels[i - 1] = labels[i + 1] = "O"
            labels[i] = "date"
            marg[i] = min(marg[i], 0.5)
            return


def _report_number(text, tokens, starts, labels) -> None:
    """The number of a technical report is labeled note (the CRF has no label
    for it; ``kinds.details`` moves it into ``report_number``), its "Report"
    word to the genre."""
    for m in _REPORT_NO.finditer(text):
        word = _index(tokens, starts, m.start("word"), m.end("word"))
        num = _index(tokens, starts, m.start("num"), m.end("num"))
        if not word or not num:
            continue
        if any(labels[i] == "authors" for i in word):
            continue
        if any(labels[i] == "container_title" for i in word) and any(
                lab == "container_title" and i not in word and i not in num for i, lab in enumerate(labels)):
            continue   # a journal with "Report" in its name, not only the report phrase
        for i in word:
            if labels[i] in ("O", "title", "note", "series", "publisher", "container_title"):
                labels[i] = "genre"
        for i in num:
            labels[i] = "note"
        if word[-1] + 1 == num[0] and tokens[word[-1]].text == ".":
            labels[word[-1]] = "genre"


def _translators(text, tokens, starts, labels, marg) -> None:
    """``translated by A. Quill``, ``trans. A. Quill``, ``(transl. A.
    Quill)``: the names after the phrase are translators.  The phrase words
    go with them (the name splitter drops role words)."""
    n = len(tokens)
    for m in _TRANSL.finditer(text):
        idx = _index(tokens, starts, m.start(), m.end())
        if not idx:
            continue
        j = idx[-1] + 1
        k = j
        while k < n:
            t = tokens[k]
            if t.kind == "initial" or t.kind == "word" and (t.text[:1].isupper() or t.text in _NAME_GLUE) \
                    or t.kind == "dash" and k > j:
                k += 1
            elif t.text == "," and k + 1 < n and tokens[k + 1].kind == "initial":
                k += 1
            else:
                break
        if not any(tokens[x].kind == "word" and tokens[x].text[:1].isupper() for x in range(j, k)):
            continue
        if any(labels[x] in ("authors", "editors") for x in range(j, k)) and labels[idx[0]] in ("authors", "editors") \
                and not (idx[0] > 0 and tokens[idx[0] - 1].text == "("):
            continue   # the labeler read "trans." inside a name list: unsure, leave it
            # (unless the phrase opens a bracket, "(transl. C. D. Inkwell)": a role, plainly)
        # "translated (from the Russian) by": words of the phrase, no name;
        # "trans." / "transl.": part of the run, the name splitter drops it
        abbrev = tokens[idx[0]].text in ("trans", "transl")
        for x in idx:
            labels[x] = "translators" if abbrev else "O"
        for x in range(j, k):
            labels[x] = "translators"
            marg[x] = min(marg[x], 0.9)


# The role printed after the names, as "(eds.)" is: "(C. D. Inkwell,
# trans.)", "(C. D. Inkwell, transl.)", "(C. D. Inkwell, tr.)", "C. D.
# Inkwell (trans.)", "..., C. D. Inkwell, trans., Springer" (common practice
# in humanities styles).  After a comma or an opening bracket, and closed by
# a bracket, a separator or the end, "Trans." cannot start a journal name
# ("Trans. Amer. Math. Soc." goes on with words).
_TRANSL_AFTER = re.compile(r"(?:,\s*|\s*\(\s*)(?:[Tt]ransl?|[Tt]r|[Tt]ranslators?)\.?(?:\s*\)|(?=\s*[,;]|\s*\.?\s*\Z))")


def _name_piece(t: Token) -> bool:
    return t.kind == "initial" or t.kind == "word" and (t.text[:1].isupper() or t.text in _NAME_GLUE) \
        or t.kind == "dash" and t.text == "-"


def _translators_after(text, tokens, starts, labels, marg) -> None:
    """Names followed by their role word (``(C. D. Inkwell, trans.)``): the
    names are the translators, the role word and the brackets no field.
    Inside a bracket the names run back to the opening bracket (several
    names, commas between them); without one, back to the separator before
    them, and they must look like a person's name (an initial, or a run the
    labeler read as names)."""
    for m in _TRANSL_AFTER.finditer(text):
        idx = _index(tokens, starts, m.start(), m.end())
        if not idx or idx[0] == 0:
            continue
        role_first = idx[0]
        closes = text[m.start():m.end()].rstrip().endswith(")")
        opens = tokens[role_first].text == "("   # "Inkwell (trans.)"
        e = role_first - 1
        a = e
        inside = closes and not opens
        while a >= 0 and (_name_piece(tokens[a]) or inside and tokens[a].text == ","):
            a -= 1
        if a == e and opens and closes:
            _to_note(labels, idx[0], idx[-1])   # "Title (trans.)": a translation, the translator unnamed
            continue
        if inside:
            if a < 0 or tokens[a].text not in "(;":
                continue    # ("(E. Vellum, ed.; C. D. Inkwell, trans.)": from the semicolon)
        elif a >= 0 and tokens[a].text not in ",.;:(":
            continue
        first = a + 1
        while first <= e and tokens[first].text == ",":
            first += 1
        if not inside and a >= 2 and tokens[a].text == "," and first <= e \
                and all(tokens[x].kind == "initial" for x in range(first, e + 1)) \
                and tokens[a - 1].kind == "word" and tokens[a - 1].text[:1].isupper() \
                and tokens[a - 2].text in ",.;:(":
            first = a - 1    # "Inkwell, C. D. (trans.)": family name first
        names = range(first, e + 1)
        if not any(tokens[x].kind == "word" and len(tokens[x].text) > 1 and tokens[x].text[:1].isupper()
                   for x in names):
            continue
        if not inside and (len(names) > 6 or not any(tokens[x].kind == "initial"
                                                     or labels[x] in ("authors", "editors", "translators")
                                                     for x in names)):
            if opens and closes:
                _to_note(labels, idx[0], idx[-1])   # "Nib Theory (trans.)": no person named
            continue
        if first == 0:
            continue   # the names that open the line ("A. Quill (trans.), Title"): leave them to the labeler
        for x in names:
            labels[x] = "translators"
            marg[x] = min(marg[x], 0.9)
        for x in idx:
            if labels[x] not in ID_LABEL_SET:
                labels[x] = "O"
        if inside and labels[a] not in ID_LABEL_SET:
            labels[a] = "O"


# Degrees as theses name them (common practice): "Ph.D.", "PhD", "M.Sc.",
# "M.A.", "M.Phil.", "D.Phil.", "Sc.D.", "Dr. rer. nat.", "Master's".
_DEGREE = (r"(?:Ph\.?\s?D|D\.?\s?Phil|M\.?\s?Phil|M\.?\s?Sc|B\.?\s?Sc|Sc\.?\s?D|D\.?\s?Sc|M\.?\s?A|M\.?\s?S"
           r"|B\.?\s?A|Dr\.(?:\s?(?:rer|phil|sc|math|techn|ing)\.(?:\s?(?:nat|pol|math|techn)\.)?)?"
           r"|Doctoral|Master'?s|Masters|Diploma|Habilitation)\.?")
# "Thesis (Ph.D.)--University of ...", "Diss. (Dr.
# rer. nat.)", and "M.Sc. thesis": the degree goes with the genre word
_THESIS_DEGREE = re.compile(r"\b(?:(?:Thesis|Dissertation|Diss\.)\s*\(\s*" + _DEGREE + r"\s*\)"
                            r"|(?<![\w.])" + _DEGREE + r"\s+(?:[Tt]hesis|[Dd]issertation)\b)")


def _thesis_degree(text, tokens, starts, labels) -> None:
    """The genre phrase of a thesis with its degree is one genre run (the
    labeler splits "Thesis (Ph.D.)" at the bracket and reads "M.Sc." as a
    title word); kinds.details words the bracketed form as "Ph.D. thesis"."""
    for m in _THESIS_DEGREE.finditer(text):
        idx = _index(tokens, starts, m.start(), m.end())
        if not idx or idx[0] == 0 or any(labels[x] in ID_LABEL_SET for x in idx):
            continue
        for x in idx:
            labels[x] = "genre"


def _title_before_role(text, tokens, starts, labels, marg) -> None:
    """``Topics in Enumeration, edited by F. Vellum, ...``: no title and no
    author, the words before the role phrase are the title."""
    if "title" in labels or "authors" in labels:
        return
    m = _EDITED_BY.search(text)
    if not m:
        return
    idx = _index(tokens, starts, 0, m.start())
    if not idx or not tokens[idx[0]].text[:1].isupper() or not all(labels[i] == "O" for i in idx):
        return
    if not any(t.kind == "word" for t in tokens[: idx[-1] + 1]):
        return
    for i in idx:
        labels[i] = "title"
        marg[i] = min(marg[i], 0.7)


# small words inside journal names ("Reports on Mathematical Physics")
_JOURNAL_GLUE = frozenset("of and on in for the de des der di la et für &".split())


def _journal_volume_year(text, tokens, starts, labels, marg) -> None:
    """``Title, PLoS ONE 8 (2013), e1234``: a capitalised piece after the
    title's last comma, a number, a bracketed year and then pages is the
    journal and its volume (the article layout), even when the labeler
    kept it in the title or took the number for an issue."""
    n = len(tokens)
    if labels.count("volume") > 1:
        return
    # only positions right before a "(": found by the str method, not a token loop
    cands = []
    p = text.find("(")
    while p > 0:
        cands.append(bisect_left(starts, p) - 1)
        p = text.find("(", p + 1)
    for i in cands:
        if not 3 <= i < n - 4:
            continue
        t = tokens[i]
        if not (t.kind == "num" and len(t.text) <= 4 and tokens[i + 1].text == "(" and tokens[i + 2].kind == "num"
                and len(tokens[i + 2].text) == 4 and tokens[i + 3].text == ")" and labels[i + 2] == "date"):
            continue
        if labels[i] not in ("title", "container_title", "issue", "volume"):
            continue
        after = i + 4
        if after < n and tokens[after].text in ",:." :
            after += 1
        if after >= n or labels[after] != "pages":
            continue
        c = i - 1
        while c > 0 and i - c <= 10 and (tokens[c].text == "." or tokens[c].kind in ("word", "initial")
                                          and (tokens[c].text[:1].isupper() or tokens[c].text in _JOURNAL_GLUE)):
            c -= 1
        if tokens[c].text != "," or c == i - 1 or not tokens[c + 1].text[:1].isupper():
            continue
        if not any(labels[x] in ("title", "container_title") for x in range(0, c)):
            continue
        if any(labels[x] == "container_title" for x in range(c + 1, i)) and (
                labels[i] == "volume" or labels[c] != "container_title"):
            continue   # the labeler saw the journal: leave its edges alone
        if "title" not in labels[:c] and "container_title" in labels[:c]:
            for x in range(0, c):
                if labels[x] == "container_title":
                    labels[x] = "title"
        for x in range(0, c):
            if labels[x] == "container_title":
                labels[x] = "title"
        labels[c] = "O"
        for x in range(c + 1, i):
            labels[x] = "container_title"
            marg[x] = min(marg[x], 0.8)
        labels[i] = "volume"
        marg[i] = min(marg[i], 0.8)
        return


def _vancouver_initials(tokens, labels) -> None:
    """``Featherstone AB, Penrake EF. Title`` (or ``... EF (2005) Title``):
    the capital initials of the last name, printed without periods, belong
    to the author list."""
    n = len(tokens)
    if n < 4 or labels[0] != "authors":
        return
    end = 0
    while end + 1 < n and labels[end + 1] == "authors":
        end += 1
    x = end + 1
    # what may follow the initials: the list's end (". Title", ", Title") or the
    # year of an author-year style ("Featherstone AB, Penrake EF (2005) Title")
    ends = x + 1 < n and (tokens[x + 1].text in ".," or tokens[x + 1].text == "(" and x + 2 < n
                          and tokens[x + 2].kind == "num" and labels[x + 2] == "date")
    if ends and labels[x] == "O" and len(tokens[x].text) <= 3 and _caps(tokens[x].text) and tokens[x].kind == "word" \
            and tokens[end].kind == "word" and tokens[x].start == tokens[end].end + 1 \
            and (any(_caps(tokens[y].text) and tokens[y].kind == "word" for y in range(1, end))
                 # one name alone: "Featherstone AB. Quill sums.", "Featherstone AB (2005) Quill sums."
                 or end == 0 and tokens[x + 1].text in ".(" and len(tokens[x].text) >= 2):
        labels[x] = "authors"


def _caps(w: str) -> bool:
    return 1 <= len(w) <= 3 and w.isalpha() and w.isupper()


_DOI_WORD = re.compile(r"(?i)doi(?:\s*:\s*|\s+)(?=\S)")


def _junk_after_doi(text, tokens, starts, labels) -> None:
    """``doi:10.abc/xyz``: a "doi:" whose value is no DOI (the identifier
    finder did not take it).  Its tokens are no page, title or volume; the
    validation pass records the value as an invalid DOI."""
    for m in bad_doi_mentions(text, tokens):
        for i in _index(tokens, starts, m[0], m[2]):
            labels[i] = "O"


_DOI_VALUE = re.compile(r"[^\s,;]+")


def bad_doi_mentions(text: str, tokens: list[Token]) -> list[tuple[int, int, int]]:
    """(keyword start, value start, value end) of each "doi" keyword whose
    value the identifier finder did not accept."""
    out: list[tuple[int, int, int]] = []
    if "doi" not in text.lower():
        return out
    covered = [(t.start, t.end) for t in tokens if t.ident is not None]
    for m in _DOI_WORD.finditer(text):
        if m.start() and (text[m.start() - 1].isalnum() or text[m.start() - 1] in "_/."):
            continue   # "...doi" inside a word or a URL
        v = _DOI_VALUE.match(text, m.end())
        if not v:
            continue
        end = v.end()
        while end > v.start() and text[end - 1] in ".,;:)]}":
            end -= 1
        if end <= v.start() or any(s < end and m.start() < e for s, e in covered):
            continue
        if not any(ch.isdigit() or ch == "/" for ch in text[v.start():end]):
            continue   # "DOI not available": no attempt at a DOI
        out.append((m.start(), v.start(), end))
        if len(out) >= 20:
            break   # a junk line full of "doi": enough to doubt it, and stays linear
    return out


_ISSUE_WORDS = frozenset(("no", "nr", "n", "num", "number", "issue", "heft", "fasc", "fascicle"))
_RANGE_NEIGHBOURS = frozenset(("issue", "note", "volume", "O"))


def _page_ranges(tokens: list[Token], labels: list[str], marg: list[float]) -> None:
    """A number range ``N-M`` in the number cluster is one field: when the
    labeler gives part of it to pages, all of it is pages
    (``Discrete Math. 301, 1-20 (2005)``); when it gives all of it to the
    issue or the note although the line has no pages, outside brackets and
    with no issue word before it (``301 (2005), 1-20, 15 March 2005``), or
    to no field at all, it is the page range -- issue ranges come bracketed or named ("(3-4)",
    "no. 3-4", "Issue 3-4").  A year range is left alone."""
    n = len(tokens)
    has_pages = "pages" in labels
    for i in range(n - 2):
        a, d, b = tokens[i], tokens[i + 1], tokens[i + 2]
        if a.kind != "num" or d.kind != "dash" or b.kind != "num":
            continue
        trio = labels[i:i + 3]
        if trio[0] == trio[1] == trio[2] == "pages" or "date" in trio:
            continue
        first, last = int(a.text), int(b.text)
        if not (last >= first or len(b.text) < len(a.text)):
            continue
        if "pages" in trio:
            if not all(x == "pages" or x in _RANGE_NEIGHBOURS for x in trio):
                continue
        elif has_pages or not (trio[0] == trio[1] == trio[2] and trio[0] in ("issue", "note", "O")):
            continue
        else:
            # bracketed ("(3-4)") or named ("no. 3-4") is an issue range
            before = tokens[i - 1] if i else None
            after = tokens[i + 3] if i + 3 < n else None
            if before is not None and (before.text in "([" or after is not None and after.text in ")]"):
                continue
            j = i - 1
            while j >= 0 and tokens[j].text in ".:":
                j -= 1
            if j >= 0 and tokens[j].text.lower() in _ISSUE_WORDS:
                continue
            # it must follow the number cluster (a volume, a date, an issue)
            k = i - 1
            while k >= 0 and labels[k] == "O":
                k -= 1
            if k < 0 or labels[k] not in ("volume", "date", "issue"):
                continue
        conf = min(marg[i:i + 3]) * 0.9
        for m in range(i, i + 3):
            labels[m] = "pages"
            marg[m] = conf
        has_pages = True


# --------------------------------------------------------------- trailing notes
# Collections add their own remarks after a reference: who added or sent it,
# cross references, errata ("[Added by the editors]", "(Contributed by N.
# Quill, Dec 2012)", "See also entry Q000123.").  They belong to no field of
# the work but must not be lost: they become the note.
_ATTRIBUTION = re.compile(
    r"(?:^|(?<=[.;,])\s+|(?<=[(\[])\s*|\s[-–—]+\s+)"
    r"(?P<cue>[Ss]ee\s+also|[Cc]f\.|(?:[Aa]dded|[Cc]ontributed|[Cc]ommunicated|[Ee]ntered|[Cc]orrected|[Ss]upplied"
    r"|[Ss]ent|[Rr]eported|[Ss]uggested)\s+by\b|[Cc]omments?:|[Ee]rratum|[Cc]orrigendum|[Rr]eprinted\s+in\b"
    r"|[Ss]ee\s+(?:entry|entries|sequence|table)\b"
    # a translation printed after the original: "; English transl., Sb. Math. 196 ..."
    r"|(?:English|French|German|Russian)\s+transl(?:\.|ation\b)|[Tt]ranslation\s+in\b|[Tt]ransl\.\s+in\b)")
_FIELD_LABELS = frozenset(("title", "container_title", "volume", "pages", "date", "publisher"))
_NOT_NOTE_WORDS = frozenset(("pp", "p", "vol", "no", "in", "and", "et", "al", "ed", "eds"))


def _to_note(labels: list[str], first: int, last: int) -> None:
    """Tokens first..last become the note; identifiers keep their scheme."""
    for j in range(first, last + 1):
        if labels[j] not in ID_LABEL_SET:
            labels[j] = "note"


def _attribution_gate(text: str) -> bool:
    return ("by " in text or "ee also" in text or "ee entr" in text or "Cf." in text or "cf." in text
            or "omment" in text or "rrat" in text or "orrigend" in text or "eprinted" in text
            or "ransl" in text)


def _attribution(text: str, tokens: list[Token], starts: list[int], labels: list[str]) -> None:
    """A remark introduced by an attribution or cross-reference phrase, after
    the work's own fields, is the note: to the closing bracket when it
    opened one, else to the end of the line (identifiers keep their labels)."""
    for m in _ATTRIBUTION.finditer(text):
        first = bisect_left(starts, m.start("cue"))
        if first >= len(tokens) or not any(x in _FIELD_LABELS for x in labels[:first]):
            continue
        if labels[first] in ("editors", "translators"):
            continue      # "edited by" is a role, handled elsewhere
        opener = text[:tokens[first].start].rstrip()[-1:]
        closer = {"(": ")", "[": "]"}.get(opener)
        last = len(tokens) - 1
        if closer:
            first -= 1    # the bracket goes with the remark
            for j in range(first + 1, len(tokens)):
                if tokens[j].text == closer:
                    last = j
                    break
        _to_note(labels, first, last)
        return


def _leftover_tail(tokens: list[Token], labels: list[str]) -> None:
    """Words at the end of the line that the labeler gave to no field
    (``... 1-20. [Entered from the old card index]``): kept as the note
    rather than dropped.  It takes two words or more (connectors such as
    "pp" and "and" do not count) after a sentence break or an opening
    bracket."""
    j = len(tokens) - 1
    while j >= 0 and (labels[j] == "O" or labels[j] in ID_LABEL_SET):
        j -= 1
    if j < 0 or labels[j] not in _FIELD_LABELS and labels[j] not in ("issue", "series", "place", "edition"):
        return
    tail = [k for k in range(j + 1, len(tokens)) if labels[k] == "O"]
    words = [k for k in tail if tokens[k].kind in ("word", "num", "initial")
             and tokens[k].text.lower().rstrip(".") not in _NOT_NOTE_WORDS]
    if len(words) < 2:
        return      # one stray word ("sv", "arXiv") is more likely a field's leftover than a remark
    first = words[0]
    # the remark starts a new sentence or bracket; "p>0", "Lason-Alon-..." continue a field
    if first == 0 or tokens[first - 1].text not in ".,;([" or tokens[first - 1].end == tokens[first].start \
            and tokens[first - 1].text in ".,;":
        return
    if tokens[first - 1].text in "([":
        first -= 1
    for k in tail:
        if k >= first:
            labels[k] = "note"     # its marginal stays the labeler's (for "no field")


# "... 1-20. - N. Feathergill, Dec 14 2012": a signed remark after a dash at
# the end of the line (who added the reference, and when).  It must name
# someone by an initial or carry a date; bounded, and tried on the tail only.
_SIGNATURE = re.compile(r"(?:[.,;)]|\d)\s*(?:-{1,2}|–|—)\s*(?=[A-Z~])(?P<sig>[^()\[\]]{2,80})\Z")
_SIGNED_BRACKET = re.compile(r"(?<=[.,;])\s*\[(?P<sig>[A-Z][^\[\]()]{2,80})\]\s*\Z")
_SIG_SHAPE = re.compile(r"\b[A-Z]\.|(?<!\d)(?:1[5-9]|20)\d\d(?!\d)")


def _signature(text: str, tokens: list[Token], starts: list[int], labels: list[str]) -> None:
    """A trailing signature is the note; the work's own fields stay (the
    date in the signature is when the remark was written, not the work's).
    Also in square brackets: ``... 1-20. [From N. Feathergill, Jan 2010]``."""
    lo = max(0, len(text.rstrip()) - 100)
    m = _SIGNATURE.search(text, lo) or _SIGNED_BRACKET.search(text, lo)
    if m is None or not _SIG_SHAPE.search(m.group("sig")):
        return
    first = bisect_left(starts, m.start("sig"))
    if m.re is _SIGNED_BRACKET and any(lab in ID_LABEL_SET for lab in labels[first:]):
        return    # "[MR2123456]", "[arXiv:...]": an identifier in brackets
    head = labels[:first]
    if first >= len(tokens) or not ("date" in head or "pages" in head or "volume" in head
                                    or "publisher" in head):
        return
    if "title" in labels[first:] or "authors" in labels[first:] and "authors" not in head:
        return    # the labeler saw the work's own fields there
    _to_note(labels, first, len(tokens) - 1)


# A place inside the work cited after its fields ("1-20; see p. 12", "1-20,
# Eq. (12)", "Lemma 4.2"): which part the collection means, a note -- not
# the work's pages or issue.  Common practice in catalogue references.
_PINPOINT = re.compile(
    r"[,;.(]\s*(?P<cue>[Ss]ee\s+(?:p\.|pp\.|pages?\b|§)|(?:[Ss]ee\s+)?(?:Eqs?\.|Equations?\b|Thm\.|Theorem\b|"
    r"Lemma\b|Prop\.|Proposition\b|Cor\.|Corollary\b|Remark\b|Example\b|Exercise\b|Table\b|Fig\.|Figure\b|"
    r"Sect?\.|Section\b|§)\s*\(?[\dA-Z])")


def _pinpoint_gate(text: str) -> bool:
    return ("ee p" in text or "Eq" in text or "Th" in text or "Lem" in text or "Prop" in text or "Cor" in text
            or "Rem" in text or "Ex" in text or "Tab" in text or "Fig" in text or "Sec" in text or "§" in text)


def _pinpoint(text: str, tokens: list[Token], starts: list[int], labels: list[str]) -> None:
    """The pinpoint and what follows it, after the work's own volume or
    pages, is the note (identifiers keep their labels)."""
    for m in _PINPOINT.finditer(text):
        first = bisect_left(starts, m.start("cue"))
        head = labels[:first]
        if first >= len(tokens) or not ("pages" in head or "volume" in head or "issue" in head
                                        or "date" in head and "publisher" in head):
            continue
        if "title" in labels[first:] or "container_title" in labels[first:]:
            return      # a title of the work itself comes later: not a pinpoint
        opener = text[:tokens[first].start].rstrip()[-1:]
        last = len(tokens) - 1
        if opener == "(":
            first -= 1
            last = next((j for j in range(first + 1, len(tokens)) if tokens[j].text == ")"), last)
        _to_note(labels, first, last)
        return


_HTML_TAG = re.compile(r"</?[A-Za-z][A-Za-z0-9]{0,9}(?:\s[^<>]{0,300})?>")


def _html_tags(text: str, tokens: list[Token], starts: list[int], labels: list[str]) -> None:
    """Markup pasted from a web page (``<a href="...">Title</a>``) is no
    field; a link inside it stays an identifier."""
    for m in _HTML_TAG.finditer(text):
        for j in _index(tokens, starts, m.start(), m.end()):
            if labels[j] not in ID_LABEL_SET:
                labels[j] = "O"
