"""Hypothesis strategies for reference models (shared by the foundation round-trip tests)."""

from hypothesis import strategies as st

from normform import capitals, ids
from normform.model import Date, FieldInfo, Kind, Name, Pages, Provenance, Reference, Span

SCHEME_ORDER = ("doi", "arxiv", "isbn", "issn", "mr", "zbl", "handle", "url")

_LETTER = st.sampled_from(list("abcdefghijklmnopqrstuvwxyzéüøçłőñßåıž"))
_UPPER = st.sampled_from(list("ABCDEFGHIJKLMNOPQRSTUVWXYZÉÜØÇŁŐÑÅŽ"))


def _word(upper: bool = True):
    head = _UPPER if upper else _LETTER
    return st.tuples(head, st.lists(_LETTER, min_size=1, max_size=7)).map(lambda t: t[0] + "".join(t[1]))


def _words(min_size=1, max_size=3, upper=True):
    return st.lists(_word(upper), min_size=min_size, max_size=max_size).map(" ".join)


_HYPHENATED = st.tuples(_word(), _word()).map(lambda t: f"{t[0]}-{t[1]}")
_FAMILY = st.one_of(_word(), _HYPHENATED, _words(2, 2),
                    st.tuples(_word(), _word(False), _word()).map(" ".join),   # Ojeda de Castilla
                    _word().map(lambda w: "O'" + w))
_GIVEN = st.one_of(_words(1, 2), _UPPER.map(lambda c: c + "."),
                   st.tuples(_UPPER, _UPPER).map(lambda t: f"{t[0]}. {t[1]}."), _HYPHENATED)
_PARTICLE = st.sampled_from(["van", "van der", "de", "de la", "von", "di", "du", "ten"])
_SUFFIX = st.sampled_from(["Jr.", "Sr.", "III", "IV"])


@st.composite
def names(draw, bibtex=True):
    if draw(st.integers(0, 9)) == 0:
        return Name(literal="The " + draw(_words(1, 3)) + " Society")
    particle = draw(st.none() | _PARTICLE)
    dropping = None if bibtex else draw(st.none() | _PARTICLE)
    if not bibtex and particle is not None and draw(st.booleans()):
        particle = particle.capitalize()
    return Name(family=draw(_FAMILY), given=draw(st.none() | _GIVEN), particle=particle,
                dropping_particle=dropping, suffix=draw(st.none() | _SUFFIX))


# Text with the characters TeX treats specially, to exercise escaping.
_PUNCT = st.sampled_from(["&", "%", "$", "#", "_", "~", "^", "\\", "--", "'", "“", "”", ":", "(n)",
                          ",", ".", "?", "–", "π", "≤", "x^2", "''", "``"])
_TOKEN = st.one_of(_word(), _word(False), _word(False), _PUNCT, st.integers(0, 2000).map(str),
                   st.sampled_from(["GL(n)", "McKay", "LaTeX", "SL(2)", "q-series", "K-theory"]))
TEXT = st.lists(_TOKEN, min_size=1, max_size=8).map(" ".join)


@st.composite
def titles(draw):
    title = draw(TEXT)
    words = title.split()
    chosen = draw(st.lists(st.sampled_from(words), max_size=2, unique=True))
    return title, capitals.canonical_hints(title, chosen)


_VALID = {
    "doi": ["10.1000/182", "10.1016/S1570-7954(08)00207-6", "10.1007/3-540-09519-5_73", "10.23638/LMCS-15(1:20)2019"],
    "arxiv": ["1301.3569", "1006.0367v3", "math/0701168v1", "math.GT/0309136"],
    "isbn": ["019853762X", "9780306406157", "0306406153"],   # the last has a bad check digit
    "issn": ["00029939", "03785955"],
    "mr": ["MR1234567 (2006j:05214)", "MR0045386", "2006j:05214"],
    "zbl": ["1127.11002", "0829.68111", "JFM 25.0123.01"],
    "handle": ["1721.1/12345"],
    "url": ["https://example.org/qsem/Q000123", "http://alpha.example.edu/~pete/notes.pdf"],
}


@st.composite
def identifiers(draw):
    out = []
    for scheme in SCHEME_ORDER:
        for raw in draw(st.lists(st.sampled_from(_VALID[scheme]), max_size=2, unique=True)):
            detail = draw(st.none() | st.just("math.CO")) if scheme == "arxiv" and not out_has(out, "arxiv") else None
            ident = ids.make(scheme, raw, detail=detail) if scheme != "mr" else ids.make(scheme, raw)
            out.append(ident)
    return tuple(out)


def out_has(out, scheme):
    return any(i.scheme == scheme for i in out)


