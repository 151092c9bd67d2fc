"""Presentation MathML (W3C MathML Core) for formula trees.

Only Core elements and attributes are written (no ``mfenced``/``menclose``,
no ``fence``/``separator`` attributes), so browsers render the output
natively and it validates against the MathML Core RELAX NG schema. Fences
are plain ``mo`` in an ``mrow`` (the operator dictionary makes them
stretchy); sums and products are ``munderover`` with a large-operator ``mo``.
The output is built as strings: every compound visit returns one element.
"""

from __future__ import annotations

from typing import Any

from xml.sax.saxutils import escape as _sax_escape

from normform.export.ascii import ADD, ATOM, MOD, MUL, NEG, POST, POW, REL
from normform.export.latex import FRAC, OPERATORS, SUBSCRIPTED, starts_with_number  # noqa: F401
from normform.export.latex import level as _latex_level
from normform.formula import ast as A


def escape(text: str) -> str:
    """XML character escaping (``&``, ``<``, ``>``); most names and numbers need none."""
    if "&" in text or "<" in text or ">" in text:
        return _sax_escape(text)
    return text


# binding levels (as normform.export.latex.level gives them) of the node classes whose
# level does not depend on the node: one dict lookup instead of a chain of isinstance
_CLASS_LEVEL = {A.Symbol: ATOM, A.Constant: ATOM, A.Call: ATOM, A.SeqRef: ATOM, A.BigOp: ATOM,
                A.Decimal: ATOM, A.Relation: REL, A.Power: POW, A.Factorial: POST, A.UnaryOp: NEG,
                A.Piecewise: ATOM}
_BINOP_LEVEL = {"/": FRAC, "mod": MOD, "+": ADD, "-": ADD}


def level(node: A.Node) -> int:
    """Same value as :func:`normform.export.latex.level`, quicker for the common nodes."""
    cls = node.__class__
    lv = _CLASS_LEVEL.get(cls)
    if lv is not None:
        return lv
    if cls is A.BinOp:
        return _BINOP_LEVEL.get(node.op, MUL)
    if cls is A.Integer:
        return NEG if node.value < 0 else ATOM
    return _latex_level(node)

NS = "http://www.w3.org/1998/Math/MathML"
REL_MO = {"=": "=", "!=": "≠", "<": "&lt;", ">": "&gt;", "<=": "≤", ">=": "≥", "~": "∼", "==": "≡"}
CONST_MI = {"pi": "π", "e": "e", "phi": "ϕ", "gamma": "γ", "i": "i", "infinity": "∞"}
NAME_MI = {"Gamma": "Γ", "zeta": "ζ", "totient": "φ", "moebius": "μ", "sigma": "σ", "numdiv": "τ",
           "stirling1": "s", "stirling2": "S", "prime": "p", "max": "max", "min": "min", "gcd": "gcd"}
LABEL_TEXT = {"ogf": "G.f.:", "egf": "E.g.f.:"}
INVISIBLE_TIMES = "\u2062"
APPLY = "\u2061"
NBSP = "\u00a0"


def mi(text: str) -> str:
    return f"<mi>{escape(text)}</mi>"


def mn(text: str) -> str:
    return f"<mn>{escape(text)}</mn>"


def mo(text: str, attrs: str = "") -> str:
    # callers pass already-escaped operator text for < and >
    return f"<mo{attrs}>{text}</mo>"


def mtext(text: str) -> str:
    return f"<mtext>{escape(text)}</mtext>"


def row(*items: str) -> str:
    return "<mrow>" + "".join(items) + "</mrow>"


_VISITS: dict[type, dict[type, Any]] = {}


