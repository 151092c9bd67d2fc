"""Math-mode LaTeX for formula trees (``\\binom``, ``\\frac``, ``\\sum\\limits``, ``\\lfloor``, ``\\equiv``, ``\\pmod``)."""

from __future__ import annotations

from normform.export.ascii import ADD, ATOM, MOD, MUL, NEG, POST, POW, level as ascii_level  # noqa: F401
from normform.formula import ast as A
from normform.formula.functions import REGISTRY

FRAC = POST  # a fraction needs no parentheses in a product, but does as a base or operand of !

REL_TEX = {"=": "=", "!=": "\\neq", "<": "<", ">": ">", "<=": "\\leq", ">=": "\\geq", "~": "\\sim", "==": "\\equiv"}
CONST_TEX = {"pi": "\\pi", "e": "e", "phi": "\\phi", "gamma": "\\gamma", "i": "i", "infinity": "\\infty"}
# named numbers written as a letter with a subscript index: F_{n}
SUBSCRIPTED = {"fibonacci": "F", "lucas": "L", "catalan": "C", "bell": "B", "harmonic": "H", "bernoulli": "B"}
# functions with their own TeX operator name
OPERATORS = {"exp": "\\exp", "log": "\\log", "sin": "\\sin", "cos": "\\cos", "tan": "\\tan", "cot": "\\cot",
             "sec": "\\sec", "csc": "\\csc", "sinh": "\\sinh", "cosh": "\\cosh", "tanh": "\\tanh",
             "arctan": "\\arctan", "arcsin": "\\arcsin", "arccos": "\\arccos", "gcd": "\\gcd",
             "max": "\\max", "min": "\\min", "Gamma": "\\Gamma", "zeta": "\\zeta", "totient": "\\varphi",
             "moebius": "\\mu", "sigma": "\\sigma", "numdiv": "\\tau", "stirling1": "s", "stirling2": "S",
             "prime": "p"}
LABEL_TEX = {"ogf": "\\text{G.f.:}\\ ", "egf": "\\text{E.g.f.:}\\ "}


def level(node: A.Node) -> int:
    if isinstance(node, A.BinOp) and node.op == "/":
        return FRAC
    if isinstance(node, A.UnaryOp):
        return NEG
    if isinstance(node, A.Piecewise):
        return ATOM  # a brace-and-table block: never wrapped in parentheses
    return ascii_level(node)


def starts_with_number(node: A.Node) -> bool:
    """True when the printed ``node`` begins with a numeral: ``2 3^n`` must keep its dot."""
    while True:
        if isinstance(node, (A.Integer, A.Decimal, A.Rational)):
            return True
        if isinstance(node, A.BinOp) and node.op != "/":
            node = node.left
        elif isinstance(node, A.Power):
            node = node.base
        elif isinstance(node, A.Factorial):
            node = node.operand
        else:
            return False


