"""Errors of the formula engine."""

from __future__ import annotations

from normform.errors import PositionedError


class FormulaError(PositionedError):
    """A formula that cannot be read: position (1-based line/column), offending text, what was expected."""


class EvaluationError(ValueError):
    """A formula that parses but cannot be evaluated at the given point (unknown variable,
    division by zero, a term of a sequence, an infinite sum, ...)."""