class MathMLPrinter(A.Visitor):
    """Walks a tree and returns Presentation MathML."""

    def __init__(self, display: str = "block", semantics: bool = False):
        if display not in ("block", "inline"):
            raise ValueError("display must be 'block' or 'inline'")
        self.display = display
        self.semantics = semantics
        self._visits = _VISITS.setdefault(type(self), {})

    def visit(self, node: A.Node) -> str:
        # A.Visitor.visit with a dispatch table per printer class (no key tuple per call)
        fn = self._visits.get(node.__class__)
        if fn is None:
            fn = getattr(type(self), "visit_" + type(node).__name__, None) or type(self).generic_visit
            self._visits[node.__class__] = fn
        return fn(self, node)

    def document(self, stmt: A.Node) -> str:
        body = self.statement(stmt) if isinstance(stmt, A.Statement) else self.visit(stmt)
        if self.semantics:
            body = with_semantics(body, stmt)
        return f'<math xmlns="{NS}" display="{self.display}">{body}</math>'

    def statement(self, stmt: A.Statement) -> str:
        parts = []
        if stmt.label:
            parts += [mtext(LABEL_TEXT[stmt.label]), '<mspace width="0.5em"/>']
        parts.append(self.visit(stmt.body))
        for i, cond in enumerate(stmt.conditions):
            if i == 0:
                parts += ['<mspace width="1em"/>', mtext("for" + NBSP)]
            else:
                parts += [mo(","), '<mspace width="0.5em"/>']
            parts.append(self.visit(cond))
        for init in stmt.initial:
            parts += [mo(","), '<mspace width="1em"/>']
            for t in init.targets:
                parts += [self.visit(t), mo("=")]
            parts.append(self.visit(init.value))
        return row(*parts)

    def paren(self, inner: str, open_: str = "(", close: str = ")") -> str:
        return row(mo(open_), inner, mo(close))

    def at(self, node: A.Node, need: int) -> str:
        text = self.visit(node)
        return self.paren(text) if level(node) < need else text

    # leaves
    def visit_Integer(self, node):
        if node.value < 0:
            return row(mo("−"), mn(str(-node.value)))
        return mn(str(node.value))

    def visit_Rational(self, node):
        q = node.value
        if q.denominator == 1:
            return self.visit_Integer(A.Integer(q.numerator))
        frac = f"<mfrac>{mn(str(abs(q.numerator)))}{mn(str(q.denominator))}</mfrac>"
        return row(mo("−"), frac) if q < 0 else frac

    def visit_Decimal(self, node):
        return mn(node.text)

    def visit_Symbol(self, node):
        return mi(node.name)

    def visit_Constant(self, node):
        return mi(CONST_MI[node.name])

    # operators
    def visit_UnaryOp(self, node):
        return row(mo("−"), self.at(node.operand, MUL))

    def visit_BinOp(self, node):
        op = node.op
        if op == "/":
            return f"<mfrac>{self.visit(node.left)}{self.visit(node.right)}</mfrac>"
        if op in "+-":
            return row(self.at(node.left, ADD), mo("+" if op == "+" else "−"), self.at(node.right, MUL))
        if op == "mod":
            return row(self.at(node.left, ADD), mo("mod"), self.at(node.right, MUL))
        left = self.paren(self.visit(node.left)) if isinstance(node.left, A.UnaryOp) else self.at(node.left, MUL)
        right = self.at(node.right, POW)
        plain = node.implicit and not starts_with_number(node.right) and level(node.right) >= POW
        sign = INVISIBLE_TIMES if plain else "⋅"
        return row(left, mo(sign), right)

    def visit_Power(self, node):
        base = self.visit(node.base)
        if level(node.base) < ATOM or isinstance(node.base, A.Call) and node.base.name in SUBSCRIPTED \
                or isinstance(node.base, A.SeqRef) and node.base.subscript:
            base = self.paren(base)
        return f"<msup>{base}{self.visit(node.exponent)}</msup>"

    def visit_Factorial(self, node):
        inner = self.visit(node.operand)
        if level(node.operand) < ATOM:
            inner = self.paren(inner)
        return row(inner, mo("!!" if node.double else "!"))

    def call_args(self, args) -> str:
        items: list[str] = []
        for i, a in enumerate(args):
            if i:
                items.append(mo(","))
            items.append(self.visit(a))
        return self.paren("".join(items))

    def visit_Call(self, node):
        name, args = node.name, node.args
        if name == "binomial":
            frac = f'<mfrac linethickness="0">{self.visit(args[0])}{self.visit(args[1])}</mfrac>'
            return row(mo("("), frac, mo(")"))
        if name == "floor":
            return self.paren(self.visit(args[0]), "⌊", "⌋")
        if name == "ceiling":
            return self.paren(self.visit(args[0]), "⌈", "⌉")
        if name == "abs":
            return self.paren(self.visit(args[0]), "|", "|")
        if name == "sqrt":
            return f"<msqrt>{self.visit(args[0])}</msqrt>"
        if name == "root":
            return f"<mroot>{self.visit(args[0])}{self.visit(args[1])}</mroot>"
        if name == "mod":
            return row(self.at(args[0], ADD), mo("mod"), self.at(args[1], MUL))
        if name == "factorial":
            return self.visit(A.Factorial(args[0]))
        if name == "factorial2":
            return self.visit(A.Factorial(args[0], True))
        if name in SUBSCRIPTED and len(args) == 1:
            return f"<msub>{mi(SUBSCRIPTED[name])}{self.visit(args[0])}</msub>"
        head = NAME_MI.get(name, name)
        return row(mi(head), mo(APPLY), self.call_args(args))

    def visit_SeqRef(self, node):
        if node.subscript:
            items: list[str] = []
            for i, a in enumerate(node.indices):
                if i:
                    items.append(mo(","))
                items.append(self.visit(a))
            return f"<msub>{mi(node.name)}{row(*items)}</msub>"
        return row(mi(node.name), mo(APPLY), self.call_args(node.indices))

    def visit_BigOp(self, node):
        sym = mo("∑" if node.op == "sum" else "∏", ' largeop="true" movablelimits="false"')
        var = mi(node.var)
        if node.divides is not None:
            head = f"<munder>{sym}{row(var, mo('∣'), self.visit(node.divides))}</munder>"
        elif node.lower is None:
            head = f"<munder>{sym}{var}</munder>"
        else:
            head = f"<munderover>{sym}{row(var, mo('='), self.visit(node.lower))}{self.visit(node.upper)}</munderover>"
        return row(head, self.at(node.body, MUL))

    def visit_Dots(self, node):
        items: list[str] = []
        sep = "+" if node.op == "+" else "⋅"
        need = MUL if node.op == "+" else POW
        for t in node.first:
            items += [self.at(t, need), mo(sep)]
        items += [mo("⋯"), mo(sep), self.at(node.last, need)]
        return row(*items)

    def visit_Relation(self, node):
        items = [self.at(node.operands[0], MOD)]
        for op, operand in zip(node.ops, node.operands[1:]):
            items += [mo(REL_MO[op]), self.at(operand, MOD)]
        if node.modulus is not None:
            items += ['<mspace width="1em"/>', mo("("), mo("mod"), '<mspace width="0.333em"/>',
                      self.visit(node.modulus), mo(")")]
        return row(*items)

    def visit_Parity(self, node):
        return row(self.at(node.operand, MOD), mtext(NBSP + ("even" if node.even else "odd")))

    def visit_And(self, node):
        items: list[str] = []
        for i, c in enumerate(node.items):
            if i:
                items.append(mtext(NBSP + "and" + NBSP))
            items.append(self.visit(c))
        return row(*items)

    def visit_Piecewise(self, node):
        rows = []
        for value, cond in node.branches:
            tail = mtext("otherwise") if cond is None else row(mtext("if" + NBSP), self.visit(cond))
            rows.append(f"<mtr><mtd>{self.visit(value)}</mtd><mtd>{tail}</mtd></mtr>")
        return row(mo("{"), "<mtable>" + "".join(rows) + "</mtable>")


