"""Shared helpers of the formula tests: the dev cases and value comparison."""

from __future__ import annotations

import json
from decimal import Decimal
from fractions import Fraction
from pathlib import Path

FIXTURES = Path(__file__).parent / "fixtures" / "formula"
# Source: shared/eval/formulas-dev.jsonl (copied verbatim; see fixtures/formula/SOURCE.md).
CASES = [json.loads(line) for line in (FIXTURES / "formulas-dev.jsonl").read_text("utf-8").splitlines() if line]
VALID = [c for c in CASES if c["kind"] != "malformed"]
MALFORMED = [c for c in CASES if c["kind"] == "malformed"]


def as_decimal(value) -> Decimal:
    from normform.formula.evaluate import Approx

    if isinstance(value, Approx):
        return value.value
    q = Fraction(value)
    return Decimal(q.numerator) / Decimal(q.denominator)


def same_value(got, want: str) -> bool:
    """Exact strings must match exactly (and not as an approximation); decimal strings
    (30 significant digits, per the dev file's README) within relative 1e-25."""
    from normform.formula.evaluate import Approx

    if "." in want or "e+" in want:
        w = Decimal(want)
        return abs(as_decimal(got) - w) <= abs(w) * Decimal("1e-25") + Decimal("1e-28")
    return not isinstance(got, Approx) and Fraction(got) == Fraction(want)
