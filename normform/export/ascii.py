"""Canonical ASCII: our own linear formula syntax (``grammars/canonical-ascii.md``).

One spelling per construct, the fewest parentheses that keep the tree, and
re-parseable by the same grammar: ``parse(ascii(f)) == f`` (spans aside).
"""

from __future__ import annotations

from normform.formula import ast as A

# precedence levels, loosest first
REL, MOD, ADD, NEG, MUL, SNEG, POW, POST, ATOM = range(9)

REL_TEXT = {"=": "=", "!=": "!=", "<": "<", ">": ">", "<=": "<=", ">=": ">=", "~": "~", "==": "=="}
CONST_TEXT = {"pi": "pi", "e": "e", "phi": "phi", "gamma": "gamma", "i": "i", "infinity": "inf"}


_ATOMIC = (A.Symbol, A.Constant, A.Call, A.SeqRef, A.BigOp, A.Decimal)


def level(node: A.Node) -> int:
    """Binding level of ``node`` as the canonical syntax reads it."""
    if isinstance(node, _ATOMIC):
        return ATOM
    if isinstance(node, A.Relation):
        return REL
    if isinstance(node, A.BinOp):
        return {"mod": MOD, "+": ADD, "-": ADD}.get(node.op, MUL)
    if isinstance(node, A.Dots):
        return ADD if node.op == "+" else MUL
    if isinstance(node, A.UnaryOp):
        return SNEG if level(node.operand) >= POW else NEG
    if isinstance(node, A.Power):
        return POW
    if isinstance(node, A.Factorial):
        return POST
    if isinstance(node, A.Integer) and node.value < 0:
        return NEG
    if isinstance(node, A.Rational):
        return MUL if node.value.denominator != 1 else (NEG if node.value < 0 else ATOM)
    if isinstance(node, A.Piecewise):
        return REL
    return ATOM


# one-letter names whose subscript form the parser reads as the function (F_n is Fibonacci)
_SUB_CALLS = frozenset("FLCHB")


def _is_function(node: A.SeqRef) -> bool:
    from normform.formula.functions import lookup

    return lookup(node.name, len(node.indices)) is not None


