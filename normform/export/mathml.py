"""Presentation MathML (W3C MathML Core) for formula trees.

Only Core elements and attributes are written (no ``mfenced``/``menclose``,
no ``fence``/``separator`` attributes), so browsers render the output
natively and it validates against the MathML Core RELAX NG schema. Fences
are plain ``mo`` in an ``mrow`` (the operator dictionary makes them
stretchy); sums and products are ``munderover`` with a large-operator ``mo``.
The output is built as strings: every compound visit returns one element.
"""

from __future__ import annotations

from xml.sax.saxutils import escape

from normform.export.ascii import ADD, ATOM, MOD, MUL, POW
from normform.export.latex import OPERATORS, SUBSCRIPTED, level, starts_with_number  # noqa: F401
from normform.formula import ast as A

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


class MathMLPrinter(A.Visitor):
    """Walks a tree and returns Presentation MathML."""

    def __init__(self, display: str = "block"):
        if display not in ("block", "inline"):
            raise ValueError("display must be 'block' or 'inline'")
        self.display = display

    def document(self, stmt: A.Node) -> str:
        body = self.statement(stmt) if isinstance(stmt, A.Statement) else self.visit(stmt)
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


def to_mathml(node: A.Node, display: str = "block") -> str:
    return MathMLPrinter(display).document(node)
