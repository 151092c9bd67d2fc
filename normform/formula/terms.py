"""Exact terms of a parsed formula: closed forms, recurrences, generating functions.

``terms(formula, first_index, count, initial=None)`` and ``series(formula,
count)`` are what ``Formula.terms`` / ``Formula.series`` delegate to.

The formula tree (:mod:`normform.formula.ast`) is compiled once into nested
closures, then called once per index: a recurrence rule ``a(n) = ...`` runs
in a few microseconds a term, and ``a(n-1)`` becomes a lookup in the table
of computed terms (:mod:`normform.formula.recurrence`), never a recursive
call.  Generating functions are read into truncated power series
(:mod:`normform.formula.series`).  Named numbers (binomial, Stirling, Bell,
...) come from the formula engine's registry :mod:`normform.formula.functions`.

Everything that cannot be computed exactly raises :class:`CannotCompute`
(or a :class:`~normform.formula.recurrence.RecurrenceError`) with a plain
reason; the checker turns those into ``cannot-check`` verdicts.
"""

from __future__ import annotations

import signal
import threading
import time
from contextlib import contextmanager
from dataclasses import dataclass, field
from fractions import Fraction
from math import factorial as _factorial
from typing import Any, Callable, Iterator, Mapping

from normform.formula import ast as A
from normform.formula import recurrence as R
from normform.formula import series as S

Number = int | Fraction
Env = dict[str, Any]
Code = Callable[[Env], Any]

MAX_BITS = R.MAX_BITS
MAX_LOOP = 100_000  # iterations of one finite sum/product
MAX_FACTORIAL = 5_000


class CannotCompute(ValueError):
    """The formula cannot be computed exactly here; ``reason`` says why in plain words."""

    def __init__(self, reason: str, node: A.Node | None = None) -> None:
        self.reason = reason
        self.span = getattr(node, "span", None)
        super().__init__(reason)


# ------------------------------------------------------------------ budget ---
# A per-check time budget.  Loops of the compiled code (sums, products) look
# at the deadline cooperatively; on the main thread an interval timer also
# interrupts a long call into a named function (Bell(20000)).  The deadline
# is per thread: checks running in several threads at once (a threaded
# server, a Dask worker) each save and restore their own, where one global
# deadline left a finished thread's -- soon past -- deadline behind for all.

_NO_DEADLINE = float("inf")
_local = threading.local()


def _deadline() -> float:
    return getattr(_local, "deadline", _NO_DEADLINE)


@contextmanager
def budget(seconds: float) -> Iterator[None]:
    """Run the body under a time budget; overrunning raises :class:`~normform.formula.recurrence.LimitExceeded`."""
    saved = _deadline()
    _local.deadline = min(saved, time.monotonic() + seconds)
    timer = False
    active = [True]
    if threading.current_thread() is threading.main_thread() and hasattr(signal, "setitimer") \
            and signal.getsignal(signal.SIGALRM) in (signal.SIG_DFL, None) and saved == _NO_DEADLINE:
        def on_alarm(signum: int, frame: Any) -> None:
            if active[0]:  # a late alarm after the body finished is ignored
                raise R.LimitExceeded(f"time budget of {seconds:g} s spent")
        signal.signal(signal.SIGALRM, on_alarm)
        signal.setitimer(signal.ITIMER_REAL, seconds + 0.25)  # cooperative checks usually fire first
        timer = True
    try:
        yield
    finally:
        active[0] = False
        _local.deadline = saved
        if timer:
            signal.setitimer(signal.ITIMER_REAL, 0)
            signal.signal(signal.SIGALRM, signal.SIG_DFL)


def _check_time() -> None:
    if time.monotonic() > _deadline():
        raise R.LimitExceeded("time budget spent")


# ------------------------------------------------------------------ helpers --

def _norm(value: Any) -> Any:
    if type(value) is Fraction and value.denominator == 1:
        return value.numerator
    return value


def _bits(value: Number) -> int:
    if isinstance(value, int):
        return value.bit_length()
    if isinstance(value, Inexact):
        return 0
    return max(value.numerator.bit_length(), value.denominator.bit_length())


def _as_int(value: Any, what: str, node: A.Node | None = None) -> int:
    if isinstance(value, bool):
        return int(value)
    if isinstance(value, int):
        return value
    if isinstance(value, Fraction) and value.denominator == 1:
        return value.numerator
    raise CannotCompute(f"{what} must be an integer, got {value}", node)


def _div(a: Any, b: Any) -> Any:
    if b == 0:
        raise ZeroDivisionError("division by zero")
    if type(a) is int and type(b) is int:
        q, r = divmod(a, b)
        return q if r == 0 else Fraction(a, b)
    return _norm(Fraction(a) / Fraction(b))


def _power(base: Any, exponent: Any, node: A.Node | None) -> Any:
    if isinstance(exponent, Fraction) and exponent.denominator != 1:
        try:
            return _norm(S._rational_power(Fraction(base), exponent))
        except S.SeriesError as exc:
            raise CannotCompute(str(exc), node) from None
    e = _as_int(exponent, "an exponent", node)
    if e < 0:
        if base == 0:
            raise ZeroDivisionError("0 to a negative power")
        return _div(1, _power(base, -e, node))
    if base in (0, 1, -1):
        return base ** e
    if e * _bits(base) > 4 * MAX_BITS:
        raise CannotCompute(f"a power with about {e * _bits(base)} bits exceeds the size limit", node)
    return _norm(base ** e)


