"""Does a formula produce the listed terms?  ``check_formula`` gives a :class:`Verdict`.

The verdict is one of

* ``agrees`` — every compared term is equal (for ``a(n) ~ f(n)``: the ratio
  ``a(n)/f(n)`` moves toward 1 over the listed terms; ``heuristic=True``,
  shown as "agrees (trend)" — a trend, never a proof);
* ``disagrees`` — the first index where the formula and the list differ,
  with both values;
* ``cannot-check`` — with a plain reason (irrational constants, a missing
  initial value, a definition that never terminates, a limit reached...).

All work is bounded (:class:`~normform.formula.recurrence.Limits`: terms,
bits per term, seconds per check); no input makes this hang or raise.
"""

from __future__ import annotations

import decimal as D
from dataclasses import asdict, dataclass, replace
from fractions import Fraction
from typing import Any, Mapping, Sequence

from normform.formula import ast as A
from normform.formula import recurrence as R
from normform.formula import terms as T

Number = int | Fraction
STATUSES = ("agrees", "disagrees", "cannot-check")
MAX_CHECK_TERMS = 2_000


@dataclass(frozen=True)
class Verdict:
    """The outcome of checking one formula against listed terms.

    ``index``/``expected``/``computed``: the first disagreement (expected is
    the listed term).  ``compared``: how many terms were really tested
    (terms used as initial values are not counted; ``initial_from_terms``
    says how many).  ``kind``: what the formula was read as.
    """

    status: str
    reason: str = ""
    heuristic: bool = False
    index: int | None = None
    expected: Number | None = None
    computed: Number | str | None = None
    compared: int = 0
    kind: str | None = None
    initial_from_terms: int = 0
    formula: str = ""

    @property
    def ok(self) -> bool:
        return self.status != "disagrees"

    @property
    def label(self) -> str:
        return f"{self.status} (trend)" if self.heuristic and self.status == "agrees" else self.status

    def describe(self) -> str:
        """One line of plain words."""
        parts = [self.label]
        if self.status == "disagrees" and self.expected is not None:
            where = f"term {self.index}" if self.kind == "table" else f"n = {self.index}"
            parts.append(f"at {where}: listed {_short(self.expected)}, formula gives {_short(self.computed)}")
        if self.compared:
            parts.append(f"{self.compared} term{'s' if self.compared != 1 else ''} compared")
        if self.initial_from_terms:
            parts.append(f"{self.initial_from_terms} listed term{'s' if self.initial_from_terms != 1 else ''} "
                         "used as initial values")
        if self.reason:
            parts.append(self.reason)
        return "; ".join(parts)

    def to_dict(self) -> dict:
        d = asdict(self)
        for key in ("expected", "computed"):
            if isinstance(d[key], Fraction):
                d[key] = str(d[key])
        d["label"] = self.label
        return d


# ------------------------------------------------------------------ helpers --

def _short(value: Any, digits: int = 40) -> str:
    from normform.formula.digits import term_text

    try:
        text = term_text(value)
    except ValueError:     # far beyond any term: say how large instead
        bits = value.bit_length() if isinstance(value, int) else "many"
        return f"a number of {bits} bits"
    if len(text) <= digits:
        return text
    return f"{text[:20]}...{text[-10:]} ({len(text)} characters)"


def _number(value: Any, what: str = "the term", max_bits: int = R.MAX_BITS) -> Number:
    from normform.formula.digits import parse_term

    if isinstance(value, bool):
        raise ValueError(f"not a term: {value!r}")
    if isinstance(value, int):
        return value          # the check itself stops at terms beyond limits.max_bits
    if isinstance(value, Fraction):
        return value.numerator if value.denominator == 1 else value
    if isinstance(value, str):
        return parse_term(value, what, max_bits)
    raise ValueError(f"not an exact term: {_short(repr(value))}")


def _listed(terms: Sequence[Any] | Mapping[int, Any], first_index: int,
            max_bits: int = R.MAX_BITS) -> dict[int, Number]:
    if isinstance(terms, str):
        terms = [t for t in terms.replace(" ", "").split(",") if t]
    if isinstance(terms, Mapping):
        return {int(k): _number(v, f"the listed term a({k})", max_bits) for k, v in sorted(terms.items())}
    return {first_index + i: _number(v, f"listed term {i + 1} (n = {first_index + i})", max_bits)
            for i, v in enumerate(terms)}


def _fmt(value: Any) -> str:
    return str(value)