class AsciiPrinter(A.Visitor):
    """Walks a tree and returns its canonical ASCII text."""

    def statement(self, stmt: A.Statement) -> str:
        body = stmt.body
        pieces: list[str] = []
        if isinstance(body, A.Relation) and isinstance(body.operands[-1], A.Piecewise):
            head = self.visit(A.Relation(body.ops, body.operands[:-1] + (A.Symbol("\0"),), body.modulus))
            head = head[: head.rindex("\0")]
            pieces = self._branches(body.operands[-1])
            pieces[0] = head + pieces[0]
        elif isinstance(body, A.Piecewise):
            pieces = self._branches(body)
        else:
            pieces = [self.visit(body)]
        text = ", ".join(pieces)
        if stmt.label:
            text = f"{stmt.label}: {text}"
        for i, cond in enumerate(stmt.conditions):
            text += (" for " if i == 0 else ", for ") + self.condition(cond)
        for init in stmt.initial:
            text += ", " + " = ".join(self.visit(t) for t in init.targets) + " = " + self.visit(init.value)
        if stmt.note:
            text += " - " + stmt.note
        return text

    def _branches(self, pw: A.Piecewise) -> list[str]:
        out = []
        for value, cond in pw.branches:
            v = self.at(value, MOD)
            out.append(f"{v} otherwise" if cond is None else f"{v} if {self.condition(cond)}")
        return out

    def condition(self, cond: A.Node) -> str:
        if isinstance(cond, A.And):
            return " and ".join(self.condition(c) for c in cond.items)
        if isinstance(cond, A.Parity):
            return f"{self.at(cond.operand, MOD)} is {'even' if cond.even else 'odd'}"
        return self.visit(cond)

    def at(self, node: A.Node, need: int) -> str:
        text = self.visit(node)
        return f"({text})" if level(node) < need else text

    # -- leaves
    def visit_Integer(self, node):
        return str(node.value)

    def visit_Rational(self, node):
        q = node.value
        return str(q.numerator) if q.denominator == 1 else f"{q.numerator}/{q.denominator}"

    def visit_Decimal(self, node):
        return node.text

    def visit_Symbol(self, node):
        return node.name

    def visit_Constant(self, node):
        return CONST_TEXT[node.name]

    # -- operators
    def visit_UnaryOp(self, node):
        inner = self.at(node.operand, NEG)
        if inner.startswith("-"):
            inner = f"({inner})"
        return "-" + inner

    def visit_BinOp(self, node):
        op = node.op
        if op in "+-":
            return f"{self.at(node.left, ADD)} {op} {self.at(node.right, NEG)}"
        if op == "mod":
            return f"{self.at(node.left, MOD)} mod {self.at(node.right, ADD)}"
        left = self.visit(node.left)
        if level(node.left) < MUL or isinstance(node.left, A.UnaryOp):
            left = f"({left})"
        return f"{left}{op}{self.at(node.right, SNEG)}"

    def visit_Power(self, node):
        base = self.visit(node.base)
        if level(node.base) < POST or (isinstance(node.base, A.Integer) and node.base.value < 0):
            base = f"({base})"
        exp = self.visit(node.exponent)
        if level(node.exponent) < POW or isinstance(node.exponent, A.UnaryOp):
            exp = f"({exp})"
        return f"{base}^{exp}"

    def visit_Factorial(self, node):
        inner = self.visit(node.operand)
        if level(node.operand) < POST or isinstance(node.operand, A.Factorial):
            inner = f"({inner})"
        return inner + ("!!" if node.double else "!")

    def visit_Call(self, node):
        return f"{node.name}({', '.join(self.visit(a) for a in node.args)})"

    def visit_SeqRef(self, node):
        if node.subscript and len(node.indices) == 1 and node.name not in _SUB_CALLS and _is_function(node):
            # `phi_n` is a term named phi; written `phi(n)` it would read back as the function
            inner = self.visit(node.indices[0])
            return f"{node.name}_{inner}" if inner.isalnum() else f"{node.name}_{{{inner}}}"
        return f"{node.name}({', '.join(self.visit(a) for a in node.indices)})"

    def visit_BigOp(self, node):
        if node.divides is not None:
            head = f"{node.var}|{self.at(node.divides, MOD)}"
        elif node.lower is None:
            head = node.var
        else:
            head = f"{node.var}={self.visit(node.lower)}..{self.visit(node.upper)}"
        return f"{node.op}({head}, {self.visit(node.body)})"

    def visit_Dots(self, node):
        if node.op == "+":
            items = [self.at(t, NEG) for t in node.first] + ["..."]
            return " + ".join(items) + " + " + self.at(node.last, NEG)
        items = [self.at(t, POW) for t in node.first] + ["..."]
        return "*".join(items) + "*" + self.at(node.last, POW)

    def visit_Relation(self, node):
        parts = [self.at(node.operands[0], MOD)]
        for op, operand in zip(node.ops, node.operands[1:]):
            parts.append(REL_TEXT[op])
            parts.append(self.at(operand, MOD))
        text = " ".join(parts)
        if node.modulus is not None:
            text += f" (mod {self.visit(node.modulus)})"
        return text

    def visit_Parity(self, node):
        return self.condition(node)

    def visit_And(self, node):
        return self.condition(node)

    def visit_Piecewise(self, node):
        raise ValueError("a piecewise definition can only stand as the whole right-hand side")


def to_ascii(node: A.Node) -> str:
    """Canonical ASCII of a statement or an expression node."""
    printer = AsciiPrinter()
    if isinstance(node, A.Statement):
        return printer.statement(node)
    return printer.visit(node)