def _double_factorial(n: int) -> int:
    if n < -1:
        raise CannotCompute(f"double factorial of {n} is undefined")
    out = 1
    while n > 1:
        out *= n
        n -= 2
    return out


_COMPARE = {
    "=": lambda a, b: a == b, "!=": lambda a, b: a != b, "<": lambda a, b: a < b,
    ">": lambda a, b: a > b, "<=": lambda a, b: a <= b, ">=": lambda a, b: a >= b,
}


def _call_named(name: str, args: list[Any], node: A.Node) -> Any:
    """A named function of the engine's registry, on exact arguments."""
    from normform.formula import functions as F

    spec = F.REGISTRY.get(name)
    fn = spec.exact if spec is not None else None
    if fn is None:
        if name == "sqrt" and len(args) == 1:
            root = F.integer_sqrt_exact(args[0])
            if root is not None:
                return _norm(root)
            raise CannotCompute(f"sqrt({args[0]}) is irrational; exact terms cannot be computed", node)
        raise CannotCompute(f"{getattr(node, 'written', '') or name}(...) cannot be computed exactly", node)
    try:
        return _norm(fn(*args))
    except (ZeroDivisionError, CannotCompute, R.RecurrenceError):
        raise
    except (ValueError, TypeError, ArithmeticError) as exc:
        raise CannotCompute(f"{name}({', '.join(map(str, args))}): {exc}", node) from None


# ------------------------------------------------------ exact compilation --

class ExactCompiler(A.Visitor):
    """AST -> closure ``code(env)`` returning an exact int / Fraction (or bool for conditions).

    ``env`` maps variable names to values and ``"@" + name`` to the lookup
    function of a sequence being computed (``a(n-1)`` -> ``env["@a"](n-1)``).
    """

    def __init__(self, sequences: frozenset[str] = frozenset()) -> None:
        self.sequences = sequences

    def compile(self, node: A.Node) -> Code:
        return self.visit(node)

    def generic_visit(self, node: A.Node) -> Code:
        raise CannotCompute(f"{type(node).__name__} cannot be computed as an exact number", node)

    # numbers and names
    def visit_Integer(self, node: A.Integer) -> Code:
        v = node.value
        return lambda env: v

    def visit_Rational(self, node: A.Rational) -> Code:
        v = _norm(Fraction(node.value))
        return lambda env: v

    visit_Decimal = visit_Rational

    def visit_Symbol(self, node: A.Symbol) -> Code:
        name = node.name

        def symbol(env: Env) -> Any:
            try:
                return env[name]
            except KeyError:
                raise CannotCompute(f"the variable {name} has no value", node) from None
        return symbol

    def visit_Constant(self, node: A.Constant) -> Code:
        raise CannotCompute(f"the constant {node.written or node.name} is not rational; "
                            "exact terms cannot be computed", node)

    # operators
    def visit_UnaryOp(self, node: A.UnaryOp) -> Code:
        inner = self.visit(node.operand)
        return lambda env: -inner(env)

    def visit_BinOp(self, node: A.BinOp) -> Code:
        left, right = self.visit(node.left), self.visit(node.right)
        op = node.op
        if op == "+":
            return lambda env: left(env) + right(env)
        if op == "-":
            return lambda env: left(env) - right(env)
        if op == "*":
            return lambda env: _norm(left(env) * right(env))
        if op == "/":
            return lambda env: _div(left(env), right(env))
        if op == "mod":
            def mod(env: Env) -> Any:
                m = right(env)
                if m == 0:
                    raise ZeroDivisionError("modulo zero")
                return _norm(left(env) % m)
            return mod
        raise CannotCompute(f"the operator {op} is not supported", node)

    def visit_Power(self, node: A.Power) -> Code:
        base, exponent = self.visit(node.base), self.visit(node.exponent)
        if isinstance(node.exponent, A.Integer) and 0 <= node.exponent.value <= 64:
            e = node.exponent.value
            return lambda env: base(env) ** e
        return lambda env: _power(base(env), exponent(env), node)

    def visit_Factorial(self, node: A.Factorial) -> Code:
        inner = self.visit(node.operand)
        double = node.double

        def fact(env: Env) -> int:
            n = _as_int(inner(env), "the argument of a factorial", node)
            if n > MAX_FACTORIAL:
                raise CannotCompute(f"{n}! exceeds the size limit", node)
            if double:
                return _double_factorial(n)
            if n < 0:
                raise CannotCompute(f"factorial of the negative number {n}", node)
            return _factorial(n)
        return fact

    def visit_Call(self, node: A.Call) -> Code:
        args = [self.visit(a) for a in node.args]
        name = node.name
        if name in _ROUNDING and len(args) == 1:
            f = _ROUNDING[name]
            a0 = args[0]
            return lambda env: f(a0(env))
        return lambda env: _call_named(name, [a(env) for a in args], node)

    def visit_SeqRef(self, node: A.SeqRef) -> Code:
        key = "@" + node.name
        if node.name not in self.sequences:
            raise CannotCompute(f"{node.name}({', '.join('...' for _ in node.indices)}) refers to a sequence "
                                "that this formula does not define", node)
        if len(node.indices) != 1:
            raise CannotCompute(f"{node.name} has {len(node.indices)} indices; only one-index sequences "
                                "can be computed", node)
        index = self.visit(node.indices[0])
        return lambda env: env[key](index(env))

    def visit_BigOp(self, node: A.BigOp) -> Code:
        body = self.visit(node.body)
        var, is_sum = node.var, node.op == "sum"
        if node.divides is not None:
            m_code = self.visit(node.divides)

            def over_divisors(env: Env) -> Any:
                m = _as_int(m_code(env), "the number whose divisors are taken", node)
                if m <= 0 or m > 10 ** 12:
                    raise CannotCompute(f"divisors of {m} are out of range", node)
                return _fold(env, var, _divisors(m), body, is_sum, node)
            return over_divisors
        if node.lower is None or node.upper is None or (
                isinstance(node.upper, A.Constant) and node.upper.name == "infinity"):
            raise CannotCompute(f"the {'sum' if is_sum else 'product'} over {var} is unbounded", node)
        lo, hi = self.visit(node.lower), self.visit(node.upper)

        def bigop(env: Env) -> Any:
            a = _as_int(lo(env), "a lower bound", node)
            b = _as_int(hi(env), "an upper bound", node)
            if b - a > MAX_LOOP:
                raise CannotCompute(f"a {'sum' if is_sum else 'product'} of {b - a + 1} terms exceeds the limit",
                                    node)
            return _fold(env, var, range(a, b + 1), body, is_sum, node)
        return bigop

    def visit_Dots(self, node: A.Dots) -> Code:
        raise CannotCompute("a sum or product written with '...' cannot be computed term by term", node)

    # conditions
    def visit_Relation(self, node: A.Relation) -> Code:
        parts = [self.visit(o) for o in node.operands]
        ops = list(node.ops)
        modulus = self.visit(node.modulus) if node.modulus is not None else None

        def relation(env: Env) -> bool:
            values = [p(env) for p in parts]
            m = modulus(env) if modulus is not None else None
            for op, a, b in zip(ops, values, values[1:]):
                if op == "==" or m is not None:
                    if m is None or (a - b) % m != 0:
                        return False
                elif op == "~":
                    raise CannotCompute("'~' is not a condition", node)
                elif not _COMPARE[op](a, b):
                    return False
            return True
        return relation

    def visit_Parity(self, node: A.Parity) -> Code:
        inner, even = self.visit(node.operand), node.even
        return lambda env: (_as_int(inner(env), "a parity test", node) % 2 == 0) == even

    def visit_And(self, node: A.And) -> Code:
        items = [self.visit(i) for i in node.items]
        return lambda env: all(i(env) for i in items)

    def visit_Piecewise(self, node: A.Piecewise) -> Code:
        branches = [(self.visit(v), self.visit(c) if c is not None else None) for v, c in node.branches]

        def piecewise(env: Env) -> Any:
            for value, cond in branches:
                if cond is None or cond(env):
                    return value(env)
            raise CannotCompute("no branch of the piecewise definition applies", node)
        return piecewise


