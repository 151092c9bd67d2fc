"""Truncated power series over the rationals.

A :class:`Series` is known modulo ``x**prec``: ``coeffs[i]`` is the exact
coefficient of ``x**i`` (a ``Fraction``) for ``i < prec``.  Every operation
tracks how much precision survives (dividing by ``x**v`` loses ``v`` terms),
so a caller asks for ``count`` coefficients, computes with a little slack and
retries with more when the result came out short (see ``terms.series``).

Operations that leave the rationals (``exp(1 + x)``, ``sqrt(2 + x)``,
``log(2 - x)``) or are undefined as power series (``1/x``, ``sqrt(x)``)
raise :class:`SeriesError` with a plain reason; nothing here loops without a
bound: every loop runs at most ``prec`` (or ``prec**2``) steps.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Callable, Iterable

Number = int | Fraction


class SeriesError(ArithmeticError):
    """A series operation that is undefined or leaves the rationals."""


def _q(value: Number) -> Number:
    """Exact coefficients are kept as ``int`` when integral: int arithmetic is
    several times faster than ``Fraction``, and most series in practice are integral."""
    if type(value) is int:
        return value
    if isinstance(value, Fraction):
        return value.numerator if value.denominator == 1 else value
    if isinstance(value, int):
        return int(value)
    raise SeriesError(f"not an exact rational: {value!r}")


def _exact_root(value: Fraction, q: int) -> Fraction | None:
    """The rational q-th root of ``value`` if there is one (sign-aware)."""
    if q == 1:
        return value
    if value < 0:
        if q % 2 == 0:
            return None
        r = _exact_root(-value, q)
        return None if r is None else -r
    num = _iroot(value.numerator, q)
    den = _iroot(value.denominator, q)
    if num is None or den is None:
        return None
    return Fraction(num, den)


def _iroot(n: int, q: int) -> int | None:
    if n < 2:
        return n
    # integer Newton iteration, then an exact check
    x = 1 << ((n.bit_length() + q - 1) // q)
    while True:
        y = ((q - 1) * x + n // x ** (q - 1)) // q
        if y >= x:
            break
        x = y
    return x if x ** q == n else None


def _rational_power(base: Fraction, exponent: Fraction) -> Fraction:
    """``base ** exponent`` when it is rational, else :class:`SeriesError`."""
    if exponent.denominator == 1:
        if base == 0 and exponent < 0:
            raise SeriesError("division by zero: 0 to a negative power")
        return base ** exponent.numerator
    root = _exact_root(base, exponent.denominator)
    if root is None:
        raise SeriesError(f"{base}^({exponent}) is not rational")
    if root == 0 and exponent < 0:
        raise SeriesError("division by zero: 0 to a negative power")
    return root ** exponent.numerator


@dataclass(frozen=True, slots=True)
class Series:
    """``sum(coeffs[i] * x**i) + O(x**prec)`` with exact rational coefficients."""

    coeffs: tuple[Fraction, ...]

    # -- construction -------------------------------------------------
    @classmethod
    def of(cls, coeffs: Iterable[Number], prec: int | None = None) -> "Series":
        values = [_q(c) for c in coeffs]
        if prec is not None:
            values = (values + [0] * prec)[:prec]
        return cls(tuple(values))

    @classmethod
    def constant(cls, value: Number, prec: int) -> "Series":
        return cls.of([value], prec)

    @classmethod
    def variable(cls, prec: int) -> "Series":
        """The series ``x`` itself."""
        return cls.of([0, 1], prec)

    @classmethod
    def monomial(cls, coefficient: Number, power: int, prec: int) -> "Series":
        if power < 0:
            raise SeriesError(f"x^{power} is not a power series (negative power)")
        values: list[Number] = [0] * prec
        if power < prec:
            values[power] = _q(coefficient)
        return cls(tuple(values))

    # -- inspection ---------------------------------------------------
    @property
    def prec(self) -> int:
        return len(self.coeffs)

    def __len__(self) -> int:
        return len(self.coeffs)

    def __getitem__(self, i: int) -> Fraction:
        return self.coeffs[i]

    def valuation(self) -> int:
        """Index of the first non-zero coefficient (``prec`` if none is known)."""
        for i, c in enumerate(self.coeffs):
            if c:
                return i
        return self.prec

    def is_constant(self) -> bool:
        return not any(self.coeffs[1:])

    def truncate(self, prec: int) -> "Series":
        if prec >= self.prec:
            return self
        return Series(self.coeffs[:max(prec, 0)])

    def egf_terms(self) -> list[Number]:
        """``n! * [x^n]``: the terms an exponential generating function lists."""
        out, f = [], 1
        for n, c in enumerate(self.coeffs):
            if n:
                f *= n
            out.append(_q(c * f))
        return out

    def max_bits(self) -> int:
        return max((max(c.numerator.bit_length(), c.denominator.bit_length()) for c in self.coeffs), default=0)

    # -- ring operations ----------------------------------------------
    def _lift(self, other: "Series | Number") -> "Series":
        if isinstance(other, Series):
            return other
        return Series.constant(other, self.prec)

    def __add__(self, other: "Series | Number") -> "Series":
        other = self._lift(other)
        n = min(self.prec, other.prec)
        a, b = self.coeffs, other.coeffs
        return Series(tuple(_q(a[i] + b[i]) for i in range(n)))

    __radd__ = __add__

    def __neg__(self) -> "Series":
        return Series(tuple(-c for c in self.coeffs))

    def __sub__(self, other: "Series | Number") -> "Series":
        return self + (-self._lift(other))

    def __rsub__(self, other: Number) -> "Series":
        return self._lift(other) + (-self)

    def scale(self, factor: Number) -> "Series":
        factor = _q(factor)
        if type(factor) is int:
            return Series(tuple(c * factor for c in self.coeffs))
        return Series(tuple(_q(c * factor) for c in self.coeffs))

    def __mul__(self, other: "Series | Number") -> "Series":
        if not isinstance(other, Series):
            return self.scale(other)
        va, vb = self.valuation(), other.valuation()
        # a factor that is zero to its precision still bounds the product's
        # precision by the other factor's valuation
        n = min(self.prec + vb, other.prec + va, max(self.prec, other.prec))
        out: list[Number] = [0] * n
        # loop over non-zero coefficients only: polynomials stay cheap
        nb = [(j, c) for j, c in enumerate(other.coeffs[:n]) if c]
        for i, ai in enumerate(self.coeffs[:n]):
            if not ai:
                continue
            for j, bj in nb:
                k = i + j
                if k >= n:
                    break
                out[k] += ai * bj
        return Series(tuple(map(_q, out)))

    __rmul__ = __mul__

    def shift_down(self, v: int) -> "Series":
        """Divide by ``x**v`` (the first ``v`` coefficients must be zero)."""
        if any(self.coeffs[:v]):
            raise SeriesError(f"division by x^{v} leaves negative powers of x (a Laurent series)")
        return Series(self.coeffs[v:])

    def shift_up(self, v: int) -> "Series":
        return Series((0,) * v + self.coeffs)

    def inverse(self) -> "Series":
        """``1/self``; the constant term must be non-zero."""
        if self.prec == 0:
            return self
        c0 = self.coeffs[0]
        if c0 == 0:
            raise SeriesError("division by a series with zero constant term")
        inv0 = _q(Fraction(1) / c0)
        nz = [(i, c) for i, c in enumerate(self.coeffs) if i and c]
        out: list[Number] = [inv0]
        for k in range(1, self.prec):
            s: Number = 0
            for i, ai in nz:
                if i > k:
                    break
                s += ai * out[k - i]
            out.append(_q(-s * inv0))
        return Series(tuple(out))

    def __truediv__(self, other: "Series | Number") -> "Series":
        if not isinstance(other, Series):
            other = _q(other)
            if other == 0:
                raise SeriesError("division by zero")
            return self.scale(Fraction(1) / other)
        v = other.valuation()
        if v >= other.prec:
            raise SeriesError("division by zero (the divisor vanishes to the computed order)")
        if v:
            # (x^v f) / (x^v g) = f / g, with v coefficients of precision lost
            num = self.shift_down(min(v, self.prec)) if self.valuation() >= v else None
            if num is None:
                raise SeriesError(f"division by x^{v} leaves negative powers of x (a Laurent series)")
            return num * other.shift_down(v).inverse()
        return self * other.inverse()

    def __rtruediv__(self, other: Number) -> "Series":
        return Series.constant(other, self.prec) / self

    # -- powers -------------------------------------------------------
    def __pow__(self, exponent: Number) -> "Series":
        exponent = _q(exponent)
        if exponent.denominator == 1:
            return self._int_power(exponent.numerator)
        return self.rational_power(exponent)

    def _int_power(self, e: int) -> "Series":
        if e < 0:
            v = self.valuation()
            if v >= self.prec:
                raise SeriesError("division by zero: zero series to a negative power")
            if v:
                raise SeriesError(f"negative power of a series divisible by x^{v} (a Laurent series)")
            return self.inverse()._int_power(-e)
        result = Series.constant(1, self.prec)
        base = self
        while e:  # square and multiply: O(log e) products
            if e & 1:
                result = result * base
            e >>= 1
            if e:
                base = base * base
        return result

    def rational_power(self, alpha: Fraction) -> "Series":
        """``self ** alpha`` for a non-integer rational ``alpha``.

        Needs a rational ``c0 ** alpha``; a leading ``x**v`` needs ``v*alpha``
        to be a non-negative integer (``sqrt(x^2 (1+x)) = x sqrt(1+x)``).
        """
        v = self.valuation()
        if v >= self.prec:
            if alpha > 0:
                return self
            raise SeriesError("division by zero: zero series to a negative power")
        if v:
            shifted = v * alpha
            if shifted.denominator != 1 or shifted < 0:
                raise SeriesError(f"(x^{v} ...)^({alpha}) is not a power series")
            inner = self.shift_down(v).rational_power(alpha)
            return inner.shift_up(int(shifted))
        f = self.coeffs
        f0 = f[0]
        g0 = _q(_rational_power(Fraction(f0), alpha))
        # g = f^alpha satisfies f g' = alpha f' g, which gives g_n term by term
        g = [g0]
        for n in range(1, self.prec):
            s = Fraction(0)
            for k in range(1, n + 1):
                fk = f[k]
                if fk:
                    s += (alpha * k - (n - k)) * fk * g[n - k]
            g.append(_q(s / (n * f0)))
        return Series(tuple(g))

    # -- calculus -----------------------------------------------------
    def derivative(self) -> "Series":
        return Series(tuple(_q(i * self.coeffs[i]) for i in range(1, self.prec)))

    def integral(self, constant: Number = 0) -> "Series":
        return Series((_q(constant),) + tuple(_q(Fraction(c) / (i + 1)) for i, c in enumerate(self.coeffs)))

    # -- composition --------------------------------------------------
    def compose(self, inner: "Series") -> "Series":
        """``self(inner(x))``; ``inner`` must have zero constant term."""
        if inner.prec and inner.coeffs[0] != 0:
            raise SeriesError("composition needs an inner series with zero constant term")
        # self is known mod x^P and inner = O(x^v): the error is O(x^(v*P))
        prec = min(self.prec * max(inner.valuation(), 1), inner.prec)
        inner = inner.truncate(prec)
        result = Series.constant(0, prec)
        for c in reversed(self.coeffs[:prec]):  # Horner
            result = result * inner + c
        return result.truncate(prec)


# -- elementary functions ----------------------------------------------
# Each needs the constant term that keeps the result rational: exp, sin,
# tan... at 0, log at 1.  exp(f) for f = c + g with c != 0 is e^c exp(g),
# which is irrational, so it is refused rather than approximated.

def _needs_zero_constant(f: Series, name: str) -> None:
    if f.prec and f.coeffs[0] != 0:
        raise SeriesError(f"{name}(...) of a series with constant term {f.coeffs[0]} is not rational")


def exp(f: Series) -> Series:
    _needs_zero_constant(f, "exp")
    a = f.coeffs
    g = [Fraction(1)]
    for n in range(1, f.prec):  # g' = f' g
        s = Fraction(0)
        for k in range(1, n + 1):
            if a[k]:
                s += k * a[k] * g[n - k]
        g.append(_q(s / n))
    return Series(tuple(g[:f.prec]))


def log(f: Series) -> Series:
    if not f.prec:
        return f
    if f.coeffs[0] != 1:
        raise SeriesError(f"log(...) of a series with constant term {f.coeffs[0]} is not rational (needs 1)")
    return (f.derivative() / f.truncate(f.prec - 1)).integral()


def _sin_cos(f: Series, hyperbolic: bool) -> tuple[Series, Series]:
    _needs_zero_constant(f, "sinh" if hyperbolic else "sin")
    a = f.coeffs
    sign = 1 if hyperbolic else -1
    s, c = [Fraction(0)], [Fraction(1)]
    for n in range(1, f.prec):  # s' = f' c, c' = -+ f' s
        ss = cs = Fraction(0)
        for k in range(1, n + 1):
            if a[k]:
                ss += k * a[k] * c[n - k]
                cs += k * a[k] * s[n - k]
        s.append(_q(ss / n))
        c.append(_q(sign * cs / n))
    return Series(tuple(s[:f.prec])), Series(tuple(c[:f.prec]))


def sin(f: Series) -> Series:
    return _sin_cos(f, False)[0]


def cos(f: Series) -> Series:
    return _sin_cos(f, False)[1]


def tan(f: Series) -> Series:
    s, c = _sin_cos(f, False)
    return s / c


def sec(f: Series) -> Series:
    return _sin_cos(f, False)[1].inverse()


def sinh(f: Series) -> Series:
    return _sin_cos(f, True)[0]


def cosh(f: Series) -> Series:
    return _sin_cos(f, True)[1]


def tanh(f: Series) -> Series:
    s, c = _sin_cos(f, True)
    return s / c


def sech(f: Series) -> Series:
    return _sin_cos(f, True)[1].inverse()


def _integrate_against(f: Series, name: str, weight: Callable[[Series], Series]) -> Series:
    _needs_zero_constant(f, name)
    if f.prec < 2:
        return Series.constant(0, f.prec)
    inner = f.truncate(f.prec - 1)
    return (f.derivative() * weight(inner)).integral()


def atan(f: Series) -> Series:
    return _integrate_against(f, "atan", lambda g: (1 + g * g).inverse())


def atanh(f: Series) -> Series:
    return _integrate_against(f, "atanh", lambda g: (1 - g * g).inverse())


def asin(f: Series) -> Series:
    return _integrate_against(f, "asin", lambda g: (1 - g * g).rational_power(Fraction(-1, 2)))


def asinh(f: Series) -> Series:
    return _integrate_against(f, "asinh", lambda g: (1 + g * g).rational_power(Fraction(-1, 2)))


def sqrt(f: Series) -> Series:
    return f.rational_power(Fraction(1, 2))


FUNCTIONS: dict[str, Callable[[Series], Series]] = {
    "exp": exp, "log": log, "ln": log, "sqrt": sqrt,
    "sin": sin, "cos": cos, "tan": tan, "sec": sec,
    "sinh": sinh, "cosh": cosh, "tanh": tanh, "sech": sech,
    "atan": atan, "arctan": atan, "asin": asin, "arcsin": asin,
    "atanh": atanh, "arctanh": atanh, "asinh": asinh, "arcsinh": asinh,
}


# -- products and sums over an index -------------------------------------

def product(factors: Iterable[Series], prec: int) -> Series:
    result = Series.constant(1, prec)
    for f in factors:
        result = result * f
    return result.truncate(prec)


def summation(terms: Iterable[Series], prec: int) -> Series:
    result = Series.constant(0, prec)
    for t in terms:
        result = result + t
    return result.truncate(prec)


def infinite(make: Callable[[int], Series], start: int, prec: int, *, neutral: int,
             max_index: int | None = None, quiet: int = 3) -> Series:
    """Truncate an infinite sum (``neutral=0``) or product (``neutral=1``).

    Factors/terms are taken for k = start, start+1, ... and stop once
    ``quiet`` consecutive ones are trivial modulo ``x**prec`` after the index
    passed ``prec`` (the usual shapes ``x^k``, ``1/(1-x^k)``, ``x^(k^2)`` only
    grow in valuation).  This is a bounded heuristic, never a proof that the
    tail vanishes; ``max_index`` caps the work.
    """
    limit = max_index if max_index is not None else start + 4 * prec + 16
    result = Series.constant(neutral, prec)
    trivial = 0
    for k in range(start, limit + 1):
        item = make(k)
        if neutral == 1:
            if (item - 1).valuation() >= prec:
                trivial += 1
            else:
                trivial = 0
                result = result * item
        else:
            if item.valuation() >= prec:
                trivial += 1
            else:
                trivial = 0
                result = result + item
        if trivial >= quiet and k - start >= prec:
            return result.truncate(prec)
    raise SeriesError(f"the infinite {'product' if neutral else 'sum'} does not settle modulo x^{prec} "
                      f"by index {limit}")
