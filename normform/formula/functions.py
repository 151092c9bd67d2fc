"""Named functions and numbers: one registry for the parser, printers, evaluator and checks.

Every integer function here is exact and iterative (no recursion, no floats).
``REGISTRY`` maps a canonical name to a :class:`FunctionSpec`; ``ALIASES`` maps
the spellings found in legacy texts to canonical names per arity (``C(n)`` is
Catalan, ``C(n,k)`` binomial; ``phi(n)`` the totient while bare ``phi`` is
the golden ratio). Real-valued functions (sqrt, exp, log, trig, Gamma, zeta)
are registered with ``exact=None``: the evaluator handles them.

Work limits keep a hostile input from hanging: arguments of the
combinatorial numbers are capped at ``MAX_INDEX``.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from math import comb, factorial as _factorial, gcd as _gcd, isqrt
from typing import Callable

MAX_INDEX = 20000
"""Largest argument accepted by the combinatorial functions (factorial, Bell, Stirling, ...)."""


class DomainError(ValueError):
    """An argument outside a function's domain (non-integer index, negative argument...)."""


def _int(x, what: str = "argument") -> int:
    if isinstance(x, bool):
        return int(x)
    if isinstance(x, int):
        return x
    if isinstance(x, Fraction) and x.denominator == 1:
        return int(x)
    raise DomainError(f"{what} must be an integer, got {x}")


def _nonneg(x, what: str = "argument") -> int:
    n = _int(x, what)
    if n < 0:
        raise DomainError(f"{what} must be >= 0, got {n}")
    if n > MAX_INDEX:
        raise DomainError(f"{what} {n} is larger than the limit {MAX_INDEX}")
    return n


# ------------------------------------------------------------ integer functions

def binomial(n, k) -> int | Fraction:
    """C(n, k) for integer k; n may be any integer or rational (generalized, falling factorial / k!).
    0 for k < 0 (common practice, as in Concrete Mathematics 5.1)."""
    k = _int(k, "k")
    if k < 0:
        return 0
    if k > MAX_INDEX:
        raise DomainError(f"k {k} is larger than the limit {MAX_INDEX}")
    if isinstance(n, int) and n >= 0:
        return comb(n, k)
    num: int | Fraction = 1
    for i in range(k):
        num *= (n - i)
    return _norm(Fraction(num) / _factorial(k))


def factorial(n) -> int:
    return _factorial(_nonneg(n, "n"))


def double_factorial(n) -> int:
    """n!! with (-1)!! = 0!! = 1 (common practice)."""
    n = _int(n, "n")
    if n < -1:
        raise DomainError(f"double factorial of {n} is not defined")
    if n > MAX_INDEX:
        raise DomainError(f"n {n} is larger than the limit {MAX_INDEX}")
    out = 1
    for i in range(n, 0, -2):
        out *= i
    return out


def fibonacci(n) -> int:
    """F(n), F(0)=0, F(1)=1, extended to negative n by F(-n) = (-1)^(n+1) F(n); fast doubling."""
    n = _int(n, "n")
    if abs(n) > 50 * MAX_INDEX:
        raise DomainError(f"n {n} is larger than the limit {50 * MAX_INDEX}")
    m = abs(n)
    a, b = 0, 1  # F(i), F(i+1)
    for bit in bin(m)[2:]:
        c = a * (2 * b - a)
        d = a * a + b * b
        a, b = (d, c + d) if bit == "1" else (c, d)
    if n < 0 and m % 2 == 0:
        return -a
    return a


def lucas(n) -> int:
    n = _int(n, "n")
    return fibonacci(n - 1) + fibonacci(n + 1)


def catalan(n) -> int:
    n = _nonneg(n, "n")
    return comb(2 * n, n) // (n + 1)


def bell(n) -> int:
    """Bell numbers by the Bell triangle."""
    n = _nonneg(n, "n")
    row = [1]
    for _ in range(n):
        new = [row[-1]]
        for x in row:
            new.append(new[-1] + x)
        row = new
    return row[0]


def stirling2(n, k) -> int:
    """Stirling numbers of the second kind S(n, k) (set partitions), row by row."""
    n, k = _nonneg(n, "n"), _int(k, "k")
    if k < 0 or k > n:
        return 0
    row = [1]  # S(0, 0)
    for i in range(1, n + 1):
        new = [0] * (i + 1)
        for j in range(1, i + 1):
            new[j] = j * (row[j] if j < len(row) else 0) + row[j - 1]
        row = new
    return row[k]