def to_mathml(node: A.Node, display: str = "block", semantics: bool = False) -> str:
    return MathMLPrinter(display, semantics).document(node)


# ---------------------------------------------------------------- Content MathML

CONTENT_OPS = {"+": "plus", "-": "minus", "*": "times", "/": "divide", "mod": "rem"}
CONTENT_REL = {"=": "eq", "!=": "neq", "<": "lt", ">": "gt", "<=": "leq", ">=": "geq", "==": "equivalent",
               "~": "approx"}
CONTENT_CONST = {"pi": "<pi/>", "e": "<exponentiale/>", "i": "<imaginaryi/>", "infinity": "<infinity/>",
                 "gamma": "<eulergamma/>"}
# functions with a Content MathML element of their own (MathML 3, chapter 4)
CONTENT_FN = {"floor": "floor", "ceiling": "ceiling", "abs": "abs", "exp": "exp", "log": "ln", "sin": "sin",
              "cos": "cos", "tan": "tan", "cot": "cot", "sec": "sec", "csc": "csc", "sinh": "sinh",
              "cosh": "cosh", "tanh": "tanh", "arctan": "arctan", "arcsin": "arcsin", "arccos": "arccos",
              "gcd": "gcd", "lcm": "lcm", "max": "max", "min": "min", "factorial": "factorial"}


# OpenMath content dictionaries for the combinatorial functions that have one
_CSYMBOL = {"binomial": ("combinat1", "binomial"), "stirling1": ("combinat1", "Stirling1"),
            "stirling2": ("combinat1", "Stirling2"), "Gamma": ("hypergeo0", "gamma"),
            "totient": ("integer2", "euler")}


def _apply(head: str, *args: str) -> str:
    return "<apply>" + head + "".join(args) + "</apply>"


