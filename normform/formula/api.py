"""Public API: ``parse_formula(text) -> Formula``."""

from __future__ import annotations

from fractions import Fraction
from typing import Any

from normform.formula import ast as A
from normform.formula.errors import EvaluationError, FormulaError

KINDS = ("closed-form", "recurrence", "ogf", "egf", "asymptotic", "identity", "expression", "relation")


_parse_statement = _parse_short = None  # normform.formula.parser's, imported on first use


def parse_formula(text: str) -> "Formula":
    """Parse one plain-text formula; raise :class:`FormulaError` with its position."""
    global _parse_statement, _parse_short
    if _parse_statement is None:
        from normform.formula.parser import _parse_statement as _parse_short, parse_statement as _parse_statement
    if text.__class__ is str and len(text) <= A.SHALLOW_TEXT:  # (a shallow tree: no `deep` wrapper needed)
        return Formula(text, _parse_short(text))
    return Formula(text, _parse_statement(text))


def _text_of(self: "Formula", *_: Any) -> str:
    return self.text


class Formula:
    """A parsed formula: the statement tree plus what it says.

    ``kind`` is one of :data:`KINDS`; ``label`` "ogf"/"egf" from a written label
    (``G.f.:``) or from the left side (``A(x) = ...``, ``Sum_{n>=0} a(n) x^n = ...``);
    ``lhs``/``rhs`` are the sides (``lhs`` None for a bare expression);
    ``conditions`` the range/parity clauses; ``initial`` maps an index (int,
    or a tuple for tables) to its value; ``note`` is trailing attribution text.
    """

    __slots__ = ("text", "root", "lhs", "rhs", "conditions", "note", "_kind", "_label", "_initial")

    def __init__(self, text: str, root: A.Statement):
        self.text = text
        self.root = root
        body = root.body
        if body.__class__ is A.Relation:  # (Relation has no subclasses)
            self.lhs: A.Node | None = body.operands[0]
            self.rhs: A.Node = body.operands[-1]
        else:
            self.lhs, self.rhs = None, body
        self.conditions = root.conditions
        self.note = root.note
        self._kind = self._label = self._initial = None

    # computed on first use: parsing and rendering do not pay for them
    @property
    def label(self) -> str | None:
        if self._label is None:
            self._label = self.root.label or _gf_label(self.lhs) or ""
        return self._label or None

    @property
    def kind(self) -> str:
        if self._kind is None:
            self._kind = _kind(self.root, self.lhs, self.rhs, self.label)
        return self._kind

    @property
    def initial(self) -> dict:
        if self._initial is None:
            self._initial = _initial(self.root)
        return self._initial

    @property
    def sequence_name(self) -> str | None:
        """Name of the sequence the left side defines (``a`` in ``a(n) = ...``), if any."""
        return _sequence_name(self.lhs)

    # -- structure
    @A.deep(text=_text_of)
    def __eq__(self, other: object) -> bool:
        return isinstance(other, Formula) and self.root == other.root

    @A.deep(text=_text_of)
    def __hash__(self) -> int:
        return hash(self.root)

    def __repr__(self) -> str:
        return f"Formula({self.text!r}, kind={self.kind!r})"

    @A.deep(text=_text_of)
    def variables(self) -> list[str]:
        """Free variables (bound summation variables and sequence names excluded), sorted."""
        return sorted(A.free_symbols(self.root.body))

    # -- output
    @A.deep(text=_text_of)
    def to_mathml(self, display: str = "block", semantics: bool = False) -> str:
        """Presentation MathML (MathML Core); ``semantics=True`` adds a Content MathML annotation."""
        from normform.export.mathml import MathMLPrinter

        return MathMLPrinter(display=display, semantics=semantics).document(self.root)

    @A.deep(text=_text_of)
    def to_latex(self) -> str:
        from normform.export.latex import LatexPrinter

        return LatexPrinter().statement(self.root)

    @A.deep(text=_text_of)
    def to_ascii(self) -> str:
        from normform.export.ascii import AsciiPrinter

        return AsciiPrinter().statement(self.root)

    def to_dict(self) -> dict[str, Any]:
        return {"input": self.text, "ok": True, "kind": self.kind, "ascii": self.to_ascii(),
                "latex": self.to_latex(), "mathml": self.to_mathml()}

    # -- values
    def evaluate(self, **values: Any):
        """Exact value of the right side (the expression itself when there is no relation)
        at ``values``: int or Fraction, or an :class:`~normform.formula.evaluate.Approx`
        (40 significant digits) when the value is irrational."""
        return self.evaluate_at(values)

    @A.deep(text=_text_of)
    def evaluate_at(self, values: dict[str, Any], *, digits: int = 40, side: int = -1, sequence=None):
        """Like :meth:`evaluate`, with the precision for irrational values and the side
        (0 = left, -1 = right) chosen; ``sequence(name, indices)`` supplies sequence terms."""
        from normform.formula.evaluate import evaluate

        body = self.root.body
        node = body.operands[side] if isinstance(body, A.Relation) else body
        self._check_conditions(values)
        return evaluate(node, values, digits=digits, sequence=sequence)

    def _check_conditions(self, values: dict[str, Any]) -> None:
        from normform.formula.evaluate import Evaluator, _coerce

        env = {k: _coerce(k, v) for k, v in values.items()}
        for cond in self.conditions:
            if not A.free_symbols(cond) <= set(env):
                continue
            try:
                ok = Evaluator(env).truth(cond)
            except EvaluationError:
                continue
            if not ok:
                from normform.export.ascii import AsciiPrinter

                raise EvaluationError(f"outside the stated range: {AsciiPrinter().condition(cond)}")

    @A.deep(text=_text_of)
    def terms(self, first_index: int, count: int, initial=None):
        """Terms a(first_index), ... (see :mod:`normform.formula.terms`)."""
        from normform.formula import terms as _terms

        return _terms.terms(self, first_index, count, initial)

    @A.deep(text=_text_of)
    def series(self, count: int):
        """Generating-function coefficients (see :mod:`normform.formula.terms`)."""
        from normform.formula import terms as _terms

        return _terms.series(self, count)


