"""Other areas' APIs as the lint rules use them, imported only on first use.

A rule that needs a service which cannot be imported raises
:class:`Unavailable`; the engine then skips that rule and says so once, rather
than guessing an answer.
"""

from __future__ import annotations

import importlib


class Unavailable(RuntimeError):
    """A service a rule needs is not importable in this installation."""


def need(module: str, attr: str | None = None):
    try:
        mod = importlib.import_module(module)
        return getattr(mod, attr) if attr else mod
    except (ImportError, AttributeError) as exc:
        raise Unavailable(f"{module}{'.' + attr if attr else ''} is not available ({exc})") from None


def parse_formula(text: str):
    return need("normform", "parse_formula")(text)


def formula_error_class():
    return need("normform", "FormulaError")


def check_formula(formula, terms, first_index):
    return need("normform", "check_formula")(formula, terms, first_index)


def parse_reference(text: str):
    return need("normform", "parse_reference")(text)


def house_style():
    cls = need("normform.export.text", "HouseStyle")
    return cls()


def ident_module(scheme: str):
    return need(f"normform.ids.{scheme}")