class ContentPrinter(A.Visitor):
    """Content MathML (strict-style ``apply`` trees) for the ``semantics`` annotation."""

    def visit_Integer(self, node):
        return f"<cn>{node.value}</cn>" if node.value >= 0 else _apply("<minus/>", f"<cn>{-node.value}</cn>")

    def visit_Rational(self, node):
        q = node.value
        return _apply("<divide/>", f"<cn>{q.numerator}</cn>", f"<cn>{q.denominator}</cn>")

    def visit_Decimal(self, node):
        return f"<cn>{escape(node.text)}</cn>"

    def visit_Symbol(self, node):
        return f"<ci>{escape(node.name)}</ci>"

    def visit_Constant(self, node):
        if node.name == "phi":  # the golden ratio (1 + sqrt 5)/2
            return _apply("<divide/>", _apply("<plus/>", "<cn>1</cn>", _apply("<root/>", "<cn>5</cn>")), "<cn>2</cn>")
        return CONTENT_CONST[node.name]

    def visit_UnaryOp(self, node):
        return _apply("<minus/>", self.visit(node.operand))

    def visit_BinOp(self, node):
        return _apply(f"<{CONTENT_OPS[node.op]}/>", self.visit(node.left), self.visit(node.right))

    def visit_Power(self, node):
        return _apply("<power/>", self.visit(node.base), self.visit(node.exponent))

    def visit_Factorial(self, node):
        if node.double:
            return _apply('<csymbol cd="integer2">factorial2</csymbol>', self.visit(node.operand))
        return _apply("<factorial/>", self.visit(node.operand))

    def visit_Call(self, node):
        args = [self.visit(a) for a in node.args]
        if node.name == "sqrt":
            return _apply("<root/>", *args)
        if node.name == "root":
            return _apply("<root/>", f"<degree>{args[1]}</degree>", args[0])
        if node.name == "mod":
            return _apply("<rem/>", *args)
        head = CONTENT_FN.get(node.name)
        if head:
            return _apply(f"<{head}/>", *args)
        cd, name = _CSYMBOL.get(node.name, ("normform", node.name))
        return _apply(f'<csymbol cd="{cd}">{escape(name)}</csymbol>', *args)

    def visit_SeqRef(self, node):
        return _apply(f"<ci>{escape(node.name)}</ci>", *(self.visit(i) for i in node.indices))

    def visit_BigOp(self, node):
        head = "<sum/>" if node.op == "sum" else "<product/>"
        parts = [f"<bvar><ci>{escape(node.var)}</ci></bvar>"]
        if node.divides is not None:
            cond = _apply('<csymbol cd="integer1">divides</csymbol>', f"<ci>{escape(node.var)}</ci>",
                          self.visit(node.divides))
            parts.append(f"<condition>{cond}</condition>")
        elif node.lower is not None:
            parts.append(f"<lowlimit>{self.visit(node.lower)}</lowlimit>")
            parts.append(f"<uplimit>{self.visit(node.upper)}</uplimit>")
        return _apply(head, *parts, self.visit(node.body))

    def visit_Dots(self, node):
        head = "<plus/>" if node.op == "+" else "<times/>"
        return _apply(head, *(self.visit(t) for t in node.first), "<ci>…</ci>", self.visit(node.last))

    def visit_Relation(self, node):
        if len(node.ops) == 1:
            out = _apply(f"<{CONTENT_REL[node.ops[0]]}/>", self.visit(node.operands[0]), self.visit(node.operands[1]))
        else:
            out = _apply("<and/>", *(_apply(f"<{CONTENT_REL[op]}/>", self.visit(a), self.visit(b))
                                    for op, a, b in zip(node.ops, node.operands, node.operands[1:])))
        if node.modulus is not None:
            out = _apply('<csymbol cd="integer2">congruent</csymbol>', *(self.visit(o) for o in node.operands),
                         self.visit(node.modulus))
        return out

    def visit_Parity(self, node):
        rem = _apply("<rem/>", self.visit(node.operand), "<cn>2</cn>")
        return _apply("<eq/>" if node.even else "<neq/>", rem, "<cn>0</cn>")

    def visit_And(self, node):
        return _apply("<and/>", *(self.visit(i) for i in node.items))

    def visit_Piecewise(self, node):
        parts = []
        for value, cond in node.branches:
            if cond is None:
                parts.append(f"<otherwise>{self.visit(value)}</otherwise>")
            else:
                parts.append(f"<piece>{self.visit(value)}{self.visit(cond)}</piece>")
        return "<piecewise>" + "".join(parts) + "</piecewise>"


def with_semantics(presentation_row: str, stmt: A.Node) -> str:
    """Wrap presentation markup in ``semantics`` with a Content MathML annotation of the body."""
    body = stmt.body if isinstance(stmt, A.Statement) else stmt
    content = ContentPrinter().visit(body)
    return (f"<semantics>{presentation_row}"
            f'<annotation-xml encoding="MathML-Content">{content}</annotation-xml></semantics>')