# ------------------------------------------------------------ classification

def _sequence_name(lhs: A.Node | None) -> str | None:
    if lhs is None:
        return None
    if isinstance(lhs, A.SeqRef):
        return lhs.name
    refs = A.seq_refs(lhs)
    return refs[0].name if refs else None


def _gf_label(lhs: A.Node | None) -> str | None:
    """``A(x) = ...`` and ``Sum_{n>=0} a(n) x^n (/n!) = ...`` name a generating function."""
    if isinstance(lhs, A.SeqRef) and lhs.indices == (A.Symbol("x"),) and lhs.name[:1].isupper():
        return "ogf"
    if isinstance(lhs, A.BigOp) and lhs.op == "sum" and isinstance(lhs.upper, A.Constant) \
            and lhs.upper.name == "infinity" and A.seq_refs(lhs.body) and "x" in A.free_symbols(lhs.body):
        has_fact = any(isinstance(n, A.Factorial) for n in lhs.body.walk())
        return "egf" if has_fact else "ogf"
    return None


def _kind(root: A.Statement, lhs, rhs, label) -> str:
    body = root.body
    if label:
        return label
    if not isinstance(body, A.Relation):
        if A.free_symbols(body) == {"x"} and not A.seq_refs(body):
            return "ogf"  # an unlabeled expression in x alone reads as a generating function
        return "expression"
    if "~" in body.ops:
        return "asymptotic"
    if body.modulus is not None or any(op != "=" for op in body.ops):
        return "relation"
    left = {r.name for r in A.seq_refs(lhs)}
    right = {r.name for r in A.seq_refs(rhs)}
    if left & right:
        return "recurrence"
    if left:
        return "closed-form"
    return "identity"


def _initial(root: A.Statement) -> dict:
    from normform.formula.evaluate import evaluate

    out: dict = {}
    for init in root.initial:
        try:
            value: Any = evaluate(init.value)
        except EvaluationError:
            value = init.value
        for target in init.targets:
            idx = []
            for i in target.indices:
                try:
                    v = evaluate(i)
                except EvaluationError:
                    v = None
                idx.append(v if isinstance(v, int) else i)
            out[idx[0] if len(idx) == 1 else tuple(idx)] = value
    return out


__all__ = ["parse_formula", "Formula", "FormulaError", "KINDS", "Fraction"]
