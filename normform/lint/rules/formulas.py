"""Rules about ``formulas``: they parse, agree with the terms, and use canonical spelling."""

from __future__ import annotations

from normform.formula.digits import term_text
from normform.lint import services
from normform.lint.fields import first_index
from normform.lint.findings import Fix
from normform.lint.formula_facts import facts, shifted_start, status, verdict, verdict_detail
from normform.lint.registry import rule

KINDS = ("closed-form", "recurrence", "ogf", "egf", "asymptotic", "identity", "other")


def _index_in(text: str, line: int, column: int) -> int:
    """Index into ``text`` of a 1-based (line, column)."""
    lines = text.split("\n")
    line = min(max(line, 1), len(lines))
    return min(sum(len(x) + 1 for x in lines[: line - 1]) + max(column - 1, 0), len(text))


@rule("formula-syntax", "formulas", "error", "a formula does not parse")
def formula_syntax(entry, ctx):
    for fact in facts(entry):
        if fact.crash:
            ctx.failed.setdefault("formula-engine", f"{entry.path}: {fact.text!r}: {fact.crash}")
        if fact.error is None:
            continue
        exc = fact.error
        index = _index_in(fact.text, getattr(exc, "line", 1) or 1, getattr(exc, "column", 1) or 1)
        expected = tuple(getattr(exc, "expected", ()) or ())
        message = f"this formula does not parse: {getattr(exc, 'message', str(exc))}"
        if expected:
            message += f"; expected {', '.join(expected[:6])}{' ...' if len(expected) > 6 else ''}"
        yield entry.finding(formula_syntax.rule, message, fact.path, span=entry.string_span(fact.path, index))


@rule("formula-disagrees", "formulas", "error", "a formula does not produce the listed terms")
def formula_disagrees(entry, ctx):
    if shifted_start(entry) is not None:
        return  # first-index-mismatch explains it better
    start = first_index(entry)
    for fact in facts(entry):
        v = verdict(entry, fact)
        if status(v) != "disagrees":
            continue
        index = verdict_detail(v, "index")
        expected, computed = verdict_detail(v, "expected"), verdict_detail(v, "computed")
        reason = verdict_detail(v, "reason")
        if index is not None and expected is not None and computed is not None:
            # values may pass Python's 4,300-digit str() limit: term_text prints them
            message = (f"the formula gives a({index}) = {term_text(computed)} but the terms list "
                       f"{term_text(expected)}; correct the formula or the terms")
        else:
            message = f"the formula does not fit the listed terms ({reason or 'no reason given'}); " \
                      "correct the formula or the terms"
        found = entry.finding(formula_disagrees.rule, message, fact.path)
        if isinstance(index, int) and 0 <= index - start < len(entry.data.get("terms", [])):
            span = entry.where.span(("terms", index - start))
            if span:
                line, col = entry.where.line_col(span[0])
                found.related.append((entry.path, line, col))
        yield found


@rule("formula-unchecked", "formulas", "note", "a formula could not be checked against the terms (says why)")
def formula_unchecked(entry, ctx):
    for fact in facts(entry):
        v = verdict(entry, fact)
        if status(v) == "cannot-check":
            reason = verdict_detail(v, "reason") or "no reason given"
            yield entry.finding(formula_unchecked.rule, f"this formula was not checked against the terms: "
                                f"{reason}", fact.path)


@rule("formula-spelling", "formulas", "note", "a formula is not written in the canonical ASCII spelling",
      fixable=True)
def formula_spelling(entry, ctx):
    for fact in facts(entry):
        if fact.formula is None:
            continue
        canonical = fact.formula.to_ascii()
        if canonical == fact.text:
            continue
        fix = None
        try:  # offer the rewrite only when it reads back as itself
            again = services.parse_formula(canonical)
            if again.to_ascii() == canonical:
                fix = Fix("rewrite in canonical ASCII", (entry.replace_value(fact.path, canonical),))
        except Exception:  # noqa: BLE001 - a canonical form that fails to parse is just not offered
            fix = None
        yield entry.finding(formula_spelling.rule, f"write this formula in canonical form: {canonical}",
                            fact.path, fix=fix)


def _kind_of(formula) -> str | None:
    kind = getattr(formula, "kind", None)
    kind = getattr(kind, "value", kind)
    if kind == "expression":
        kind = "closed-form"
    return kind if kind in KINDS else None


@rule("formula-kind-mismatch", "formulas", "warning", "a formula's declared kind differs from what it is",
      fixable=True)
def formula_kind_mismatch(entry, ctx):
    for fact in facts(entry):
        if fact.formula is None or fact.kind in (None, "other"):
            continue
        actual = _kind_of(fact.formula)
        if actual and actual != fact.kind:
            path = fact.path[:-1] + ("kind",)
            yield entry.finding(formula_kind_mismatch.rule, f"this formula reads as {actual!r}, "
                                f"not {fact.kind!r}; correct the kind", path,
                                fix=Fix(f"set kind to {actual}", (entry.replace_value(path, actual),)))
