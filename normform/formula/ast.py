"""The formula model: immutable dataclass nodes with exact source spans.

Every node carries ``span`` = (start, end) character offsets into the parsed
text; spans are excluded from ``==`` and ``hash`` so two trees compare equal
when they have the same *structure* (``parse(ascii(f)) == f``).
``line_col(text, offset)`` turns an offset into 1-based line/column.

Printers and the evaluator subclass :class:`Visitor`, whose ``visit(node)``
dispatches to ``visit_<ClassName>``.

Stability contract: fields are only ever *added* (with defaults), never
renamed or removed; other areas (formula checks) walk these nodes.
"""

from __future__ import annotations

from dataclasses import dataclass, field, fields
from fractions import Fraction
from typing import Any, Iterator

Span = tuple[int, int]
NO_SPAN: Span = (0, 0)


# Longest operator chains (``a + b + ... `` with thousands of terms, bounded by the parser's
# MAX_LENGTH) make trees thousands of levels deep; the printers, the resolver and the
# evaluator walk them recursively, a few Python frames per level. Since Python 3.11 such
# frames live on the heap, not the C stack, so a larger recursion limit during those walks
# is safe; ``deep`` raises it (never lowers it) for the duration of a call.
DEEP_RECURSION = 60_000
_deep_active = [0]
_saved_limit: list = [None]


SHALLOW_TEXT = 200
"""Texts up to this length make trees shallow enough for the default limit."""


def deep(func=None, *, text=None):
    """Decorator: run ``func`` with room for DEEP_RECURSION frames (see above).
    ``text(*args)``, when given, returns the formula text: short texts skip the change."""
    if func is None:
        return lambda f: deep(f, text=text)
    import functools
    import sys

    @functools.wraps(func)
    def wrapper(*args, **kwargs):
        if text is not None and len(text(*args)) <= SHALLOW_TEXT:
            return func(*args, **kwargs)
        # the first call in raises the limit, the last one out restores it (calls nest,
        # and may overlap across threads)
        if _deep_active[0] == 0:
            old = sys.getrecursionlimit()
            if old < DEEP_RECURSION:
                _saved_limit[0] = old
                sys.setrecursionlimit(DEEP_RECURSION)
        _deep_active[0] += 1
        try:
            return func(*args, **kwargs)
        finally:
            _deep_active[0] -= 1
            if _deep_active[0] == 0 and _saved_limit[0] is not None:
                if sys.getrecursionlimit() == DEEP_RECURSION:
                    sys.setrecursionlimit(_saved_limit[0])
                _saved_limit[0] = None

    return wrapper


def line_col(text: str, offset: int) -> tuple[int, int]:
    """1-based (line, column) of ``offset`` in ``text``."""
    line = text.count("\n", 0, offset) + 1
    start = text.rfind("\n", 0, offset) + 1
    return line, offset - start + 1


_CHILD_FIELDS: dict[type, tuple[str, ...]] = {}


def _span() -> Any:
    return field(default=NO_SPAN, compare=False, repr=False, kw_only=True)


@dataclass(frozen=True)
class Node:
    """Base of all nodes."""

    def children(self) -> Iterator["Node"]:
        """Direct child nodes, in source order."""
        names = _CHILD_FIELDS.get(type(self))
        if names is None:
            names = _CHILD_FIELDS[type(self)] = tuple(
                f.name for f in fields(self) if f.name != "span" and f.compare)
        for name in names:
            value = getattr(self, name)
            if isinstance(value, Node):
                yield value
            elif isinstance(value, tuple):
                for item in value:
                    if isinstance(item, Node):
                        yield item
                    elif isinstance(item, tuple):
                        yield from (x for x in item if isinstance(x, Node))

    def walk(self) -> Iterator["Node"]:
        """This node and all descendants, pre-order, iteratively (no recursion limit)."""
        stack: list[Node] = [self]
        while stack:
            node = stack.pop()
            yield node
            stack.extend(reversed(list(node.children())))


# ---------------------------------------------------------------- numbers ---

@dataclass(frozen=True)
class Integer(Node):
    value: int
    span: Span = _span()


@dataclass(frozen=True)
class Rational(Node):
    """An exact rational literal (made by rewrites, e.g. ``Decimal`` exactness); ``value`` is a Fraction."""
    value: Fraction
    span: Span = _span()


@dataclass(frozen=True)
class Decimal(Node):
    """A decimal literal as written (``0.25``); ``value`` is its exact Fraction."""
    text: str
    value: Fraction
    span: Span = _span()


# ---------------------------------------------------------------- names -----

@dataclass(frozen=True)
class Symbol(Node):
    """A variable: ``n``, ``k``, ``x``."""
    name: str
    span: Span = _span()


@dataclass(frozen=True)
class Constant(Node):
    """A named constant. ``name`` is canonical: pi, e, phi (golden ratio), gamma (Euler), i, infinity."""
    name: str
    written: str = field(default="", compare=False)
    span: Span = _span()


# ---------------------------------------------------------------- operators -

@dataclass(frozen=True)
class UnaryOp(Node):
    """``op`` is ``"-"`` (negation)."""
    op: str
    operand: Node
    span: Span = _span()


@dataclass(frozen=True)
class BinOp(Node):
    """``op`` in ``+ - * / mod``. Implicit products are ``*`` (``implicit`` records the spelling)."""
    op: str
    left: Node
    right: Node
    implicit: bool = field(default=False, compare=False)
    span: Span = _span()