def _compare(listed: dict[int, Number], computed: Mapping[int, Number], kind: str, skip: set[int] = frozenset(),
             **extra: Any) -> Verdict:
    compared = 0
    for n, want in listed.items():
        if n in skip or n not in computed:
            continue
        got = computed[n]
        if got != want:
            reason = ""
            if isinstance(got, Fraction) and isinstance(want, int):
                reason = f"the formula gives the non-integer {got} where an integer is listed"
            return Verdict("disagrees", reason, index=n, expected=want, computed=got, compared=compared + 1,
                           kind=kind, **extra)
        compared += 1
    if compared == 0:
        return Verdict("cannot-check", "no listed term could be compared", kind=kind, **extra)
    return Verdict("agrees", kind=kind, compared=compared, **extra)


# ------------------------------------------------------------------ checks ---

def _formula_text(formula: Any, *_: Any) -> str:
    return formula if isinstance(formula, str) else getattr(formula, "text", "")


@A.deep(text=_formula_text)  # long flat chains (a 700-term sum) need deep tree walks
def check_formula(formula: Any, terms: Sequence[Any] | Mapping[int, Any], first_index: int = 0, *,
                  initial: Any = None, kind: str | None = None,
                  limits: R.Limits | None = None) -> Verdict:
    """Check ``formula`` (a :class:`~normform.formula.api.Formula` or its text) against ``terms``.

    ``terms`` lists a(first_index), a(first_index+1), ... (or is a mapping
    ``{n: a(n)}``).  ``initial`` supplies recurrence initial values that the
    text leaves out; without them the leading listed terms serve.  ``kind``
    overrides what the formula is read as ("ogf", "egf", ...).
    """
    text = formula if isinstance(formula, str) else getattr(formula, "text", "")
    limits = limits or R.Limits()
    try:
        with T.budget(limits.seconds):
            return _check(formula, terms, first_index, initial, kind, limits, text)
    except RecursionError:
        return Verdict("cannot-check", "the formula is nested too deeply to compute", formula=text)
    except (T.CannotCompute, R.RecurrenceError) as exc:
        return Verdict("cannot-check", exc.reason, formula=text)
    except (ValueError, ArithmeticError, TypeError) as exc:
        # FormulaError is a ValueError: report its position and message
        return Verdict("cannot-check", _error_text(exc), formula=text)
    except Exception as exc:  # a batch of entries must never stop at one formula
        return Verdict("cannot-check", f"internal error while checking: {type(exc).__name__}: {exc}",
                       formula=text)


def _error_text(exc: Exception) -> str:
    describe = getattr(exc, "describe", None)
    if callable(describe):
        return f"cannot read the formula: {describe()}"
    return f"{type(exc).__name__}: {exc}"


def _check(formula: Any, terms: Any, first_index: int, initial: Any, kind: str | None, limits: R.Limits,
           text: str) -> Verdict:
    if isinstance(formula, str):
        formula = T.parse(formula)
    from normform.formula.digits import TermTooLarge

    try:
        listed = _listed(terms, first_index, limits.max_bits)
    except TermTooLarge as exc:
        return Verdict("cannot-check", str(exc), formula=text)
    except (ValueError, ZeroDivisionError) as exc:
        return Verdict("cannot-check", f"the listed terms are not exact numbers ({exc})", formula=text)
    note = ""
    if len(listed) > min(MAX_CHECK_TERMS, limits.max_terms):
        keep = min(MAX_CHECK_TERMS, limits.max_terms)
        listed = dict(list(listed.items())[:keep])
        note = f"only the first {keep} listed terms were compared"
    if not listed:
        return Verdict("cannot-check", "no terms are listed", formula=text)
    plan = T.plan(formula)
    what = kind or plan.kind
    if what == "asymptotic":
        verdict = _check_trend(plan, listed, limits)
    elif what in ("ogf", "egf"):
        verdict = _check_series(formula, plan, listed, what, kind is not None or plan.gf_label is not None, limits)
    elif what == "recurrence":
        verdict = _check_recurrence(plan, listed, initial, limits)
    elif what == "table":
        verdict = _check_table(plan, listed, limits)
    else:
        verdict = _check_closed(plan, listed, limits)
        if plan.also is not None and verdict.status == "agrees":
            # an identity: the left side must give the terms too
            left = _check_closed(replace(plan, expr=plan.also, also=None), listed, limits)
            if left.status != "agrees":
                verdict = replace(left, reason="; ".join(r for r in ("left side", left.reason) if r))
            else:
                verdict = replace(verdict, reason="; ".join(r for r in (verdict.reason, "both sides checked") if r))
    reason = "; ".join(r for r in (verdict.reason, note) if r)
    return replace(verdict, formula=text, reason=reason)


