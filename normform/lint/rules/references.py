"""Rules about ``references``: parsable, complete, valid identifiers, no repeats, house style."""

from __future__ import annotations

import re
import unicodedata

from normform.lint import services
from normform.lint.findings import Fix
from normform.lint.refs_facts import items, parsed, reference_ids, work_key
from normform.lint.registry import rule


@rule("reference-unparsed", "references", "warning",
      "a reference line cannot be parsed with confidence (setting min-confidence)")
def reference_unparsed(entry, ctx):
    for item in items(entry):
        if item.text is None:
            continue
        ref = parsed(entry, item)
        confidence = ref.confidence
        if confidence is not None and confidence < ctx.settings.min_confidence:
            yield entry.finding(reference_unparsed.rule,
                                f"this reference could not be read with confidence ({confidence:.2f}); "
                                "write authors, title, venue, volume, year and pages in a usual order, "
                                "or give it as a structured table", item.path)


def _missing(ref) -> list[str]:
    kind = getattr(ref.kind, "value", ref.kind)
    out = []
    if kind in ("article", "book", "chapter", "paper", "thesis", "report") and ref.year is None:
        out.append("year")
    if kind == "article":
        if not ref.container_title:
            out.append("journal")
        if ref.pages is None or not (ref.pages.first or ref.pages.article):
            out.append("pages")
    return out


@rule("reference-incomplete", "references", "warning", "an article lacks its year, journal or pages (a work lacks its year)")
def reference_incomplete(entry, ctx):
    for item in items(entry):
        ref = parsed(entry, item)
        if item.text is not None and (ref.confidence or 0) < ctx.settings.min_confidence:
            continue   # reference-unparsed says it; its fields are guesses
        missing = _missing(ref)
        if missing:
            kind = getattr(ref.kind, "value", ref.kind)
            yield entry.finding(reference_incomplete.rule, f"this {kind} reference has no "
                                f"{', '.join(missing)}; add {'it' if len(missing) == 1 else 'them'}", item.path)


def _bad_ident(entry, ctx, rule_obj, schemes: tuple[str, ...], what: str):
    ids = services.need("normform.ids")
    for ref_path, ident, (path, start, end) in reference_ids(entry):
        if ident.scheme not in schemes or ident.valid:
            continue
        try:
            ids.validate(ident.scheme, ident.value)
            reason = "it is not valid"
        except ValueError as exc:
            reason = getattr(exc, "message", str(exc))
        yield entry.finding(rule_obj, f"this {what} is not valid: {reason}; copy it again from the source",
                            path, span=entry.string_span(path, start, end))


@rule("doi-invalid", "references", "error", "a DOI is not well formed")
def doi_invalid(entry, ctx):
    yield from _bad_ident(entry, ctx, doi_invalid.rule, ("doi",), "DOI")


@rule("isbn-check-digit", "references", "error", "an ISBN has a wrong check digit or length")
def isbn_check_digit(entry, ctx):
    yield from _bad_ident(entry, ctx, isbn_check_digit.rule, ("isbn",), "ISBN")


@rule("issn-check-digit", "references", "error", "an ISSN has a wrong check digit or form")
def issn_check_digit(entry, ctx):
    yield from _bad_ident(entry, ctx, issn_check_digit.rule, ("issn",), "ISSN")


@rule("arxiv-malformed", "references", "error", "an arXiv identifier is malformed")
def arxiv_malformed(entry, ctx):
    yield from _bad_ident(entry, ctx, arxiv_malformed.rule, ("arxiv",), "arXiv identifier")


@rule("reference-duplicate", "references", "warning", "the entry cites the same work twice")
def reference_duplicate(entry, ctx):
    seen: dict[tuple, tuple] = {}
    for item in items(entry):
        key = work_key(entry, item)
        if key in seen:
            line = entry.where.line_col(entry.where.span(seen[key])[0])[0]
            yield entry.finding(reference_duplicate.rule, f"this cites the same work as the reference on "
                                f"line {line}; keep one of them", item.path)
        else:
            seen[key] = item.path


def _core(r) -> dict:
    return {
        "authors": [n.family_full() for n in r.authors], "title": r.title, "venue": r.container_title,
        "volume": r.volume, "issue": r.issue, "year": r.year,
        "pages": r.pages.range_text() if r.pages else None,
        "identifiers": sorted((i.scheme, i.value.lower()) for i in r.identifiers), "publisher": r.publisher,
    }


def _lost(a, b) -> list[str]:
    """Fields of record ``a`` that the restyled line (read back as ``b``) does not carry the same."""
    ca, cb = _core(a), _core(b)
    return [k for k in ca if ca[k] != cb[k]]


# Words a house style may add, drop or respell without changing what a line
# says: field labels and joiners (common practice of reference styles).
DECORATION = frozenset("""pp p pg pages page vol vols volume volumes no nos nr number numbers issue iss
and in eds ed edn edition editor editors edited by et al""".split())

_TOKEN = re.compile(r"[^\W_]+")


def _folded_tokens(text: str) -> list[tuple[str, bool]]:
    """(case- and accent-folded letters/digits token, abbreviated i.e. followed by '.') per token."""
    plain = "".join(c for c in unicodedata.normalize("NFKD", text) if not unicodedata.combining(c))
    return [(m.group().casefold(), plain[m.end():m.end() + 1] == ".") for m in _TOKEN.finditer(plain)]


def words_dropped(original: str, styled: str) -> list[str]:
    """Words of ``original`` missing from ``styled`` (empty: nothing the line says is lost).

    A word the line abbreviates with a full stop ("Fib.") may come back spelled
    out ("Fibonacci"); a full word ("Quill") must come back whole, so a
    restyling that cuts names to initials is caught.
    """
    have = {w for w, _ in _folded_tokens(styled)}
    missing = []
    for word, abbreviated in _folded_tokens(original):
        if word in DECORATION or word in have:
            continue
        if abbreviated and any(h.startswith(word) for h in have):
            continue
        missing.append(word)
    return missing


@rule("reference-house-style", "references", "note",
      "a confidently read reference line differs from the house style (setting style-confidence)", fixable=True)
def reference_house_style(entry, ctx):
    style = None
    for item in items(entry):
        if item.text is None:
            continue
        ref = parsed(entry, item)
        if (ref.confidence or 0) < ctx.settings.style_confidence:
            continue   # a rewrite of a doubtful reading could lose what the line says
        style = style or services.house_style()
        styled = style.format(ref)
        if not styled or styled == item.text:
            continue
        try:
            lost = _lost(ref, services.parse_reference(styled))
        except ValueError:
            lost = ["everything (the restyled line cannot be read)"]
        # The fix is offered only when it is safe: a confident reading, and no
        # word of the line missing from the rewrite (parser slips show up there).
        why = ""
        dropped = words_dropped(item.text, styled)
        if lost:
            why = f"the automatic form would change {', '.join(lost)}"
        elif dropped:
            why = f"the automatic form would drop the words {', '.join(dict.fromkeys(dropped))}"
        elif (ref.confidence or 0) < ctx.settings.fix_confidence:
            why = (f"the line was read with confidence {ref.confidence or 0:.2f}, below the "
                   f"{ctx.settings.fix_confidence} an automatic rewrite needs (setting fix-confidence)")
        if not why:
            yield entry.finding(reference_house_style.rule, f"write this reference in house style: {styled}",
                                item.path,
                                fix=Fix("rewrite in house style", (entry.replace_value(item.path, styled),)))
        else:
            yield entry.finding(reference_house_style.rule, f"this reference differs from the house style; "
                                f"rewrite it by hand ({why}): {styled}", item.path)
