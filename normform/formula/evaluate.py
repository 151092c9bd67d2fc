"""Exact evaluation of formula trees.

Values are exact wherever the mathematics allows:

* ``int`` and ``fractions.Fraction`` for rational results;
* :class:`Surd` ``a + b*sqrt(d)`` inside one quadratic field, so that
  ``(phi^n - (-1/phi)^n)/sqrt(5)`` is an exact integer and
  ``floor(n*sqrt(2))`` is decided exactly;
* :class:`Approx` (a ``decimal.Decimal`` with its number of significant
  digits) where exactness is impossible (pi, e, logs, exp, zeta...). An
  Approx remembers when it is ``r*pi`` or ``log(q)``, so ``sin(pi/6)`` = 1/2
  and ``log(8)/log(2)`` = 3 come out exact.

:func:`evaluate` returns int, Fraction or Approx (a Surd result is given as
an Approx whose ``exact`` field spells the exact value). Work is bounded:
result sizes (bits), sum lengths and powers are capped, and an undecidable
floor at the working precision is retried at higher precision.
"""

from __future__ import annotations

import decimal
from dataclasses import dataclass
from decimal import Decimal, localcontext
from fractions import Fraction
from math import isqrt
from typing import Callable, Mapping

from normform.formula import ast as A
from normform.formula import functions as F
from normform.formula.errors import EvaluationError

MAX_BITS = 1 << 21
"""Largest exact intermediate result, in bits (about 630,000 decimal digits)."""
MAX_STEPS = 2_000_000
"""Most terms a single evaluation may add or multiply in sums and products."""
DEFAULT_DIGITS = 40

Exact = int | Fraction


# ------------------------------------------------------------ value types ---

@dataclass(frozen=True)
class Surd:
    """``a + b*sqrt(d)`` with rational a, b (b != 0) and squarefree d > 1."""
    a: Fraction
    b: Fraction
    d: int

    def __str__(self) -> str:
        return self.text()

    def text(self) -> str:
        b = f"sqrt({self.d})" if self.b == 1 else f"{_qtext(self.b)}*sqrt({self.d})"
        if self.b == -1:
            b = f"-sqrt({self.d})"
        if self.a == 0:
            return b
        return f"{_qtext(self.a)} + {b}" if not b.startswith("-") else f"{_qtext(self.a)} - {b[1:]}"

    def sign(self) -> int:
        sa, sb = _sgn(self.a), _sgn(self.b)
        if sa == 0 or sa == sb:
            return sb
        # a and b*sqrt(d) have opposite signs: compare a^2 with b^2 d
        lhs, rhs = self.a * self.a, self.b * self.b * self.d
        return sa if lhs > rhs else sb


@dataclass(frozen=True)
class Approx:
    """A real number known to ``digits`` significant digits.

    ``pi_multiple``: the value is exactly r*pi; ``log_of``: the value is exactly log(q);
    ``exact``: an exact spelling when one is known (e.g. from a Surd).
    """
    value: Decimal
    digits: int
    pi_multiple: Fraction | None = None
    log_of: Fraction | None = None
    exact: str | None = None

    def __float__(self) -> float:
        return float(self.value)

    def __str__(self) -> str:
        with localcontext() as ctx:
            ctx.prec = self.digits
            return str(+self.value)

    def to_decimal(self) -> Decimal:
        return self.value


def _qtext(q: Fraction) -> str:
    return str(q.numerator) if q.denominator == 1 else f"{q.numerator}/{q.denominator}"


def _sgn(x) -> int:
    return (x > 0) - (x < 0)


def _norm(x):
    if isinstance(x, Fraction) and x.denominator == 1:
        return int(x)
    return x


def _is_q(x) -> bool:
    return isinstance(x, (int, Fraction)) and not isinstance(x, bool)


class _NeedPrecision(Exception):
    """Raised when a floor/comparison cannot be decided at the working precision."""


# ------------------------------------------------------------ decimal maths -

def _pi(prec: int) -> Decimal:
    with localcontext() as ctx:
        ctx.prec = prec + 5
        # Machin: pi = 16 atan(1/5) - 4 atan(1/239)
        result = 16 * _atan_inv(5, ctx.prec) - 4 * _atan_inv(239, ctx.prec)
    return +result


def _atan_inv(x: int, prec: int) -> Decimal:
    with localcontext() as ctx:
        ctx.prec = prec + 5
        total = term = Decimal(1) / x
        x2, k, sign = x * x, 1, 1
        eps = Decimal(10) ** -(prec + 3)
        while abs(term) > eps:
            term /= x2
            k += 2
            sign = -sign
            total += sign * term / k
    return total