@dataclass(frozen=True)
class Power(Node):
    base: Node
    exponent: Node
    span: Span = _span()


@dataclass(frozen=True)
class Factorial(Node):
    """``n!`` (``double=False``) or ``n!!`` (``double=True``)."""
    operand: Node
    double: bool = False
    span: Span = _span()


@dataclass(frozen=True)
class Call(Node):
    """A known function or named number; ``name`` is the canonical registry name
    (see :mod:`normform.formula.functions`), ``written`` the spelling in the text."""
    name: str
    args: tuple[Node, ...]
    written: str = field(default="", compare=False)
    span: Span = _span()


@dataclass(frozen=True)
class SeqRef(Node):
    """A reference to a sequence or table term: ``a(n-1)``, ``a_{n-1}``, ``T(n,k)``."""
    name: str
    indices: tuple[Node, ...]
    subscript: bool = field(default=False, compare=False)
    span: Span = _span()


@dataclass(frozen=True)
class BigOp(Node):
    """A sum (``op="sum"``) or product (``op="prod"``) over ``var``.

    Bounds: ``lower``/``upper`` (``upper`` may be ``Constant("infinity")``), or
    ``divides`` = m for "``var`` runs over the positive divisors of m" (``d|n``).
    ``lower`` None with ``divides`` None means "over all ``var``" (unbounded, not evaluable).
    """
    op: str
    var: str
    body: Node
    lower: Node | None = None
    upper: Node | None = None
    divides: Node | None = None
    span: Span = _span()


@dataclass(frozen=True)
class Dots(Node):
    """A sum or product written with an ellipsis: ``1 + 3 + 5 + ... + (2n-1)``.
    ``op`` is ``"+"`` or ``"*"``; ``first`` the terms before the dots, ``last`` the final term."""
    op: str
    first: tuple[Node, ...]
    last: Node
    span: Span = _span()


# ---------------------------------------------------------------- relations -

RELATIONS = ("=", "!=", "<", ">", "<=", ">=", "~", "==")  # "==" is congruence (≡)


@dataclass(frozen=True)
class Relation(Node):
    """A chain ``a op1 b op2 c``: ``operands`` has one more item than ``ops``.
    ``modulus`` set means a congruence ``a ≡ b (mod m)`` (ops are ``"=="``)."""
    ops: tuple[str, ...]
    operands: tuple[Node, ...]
    modulus: Node | None = None
    span: Span = _span()


@dataclass(frozen=True)
class Parity(Node):
    """The condition "``operand`` is even/odd" (``even`` True/False)."""
    operand: Node
    even: bool
    span: Span = _span()


@dataclass(frozen=True)
class And(Node):
    items: tuple[Node, ...]
    span: Span = _span()


@dataclass(frozen=True)
class Piecewise(Node):
    """``branches`` = ((value, condition), ...); the last condition may be None ("otherwise")."""
    branches: tuple[tuple[Node, Node | None], ...]
    span: Span = _span()


# ---------------------------------------------------------------- statement -

@dataclass(frozen=True)
class Initial(Node):
    """Initial values ``a(0) = a(1) = 1``: each target is a SeqRef with constant indices."""
    targets: tuple[Node, ...]
    value: Node
    span: Span = _span()


@dataclass(frozen=True)
class Statement(Node):
    """A whole line.

    ``label``: "ogf", "egf" or None (from ``G.f.:``, ``E.g.f.:``...);
    ``body``: an expression or a :class:`Relation` (its first and last operands are lhs/rhs);
    ``conditions``: range/parity clauses (``for n >= 1``, ``0 <= k <= n``);
    ``initial``: :class:`Initial` clauses; ``note``: trailing attribution text (not math).
    """
    body: Node
    label: str | None = None
    conditions: tuple[Node, ...] = ()
    initial: tuple[Initial, ...] = ()
    note: str | None = None
    span: Span = _span()


# ---------------------------------------------------------------- visitor ---

_DISPATCH: dict[tuple[type, type], Any] = {}


class Visitor:
    """Dispatch ``visit(node)`` to ``visit_<ClassName>(node)``; ``generic_visit`` otherwise."""

    def visit(self, node: Node) -> Any:
        key = (type(self), type(node))
        fn = _DISPATCH.get(key)
        if fn is None:
            fn = getattr(type(self), "visit_" + type(node).__name__, None) or type(self).generic_visit
            _DISPATCH[key] = fn
        return fn(self, node)

    def generic_visit(self, node: Node) -> Any:
        raise NotImplementedError(f"{type(self).__name__} cannot handle {type(node).__name__}")


def free_symbols(node: Node) -> set[str]:
    """Names of the free variables of ``node`` (bound sum/product variables excluded)."""
    out: set[str] = set()
    stack: list[tuple[Node, frozenset[str]]] = [(node, frozenset())]
    while stack:
        cur, bound = stack.pop()
        if isinstance(cur, Symbol):
            if cur.name not in bound:
                out.add(cur.name)
            continue
        if isinstance(cur, BigOp):
            for part in (cur.lower, cur.upper, cur.divides):
                if part is not None:
                    stack.append((part, bound))
            stack.append((cur.body, bound | {cur.var}))
            continue
        for child in cur.children():
            stack.append((child, bound))
    return out


def seq_refs(node: Node) -> list[SeqRef]:
    """All sequence references inside ``node``."""
    return [n for n in node.walk() if isinstance(n, SeqRef)]