def stirling1(n, k) -> int:
    """Signed Stirling numbers of the first kind s(n, k): s(n+1,k) = s(n,k-1) - n s(n,k)."""
    n, k = _nonneg(n, "n"), _int(k, "k")
    if k < 0 or k > n:
        return 0
    row = [1]
    for i in range(n):
        new = [0] * (i + 2)
        for j in range(i + 2):
            left = row[j - 1] if j >= 1 else 0
            here = row[j] if j < len(row) else 0
            new[j] = left - i * here
        row = new
    return row[k]


def harmonic(n) -> Fraction | int:
    n = _nonneg(n, "n")
    total = Fraction(0)
    for i in range(1, n + 1):
        total += Fraction(1, i)
    return _norm(total)


def _factor(n: int) -> list[tuple[int, int]]:
    if n <= 0:
        raise DomainError(f"argument must be >= 1, got {n}")
    if n > 10 ** 14:
        raise DomainError(f"{n} is too large to factor here")
    out = []
    p = 2
    while p * p <= n:
        if n % p == 0:
            e = 0
            while n % p == 0:
                n //= p
                e += 1
            out.append((p, e))
        p += 1 if p == 2 else 2
    if n > 1:
        out.append((n, 1))
    return out


def totient(n) -> int:
    n = _int(n, "n")
    out = n
    for p, _ in _factor(n):
        out = out // p * (p - 1)
    return out


def moebius(n) -> int:
    n = _int(n, "n")
    f = _factor(n)
    if any(e > 1 for _, e in f):
        return 0
    return -1 if len(f) % 2 else 1


def sigma(n, k=1) -> int:
    """Sum of the k-th powers of the divisors of n."""
    n, k = _int(n, "n"), _int(k, "k")
    out = 1
    for p, e in _factor(n):
        out *= sum(p ** (k * i) for i in range(e + 1))
    return out


def numdiv(n) -> int:
    n = _int(n, "n")
    out = 1
    for _, e in _factor(n):
        out *= e + 1
    return out


def isprime(n) -> int:
    n = _int(n, "n")
    if n < 2:
        return 0
    if n > 10 ** 14:
        raise DomainError(f"{n} is too large to test here")
    return 1 if _factor(n) == [(n, 1)] else 0


def prime(n) -> int:
    """The n-th prime, prime(1) = 2."""
    n = _nonneg(n, "n")
    if n < 1:
        raise DomainError("prime(n) needs n >= 1")
    count, candidate = 0, 1
    while count < n:
        candidate += 1
        if isprime(candidate):
            count += 1
    return candidate


def partitions(n) -> int:
    """Number of partitions p(n), by Euler's pentagonal recurrence."""
    n = _nonneg(n, "n")
    p = [1] + [0] * n
    for m in range(1, n + 1):
        total, j = 0, 1
        while True:
            g1 = j * (3 * j - 1) // 2
            if g1 > m:
                break
            sign = 1 if j % 2 else -1
            total += sign * p[m - g1]
            g2 = j * (3 * j + 1) // 2
            if g2 <= m:
                total += sign * p[m - g2]
            j += 1
        p[m] = total
    return p[n]


def subfactorial(n) -> int:
    n = _nonneg(n, "n")
    a = 1  # !0
    for i in range(1, n + 1):
        a = i * a + (-1) ** i
    return a


def motzkin(n) -> int:
    n = _nonneg(n, "n")
    a, b = 1, 1  # M(0), M(1)
    if n == 0:
        return 1
    for i in range(2, n + 1):
        a, b = b, ((2 * i + 1) * b + (3 * i - 3) * a) // (i + 2)
    return b


def bernoulli(n) -> Fraction | int:
    """Bernoulli numbers with B(1) = -1/2 (the older table convention), Akiyama–Tanigawa."""
    n = _nonneg(n, "n")
    if n > 2000:
        raise DomainError("Bernoulli index larger than 2000")
    a = [Fraction(0)] * (n + 1)
    for m in range(n + 1):
        a[m] = Fraction(1, m + 1)
        for j in range(m, 0, -1):
            a[j - 1] = j * (a[j - 1] - a[j])
    b = a[0]
    if n == 1:
        b = -b
    return _norm(b)


def floor_(x) -> int:
    if isinstance(x, int):
        return x
    if isinstance(x, Fraction):
        return x.numerator // x.denominator
    raise DomainError("floor of a non-rational")


def ceiling(x) -> int:
    return -floor_(-x)


def round_(x) -> int:
    """Nearest integer; halves round up (floor(x + 1/2)), common practice in sequence formulas."""
    return floor_(x + Fraction(1, 2))


def mod(a, m):
    """a mod m with the sign of m (floored), exact for rationals."""
    if m == 0:
        raise DomainError("mod 0")
    return _norm(a - m * floor_(Fraction(a) / Fraction(m)))