def _check_closed(plan: T.Plan, listed: dict[int, Number], limits: R.Limits) -> Verdict:
    code = T.compile_exact(plan.expr)
    cond = plan.condition
    kind = "closed-form"
    computed: dict[int, Number] = {}
    skip: set[int] = set()
    for n, want in listed.items():
        if n in plan.initial:
            value = plan.initial[n]
        elif cond is not None and not cond({plan.var: n}):
            skip.add(n)
            continue
        else:
            try:
                value = code({plan.var: n})
            except ZeroDivisionError:
                return _stop(listed, computed, skip, f"division by zero at {plan.var} = {n}", kind)
            except (T.CannotCompute, R.RecurrenceError) as exc:
                return _stop(listed, computed, skip, exc.reason, kind)
            if isinstance(value, bool):
                return Verdict("cannot-check", "the formula is a condition, not a value", kind=kind)
            if isinstance(value, T.Inexact):
                return _inexact(listed, computed, skip, n, want, value, kind)
            if T._bits(value) > limits.max_bits:
                return _stop(listed, computed, skip, f"the term at {plan.var} = {n} has more than "
                                                     f"{limits.max_bits} bits", kind)
        computed[n] = value
        if value != want:  # stop at the first difference: later terms may be costly
            break
    v = _compare(listed, computed, kind, skip)
    if skip and v.status != "disagrees":
        v = replace(v, reason=f"{len(skip)} listed term(s) outside the formula's range clause were skipped")
    return v


def _inexact(listed: dict[int, Number], computed: dict[int, Number], skip: set[int], n: int, want: Number,
             value: "T.Inexact", kind: str) -> Verdict:
    """An irrational value: clearly different from the listed term is a disagreement;
    equal to 25 digits is not a proof, so cannot-check."""
    try:
        got = value.value
        close = got is not None and abs(got - _dec(want)) <= abs(_dec(want)) * D.Decimal("1e-25") + D.Decimal("1e-25")
    except (ArithmeticError, TypeError):
        return _stop(listed, computed, skip, f"the value at n = {n} is not exact ({value})", kind)
    if not close:
        before = _compare(listed, computed, kind, skip)
        if before.status == "disagrees":
            return before
        return Verdict("disagrees", f"the formula gives the irrational value {value}", index=n, expected=want,
                       computed=str(value), compared=before.compared + 1, kind=kind)
    return _stop(listed, computed, skip, f"at n = {n} the formula gives {value}, equal to the listed term "
                                         "to 25 digits but not exactly computable", kind)


def _check_table(plan: T.Plan, listed: dict[int, Number], limits: R.Limits) -> Verdict:
    """T(n,k) read by rows: the listed terms are the flattened rows from row ``first_index``."""
    indices = list(listed)
    first = indices[0]
    if indices != list(range(first, first + len(indices))):
        return Verdict("cannot-check", "a table needs consecutive listed terms", kind="table")
    code = T.compile_exact(plan.expr)
    compared = 0
    for (n, k), want in zip(T.table_cells(plan, first, len(indices)), listed.values()):
        try:
            got = code({plan.var: n, plan.var2: k})
        except ZeroDivisionError:
            return Verdict("cannot-check", f"division by zero at ({n}, {k})", compared=compared, kind="table")
        except (T.CannotCompute, R.RecurrenceError) as exc:
            return Verdict("cannot-check", exc.reason, compared=compared, kind="table")
        compared += 1
        if got != want:
            shown = str(got) if isinstance(got, T.Inexact) else got
            return Verdict("disagrees", f"the table read by rows; term {first + compared - 1} is "
                           f"{plan.name}({n},{k})", index=first + compared - 1, expected=want, computed=shown,
                           compared=compared, kind="table")
    return Verdict("agrees", f"the table read by rows from row {first}", compared=compared, kind="table")


def _stop(listed: dict[int, Number], computed: dict[int, Number], skip: set[int], reason: str, kind: str,
          **extra: Any) -> Verdict:
    """A computation stopped early: a disagreement found so far still counts, else cannot-check."""
    partial = _compare(listed, computed, kind, skip, **extra)
    if partial.status == "disagrees":
        return partial
    if partial.compared:
        return Verdict("cannot-check", f"{reason}; the terms before that agree",
                       compared=partial.compared, kind=kind, **extra)
    return Verdict("cannot-check", reason, kind=kind, **extra)