def _sin(x: Decimal, prec: int) -> Decimal:
    with localcontext() as ctx:
        ctx.prec = prec + 10
        two_pi = 2 * _pi(prec + 10)
        x = x % two_pi
        total, term, i = Decimal(0), x, 1
        eps = Decimal(10) ** -(prec + 5)
        while abs(term) > eps:
            total += term
            term = -term * x * x / ((i + 1) * (i + 2))
            i += 2
    return total


def _cos(x: Decimal, prec: int) -> Decimal:
    with localcontext() as ctx:
        ctx.prec = prec + 10
        return _sin(x + _pi(prec + 10) / 2, prec)


def _atan(x: Decimal, prec: int) -> Decimal:
    with localcontext() as ctx:
        ctx.prec = prec + 10
        if x < 0:
            return -_atan(-x, prec)
        halvings = 0
        while x > Decimal("0.1"):  # atan(x) = 2 atan(x / (1 + sqrt(1 + x^2)))
            x = x / (1 + (1 + x * x).sqrt())
            halvings += 1
        total, term, k = Decimal(0), x, 1
        eps = Decimal(10) ** -(prec + 5)
        while abs(term) > eps:
            total += term / k
            term = -term * x * x
            k += 2
        return total * (2 ** halvings)


def _zeta(s: int, prec: int) -> Decimal:
    """Riemann zeta at an integer s >= 2 by Borwein's alternating-series method."""
    with localcontext() as ctx:
        ctx.prec = prec + 10
        n = int(prec * 1.32) + 10
        fact = [1]
        for i in range(1, 2 * n + 1):
            fact.append(fact[-1] * i)
        # d_k = n * sum_{i<=k} (n+i-1)! 4^i / ((n-i)! (2i)!)
        d = []
        total = Fraction(0)
        for i in range(n + 1):
            total += Fraction(fact[n + i - 1] * 4 ** i, fact[n - i] * fact[2 * i])
            d.append(total * n)
        dn = d[n]
        series = sum(Fraction((-1) ** k) * (d[k] - dn) / Fraction((k + 1) ** s) for k in range(n))
        value = -series / (dn * (1 - Fraction(2) ** (1 - s)))
        return Decimal(value.numerator) / Decimal(value.denominator)


# ------------------------------------------------------------ evaluator -----

SequenceLookup = Callable[[str, tuple], object]