class LatexPrinter(A.Visitor):
    """Walks a tree and returns math-mode LaTeX."""

    def statement(self, stmt: A.Statement) -> str:
        body = stmt.body
        text = self.visit(body)
        if stmt.label:
            text = LABEL_TEX[stmt.label] + text
        for i, cond in enumerate(stmt.conditions):
            text += ("\\quad \\text{for } " if i == 0 else ",\\ ") + self.visit(cond)
        for init in stmt.initial:
            text += ",\\quad " + " = ".join(self.visit(t) for t in init.targets) + " = " + self.visit(init.value)
        return text

    def paren(self, text: str) -> str:
        return f"\\left({text}\\right)"

    def at(self, node: A.Node, need: int) -> str:
        text = self.visit(node)
        return self.paren(text) if level(node) < need else text

    # leaves
    def visit_Integer(self, node):
        return str(node.value)

    def visit_Rational(self, node):
        q = node.value
        return str(q.numerator) if q.denominator == 1 else f"\\frac{{{q.numerator}}}{{{q.denominator}}}"

    def visit_Decimal(self, node):
        return node.text

    def visit_Symbol(self, node):
        name = node.name
        return name if len(name) == 1 else f"\\mathit{{{name}}}"

    def visit_Constant(self, node):
        return CONST_TEX[node.name]

    # operators
    def visit_UnaryOp(self, node):
        return "-" + self.at(node.operand, MUL)

    def visit_BinOp(self, node):
        op = node.op
        if op == "/":
            return f"\\frac{{{self.visit(node.left)}}}{{{self.visit(node.right)}}}"
        if op in "+-":
            return f"{self.at(node.left, ADD)} {op} {self.at(node.right, MUL)}"
        if op == "mod":
            return f"{self.at(node.left, ADD)} \\bmod {self.at(node.right, MUL)}"
        left = self.at(node.left, MUL) if not isinstance(node.left, A.UnaryOp) else self.paren(self.visit(node.left))
        right = self.at(node.right, POW)
        if node.implicit and not starts_with_number(node.right) and level(node.right) >= POW:
            return f"{left} {right}"
        return f"{left} \\cdot {right}"

    def visit_Power(self, node):
        base = self.visit(node.base)
        if level(node.base) < ATOM or isinstance(node.base, A.Call) and node.base.name in SUBSCRIPTED \
                or isinstance(node.base, A.SeqRef) and node.base.subscript:
            base = self.paren(base)
        return f"{{{base}}}^{{{self.visit(node.exponent)}}}"

    def visit_Factorial(self, node):
        inner = self.visit(node.operand)
        if level(node.operand) < ATOM:
            inner = self.paren(inner)
        return inner + ("!!" if node.double else "!")

    def args(self, node) -> str:
        return self.paren(", ".join(self.visit(a) for a in node.args))

    def visit_Call(self, node):
        name, args = node.name, node.args
        if name == "binomial":
            return f"\\binom{{{self.visit(args[0])}}}{{{self.visit(args[1])}}}"
        if name == "floor":
            return f"\\left\\lfloor {self.visit(args[0])} \\right\\rfloor"
        if name == "ceiling":
            return f"\\left\\lceil {self.visit(args[0])} \\right\\rceil"
        if name == "abs":
            return f"\\left| {self.visit(args[0])} \\right|"
        if name == "sqrt":
            return f"\\sqrt{{{self.visit(args[0])}}}"
        if name == "root":
            return f"\\sqrt[{self.visit(args[1])}]{{{self.visit(args[0])}}}"
        if name == "mod":
            return f"{self.at(args[0], ADD)} \\bmod {self.at(args[1], MUL)}"
        if name == "factorial":
            return self.visit(A.Factorial(args[0]))
        if name == "factorial2":
            return self.visit(A.Factorial(args[0], True))
        if name in SUBSCRIPTED and len(args) == 1:
            return f"{SUBSCRIPTED[name]}_{{{self.visit(args[0])}}}"
        head = OPERATORS.get(name) or f"\\operatorname{{{name}}}"
        return head + self.args(node)

    def visit_SeqRef(self, node):
        name = node.name if len(node.name) == 1 else f"\\mathit{{{node.name}}}"
        inner = ", ".join(self.visit(i) for i in node.indices)
        if node.subscript:
            return f"{name}_{{{inner}}}"
        return f"{name}\\left({inner}\\right)"

    def visit_BigOp(self, node):
        sym = "\\sum" if node.op == "sum" else "\\prod"
        var = node.var if len(node.var) == 1 else f"\\mathit{{{node.var}}}"
        if node.divides is not None:
            head = f"{sym}\\limits_{{{var} \\mid {self.visit(node.divides)}}}"
        elif node.lower is None:
            head = f"{sym}\\limits_{{{var}}}"
        else:
            head = f"{sym}\\limits_{{{var}={self.visit(node.lower)}}}^{{{self.visit(node.upper)}}}"
        return f"{head} {self.at(node.body, MUL)}"

    def visit_Dots(self, node):
        if node.op == "+":
            return " + ".join([self.at(t, MUL) for t in node.first] + ["\\cdots", self.at(node.last, MUL)])
        return " \\cdot ".join([self.at(t, POW) for t in node.first] + ["\\cdots", self.at(node.last, POW)])

    def visit_Relation(self, node):
        parts = [self.at(node.operands[0], MOD)]
        for op, operand in zip(node.ops, node.operands[1:]):
            parts += [REL_TEX[op], self.at(operand, MOD)]
        text = " ".join(parts)
        if node.modulus is not None:
            text += f" \\pmod{{{self.visit(node.modulus)}}}"
        return text

    def visit_Parity(self, node):
        return f"{self.at(node.operand, MOD)} \\text{{ {'even' if node.even else 'odd'}}}"

    def visit_And(self, node):
        return " \\text{ and } ".join(self.visit(c) for c in node.items)

    def visit_Piecewise(self, node):
        rows = []
        for value, cond in node.branches:
            tail = "\\text{otherwise}" if cond is None else "\\text{if } " + self.visit(cond)
            rows.append(f"{self.visit(value)} & {tail}")
        return "\\begin{cases} " + " \\\\ ".join(rows) + " \\end{cases}"


def to_latex(node: A.Node) -> str:
    printer = LatexPrinter()
    return printer.statement(node) if isinstance(node, A.Statement) else printer.visit(node)


__all__ = ["LatexPrinter", "to_latex", "REGISTRY"]
