"""Rules about ``terms`` and ``first_index``."""

from __future__ import annotations

import re

from normform.lint.findings import Fix
from normform.lint.registry import rule


@rule("term-not-integer", "terms", "error", "a term is not an integer", fixable=True)
def term_not_integer(entry, ctx):
    terms = entry.data.get("terms")
    if not isinstance(terms, list):
        return
    for i, value in enumerate(terms):
        if isinstance(value, int) and not isinstance(value, bool):
            continue
        fixed = None
        if isinstance(value, float) and value.is_integer() and abs(value) < 2**53:
            fixed = int(value)
        elif isinstance(value, str) and re.fullmatch(r"\s*-?\d+\s*", value):
            fixed = int(value)
        fix = None
        if fixed is not None:
            fix = Fix("write the term as an integer", (entry.replace_value(("terms", i), fixed),))
        shown = repr(value) if not isinstance(value, bool) else str(value).lower()
        yield entry.finding(term_not_integer.rule, f"term {i + 1} ({shown}) is not an integer; "
                            "list terms as plain integers" + (f", e.g. {fixed}" if fixed is not None else ""),
                            ("terms", i), fix=fix)


@rule("too-few-terms", "terms", "warning", "fewer terms than the catalogue's minimum (setting min-terms)")
def too_few_terms(entry, ctx):
    terms = entry.data.get("terms")
    if isinstance(terms, list) and len(terms) < ctx.settings.min_terms:
        yield entry.finding(too_few_terms.rule, f"list at least {ctx.settings.min_terms} terms "
                            f"(found {len(terms)})", ("terms",))


@rule("first-index-mismatch", "terms", "error",
      "first_index does not fit the formulas: they match the terms only from another index", fixable=True)
def first_index_mismatch(entry, ctx):
    from normform.lint.formula_facts import shifted_start

    found = shifted_start(entry)
    if found is None:
        return
    start, current, count = found
    if "first_index" in entry.data:
        path = ("first_index",)
        fix = Fix(f"set first_index to {start}", (entry.replace_value(path, start),))
    else:
        path = ("terms",)
        fix = Fix(f"add first_index = {start}", (entry.insert_top_level_after("terms", "first_index", start),))
    yield entry.finding(first_index_mismatch.rule, f"the terms match the formula{'s' if count > 1 else ''} "
                        f"when the first term is a({start}), not a({current}); set first_index = {start}",
                        path, fix=fix)
