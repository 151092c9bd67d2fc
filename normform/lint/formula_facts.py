"""Facts about an entry's formulas shared by several rules (parsed and checked once)."""

from __future__ import annotations

from dataclasses import dataclass, field

from normform.lint import services
from normform.lint.fields import first_index, formulas, int_terms

SHIFTS = (-1, 1, -2, 2)   # other first indices tried when a formula disagrees


@dataclass
class FormulaFact:
    path: tuple
    text: str
    kind: str | None                   # the kind the entry declares
    formula: object | None = None      # normform Formula when it parses
    error: Exception | None = None     # FormulaError when it does not
    crash: str | None = None           # the engine failed on it (not the contributor's fault)
    verdicts: dict = field(default_factory=dict)   # first index -> Verdict


def facts(entry) -> list[FormulaFact]:
    cached = entry.cache.get("formulas")
    if cached is not None:
        return cached
    cached = []
    listed = list(formulas(entry))
    if listed:
        error_class = services.formula_error_class()
        for path, text, kind in listed:
            fact = FormulaFact(path, text, kind)
            try:
                fact.formula = services.parse_formula(text)
            except error_class as exc:
                fact.error = exc
            except Exception as exc:  # noqa: BLE001 - an engine bug must not hide the other formulas
                fact.crash = f"{type(exc).__name__}: {exc}"
            cached.append(fact)
    entry.cache["formulas"] = cached
    return cached


def verdict(entry, fact: FormulaFact, start: int | None = None):
    """The check of ``fact`` against the terms from index ``start`` (default: first_index)."""
    terms = int_terms(entry)
    if fact.formula is None or terms is None:
        return None
    start = first_index(entry) if start is None else start
    if start not in fact.verdicts:
        try:
            fact.verdicts[start] = services.check_formula(fact.formula, terms, start)
        except services.Unavailable:
            raise
        except Exception as exc:  # noqa: BLE001 - recorded, reported by formula-unchecked
            fact.crash = fact.crash or f"{type(exc).__name__}: {exc}"
            fact.verdicts[start] = None
    return fact.verdicts[start]


def status(v) -> str | None:
    if v is None:
        return None
    value = getattr(v, "status", None)
    return getattr(value, "value", value)     # an Enum or a plain string


def verdict_detail(v, name: str):
    """Verdict fields under the names the checks area may use."""
    aliases = {
        "index": ("first_bad_index", "index", "bad_index", "at"),
        "expected": ("expected", "listed", "term"),
        "computed": ("computed", "got", "value"),
        "reason": ("reason", "why", "message"),
    }[name]
    for alias in aliases:
        value = getattr(v, alias, None)
        if value is not None:
            return value
    return None


def shifted_start(entry) -> tuple[int, int, int] | None:
    """``(start, current, count)`` when the disagreeing formulas all agree from another start."""
    if int_terms(entry) is None:
        return None
    cached = entry.cache.get("shifted")
    if cached is not None or "shifted" in entry.cache:
        return cached
    current = first_index(entry)
    parsed = [f for f in facts(entry) if f.formula is not None]
    statuses = [status(verdict(entry, f)) for f in parsed]
    bad = [f for f, s in zip(parsed, statuses) if s == "disagrees"]
    result = None
    if bad and "agrees" not in statuses:
        for shift in SHIFTS:
            start = current + shift
            if all(status(verdict(entry, f, start)) == "agrees" for f in bad):
                result = (start, current, len(bad))
                break
    entry.cache["shifted"] = result
    return result
