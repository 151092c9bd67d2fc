"""``normform check TERMS EXPR...``: does each formula produce the listed terms?

One verdict per formula.  Exit status 0 when every formula agrees or cannot
be checked, 1 when any disagrees, 2 for bad arguments.
"""

from __future__ import annotations

import argparse
import json
import sys

from normform.cli import UsageError


def configure(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("terms", metavar="TERMS", help="the listed terms, comma-separated: 1,1,2,3,5,8")
    parser.add_argument("formulas", metavar="EXPR", nargs="+",
                        help="formulas to check (quote each one); '-' reads one formula per line from stdin")
    parser.add_argument("--first-index", type=int, default=0, metavar="I",
                        help="index of the first listed term (default 0)")
    parser.add_argument("--initial", metavar="V,V,...",
                        help="initial values of a recurrence, from the first index on (default: from the terms)")
    parser.add_argument("--kind", choices=("ogf", "egf"),
                        help="read every formula as this kind of generating function")
    parser.add_argument("--format", choices=("text", "json"), default="text", help="output format")
    parser.add_argument("--seconds", type=float, default=2.0, metavar="S",
                        help="time budget per formula (default 2)")


def _numbers(text: str, what: str) -> list:
    from normform.formula.check import _short
    from normform.formula.digits import TermTooLarge, parse_term

    out = []
    for part in text.replace(" ", "").split(","):
        if not part:
            continue
        try:
            out.append(parse_term(part, f"term {len(out) + 1}"))
        except TermTooLarge as exc:
            raise UsageError(f"{what}: {exc}") from None
        except (ValueError, ZeroDivisionError):
            raise UsageError(f"{what}: {_short(part)!r} is not an integer or p/q") from None
    if not out:
        raise UsageError(f"{what}: no values given")
    return out


def run(args: argparse.Namespace) -> int:
    from normform.formula.check import check_formula
    from normform.formula.digits import term_digits_allowed
    from normform.formula.recurrence import Limits

    listed = _numbers(args.terms, "TERMS")
    initial = _numbers(args.initial, "--initial") if args.initial else None
    if args.seconds <= 0:
        raise UsageError("--seconds must be positive")
    limits = Limits(seconds=args.seconds)
    formulas: list[str] = []
    for expr in args.formulas:
        if expr == "-":
            formulas.extend(line.rstrip("\n") for line in sys.stdin if line.strip())
        else:
            formulas.append(expr)
    worst = 0
    for text in formulas:
        verdict = check_formula(text, listed, args.first_index, initial=initial, kind=args.kind, limits=limits)
        if verdict.status == "disagrees":
            worst = 1
        if args.format == "json":
            with term_digits_allowed():    # listed and computed terms have at most 20,000 bits
                print(json.dumps({"input": text, **verdict.to_dict()}, ensure_ascii=False))
        else:
            print(f"{verdict.label}: {text}")
            details = verdict.describe().split("; ", 1)
            if len(details) > 1:
                print(f"    {details[1]}")
    return worst
