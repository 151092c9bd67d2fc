"""Helpers shared by the lint tests (not a test module)."""

from __future__ import annotations

import importlib
import subprocess
import sys
from pathlib import Path

import pytest

from normform.lint.engine import Context, lint
from normform.lint.entry import parse_entry
from normform.lint.registry import select_rules
from normform.lint.settings import LintSettings

REPO = Path(__file__).resolve().parent.parent
DEMO = REPO / "corpus_demo" / "entries"
FIXTURES = Path(__file__).resolve().parent / "fixtures" / "lint"

BASE = '''id = "Q000100"
title = "Test entry"
terms = [1, 1, 2, 3, 5, 8, 13, 21, 34, 55, 89]
first_index = 0
'''


def findings(text: str, path: str = "Q000100.toml", select=(), settings: LintSettings | None = None,
             others: list[tuple[str, str]] = ()):
    """Findings of the selected rules on one entry text (plus other entries for catalogue rules)."""
    entries = [parse_entry(path, text)] + [parse_entry(p, t) for p, t in others]
    ctx = Context(settings or LintSettings())
    out = lint(entries, select_rules(list(select)), ctx)
    assert not ctx.failed, ctx.failed
    for slug, why in ctx.skipped.items():
        if slug in select:
            pytest.skip(f"{slug} skipped: {why}")
    return out


def slugs(text: str, *select, **kw) -> list[str]:
    return [f.slug for f in findings(text, select=select, **kw)]


def need(module: str, attr: str | None = None):
    """Skip when another area's module is not there yet."""
    try:
        mod = importlib.import_module(module)
        return getattr(mod, attr) if attr else mod
    except (ImportError, AttributeError) as exc:
        pytest.skip(f"{module} not available: {exc}")


# The console script's code path (``python -m normform.cli`` runs cli.py as __main__,
# a second copy of the module).
CLI = [sys.executable, "-c", "import sys; from normform.cli import main; sys.exit(main())"]


def run_cli(*args: str, cwd: Path | None = None, input: str | None = None):
    return subprocess.run([*CLI, "lint", *args], cwd=cwd or REPO,
                          capture_output=True, text=True, input=input, timeout=120)
