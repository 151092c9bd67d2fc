"""normform: clean legacy references and plain-text formulas of mathematical collections.

The public API is loaded lazily so that ``import normform`` stays cheap:
the grammars and the trained reference model are only read on first use.
"""

from __future__ import annotations

__version__ = "0.1.0"

# name -> "module:attribute"
_LAZY = {
    "parse_reference": "normform.refs.api:parse_reference",
    "parse_references": "normform.refs.api:parse_references",
    "parse_formula": "normform.formula.api:parse_formula",
    "Formula": "normform.formula.api:Formula",
    "FormulaError": "normform.formula.errors:FormulaError",
    "check_formula": "normform.formula.check:check_formula",
    "Verdict": "normform.formula.check:Verdict",
    "Reference": "normform.model:Reference",
    "Name": "normform.model:Name",
    "Kind": "normform.model:Kind",
}

__all__ = sorted(_LAZY) + ["__version__"]


def __getattr__(name: str):
    target = _LAZY.get(name)
    if target is None:
        raise AttributeError(f"module 'normform' has no attribute {name!r}")
    import importlib

    module_name, attr = target.split(":")
    value = getattr(importlib.import_module(module_name), attr)
    globals()[name] = value
    return value


def __dir__():
    return __all__