def gcd(*xs) -> int:
    out = 0
    for x in xs:
        out = _gcd(out, _int(x))
    return out


def lcm(*xs) -> int:
    out = 1
    for x in xs:
        x = _int(x)
        if x == 0:
            return 0
        out = abs(out * x) // _gcd(out, x)
    return out


def sign(x) -> int:
    return (x > 0) - (x < 0)


def abs_(x):
    return -x if x < 0 else x


def max_(*xs):
    return max(xs)


def min_(*xs):
    return min(xs)


def _norm(x):
    if isinstance(x, Fraction) and x.denominator == 1:
        return int(x)
    return x


def integer_sqrt_exact(x) -> int | Fraction | None:
    """sqrt(x) when x is the square of a rational, else None."""
    if x < 0:
        return None
    x = Fraction(x)
    p, q = x.numerator, x.denominator
    rp, rq = isqrt(p), isqrt(q)
    if rp * rp == p and rq * rq == q:
        return _norm(Fraction(rp, rq))
    return None


# ------------------------------------------------------------ registry ------

@dataclass(frozen=True)
class FunctionSpec:
    """A registered function.

    ``arity``: (min, max) number of arguments (max None = any); ``exact``: the
    exact implementation on int/Fraction arguments, or None when the
    evaluator computes it (real functions); ``integer_args``: the exact
    implementation needs integer arguments; ``latex``/``mathml``: how the
    printers spell its head (the printers special-case binomial, floor, ...).
    """
    name: str
    arity: tuple[int, int | None]
    exact: Callable | None = None
    integer_args: bool = False
    latex: str = ""
    mathml: str = ""
    doc: str = ""
    aliases: tuple[str, ...] = field(default=())

    def accepts(self, n: int) -> bool:
        lo, hi = self.arity
        return n >= lo and (hi is None or n <= hi)

    def arity_text(self) -> str:
        lo, hi = self.arity
        if hi == lo:
            return f"{lo} argument" + ("" if lo == 1 else "s")
        if hi is None:
            return f"{lo} or more arguments"
        return f"{lo} to {hi} arguments"


def _spec(name, arity, exact=None, *, integer_args=False, latex="", mathml="", doc="", aliases=()):
    if isinstance(arity, int):
        arity = (arity, arity)
    return FunctionSpec(name, arity, exact, integer_args, latex or f"\\operatorname{{{name}}}",
                        mathml or name, doc, tuple(aliases))