_PAGE = st.one_of(st.integers(1, 999).map(str), st.sampled_from(["xii", "S12", "e1234"]))


@st.composite
def pages(draw):
    first = draw(_PAGE)
    last = draw(st.none() | _PAGE)
    article = draw(st.none() | st.sampled_from(["12", "13.2.4"]))
    count = draw(st.none() | st.sampled_from(["xiv+316", "253"]))
    return Pages(first=first, last=last, article=article, count=count)


@st.composite
def dates(draw):
    choice = draw(st.integers(0, 3))
    if choice == 0:
        return Date(literal=draw(st.sampled_from(["to appear", "in press", "n.d."])))
    year = draw(st.integers(1000, 2100))
    if choice == 1:
        return Date(year=year, circa=True)
    month = draw(st.none() | st.integers(1, 12))
    day = draw(st.integers(1, 28)) if month and draw(st.booleans()) else None
    season = draw(st.sampled_from(["Spring", "Winter"])) if month is None and draw(st.booleans()) else None
    return Date(year=year, month=month, day=day, season=season)


@st.composite
def accessed_dates(draw):
    """Access dates as typed in references: a full ISO-expressible date mostly, or a literal."""
    if draw(st.integers(0, 5)) == 0:
        return Date(literal=draw(st.sampled_from(["n.d.", "last week", "Spring term"])))
    year = draw(st.integers(1990, 2030))
    month = draw(st.none() | st.integers(1, 12))
    day = draw(st.integers(1, 31)) if month and draw(st.integers(0, 3)) else None
    return Date(year=year, month=month, day=day)


_REPORT_NUMBER = st.one_of(st.integers(1, 999).map(str), st.sampled_from(["TR-2007-13", "2004/17", "Q-12a"]))
_VERSION = st.sampled_from(["2.1", "0.9.3", "1", "2021.03", "3.0-beta"])

_FIELDS = ["title", "author", "year", "container_title", "pages"]


@st.composite
def provenances(draw):
    raw = draw(st.text(min_size=0, max_size=60))
    chosen = draw(st.lists(st.sampled_from(_FIELDS), unique=True, max_size=3))
    infos = []
    for name in chosen:
        start = draw(st.integers(0, 50))
        span = draw(st.none() | st.integers(0, 20).map(lambda n, s=start: Span(s, s + n)))
        infos.append(FieldInfo(name, draw(st.floats(0, 1, allow_nan=False)), span))
    return Provenance(raw=raw, fields=tuple(infos), confidence=draw(st.none() | st.floats(0, 1)),
                      origin=draw(st.none() | st.sampled_from(["legacy.txt:12", "Q000123"])))


_KEY = st.from_regex(r"\A[A-Za-z][A-Za-z0-9:_-]{0,12}\Z")
_opt = lambda s: st.none() | s  # noqa: E731


@st.composite
def references(draw, bibtex=True):
    kind = draw(st.sampled_from(list(Kind)))
    title, protected = draw(st.none() | titles()) or (None, ())
    genre = draw(_opt(st.sampled_from(["PhD thesis", "Master's thesis", "Technical report", "Lecture notes"])))
    extra = tuple(draw(st.lists(st.tuples(st.sampled_from(["abstract", "keywords", "howpublished"]), TEXT),
                                max_size=2, unique_by=lambda kv: kv[0])))
    return Reference(
        kind=kind,
        authors=tuple(draw(st.lists(names(bibtex), max_size=3))),
        editors=tuple(draw(st.lists(names(bibtex), max_size=2))),
        translators=tuple(draw(st.lists(names(bibtex), max_size=1))),
        title=title, title_protected=protected,
        container_title=draw(_opt(TEXT)), series=draw(_opt(TEXT)),
        series_number=draw(_opt(st.integers(1, 400).map(str))),
        volume=draw(_opt(st.integers(1, 400).map(str))), issue=draw(_opt(st.sampled_from(["3", "4-5", "Suppl."]))),
        pages=draw(_opt(pages())), date=draw(_opt(dates())),
        publisher=draw(_opt(TEXT)), place=draw(_opt(_words(1, 2))), edition=draw(_opt(st.sampled_from(["2nd", "3", "Revised"]))),
        genre=genre, language=draw(_opt(st.sampled_from(["english", "french", "de"]))),
        identifiers=draw(identifiers()), note=draw(_opt(TEXT)), key=draw(_KEY),
        report_number=draw(_opt(_REPORT_NUMBER)), accessed=draw(_opt(accessed_dates())),
        version=draw(_opt(_VERSION)),
        extra=extra, provenance=draw(_opt(provenances())),
    )