def _floor(v: Any) -> int:
    return v if isinstance(v, int) else v.numerator // v.denominator


def _ceil(v: Any) -> int:
    return v if isinstance(v, int) else -((-v.numerator) // v.denominator)


def _sign(v: Any) -> int:
    return (v > 0) - (v < 0)


_ROUNDING: dict[str, Callable[[Any], Any]] = {
    "floor": _floor, "ceil": _ceil, "ceiling": _ceil, "abs": abs, "sign": _sign,
    "round": lambda v: _floor(v + Fraction(1, 2)),
}


def _divisors(m: int) -> list[int]:
    small, large = [], []
    d = 1
    while d * d <= m:
        if m % d == 0:
            small.append(d)
            if d * d != m:
                large.append(m // d)
        d += 1
    return small + large[::-1]


def _fold(env: Env, var: str, values: Any, body: Code, is_sum: bool, node: A.Node) -> Any:
    saved = env.get(var, _MISSING)
    total: Any = 0 if is_sum else 1
    try:
        for i, k in enumerate(values):
            if not i & 255:
                _check_time()
            env[var] = k
            if is_sum:
                total += body(env)
            else:
                total = _norm(total * body(env))
    finally:
        if saved is _MISSING:
            env.pop(var, None)
        else:
            env[var] = saved
    return _norm(total)


_MISSING = object()


_NATIVE = (A.Integer, A.Rational, A.Decimal, A.Symbol, A.UnaryOp, A.BinOp, A.Power, A.Factorial, A.SeqRef,
           A.BigOp, A.Relation, A.Parity, A.And, A.Piecewise)


def _native(node: A.Node) -> bool:
    """Can the fast rational compiler take the whole tree?  Irrational constants, real
    functions and '...' sums go to the engine's evaluator instead (exact surds, floors of
    irrationals, pattern-matched dots)."""
    from normform.formula import functions as F

    for sub in node.walk():
        if isinstance(sub, A.Constant):
            if sub.name != "infinity":
                return False
        elif isinstance(sub, A.Call):
            spec = F.REGISTRY.get(sub.name)
            if sub.name not in _ROUNDING and (spec is None or spec.exact is None):
                return False
        elif not isinstance(sub, _NATIVE):
            return False
    return True


class Inexact:
    """A value the engine's evaluator could only approximate (irrational): ``value`` is a
    ``decimal.Decimal``, ``text`` the evaluator's spelling."""

    __slots__ = ("value", "text")

    def __init__(self, value: Any, text: str) -> None:
        self.value, self.text = value, text

    def __str__(self) -> str:
        return self.text

    def __repr__(self) -> str:
        return f"Inexact({self.text})"


def _delegate(node: A.Node, sequences: frozenset[str]) -> Code:
    from normform.formula.errors import EvaluationError
    from normform.formula.evaluate import evaluate

    def run(env: Env) -> Any:
        values = {k: v for k, v in env.items() if not k.startswith("@")}

        def sequence(name: str, indices: tuple) -> Any:
            look = env.get("@" + name)
            if look is None or len(indices) != 1:
                raise CannotCompute(f"{name}(...) refers to a sequence that this formula does not define", node)
            return look(indices[0])
        try:
            value = evaluate(node, values, sequence=sequence if sequences else None)
        except EvaluationError as exc:
            text = str(exc)
            if "division by zero" in text or "divide by zero" in text:
                raise ZeroDivisionError(text) from None
            raise CannotCompute(text, node) from None
        if isinstance(value, (int, Fraction)) and not isinstance(value, bool):
            return _norm(value)
        if isinstance(value, bool):
            return value
        exact = getattr(value, "exact", None)
        return Inexact(getattr(value, "value", None), exact or str(value))
    return run


def compile_exact(node: A.Node, sequences: frozenset[str] = frozenset()) -> Code:
    """``node`` as a closure ``code(env)``: the fast rational compiler when it can take the
    whole tree, else the engine's evaluator (which may return an :class:`Inexact`)."""
    if _native(node):
        return ExactCompiler(sequences).compile(node)
    return _delegate(node, sequences)


# ---------------------------------------------------------- series reading --

class SeriesReader(A.Visitor):
    """AST -> :class:`~normform.formula.series.Series` in the variable ``x`` (or an exact number)."""

    def __init__(self, prec: int, var: str = "x", deadline: float | None = None) -> None:
        self.prec = prec
        self.var = var
        self.env: Env = {}
        self.deadline = deadline
        self._with_var: dict[int, bool] = {}

    def read(self, node: A.Node) -> S.Series:
        value = self.visit(node)
        return value if isinstance(value, S.Series) else S.Series.constant(value, self.prec)

    def _exact(self, node: A.Node) -> Any:
        try:
            value = compile_exact(node)(dict(self.env))
        except ZeroDivisionError:
            raise CannotCompute("division by zero", node) from None
        if isinstance(value, Inexact):
            raise CannotCompute(f"the coefficient {value} is irrational; the series is not over the rationals", node)
        return value

    def _has_var(self, node: A.Node) -> bool:
        """Does ``node`` mention the series variable? (one bottom-up pass per tree, then cached)"""
        known = self._with_var.get(id(node))
        if known is None:
            self._mark(node)
            known = self._with_var[id(node)]
        return known

    def _mark(self, root: A.Node) -> None:
        marks, var = self._with_var, self.var
        stack: list[tuple[A.Node, bool]] = [(root, False)]
        while stack:
            node, done = stack.pop()
            if id(node) in marks:
                continue
            kids = list(node.children())
            if not done and kids:
                stack.append((node, True))
                stack.extend((k, False) for k in kids if id(k) not in marks)
                continue
            marks[id(node)] = (isinstance(node, A.Symbol) and node.name == var) or any(marks[id(k)] for k in kids)

    def generic_visit(self, node: A.Node) -> Any:
        if not self._has_var(node):
            return self._exact(node)
        raise CannotCompute(f"{type(node).__name__} is not supported in a generating function", node)

    def visit_Symbol(self, node: A.Symbol) -> Any:
        if node.name == self.var and self.var not in self.env:
            return S.Series.variable(self.prec)
        if node.name in self.env:
            return self.env[node.name]
        raise CannotCompute(f"the generating function has a second free variable {node.name}", node)

    def visit_UnaryOp(self, node: A.UnaryOp) -> Any:
        return -self.visit(node.operand)

    def visit_BinOp(self, node: A.BinOp) -> Any:
        if not self._has_var(node):
            return self._exact(node)
        left, right = self.visit(node.left), self.visit(node.right)
        try:
            if node.op == "+":
                return left + right
            if node.op == "-":
                return left - right
            if node.op == "*":
                return left * right
            if node.op == "/":
                if not isinstance(right, S.Series) and right == 0:
                    raise CannotCompute("division by zero", node)
                if not isinstance(left, S.Series):
                    left = S.Series.constant(left, self.prec)
                return left / right
        except S.SeriesError as exc:
            raise CannotCompute(str(exc), node) from None
        raise CannotCompute(f"the operator {node.op} is not supported in a generating function", node)

    def visit_Power(self, node: A.Power) -> Any:
        if not self._has_var(node):
            return self._exact(node)
        if self._has_var(node.exponent):
            if isinstance(node.base, A.Constant) and node.base.name == "e":
                return self._apply("exp", self.visit(node.exponent), node)
            raise CannotCompute("a power with x in the exponent (other than e^...) is not supported", node)
        base = self.visit(node.base)
        exponent = self._exact(node.exponent)
        if isinstance(exponent, Fraction) and exponent.denominator != 1:
            pass
        else:
            exponent = _as_int(exponent, "the exponent", node)
            if abs(exponent) > 100_000:
                raise CannotCompute(f"the exponent {exponent} exceeds the limit", node)
            if (isinstance(node.base, A.Symbol) and node.base.name == self.var and exponent >= 0):
                return S.Series.monomial(1, exponent, self.prec)
        try:
            return base ** exponent
        except S.SeriesError as exc:
            raise CannotCompute(str(exc), node) from None

    def _apply(self, name: str, arg: Any, node: A.Node) -> S.Series:
        if not isinstance(arg, S.Series):
            arg = S.Series.constant(arg, self.prec)
        try:
            return S.FUNCTIONS[name](arg)
        except S.SeriesError as exc:
            raise CannotCompute(str(exc), node) from None

    def visit_Call(self, node: A.Call) -> Any:
        if not self._has_var(node):
            return self._exact(node)
        if node.name in S.FUNCTIONS and len(node.args) == 1:
            return self._apply(node.name, self.visit(node.args[0]), node)
        raise CannotCompute(f"{node.written or node.name}(...) of x is not supported in a generating function",
                            node)

    def visit_BigOp(self, node: A.BigOp) -> Any:
        if not self._has_var(node):
            return self._exact(node)
        var, is_sum = node.var, node.op == "sum"
        if node.lower is None:
            raise CannotCompute(f"the {'sum' if is_sum else 'product'} over {var} has no lower bound", node)
        lo = _as_int(self._exact(node.lower), "a lower bound", node)
        infinite = node.upper is None or (isinstance(node.upper, A.Constant) and node.upper.name == "infinity")

        def item(k: int) -> S.Series:
            self._tick()
            saved = self.env.get(var, _MISSING)
            self.env[var] = k
            try:
                return self.read(node.body)
            finally:
                if saved is _MISSING:
                    del self.env[var]
                else:
                    self.env[var] = saved
        try:
            if infinite:
                return S.infinite(item, lo, self.prec, neutral=0 if is_sum else 1)
            hi = _as_int(self._exact(node.upper), "an upper bound", node)
            if hi - lo > MAX_LOOP:
                raise CannotCompute("too many terms in a finite sum or product", node)
            parts = (item(k) for k in range(lo, hi + 1))
            return S.summation(parts, self.prec) if is_sum else S.product(parts, self.prec)
        except S.SeriesError as exc:
            raise CannotCompute(str(exc), node) from None

    def _tick(self) -> None:
        if (self.deadline is not None and time.monotonic() > self.deadline) or time.monotonic() > _deadline():
            raise R.LimitExceeded("time budget spent while expanding the generating function")


# ------------------------------------------------------------ the plan ------

@dataclass(frozen=True)
class Plan:
    """How a formula's terms are computed.

    ``kind``: closed-form, recurrence, ogf, egf, asymptotic;
    ``expr``: the expression to compute (rhs); ``var``: its index or series variable.
    """

    kind: str
    expr: A.Node
    var: str = "n"
    name: str | None = None           # the sequence name (a, F, ...)
    recurrence: R.Recurrence | None = None
    condition: Code | None = None     # closed forms: where the formula holds
    lhs: A.Node | None = None
    gf_label: str | None = None       # "ogf"/"egf" when the text said so
    initial: Mapping[int, Number] = field(default_factory=dict)  # closed forms with stated values
    var2: str | None = None           # tables T(n,k): the column variable
    also: A.Node | None = None        # identities f(n) = g(n): the left side, checked too
    conditions: tuple[A.Node, ...] = ()


def parse(text: str) -> Any:
    """The engine's ``parse_formula`` (a Formula), or its bare statement parser as a fallback."""
    try:
        from normform.formula.api import parse_formula
    except ImportError:
        from normform.formula.parser import parse_statement
        return parse_statement(text)
    return parse_formula(text)


def _statement(formula: Any) -> A.Statement:
    if isinstance(formula, str):
        formula = parse(formula)
    if isinstance(formula, A.Statement):
        return formula
    root = getattr(formula, "root", None)
    if isinstance(root, A.Statement):
        return root
    if isinstance(root, A.Node):
        return A.Statement(body=root, label=getattr(formula, "label", None))
    raise TypeError(f"not a formula: {formula!r}")


def _sides(stmt: A.Statement) -> tuple[str | None, A.Node | None, A.Node]:
    body = stmt.body
    if isinstance(body, A.Relation) and len(body.ops) >= 1:
        return body.ops[0], body.operands[0], body.operands[-1]
    return None, None, body


def _linear_offset(index: A.Node, var: str) -> int | None:
    """``s`` when ``index`` is ``var + s`` for an integer constant ``s``, else None."""
    try:
        code = compile_exact(index)
        v0, v1, v7 = code({var: 0}), code({var: 1}), code({var: 7})
    except (CannotCompute, ArithmeticError):
        return None
    if isinstance(v0, int) and v1 == v0 + 1 and v7 == v0 + 7:
        return v0
    return None


def _order(rhs: A.Node, name: str, var: str, lhs_shift: int) -> int | None:
    offsets = []
    for ref in A.seq_refs(rhs):
        if ref.name != name:
            continue
        if len(ref.indices) != 1 or var not in A.free_symbols(ref.indices[0]):
            return None
        s = _linear_offset(ref.indices[0], var)
        if s is None:
            return None
        offsets.append(lhs_shift - s)
    return max(offsets) if offsets else 0


def _conditions(stmt: A.Statement, var: str) -> Code | None:
    codes = []
    for cond in stmt.conditions:
        if A.free_symbols(cond) <= {var}:
            codes.append(compile_exact(cond))
    if not codes:
        return None
    return lambda env: all(c(env) for c in codes)


def _initial_values(stmt: A.Statement, name: str | None) -> dict[int, Number]:
    out: dict[int, Number] = {}
    for init in stmt.initial:
        value = _norm(compile_exact(init.value)({}))
        if not isinstance(value, (int, Fraction)) or isinstance(value, bool):
            raise CannotCompute(f"the initial value {value} is not an exact rational number", init)
        for target in init.targets:
            if not isinstance(target, A.SeqRef) or len(target.indices) != 1:
                raise CannotCompute("an initial value must name one term such as a(0)", target)
            if name is not None and target.name != name:
                raise CannotCompute(f"the initial value {target.name}(...) names another sequence than {name}",
                                    target)
            index = _as_int(compile_exact(target.indices[0])({}), "the index of an initial value", target)
            if index in out and out[index] != value:
                raise CannotCompute(f"conflicting initial values for {target.name}({index}): "
                                    f"{out[index]} and {value}", target)
            out[index] = value
    return out


def _label(formula: Any, stmt: A.Statement) -> str | None:
    """A written label (``G.f.:``) or one implied by the left side (``A(x) =``); not a guess."""
    label = stmt.label or getattr(formula, "label", None)
    return label if label in ("ogf", "egf") else None


_PLANS: dict[int, tuple[A.Statement, Any, Any, Plan]] = {}


def plan(formula: Any) -> Plan:
    """Work out what the formula says and how to compute it (no terms computed yet).

    Plans of recently seen formula objects are kept (keyed by the tree's
    identity), so checking one formula against many entries compiles it once.
    """
    stmt = _statement(formula)
    label, kind = getattr(formula, "label", None), getattr(formula, "kind", None)
    hit = _PLANS.get(id(stmt))
    if hit is not None and hit[0] is stmt and hit[1] == label and hit[2] == kind:
        return hit[3]
    result = _plan(formula, stmt)
    if len(_PLANS) >= 256:
        _PLANS.clear()
    _PLANS[id(stmt)] = (stmt, label, kind, result)
    return result


def _plan(formula: Any, stmt: A.Statement) -> Plan:
    op, lhs, rhs = _sides(stmt)
    label = _label(formula, stmt)
    free = A.free_symbols(rhs)
    if op == "~":
        var = _index_var(lhs, rhs)
        return Plan("asymptotic", rhs, var=var, lhs=lhs, condition=_conditions(stmt, var))
    if op not in (None, "="):
        raise CannotCompute(f"a relation with '{op}' does not define terms", stmt.body)
    # generating functions: labelled, or an expression in x alone (then the
    # engine's guess of the kind, else ordinary; the checker tries both)
    if label or ("x" in free and "n" not in free and not A.seq_refs(rhs)):
        guess = getattr(formula, "kind", None)
        return Plan(label or (guess if guess in ("ogf", "egf") else "ogf"), rhs, var="x", lhs=lhs, gf_label=label)
    # recurrences: the defined sequence occurs on the right
    if lhs is not None:
        refs = A.seq_refs(lhs)
        if len(refs) == 1 and len(refs[0].indices) == 1:
            ref = refs[0]
            name = ref.name
            var = _index_var(ref.indices[0], rhs)
            shift = _linear_offset(ref.indices[0], var)
            if shift is None:
                raise CannotCompute(f"the left side {name}(...) is not of the form {name}({var}+c)", lhs)
            initial = _initial_values(stmt, name)
            if any(r.name == name for r in A.seq_refs(rhs)):
                rec = _recurrence(stmt, lhs, ref, rhs, var, shift, initial)
                return Plan("recurrence", rhs, var=var, name=name, recurrence=rec, lhs=lhs)
            if not isinstance(lhs, A.SeqRef) or shift != 0:
                # (n+1)*a(n) = ..., a(n+1) = f(n): solve for a(m) like a recurrence without references
                rec = _recurrence(stmt, lhs, ref, rhs, var, shift, initial)
                return Plan("recurrence", rhs, var=var, name=name, recurrence=rec, lhs=lhs)
            return Plan("closed-form", rhs, var=var, name=name, lhs=lhs, condition=_conditions(stmt, var),
                        initial=initial)
        if len(refs) == 1 and isinstance(lhs, A.SeqRef) and len(lhs.indices) == 2 and \
                all(isinstance(i, A.Symbol) for i in lhs.indices) and not A.seq_refs(rhs):
            # a table T(n,k) = f(n,k), read by rows
            row, col = (i.name for i in lhs.indices)
            extra = A.free_symbols(rhs) - {row, col}
            if extra:
                raise CannotCompute(f"the table formula has free variables {', '.join(sorted(extra))}", rhs)
            return Plan("table", rhs, var=row, var2=col, name=lhs.name, lhs=lhs, conditions=stmt.conditions)
        if refs:
            raise CannotCompute("the left side names more than one term or a table entry", lhs)
    var = "n" if "n" in free or not free else (sorted(free)[0] if len(free) == 1 else "n")
    if len(free - {var}) > 0:
        raise CannotCompute(f"the formula has free variables {', '.join(sorted(free - {var}))} besides {var}",
                            rhs)
    also = None
    if lhs is not None and A.free_symbols(lhs) <= {var} and not A.seq_refs(lhs):
        also = lhs  # an identity: both sides should give the listed terms
    return Plan("closed-form", rhs, var=var, lhs=lhs, condition=_conditions(stmt, var), also=also)


def _index_var(index: A.Node | None, rhs: A.Node) -> str:
    names = A.free_symbols(index) if index is not None else set()
    if len(names) == 1:
        return next(iter(names))
    if "n" in names or "n" in A.free_symbols(rhs):
        return "n"
    rest = A.free_symbols(rhs)
    return next(iter(rest)) if len(rest) == 1 else "n"


def _recurrence(stmt: A.Statement, lhs: A.Node, ref: A.SeqRef, rhs: A.Node, var: str, shift: int,
                initial: dict[int, Number]) -> R.Recurrence:
    name = ref.name
    seqs = frozenset({name})
    rhs_code = compile_exact(rhs, seqs)
    key = "@" + name
    cond = _conditions(stmt, var)
    free = A.free_symbols(rhs) - {var}
    if free:
        raise CannotCompute(f"the rule has free variables {', '.join(sorted(free))} besides {var}", rhs)
    if isinstance(lhs, A.SeqRef):
        def rule(m: int, lookup: R.Lookup) -> Any:
            return rhs_code({var: m - shift, key: lookup})
    elif isinstance(lhs, A.BinOp) and lhs.op == "*" and (lhs.left is ref or lhs.right is ref) and \
            not A.seq_refs(lhs.left if lhs.right is ref else lhs.right):
        # the usual shape c(n) * a(n+s): divide by the coefficient
        coef_code = compile_exact(lhs.left if lhs.right is ref else lhs.right)

        def rule(m: int, lookup: R.Lookup) -> Any:
            n = m - shift
            c = coef_code({var: n})
            if c == 0:
                raise ZeroDivisionError(f"the coefficient of {name}({m}) on the left side is zero at {var} = {n}")
            return _div(rhs_code({var: n, key: lookup}), c)
    else:
        # lhs is c(n) * a(n+s) (+ d(n)) in another shape: solve for the term, probing it with 0, 1, 2
        lhs_code = compile_exact(lhs, seqs)

        def rule(m: int, lookup: R.Lookup) -> Any:
            n = m - shift

            def probe(v: Any) -> Callable[[int], Any]:
                def look(i: int) -> Any:
                    return v if i == m else lookup(i)
                return look
            right = rhs_code({var: n, key: lookup})
            d = lhs_code({var: n, key: probe(0)})
            c = lhs_code({var: n, key: probe(1)}) - d
            if lhs_code({var: n, key: probe(2)}) != 2 * c + d:
                raise CannotCompute(f"the left side is not linear in {name}({m})", lhs)
            if c == 0:
                raise ZeroDivisionError(f"the coefficient of {name}({m}) on the left side is zero at {var} = {n}")
            return _div(right - d, c)
    applies = None
    if cond is not None:
        def applies(m: int) -> bool:
            return bool(cond({var: m - shift}))
    return R.Recurrence(rule=rule, order=_order(rhs, name, var, shift), initial=initial, name=name,
                        applies=applies)


# ------------------------------------------------------------- public API --

def _limits(limits: R.Limits | None) -> R.Limits:
    return limits if limits is not None else R.Limits()


def _initial_arg(initial: Any, first_index: int) -> dict[int, Number] | None:
    if initial is None:
        return None
    from normform.formula.digits import parse_term

    def exact(v: Any, what: str) -> Number:   # long digit strings too (up to the size of a term)
        return _norm(parse_term(v, what) if isinstance(v, str) else Fraction(v))

    if isinstance(initial, Mapping):
        return {int(k): exact(v, f"the initial value a({k})") for k, v in initial.items()}
    if isinstance(initial, str):
        initial = [p for p in initial.replace(" ", "").split(",") if p]
    return {first_index + i: exact(v, f"initial value {i + 1}") for i, v in enumerate(initial)}


def terms(formula: Any, first_index: int, count: int, initial: Any = None, *,
          limits: R.Limits | None = None, kind: str | None = None) -> list[Number]:
    """``count`` exact terms of ``formula`` from index ``first_index``.

    ``initial`` (a list starting at ``first_index``, a ``"1,1"`` string, or a
    ``{index: value}`` mapping) supplies or overrides initial values of a
    recurrence.  Generating functions give their coefficients (ogf) or
    ``n!`` times them (egf) from ``first_index`` on.
    """
    limits = _limits(limits)
    if count > limits.max_terms:
        raise R.LimitExceeded(f"{count} terms requested; the limit is {limits.max_terms}")
    p = plan(formula)
    kind = kind or p.kind
    if kind in ("ogf", "egf"):
        if first_index < 0:
            raise CannotCompute("generating-function coefficients start at index 0")
        return series(formula, first_index + count, kind=kind, limits=limits)[first_index:]
    if kind == "recurrence":
        assert p.recurrence is not None
        return R.evaluate(p.recurrence, first_index, count, initial=_initial_arg(initial, first_index),
                          limits=limits)
    if kind == "asymptotic":
        raise CannotCompute("an asymptotic formula a(n) ~ f(n) does not give exact terms")
    if kind == "table":
        return table_terms(p, first_index, count, limits)
    return closed_form_terms(p, first_index, count, limits)


def table_cells(p: Plan, first_row: int, count: int) -> list[tuple[int, int]]:
    """The first ``count`` cells (n, k) of a table read by rows from row ``first_row``:
    k = 0..n, kept where the formula's conditions on k hold (``1 <= k <= n``)."""
    assert p.var2 is not None
    conds = [compile_exact(c) for c in p.conditions if A.free_symbols(c) <= {p.var, p.var2}]
    cells: list[tuple[int, int]] = []
    n = first_row
    while len(cells) < count:
        if n - first_row > count + 2:
            raise CannotCompute("the table's conditions leave its rows empty")
        for k in range(0, n + 1):
            env = {p.var: n, p.var2: k}
            if all(c(env) for c in conds):
                cells.append((n, k))
                if len(cells) == count:
                    break
        n += 1
    return cells


def table_terms(p: Plan, first_row: int, count: int, limits: R.Limits) -> list[Number]:
    code = compile_exact(p.expr)
    out = []
    for n, k in table_cells(p, first_row, count):
        value = code({p.var: n, p.var2: k})
        if isinstance(value, Inexact) or isinstance(value, bool):
            raise CannotCompute(f"T({n},{k}) = {value} is not an exact rational number", p.expr)
        out.append(value)
    return out


def closed_form_terms(p: Plan, first_index: int, count: int, limits: R.Limits) -> list[Number]:
    code = compile_exact(p.expr)
    deadline = time.monotonic() + limits.seconds
    out: list[Number] = []
    for n in range(first_index, first_index + count):
        if n in p.initial:
            out.append(p.initial[n])
            continue
        try:
            value = code({p.var: n})
        except ZeroDivisionError:
            raise CannotCompute(f"division by zero at {p.var} = {n}", p.expr) from None
        if isinstance(value, bool):
            raise CannotCompute("the formula is a condition, not a value", p.expr)
        if isinstance(value, Inexact):
            raise CannotCompute(f"the value at {p.var} = {n} is irrational ({value}); "
                                "exact terms cannot be computed", p.expr)
        if _bits(value) > limits.max_bits:
            raise R.LimitExceeded(f"the term at {p.var} = {n} has more than {limits.max_bits} bits")
        if time.monotonic() > deadline:
            raise R.LimitExceeded(f"time budget of {limits.seconds:g} s spent at {p.var} = {n}")
        out.append(value)
    return out


def series(formula: Any, count: int, *, kind: str | None = None,
           limits: R.Limits | None = None) -> list[Number]:
    """The first ``count`` terms of a generating function.

    An ordinary g.f. gives its coefficients ``[x^0..x^(count-1)]``; an
    exponential one (label ``E.g.f.:``, or ``kind="egf"``) ``n! [x^n]``.
    """
    limits = _limits(limits)
    if count > limits.max_terms:
        raise R.LimitExceeded(f"{count} terms requested; the limit is {limits.max_terms}")
    p = plan(formula)
    kind = kind or (p.kind if p.kind in ("ogf", "egf") else "ogf")
    s = expand(p.expr, count, limits=limits, var=p.var if p.kind in ("ogf", "egf") else "x")
    values = s.egf_terms() if kind == "egf" else list(s.coeffs)
    out = [_norm(v) for v in values]
    for i, v in enumerate(out):
        if _bits(v) > limits.max_bits:
            raise R.LimitExceeded(f"the coefficient of x^{i} has more than {limits.max_bits} bits")
    return out


def expand(expr: A.Node, count: int, *, limits: R.Limits | None = None, var: str = "x") -> S.Series:
    """``expr`` as a power series in ``var`` known to at least ``count`` coefficients.

    Division by a power of x costs precision; the work is redone with more
    slack (a few times at most) until ``count`` coefficients survive.
    """
    limits = _limits(limits)
    deadline = time.monotonic() + limits.seconds
    slack = 2
    for _ in range(4):
        reader = SeriesReader(count + slack, var=var, deadline=deadline)
        s = reader.read(expr)
        if s.prec >= count:
            return s.truncate(count)
        slack += count + slack - s.prec
    raise CannotCompute(f"only {s.prec} coefficients of the generating function could be determined")