_SPECS = [
    _spec("binomial", 2, binomial, latex="\\binom", doc="binomial coefficient",
          aliases=("binomial", "binom", "Binomial", "choose", "C", "nCr")),
    _spec("factorial", 1, factorial, integer_args=True, aliases=("factorial", "fact", "Factorial")),
    _spec("factorial2", 1, double_factorial, integer_args=True,
          aliases=("factorial2", "doublefactorial", "DoubleFactorial")),
    _spec("fibonacci", 1, fibonacci, integer_args=True, latex="F", mathml="F",
          aliases=("fibonacci", "Fibonacci", "fib", "Fib", "F")),
    _spec("lucas", 1, lucas, integer_args=True, latex="L", mathml="L",
          aliases=("lucas", "Lucas", "L")),
    _spec("catalan", 1, catalan, integer_args=True, latex="C", mathml="C",
          aliases=("catalan", "Catalan", "C", "CatalanNumber")),
    _spec("bell", 1, bell, integer_args=True, latex="B", mathml="B", aliases=("bell", "Bell", "BellB")),
    _spec("stirling1", 2, stirling1, integer_args=True, latex="s", mathml="s",
          doc="signed Stirling numbers of the first kind",
          aliases=("stirling1", "Stirling1", "S1", "StirlingS1")),
    _spec("stirling2", 2, stirling2, integer_args=True, latex="S", mathml="S",
          doc="Stirling numbers of the second kind",
          aliases=("stirling2", "Stirling2", "S2", "StirlingS2")),
    _spec("harmonic", 1, harmonic, integer_args=True, latex="H", mathml="H",
          aliases=("harmonic", "Harmonic", "HarmonicNumber", "H")),
    _spec("totient", 1, totient, integer_args=True, latex="\\varphi", mathml="φ",
          aliases=("totient", "phi", "φ", "ϕ", "eulerphi", "EulerPhi", "Phi")),
    _spec("moebius", 1, moebius, integer_args=True, latex="\\mu", mathml="μ",
          aliases=("moebius", "mobius", "Moebius", "mu", "μ", "MoebiusMu")),
    _spec("sigma", (1, 2), sigma, integer_args=True, latex="\\sigma", mathml="σ",
          aliases=("sigma", "σ", "DivisorSigma")),
    _spec("numdiv", 1, numdiv, integer_args=True, latex="\\tau", mathml="τ",
          aliases=("numdiv", "tau", "τ")),
    _spec("isprime", 1, isprime, integer_args=True, aliases=("isprime", "IsPrime", "PrimeQ")),
    _spec("prime", 1, prime, integer_args=True, latex="p", mathml="p", aliases=("prime", "Prime")),
    _spec("partitions", 1, partitions, integer_args=True,
          aliases=("partitions", "numbpart", "PartitionsP")),
    _spec("subfactorial", 1, subfactorial, integer_args=True, aliases=("subfactorial", "Subfactorial")),
    _spec("motzkin", 1, motzkin, integer_args=True, aliases=("motzkin", "Motzkin")),
    _spec("bernoulli", 1, bernoulli, integer_args=True, latex="B", mathml="B",
          aliases=("bernoulli", "Bernoulli", "BernoulliB")),
    _spec("floor", 1, floor_, latex="\\lfloor", aliases=("floor", "Floor")),
    _spec("ceiling", 1, ceiling, latex="\\lceil", aliases=("ceiling", "ceil", "Ceiling", "Ceil")),
    _spec("round", 1, round_, aliases=("round", "Round", "nint")),
    _spec("mod", 2, mod, aliases=("mod", "Mod")),
    _spec("gcd", (1, None), gcd, integer_args=True, aliases=("gcd", "GCD", "Gcd")),
    _spec("lcm", (1, None), lcm, integer_args=True, aliases=("lcm", "LCM", "Lcm")),
    _spec("sign", 1, sign, aliases=("sign", "sgn", "Sign")),
    _spec("abs", 1, abs_, latex="|", aliases=("abs", "Abs")),
    _spec("max", (1, None), max_, aliases=("max", "Max")),
    _spec("min", (1, None), min_, aliases=("min", "Min")),
    # real functions: computed by the evaluator (exactly where possible)
    _spec("sqrt", 1, latex="\\sqrt", aliases=("sqrt", "Sqrt")),
    _spec("root", 2, latex="\\sqrt", doc="root(x, k): k-th root", aliases=("root",)),
    _spec("exp", 1, latex="\\exp", aliases=("exp", "Exp")),
    _spec("log", (1, 2), latex="\\log", doc="natural logarithm; log(b, x) base b",
          aliases=("log", "ln", "Log")),
    _spec("log2", 1, latex="\\log_2", aliases=("log2", "lg")),
    _spec("log10", 1, latex="\\log_{10}", aliases=("log10",)),
    _spec("sin", 1, latex="\\sin", aliases=("sin", "Sin")),
    _spec("cos", 1, latex="\\cos", aliases=("cos", "Cos")),
    _spec("tan", 1, latex="\\tan", aliases=("tan", "Tan")),
    _spec("cot", 1, latex="\\cot", aliases=("cot", "Cot")),
    _spec("sec", 1, latex="\\sec", aliases=("sec", "Sec")),
    _spec("csc", 1, latex="\\csc", aliases=("csc", "Csc")),
    _spec("sinh", 1, latex="\\sinh", aliases=("sinh", "Sinh")),
    _spec("cosh", 1, latex="\\cosh", aliases=("cosh", "Cosh")),
    _spec("tanh", 1, latex="\\tanh", aliases=("tanh", "Tanh")),
    _spec("arctan", 1, latex="\\arctan", aliases=("arctan", "atan", "ArcTan")),
    _spec("arcsin", 1, latex="\\arcsin", aliases=("arcsin", "asin", "ArcSin")),
    _spec("arccos", 1, latex="\\arccos", aliases=("arccos", "acos", "ArcCos")),
    _spec("Gamma", 1, latex="\\Gamma", mathml="Γ", aliases=("Gamma", "Γ")),
    _spec("zeta", 1, latex="\\zeta", mathml="ζ", aliases=("zeta", "Zeta", "ζ")),
]

REGISTRY: dict[str, FunctionSpec] = {s.name: s for s in _SPECS}
ALIASES: dict[str, list[FunctionSpec]] = {}
for _s in _SPECS:
    for _a in _s.aliases:
        ALIASES.setdefault(_a, []).append(_s)


def lookup(name: str, arity: int | None) -> FunctionSpec | None:
    """The function spelled ``name`` taking ``arity`` arguments (None: any arity)."""
    specs = ALIASES.get(name)
    if not specs:
        return None
    if arity is None:
        return specs[0]
    for spec in specs:
        lo, hi = spec.arity  # (spec.accepts, in line: the parser asks once per application)
        if arity >= lo and (hi is None or arity <= hi):
            return spec
    return None