def _check_recurrence(plan: T.Plan, listed: dict[int, Number], initial: Any, limits: R.Limits) -> Verdict:
    rec = plan.recurrence
    assert rec is not None
    indices = list(listed)
    first, last = indices[0], indices[-1]
    if indices != list(range(first, last + 1)):
        return Verdict("cannot-check", "a recurrence needs consecutive listed terms", kind="recurrence")
    given = T._initial_arg(initial, first)
    values: list[Number]
    used = 0
    try:
        if rec.initial or given:
            values = R.evaluate(rec, first, len(indices), initial=given, limits=limits)
        else:
            used, values = R.terms_with_leading(rec, first, [listed[i] for i in indices], limits=limits)
    except R.MissingInitialValue as exc:
        if rec.initial or given:
            # the stated initial values are not enough: complete them from the listed terms
            try:
                merged = dict(rec.initial)
                merged.update(given or {})
                rec2 = R.Recurrence(rule=rec.rule, order=rec.order, start=rec.start, initial=merged,
                                    name=rec.name, applies=rec.applies)
                used, values = R.terms_with_leading(rec2, first, [listed[i] for i in indices], limits=limits)
            except R.RecurrenceError as exc2:
                return _stop_rec(listed, first, exc2)
        else:
            return _stop_rec(listed, first, exc, set(given or ()) - set(rec.initial))
    except R.RecurrenceError as exc:
        return _stop_rec(listed, first, exc, set(given or ()) - set(rec.initial))
    computed = {first + i: v for i, v in enumerate(values)}
    # the caller's initial values are inputs, not claims of the formula: not compared
    skip = set(indices[:used]) | (set(given or ()) - set(rec.initial))
    if used >= len(indices):
        return Verdict("cannot-check", "every listed term is needed as an initial value", kind="recurrence",
                       initial_from_terms=used)
    return _compare(listed, computed, "recurrence", skip, initial_from_terms=used)


def _stop_rec(listed: dict[int, Number], first: int, exc: R.RecurrenceError, skip: set[int] = frozenset()) -> Verdict:
    computed = {first + i: v for i, v in enumerate(exc.partial)}
    return _stop(listed, computed, set(skip), exc.reason, "recurrence")


def _check_series(formula: Any, plan: T.Plan, listed: dict[int, Number], kind: str, labelled: bool,
                  limits: R.Limits) -> Verdict:
    if min(listed) < 0:
        return Verdict("cannot-check", "generating-function coefficients start at index 0", kind=kind)
    count = max(listed) + 1
    try:
        coeffs = T.series(formula, count, kind=kind, limits=limits)
    except R.LimitExceeded as exc:
        return Verdict("cannot-check", exc.reason, kind=kind)
    verdict = _compare(listed, dict(enumerate(coeffs)), kind)
    if verdict.status == "disagrees" and not labelled:
        # no label: the same function may be meant as the other kind of generating function
        other = "egf" if kind == "ogf" else "ogf"
        try:
            alt = _compare(listed, dict(enumerate(T.series(formula, count, kind=other, limits=limits))), other)
        except (T.CannotCompute, R.RecurrenceError):
            alt = None
        if alt is not None and alt.status == "agrees":
            name = "an exponential" if other == "egf" else "an ordinary"
            return replace(alt, reason=f"read as {name} generating function (the text has no label)")
    return verdict


# --------------------------------------------------------- asymptotic trend --

TREND_LAST_DISTANCE = 0.2


