"""``normform formula``: parse plain-text formulas line by line; render, evaluate, compute terms."""

from __future__ import annotations

import argparse
import json
import sys


def configure(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("expr", nargs="?", default="-",
                        help="a formula, or '-' (default) to read one formula per line from stdin")
    parser.add_argument("--to", choices=("ascii", "latex", "mathml", "json"), default="ascii",
                        help="output format (default: canonical ascii)")
    parser.add_argument("--display", choices=("block", "inline"), default="block",
                        help="MathML display mode (default: block)")
    parser.add_argument("--semantics", action="store_true",
                        help="MathML: add a Content MathML annotation (semantics/annotation-xml)")
    parser.add_argument("--at", metavar="VARS",
                        help="evaluate each formula at this point, e.g. n=5,k=2 (values: integers or p/q)")
    parser.add_argument("--digits", type=int, default=40,
                        help="significant digits for irrational values (default: 40)")
    parser.add_argument("--terms", type=int, metavar="N", help="print the first N terms the formula defines")
    parser.add_argument("--first-index", type=int, default=None, metavar="I",
                        help="index of the first term (default: the smallest initial index, else 0)")
    parser.add_argument("--initial", metavar="V,V,...",
                        help="initial values a(I), a(I+1), ... for a recurrence that does not state them")


def _point(spec: str) -> dict[str, object]:
    from fractions import Fraction

    from normform.cli import UsageError

    out: dict[str, object] = {}
    for part in spec.split(","):
        if not part.strip():
            continue
        name, eq, value = part.partition("=")
        if not eq or not name.strip():
            raise UsageError(f"--at expects name=value pairs, got {part!r}")
        try:
            out[name.strip()] = Fraction(value.strip())
        except (ValueError, ZeroDivisionError):
            raise UsageError(f"--at value for {name.strip()} is not a number: {value!r}") from None
    return out


def _initial(spec: str) -> list:
    from fractions import Fraction

    from normform.cli import UsageError

    try:
        return [Fraction(v.strip()) for v in spec.split(",") if v.strip()]
    except (ValueError, ZeroDivisionError):
        raise UsageError(f"--initial expects comma-separated numbers, got {spec!r}") from None


def show_value(value) -> str:
    """``p/q`` for rationals; an approximation is printed with its digits and marked."""
    from fractions import Fraction

    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, Fraction):
        return str(value.numerator) if value.denominator == 1 else f"{value.numerator}/{value.denominator}"
    exact = getattr(value, "exact", None)
    text = f"{value} (approx.)"
    return f"{text} = {exact}" if exact else text


def run(args: argparse.Namespace) -> int:
    from normform.formula.digits import max_digits, term_digits_allowed
    from normform.formula.evaluate import MAX_BITS

    # exact results are capped in bits by the evaluator: print them whole, with
    # the conversion limit raised to that cap for this command only (never to 0)
    with term_digits_allowed(max_digits(MAX_BITS)):
        return _run(args)


def _run(args: argparse.Namespace) -> int:
    from normform.formula.api import parse_formula
    from normform.formula.errors import EvaluationError, FormulaError

    point = _point(args.at) if args.at else None
    initial = _initial(args.initial) if args.initial else None
    if args.terms is not None and args.terms < 0:
        from normform.cli import UsageError

        raise UsageError("--terms must be >= 0")
    if args.expr == "-":
        lines = (line.rstrip("\n") for line in sys.stdin)
    else:
        lines = iter(args.expr.splitlines() or [""])
    failures = 0
    out = sys.stdout
    for lineno, line in enumerate(lines, 1):
        # every key in every object (null when empty), so a reader needs no key checks
        record: dict[str, object] = {"input": line, "ok": False, "kind": None, "ascii": None,
                                     "latex": None, "mathml": None, "error": None}
        if not line.strip():
            # a blank line keeps its place (output line N is input line N) but is no failure
            if args.to == "json":
                record["error"] = {"line": lineno, "column": 1, "message": "empty line"}
                out.write(json.dumps(record, ensure_ascii=False) + "\n")
            else:
                out.write("\n")
            continue
        try:
            try:
                f = parse_formula(line)
            except RecursionError:  # safety net: the limits should make this unreachable
                raise FormulaError("formula too deeply nested", line=1, column=1, source=line,
                                   expected=("a shallower formula",)) from None
        except FormulaError as exc:
            failures += 1
            record["error"] = {"line": lineno, "column": exc.column, "message": exc.describe().split(": ", 1)[-1]}
            if args.to == "json":
                out.write(json.dumps(record, ensure_ascii=False) + "\n")
            else:
                print(f"normform formula: line {lineno}, column {exc.column}: {exc.describe().split(': ', 1)[-1]}",
                      file=sys.stderr)
                print(exc.excerpt(), file=sys.stderr)
                out.write("\n")  # keep output line N for input line N
            continue
        record.update(ok=True, kind=f.kind)
        problems = []
        if args.to == "json":
            record.update(ascii=f.to_ascii(), latex=f.to_latex(), mathml=f.to_mathml(args.display, args.semantics))
        if point is not None:
            try:
                record["value"] = show_value(f.evaluate_at(point, digits=args.digits))
            except EvaluationError as exc:
                problems.append(f"cannot evaluate: {exc}")
        if args.terms is not None:
            try:
                first = args.first_index
                if first is None:
                    first = min((k for k in f.initial if isinstance(k, int)), default=0)
                record["terms"] = [show_value(t) for t in f.terms(first, args.terms, initial)]
            except (EvaluationError, ValueError, ImportError, NotImplementedError) as exc:
                problems.append(f"cannot compute terms: {exc}")
        if problems:
            failures += 1
            record["ok"] = False
            record["error"] = {"line": lineno, "column": 1, "message": "; ".join(problems)}
        if args.to == "json":
            out.write(json.dumps(record, ensure_ascii=False) + "\n")
            continue
        for p in problems:
            print(f"normform formula: line {lineno}: {p}", file=sys.stderr)
        if point is not None or args.terms is not None:
            if point is not None:  # an empty line where a value could not be computed
                out.write(str(record.get("value", "")) + "\n")
            if args.terms is not None:
                out.write(", ".join(record.get("terms", ())) + "\n")
            continue
        text = {"ascii": f.to_ascii, "latex": f.to_latex}.get(args.to)
        out.write((text() if text else f.to_mathml(args.display, args.semantics)) + "\n")
    return 1 if failures else 0