class Evaluator(A.Visitor):
    """Evaluate a node under ``env`` (name -> int/Fraction); ``sequence(name, indices)``
    supplies terms of sequences (recurrences); ``digits`` is the working precision."""

    def __init__(self, env: Mapping[str, object] | None = None, *, sequence: SequenceLookup | None = None,
                 digits: int = DEFAULT_DIGITS):
        self.env = dict(env or {})
        self.sequence = sequence
        self.digits = digits
        self.prec = digits + 15
        self.steps = 0
        self._pi_cache: Decimal | None = None

    # -- helpers
    def pi(self) -> Decimal:
        if self._pi_cache is None:
            self._pi_cache = _pi(self.prec)
        return self._pi_cache

    def dec(self, x) -> Decimal:
        """Decimal of any value, at working precision."""
        with localcontext() as ctx:
            ctx.prec = self.prec
            if isinstance(x, int):
                return Decimal(x)
            if isinstance(x, Fraction):
                return Decimal(x.numerator) / Decimal(x.denominator)
            if isinstance(x, Surd):
                return Decimal(x.a.numerator) / x.a.denominator + \
                    Decimal(x.b.numerator) / x.b.denominator * Decimal(x.d).sqrt()
            if isinstance(x, Approx):
                return x.value
        raise EvaluationError(f"not a real number: {x!r}")

    def approx(self, value: Decimal, **kw) -> Approx:
        return Approx(value, self.digits, **kw)

    def check_size(self, x):
        if isinstance(x, int):
            if x.bit_length() > MAX_BITS:
                raise EvaluationError(f"intermediate result larger than {MAX_BITS} bits")
        elif isinstance(x, Fraction):
            if x.numerator.bit_length() + x.denominator.bit_length() > MAX_BITS:
                raise EvaluationError(f"intermediate result larger than {MAX_BITS} bits")
        return x

    def step(self, n: int = 1):
        self.steps += n
        if self.steps > MAX_STEPS:
            raise EvaluationError(f"more than {MAX_STEPS} terms in sums or products")

    # -- arithmetic on mixed values
    def add(self, x, y):
        if _is_q(x) and _is_q(y):
            return self.check_size(_norm(Fraction(x) + y) if isinstance(x, Fraction) or isinstance(y, Fraction)
                                   else x + y)
        if isinstance(x, Surd) or isinstance(y, Surd):
            if _is_q(x):
                x, y = y, x
            if isinstance(x, Surd) and _is_q(y):
                return Surd(x.a + y, x.b, x.d)
            if isinstance(x, Surd) and isinstance(y, Surd) and x.d == y.d:
                return _surd(x.a + y.a, x.b + y.b, x.d)
        pm = None
        if isinstance(x, Approx) and isinstance(y, Approx) and x.pi_multiple is not None \
                and y.pi_multiple is not None:
            pm = x.pi_multiple + y.pi_multiple
        with localcontext() as ctx:
            ctx.prec = self.prec
            return self.approx(self.dec(x) + self.dec(y), pi_multiple=pm)

    def neg(self, x):
        if _is_q(x):
            return -x
        if isinstance(x, Surd):
            return Surd(-x.a, -x.b, x.d)
        return Approx(-x.value, x.digits, pi_multiple=None if x.pi_multiple is None else -x.pi_multiple)

    def mul(self, x, y):
        if _is_q(x) and _is_q(y):
            if isinstance(x, int) and isinstance(y, int):
                if x.bit_length() + y.bit_length() > MAX_BITS:
                    raise EvaluationError(f"intermediate result larger than {MAX_BITS} bits")
                return x * y
            return self.check_size(_norm(Fraction(x) * y))
        if _is_q(x) and x == 0 or _is_q(y) and y == 0:
            return 0
        if isinstance(x, Surd) or isinstance(y, Surd):
            if _is_q(x):
                x, y = y, x
            if isinstance(x, Surd) and _is_q(y):
                return Surd(x.a * y, x.b * y, x.d)
            if isinstance(x, Surd) and isinstance(y, Surd) and x.d == y.d:
                return _surd(x.a * y.a + x.b * y.b * x.d, x.a * y.b + x.b * y.a, x.d)
        pm = None
        if isinstance(x, Approx) and x.pi_multiple is not None and _is_q(y):
            pm = x.pi_multiple * y
        elif isinstance(y, Approx) and y.pi_multiple is not None and _is_q(x):
            pm = y.pi_multiple * x
        with localcontext() as ctx:
            ctx.prec = self.prec
            return self.approx(self.dec(x) * self.dec(y), pi_multiple=pm)

    def inv(self, x):
        if _is_q(x):
            if x == 0:
                raise EvaluationError("division by zero")
            return _norm(1 / Fraction(x))
        if isinstance(x, Surd):
            norm = x.a * x.a - x.b * x.b * x.d
            return _surd(x.a / norm, -x.b / norm, x.d)
        if x.value == 0:
            raise EvaluationError("division by zero")
        with localcontext() as ctx:
            ctx.prec = self.prec
            return self.approx(1 / x.value)

    def div(self, x, y):
        if isinstance(x, Approx) and isinstance(y, Approx):
            if x.log_of is not None and y.log_of is not None:
                r = _log_ratio(x.log_of, y.log_of)
                if r is not None:
                    return r
            if x.pi_multiple is not None and y.pi_multiple is not None and y.pi_multiple != 0:
                return _norm(x.pi_multiple / y.pi_multiple)
        if isinstance(y, Approx) and y.pi_multiple is not None and _is_q(x) and x == 0:
            return 0
        return self.mul(x, self.inv(y))

    def sign(self, x) -> int:
        if _is_q(x):
            return _sgn(x)
        if isinstance(x, Surd):
            return x.sign()
        tol = Decimal(10) ** (-(self.prec - 8))
        if abs(x.value) <= tol * max(1, abs(x.value)):
            raise _NeedPrecision()
        return _sgn(x.value)

    def compare(self, x, y) -> int:
        return self.sign(self.add(x, self.neg(y)))

    def floor(self, x) -> int:
        if _is_q(x):
            return F.floor_(x)
        guess = int(self.dec(x).to_integral_value(rounding=decimal.ROUND_FLOOR))
        # exact check for surds; for Approx, sign() raises when too close to call
        for m in (guess - 1, guess, guess + 1):
            if self.compare(x, m) >= 0 and self.compare(x, m + 1) < 0:
                return m
        raise _NeedPrecision()

    def power(self, base, exp):
        if _is_q(exp) and isinstance(exp, int) or (isinstance(exp, Fraction) and exp.denominator == 1):
            e = int(exp)
            if _is_q(base):
                if base == 0:
                    if e < 0:
                        raise EvaluationError("division by zero (0 to a negative power)")
                    return 1 if e == 0 else 0
                if base in (1, -1):
                    return base ** (e % 2) if base == -1 else 1
                if abs(e).bit_length() > 40:
                    raise EvaluationError("power too large: the exponent is huge")
                size = abs(e) * max(1, Fraction(base).numerator.bit_length(), Fraction(base).denominator.bit_length())
                if size > MAX_BITS:
                    raise EvaluationError(f"power too large (more than {MAX_BITS} bits)")
                out = Fraction(base) ** e
                return _norm(out)
            if isinstance(base, Surd):
                if abs(e) > 100000:
                    raise EvaluationError("power too large")
                result, b, k = 1, base if e >= 0 else self.inv(base), abs(e)
                while k:
                    if k & 1:
                        result = self.mul(result, b)
                    k >>= 1
                    if k:
                        b = self.mul(b, b)
                return result
            with localcontext() as ctx:
                ctx.prec = self.prec
                pm = None
                return self.approx(base.value ** e, pi_multiple=pm)
        if isinstance(exp, Fraction) and _is_q(base):
            p, q = exp.numerator, exp.denominator
            root = self.root(base, q)
            return self.power(root, p)
        # real exponent
        b = self.dec(base)
        e = self.dec(exp)
        if b < 0:
            raise EvaluationError("negative base with a non-integer exponent (complex result)")
        if b == 0:
            return 0 if e > 0 else self._err_zero_pow()
        with localcontext() as ctx:
            ctx.prec = self.prec
            return self.approx((e * b.ln()).exp())

    def _err_zero_pow(self):
        raise EvaluationError("0 to a non-positive power")

    def root(self, x, k: int):
        """k-th root (k >= 1)."""
        if k == 1:
            return x
        if _is_q(x):
            if x < 0 and k % 2 == 0:
                raise EvaluationError(f"even root of a negative number ({x})")
            if x < 0:
                r = self.root(-x, k)
                return self.neg(r)
            q = Fraction(x)
            rp, rq = _iroot(q.numerator, k), _iroot(q.denominator, k)
            if rp is not None and rq is not None:
                return _norm(Fraction(rp, rq))
            if k == 2:
                return _sqrt_surd(q)
            if k % 2 == 0:
                half = self.root(x, 2)
                return self.root(half, k // 2) if _is_q(half) else self._approx_root(x, k)
            return self._approx_root(x, k)
        return self._approx_root(x, k)

    def _approx_root(self, x, k: int):
        v = self.dec(x)
        if v < 0 and k % 2 == 0:
            raise EvaluationError("even root of a negative number")
        with localcontext() as ctx:
            ctx.prec = self.prec
            if v == 0:
                return 0
            r = (abs(v).ln() / k).exp()
            return self.approx(-r if v < 0 else r)

    # -- visitors
    def visit_Integer(self, node: A.Integer):
        return node.value

    def visit_Rational(self, node: A.Rational):
        return _norm(node.value)

    def visit_Decimal(self, node: A.Decimal):
        return _norm(node.value)

    def visit_Symbol(self, node: A.Symbol):
        if node.name in self.env:
            v = self.env[node.name]
            if isinstance(v, (int, Fraction, Surd, Approx)) and not isinstance(v, bool):
                return _norm(v) if _is_q(v) else v
            raise EvaluationError(f"value of {node.name} must be a number")
        raise EvaluationError(f"no value for {node.name}")

    def visit_Constant(self, node: A.Constant):
        name = node.name
        if name == "pi":
            return self.approx(self.pi(), pi_multiple=Fraction(1))
        if name == "e":
            with localcontext() as ctx:
                ctx.prec = self.prec
                return self.approx(Decimal(1).exp())
        if name == "phi":
            return Surd(Fraction(1, 2), Fraction(1, 2), 5)
        if name == "gamma":
            return self.approx(_euler_gamma(self.prec))
        if name == "i":
            raise EvaluationError("the imaginary unit is not supported by the evaluator")
        raise EvaluationError("infinity is not a number")

    def visit_UnaryOp(self, node: A.UnaryOp):
        return self.neg(self.visit(node.operand))

    def visit_BinOp(self, node: A.BinOp):
        x = self.visit(node.left)
        y = self.visit(node.right)
        op = node.op
        if op == "+":
            return self.add(x, y)
        if op == "-":
            return self.add(x, self.neg(y))
        if op == "*":
            return self.mul(x, y)
        if op == "/":
            return self.div(x, y)
        if op == "mod":
            return self.mod(x, y)
        raise EvaluationError(f"unknown operator {op}")

    def mod(self, x, y):
        if _is_q(x) and _is_q(y):
            if y == 0:
                raise EvaluationError("mod 0")
            return F.mod(x, y)
        if self.sign(y) == 0:
            raise EvaluationError("mod 0")
        q = self.floor(self.div(x, y))
        return self.add(x, self.neg(self.mul(y, q)))

    def visit_Power(self, node: A.Power):
        return self.power(self.visit(node.base), self.visit(node.exponent))

    def visit_Factorial(self, node: A.Factorial):
        v = self.visit(node.operand)
        n = self.integer(v, "factorial")
        try:
            return F.double_factorial(n) if node.double else F.factorial(n)
        except F.DomainError as exc:
            raise EvaluationError(str(exc)) from None

    def integer(self, v, what: str) -> int:
        if isinstance(v, int):
            return v
        if isinstance(v, Fraction) and v.denominator == 1:
            return int(v)
        raise EvaluationError(f"{what} needs an integer, got {_show(v)}")

    def visit_SeqRef(self, node: A.SeqRef):
        if self.sequence is None:
            raise EvaluationError(f"{node.name}(...) is a term of a sequence; compute terms instead")
        indices = tuple(self.integer(self.visit(i), f"index of {node.name}") for i in node.indices)
        value = self.sequence(node.name, indices)
        if value is None:
            raise EvaluationError(f"no value for {node.name}{indices}")
        return value

    def visit_Call(self, node: A.Call):
        name = node.name
        args = [self.visit(a) for a in node.args]
        special = getattr(self, "fn_" + name, None)
        if special is not None:
            return special(*args)
        spec = F.REGISTRY.get(name)
        if spec is None or spec.exact is None:
            raise EvaluationError(f"cannot evaluate {name}")
        if name in ("floor", "ceiling", "round", "abs", "sign", "max", "min"):
            return self.real_fn(name, args)
        if spec.integer_args:
            args = [self.integer(a, name) for a in args]
        elif not all(_is_q(a) for a in args):
            raise EvaluationError(f"{name} of an irrational argument is not supported")
        try:
            return _norm(spec.exact(*args))
        except F.DomainError as exc:
            raise EvaluationError(f"{name}: {exc}") from None

    def real_fn(self, name: str, args: list):
        if name == "floor":
            return self.floor(args[0])
        if name == "ceiling":
            return -self.floor(self.neg(args[0]))
        if name == "round":
            return self.floor(self.add(args[0], Fraction(1, 2)))
        if name == "abs":
            return self.neg(args[0]) if self.sign(args[0]) < 0 else args[0]
        if name == "sign":
            return self.sign(args[0])
        best = args[0]
        for a in args[1:]:
            c = self.compare(a, best)
            if (name == "max" and c > 0) or (name == "min" and c < 0):
                best = a
        return best

    # real functions
    def fn_sqrt(self, x):
        return self.root(x, 2)

    def fn_root(self, x, k):
        return self.root(x, self.integer(k, "root"))

    def fn_exp(self, x):
        if _is_q(x) and x == 0:
            return 1
        if isinstance(x, Approx) and x.log_of is not None:
            return _norm(x.log_of)
        with localcontext() as ctx:
            ctx.prec = self.prec
            return self.approx(self.dec(x).exp())

    def fn_log(self, x, y=None):
        if y is not None:  # log(b, x)
            return self.div(self.fn_log(y), self.fn_log(x))
        if _is_q(x):
            if x <= 0:
                raise EvaluationError("log of a non-positive number")
            if x == 1:
                return 0
            with localcontext() as ctx:
                ctx.prec = self.prec
                return self.approx(self.dec(x).ln(), log_of=Fraction(x))
        v = self.dec(x)
        if v <= 0:
            raise EvaluationError("log of a non-positive number")
        with localcontext() as ctx:
            ctx.prec = self.prec
            return self.approx(v.ln())

    def fn_log2(self, x):
        return self.fn_log(2, x)

    def fn_log10(self, x):
        return self.fn_log(10, x)

    def _trig_exact(self, x, kind: str):
        if isinstance(x, Approx) and x.pi_multiple is not None:
            r = x.pi_multiple % 2
            return _exact_trig(r, kind)
        if _is_q(x) and x == 0:
            return {"sin": 0, "cos": 1, "tan": 0}[kind]
        return None

    def fn_sin(self, x):
        exact = self._trig_exact(x, "sin")
        return exact if exact is not None else self.approx(_sin(self.dec(x), self.prec))

    def fn_cos(self, x):
        exact = self._trig_exact(x, "cos")
        return exact if exact is not None else self.approx(_cos(self.dec(x), self.prec))

    def fn_tan(self, x):
        return self.div(self.fn_sin(x), self.fn_cos(x))

    def fn_cot(self, x):
        return self.div(self.fn_cos(x), self.fn_sin(x))

    def fn_sec(self, x):
        return self.inv(self.fn_cos(x))

    def fn_csc(self, x):
        return self.inv(self.fn_sin(x))

    def fn_sinh(self, x):
        if _is_q(x) and x == 0:
            return 0
        ex = self.fn_exp(x)
        return self.div(self.add(ex, self.neg(self.inv(ex))), 2)

    def fn_cosh(self, x):
        if _is_q(x) and x == 0:
            return 1
        ex = self.fn_exp(x)
        return self.div(self.add(ex, self.inv(ex)), 2)

    def fn_tanh(self, x):
        return self.div(self.fn_sinh(x), self.fn_cosh(x))

    def fn_arctan(self, x):
        if _is_q(x) and x == 0:
            return 0
        if _is_q(x) and abs(x) == 1:
            return self.approx(self.pi() / 4 * x, pi_multiple=Fraction(x, 4))
        return self.approx(_atan(self.dec(x), self.prec))

    def fn_arcsin(self, x):
        v = self.dec(x)
        if abs(v) > 1:
            raise EvaluationError("arcsin outside [-1, 1]")
        if _is_q(x) and x in (0, 1, -1, Fraction(1, 2), Fraction(-1, 2)):
            r = {0: Fraction(0), 1: Fraction(1, 2), -1: Fraction(-1, 2),
                 Fraction(1, 2): Fraction(1, 6), Fraction(-1, 2): Fraction(-1, 6)}[x]
            return 0 if r == 0 else self.approx(self.pi() * self.dec(r), pi_multiple=r)
        with localcontext() as ctx:
            ctx.prec = self.prec
            if abs(v) == 1:
                return self.approx(self.pi() / 2 * v)
            return self.approx(_atan(v / (1 - v * v).sqrt(), self.prec))

    def fn_arccos(self, x):
        half_pi = self.approx(self.pi() / 2, pi_multiple=Fraction(1, 2))
        return self.add(half_pi, self.neg(self.fn_arcsin(x)))

    def fn_Gamma(self, x):
        if _is_q(x):
            q = Fraction(x)
            if q.denominator == 1:
                if q <= 0:
                    raise EvaluationError("Gamma has poles at 0, -1, -2, ...")
                return F.factorial(int(q) - 1)
            if q.denominator == 2:
                # Gamma(m + 1/2) = sqrt(pi) * prod, both directions from Gamma(1/2) = sqrt(pi)
                m = q - Fraction(1, 2)
                factor = Fraction(1)
                if m >= 0:
                    for j in range(int(m)):
                        factor *= Fraction(2 * j + 1, 2)
                else:
                    for j in range(int(-m)):
                        factor /= (Fraction(-1, 2) - j)
                with localcontext() as ctx:
                    ctx.prec = self.prec
                    return self.mul(factor, self.approx(self.pi().sqrt()))
        raise EvaluationError("Gamma is evaluated only at integers and half-integers")

    def fn_zeta(self, x):
        s = self.integer(x, "zeta")
        if s == 1:
            raise EvaluationError("zeta has a pole at 1")
        if s <= 1:
            raise EvaluationError("zeta is evaluated only at integers >= 2")
        if s % 2 == 0:
            k = s // 2
            coeff = abs(Fraction(F.bernoulli(s))) * Fraction(2) ** (s - 1) / F.factorial(s)
            return self.mul(coeff, self.power(self.visit_Constant(A.Constant("pi")), s))
        return self.approx(_zeta(s, self.prec))

    # -- sums, products, dots
    def bounds(self, node: A.BigOp) -> list[int]:
        if node.divides is not None:
            m = self.integer(self.visit(node.divides), "divisor sum")
            if m <= 0:
                raise EvaluationError("divisor sum needs a positive number")
            if m > 10 ** 12:
                raise EvaluationError("number too large for a divisor sum")
            small = [d for d in range(1, isqrt(m) + 1) if m % d == 0]
            self.step(isqrt(m))
            return sorted(set(small + [m // d for d in small]))
        if node.lower is None or node.upper is None:
            raise EvaluationError(f"{node.op} over {node.var} has no limits")
        if isinstance(node.upper, A.Constant) and node.upper.name == "infinity":
            raise EvaluationError(f"infinite {'sum' if node.op == 'sum' else 'product'}: no exact value")
        lo = self.integer(self.visit(node.lower), "lower limit")
        hi = self.integer(self.visit(node.upper), "upper limit")
        if hi - lo + 1 > MAX_STEPS:
            raise EvaluationError(f"more than {MAX_STEPS} terms")
        return list(range(lo, hi + 1))

    def visit_BigOp(self, node: A.BigOp):
        values = self.bounds(node)
        saved = self.env.get(node.var, _MISSING)
        total = 0 if node.op == "sum" else 1
        try:
            for v in values:
                self.step()
                self.env[node.var] = v
                term = self.visit(node.body)
                total = self.add(total, term) if node.op == "sum" else self.mul(total, term)
        finally:
            if saved is _MISSING:
                self.env.pop(node.var, None)
            else:
                self.env[node.var] = saved
        return total

    def visit_Dots(self, node: A.Dots):
        free = sorted(A.free_symbols(node.last))
        if not free:
            raise EvaluationError("cannot tell how the terms continue after '...'")
        var = "n" if "n" in free else free[0]
        hi = self.integer(self.visit_Symbol(A.Symbol(var)), var)
        firsts = [self.visit(t) for t in node.first]
        saved = self.env.get(var)
        try:
            start = None
            for k0 in range(-3, 30):
                ok = True
                for j, want in enumerate(firsts):
                    self.env[var] = k0 + j
                    try:
                        got = self.visit(node.last)
                    except EvaluationError:
                        ok = False
                        break
                    if got != want:
                        ok = False
                        break
                if ok:
                    start = k0
                    break
            if start is None:
                raise EvaluationError("the first terms do not follow the last term's pattern")
            total = 0 if node.op == "+" else 1
            for k in range(start, hi + 1):
                self.step()
                self.env[var] = k
                t = self.visit(node.last)
                total = self.add(total, t) if node.op == "+" else self.mul(total, t)
            return total
        finally:
            self.env[var] = saved

    # -- conditions and pieces
    def truth(self, node: A.Node) -> bool:
        if isinstance(node, A.Parity):
            v = self.integer(self.visit(node.operand), "parity")
            return (v % 2 == 0) == node.even
        if isinstance(node, A.And):
            return all(self.truth(i) for i in node.items)
        if isinstance(node, A.Relation):
            values = [self.visit(o) for o in node.operands]
            for op, x, y in zip(node.ops, values, values[1:]):
                if node.modulus is not None:
                    m = self.visit(node.modulus)
                    ok = self.mod(self.add(x, self.neg(y)), m) == 0
                else:
                    c = self.compare(x, y)
                    ok = {"=": c == 0, "==": c == 0, "!=": c != 0, "<": c < 0, ">": c > 0,
                          "<=": c <= 0, ">=": c >= 0}.get(op)
                    if ok is None:
                        raise EvaluationError(f"cannot decide the relation {op}")
                if not ok:
                    return False
            return True
        raise EvaluationError("not a condition")

    def visit_Piecewise(self, node: A.Piecewise):
        for value, cond in node.branches:
            if cond is None or self.truth(cond):
                return self.visit(value)
        raise EvaluationError("no branch of the piecewise definition applies")

    def visit_Relation(self, node: A.Relation):
        return self.truth(node)


_MISSING = object()


def _show(v) -> str:
    if isinstance(v, Approx):
        return str(v)
    return str(v)


def _surd(a: Fraction, b: Fraction, d: int):
    if b == 0:
        return _norm(Fraction(a))
    return Surd(Fraction(a), Fraction(b), d)


def _iroot(n: int, k: int) -> int | None:
    if n < 0:
        return None
    if n < 2:
        return n
    r = int(round(n ** (1.0 / k))) if n.bit_length() < 1000 else _int_nth_root(n, k)
    for c in (r - 1, r, r + 1):
        if c >= 0 and c ** k == n:
            return c
    r = _int_nth_root(n, k)
    return r if r ** k == n else None


def _int_nth_root(n: int, k: int) -> int:
    lo, hi = 0, 1 << (n.bit_length() // k + 1)
    while lo < hi:
        mid = (lo + hi + 1) // 2
        if mid ** k <= n:
            lo = mid
        else:
            hi = mid - 1
    return lo


def _squarefree_split(m: int) -> tuple[int, int] | None:
    """m = s^2 * d with d squarefree (trial division up to 10^5); None if unsure."""
    s, d, p = 1, m, 2
    while p * p <= d and p < 100000:
        while d % (p * p) == 0:
            d //= p * p
            s *= p
        p += 1 if p == 2 else 2
    if p * p <= d:
        r = isqrt(d)
        if r * r == d:
            return s * r, 1
        return None
    return s, d


def _sqrt_surd(q: Fraction):
    # sqrt(p/q) = sqrt(p*q)/q
    m = q.numerator * q.denominator
    split = _squarefree_split(m)
    if split is None:
        return Approx(Decimal(m).sqrt() / q.denominator, DEFAULT_DIGITS)
    s, d = split
    if d == 1:
        return _norm(Fraction(s, q.denominator))
    return Surd(Fraction(0), Fraction(s, q.denominator), d)


_HALF_SQRT2 = Surd(Fraction(0), Fraction(1, 2), 2)
_HALF_SQRT3 = Surd(Fraction(0), Fraction(1, 2), 3)


def _exact_trig(r: Fraction, kind: str):
    """sin/cos/tan of r*pi, 0 <= r < 2, when r has denominator 1, 2, 3, 4 or 6."""
    if r.denominator not in (1, 2, 3, 4, 6):
        return None
    deg = int(r * 180)
    table = {0: (0, 1), 30: (Fraction(1, 2), _HALF_SQRT3), 45: (_HALF_SQRT2, _HALF_SQRT2),
             60: (_HALF_SQRT3, Fraction(1, 2)), 90: (1, 0)}
    base = deg % 180
    sign_s = 1 if deg < 180 else -1
    if base <= 90:
        s, c = table[base]
        c_sign = 1
    else:
        s, c = table[180 - base]
        c_sign = -1
    c_sign *= 1 if deg < 180 else -1

    def scale(v, k):
        if isinstance(v, Surd):
            return Surd(v.a * k, v.b * k, v.d)
        return _norm(Fraction(v) * k)

    s, c = scale(s, sign_s), scale(c, c_sign)
    if kind == "sin":
        return s
    if kind == "cos":
        return c
    return None


def _log_ratio(a: Fraction, b: Fraction) -> Exact | None:
    """log(a)/log(b) when it is rational p/q (a^q == b^p), small q."""
    if b == 1 or a <= 0 or b <= 0:
        return None
    import math
    r = Fraction(math.log(a) / math.log(b)).limit_denominator(64)
    p, q = r.numerator, r.denominator
    if abs(p) > 4096:
        return None
    if Fraction(a) ** q == Fraction(b) ** p:
        return _norm(r)
    return None


def _euler_gamma(prec: int) -> Decimal:
    """Euler's constant by the Brent–McMillan formula (B1 variant)."""
    with localcontext() as ctx:
        ctx.prec = prec + 10
        n = int(prec * 0.6) + 10
        a = -Decimal(n).ln()
        b = Decimal(1)
        u, v = a, b
        k = 1
        eps = Decimal(10) ** -(prec + 5)
        while True:
            b = b * n * n / (k * k)
            a = (a * n * n / k + b) / k
            u += a
            v += b
            if b < eps and abs(a) < eps:
                break
            k += 1
        return u / v


# ------------------------------------------------------------ public --------

def to_public(x, digits: int):
    """int / Fraction stay; Surd and Approx become an :class:`Approx` of ``digits`` digits."""
    if _is_q(x):
        return _norm(x)
    if isinstance(x, bool):
        return x
    ev = Evaluator(digits=digits)
    if isinstance(x, Surd):
        return Approx(ev.dec(x), digits, exact=x.text())
    return Approx(x.value, digits, pi_multiple=x.pi_multiple, log_of=x.log_of, exact=x.exact)


@A.deep
def evaluate(node: A.Node, env: Mapping[str, object] | None = None, *, digits: int = DEFAULT_DIGITS,
             sequence: SequenceLookup | None = None, exact_internal: bool = False):
    """Value of ``node`` with variables from ``env``.

    Returns int or Fraction when the value is rational, otherwise an :class:`Approx`
    with ``digits`` significant digits (``exact_internal=True`` returns the internal
    Surd/Approx value instead, for callers that keep computing).
    Raises :class:`EvaluationError` when the value cannot be computed.
    """
    env = {k: _coerce(k, v) for k, v in (env or {}).items()}
    work = digits
    for _ in range(4):
        ev = Evaluator(env, sequence=sequence, digits=work)
        try:
            with localcontext() as ctx:
                ctx.prec = ev.prec
                ctx.traps[decimal.InvalidOperation] = True
                value = ev.visit(node)
            return value if exact_internal else to_public(value, digits)
        except _NeedPrecision:
            work *= 3
        except (decimal.InvalidOperation, decimal.Overflow, OverflowError) as exc:
            raise EvaluationError(f"numeric error: {exc.__class__.__name__}") from None
        except RecursionError:
            raise EvaluationError("formula too deeply nested to evaluate") from None
    raise EvaluationError("cannot decide a floor or comparison: the value is too close to an integer")


def _coerce(name: str, v):
    if isinstance(v, bool):
        raise EvaluationError(f"value of {name} must be a number")
    if isinstance(v, (int, Fraction, Surd, Approx)):
        return v
    if isinstance(v, str):
        try:
            return _norm(Fraction(v.strip()))
        except (ValueError, ZeroDivisionError):
            raise EvaluationError(f"value of {name} is not a number: {v!r}") from None
    if isinstance(v, float):
        return _norm(Fraction(v))
    raise EvaluationError(f"value of {name} must be a number")
