"""The rule registry: every rule is a small function registered with :func:`rule`.

A rule module ``normform/lint/rules/<category>.py`` defines functions like::

    @rule("title-missing", "entry", "error", "the entry has no title")
    def title_missing(entry, ctx):
        ...yield entry.finding(title_missing.rule, "add a title", ("title",))

Per-entry rules take ``(entry, ctx)``; catalogue rules (``scope="catalogue"``)
take ``(entries, ctx)`` and see every entry of the run at once.
"""

from __future__ import annotations

import importlib
from dataclasses import dataclass
from typing import Callable, Iterable

from normform.lint.findings import SEVERITIES

CATEGORIES = ("entry", "formulas", "references", "links", "terms", "programs", "text", "catalogue")


@dataclass(frozen=True, slots=True)
class Rule:
    slug: str
    category: str
    severity: str
    summary: str               # one line for --list-rules and SARIF
    check: Callable
    scope: str = "entry"       # "entry" or "catalogue"
    fixable: bool = False


_RULES: dict[str, Rule] = {}


def rule(slug: str, category: str, severity: str, summary: str, *, scope: str = "entry",
         fixable: bool = False):
    if severity not in SEVERITIES:
        raise ValueError(f"bad severity {severity!r}")
    if category not in CATEGORIES:
        raise ValueError(f"bad category {category!r}")

    def register(func):
        if slug in _RULES:
            raise ValueError(f"rule {slug!r} registered twice")
        func.rule = _RULES[slug] = Rule(slug, category, severity, summary, func, scope, fixable)
        return func

    return register


def all_rules() -> list[Rule]:
    """Every rule, in category then registration order."""
    for category in CATEGORIES:
        importlib.import_module(f"normform.lint.rules.{category}")
    order = {c: i for i, c in enumerate(CATEGORIES)}
    return sorted(_RULES.values(), key=lambda r: order[r.category])


def select_rules(select: Iterable[str] = (), ignore: Iterable[str] = ()) -> list[Rule]:
    """Rules chosen by slug or category; unknown names raise ``KeyError``."""
    rules = all_rules()
    known = {r.slug for r in rules} | set(CATEGORIES)
    select, ignore = list(select), list(ignore)
    for name in select + ignore:
        if name not in known:
            raise KeyError(name)

    def hit(r: Rule, names: list[str]) -> bool:
        return r.slug in names or r.category in names

    chosen = [r for r in rules if not select or hit(r, select)]
    return [r for r in chosen if not hit(r, ignore)]