class _Approx(A.Visitor):
    """AST -> ``decimal.Decimal`` with 50 significant digits (for ``f(n)`` in ``a(n) ~ f(n)`` only)."""

    CONSTANTS = {
        # from memory, 50 digits each
        "pi": "3.14159265358979323846264338327950288419716939937511",
        "e": "2.71828182845904523536028747135266249775724709369996",
        "phi": "1.61803398874989484820458683436563811772030917980576",
        "gamma": "0.57721566490153286060651209008240243104215933593992",
    }

    def __init__(self, env: dict[str, int]) -> None:
        self.env = env

    def generic_visit(self, node: A.Node) -> D.Decimal:
        return self._exact(node)

    def _exact(self, node: A.Node) -> D.Decimal:
        value = T.compile_exact(node)(dict(self.env))
        return _dec(value)

    def visit_Symbol(self, node: A.Symbol) -> D.Decimal:
        if node.name not in self.env:
            raise T.CannotCompute(f"the variable {node.name} has no value", node)
        return D.Decimal(self.env[node.name])

    def visit_Constant(self, node: A.Constant) -> D.Decimal:
        if node.name not in self.CONSTANTS:
            raise T.CannotCompute(f"the constant {node.written or node.name} has no real value here", node)
        return D.Decimal(self.CONSTANTS[node.name])

    def visit_UnaryOp(self, node: A.UnaryOp) -> D.Decimal:
        return -self.visit(node.operand)

    def visit_BinOp(self, node: A.BinOp) -> D.Decimal:
        a, b = self.visit(node.left), self.visit(node.right)
        if node.op == "+":
            return a + b
        if node.op == "-":
            return a - b
        if node.op == "*":
            return a * b
        if node.op == "/":
            if b == 0:
                raise ZeroDivisionError("division by zero")
            return a / b
        return self._exact(node)

    def visit_Power(self, node: A.Power) -> D.Decimal:
        base, exponent = self.visit(node.base), self.visit(node.exponent)
        if exponent == exponent.to_integral_value() and abs(exponent) < 10 ** 6:
            if base == 0 and exponent < 0:
                raise ZeroDivisionError("0 to a negative power")
            return base ** int(exponent)
        if base <= 0:
            raise T.CannotCompute("a non-positive number to a fractional power", node)
        return (base.ln() * exponent).exp()

    def visit_Call(self, node: A.Call) -> D.Decimal:
        if node.name in ("sqrt", "exp", "log", "ln") and len(node.args) == 1:
            v = self.visit(node.args[0])
            if node.name == "sqrt":
                if v < 0:
                    raise T.CannotCompute("square root of a negative number", node)
                return v.sqrt()
            if node.name == "exp":
                return v.exp()
            if v <= 0:
                raise T.CannotCompute("logarithm of a non-positive number", node)
            return v.ln()
        return self._exact(node)


def _dec(value: Any) -> D.Decimal:
    if isinstance(value, T.Inexact):
        if value.value is None:
            raise T.CannotCompute(f"no numeric value for {value}")
        return value.value
    if isinstance(value, Fraction):
        return D.Decimal(value.numerator) / D.Decimal(value.denominator)
    if isinstance(value, bool):
        raise T.CannotCompute("a condition is not a number")
    return D.Decimal(value)


def approximate(node: A.Node, env: dict[str, int]) -> D.Decimal:
    with D.localcontext() as ctx:
        ctx.prec = 50
        ctx.Emax = 10 ** 8
        ctx.Emin = -10 ** 8
        ctx.traps[D.InvalidOperation] = True
        return +_Approx(env).visit(node)


def _check_trend(plan: T.Plan, listed: dict[int, Number], limits: R.Limits) -> Verdict:
    lhs = plan.lhs
    if lhs is not None and not A.seq_refs(lhs) and A.free_symbols(lhs) <= {plan.var}:
        # an explicit left side (binomial(2n,n) ~ ...) must be the listed sequence itself
        exact = _check_closed(replace(plan, expr=lhs, also=None, initial={}), listed, limits)
        if exact.status == "disagrees":
            return replace(exact, kind="asymptotic",
                           reason="; ".join(r for r in ("the left side is not the listed sequence", exact.reason) if r))
    points: list[tuple[int, float]] = []
    for n, value in listed.items():
        if plan.condition is not None:
            try:
                if not plan.condition({plan.var: n}):
                    continue
            except (T.CannotCompute, ArithmeticError):
                continue
        try:
            f = approximate(plan.expr, {plan.var: n})
            if f == 0:
                continue
            with D.localcontext() as ctx:
                ctx.prec, ctx.Emax, ctx.Emin = 50, 10 ** 8, -10 ** 8
                distance = abs(_dec(value) / f - 1)
        except (T.CannotCompute, ArithmeticError, ValueError, OverflowError):
            continue  # f(n) undefined at small n (log 0, 0^(-1/2)): skip that point
        points.append((n, float(distance) if distance < D.Decimal("1e300") else float("inf")))
    kind = "asymptotic"
    if len(points) < 3:
        return Verdict("cannot-check", f"only {len(points)} listed term(s) give a ratio a(n)/f(n); "
                                       "a trend needs at least 3", kind=kind, heuristic=True)
    d = [p[1] for p in points]
    half = len(d) // 2
    early, late = d[:half], d[half:]
    last_n = points[-1][0]
    info = f"|a(n)/f(n) - 1| = {d[-1]:.3g} at n = {last_n}, {max(early):.3g} early on"
    if max(late) < max(early) and d[-1] <= TREND_LAST_DISTANCE and d[-1] <= sorted(early)[len(early) // 2]:
        return Verdict("agrees", f"ratio moves toward 1 ({info}); a trend, not a proof", heuristic=True,
                       compared=len(points), kind=kind)
    return Verdict("disagrees", f"the ratio a(n)/f(n) does not move toward 1 ({info})", heuristic=True,
                   index=last_n, compared=len(points), kind=kind)
