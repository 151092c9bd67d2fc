"""Locate files shipped inside the package: grammars, data tables, trained models.

Installed (wheel or editable), grammars are the package ``normform.grammars``;
in a bare checkout on ``sys.path`` they are the top-level ``grammars/`` folder.
"""

from __future__ import annotations

from functools import lru_cache
from importlib import resources
from pathlib import Path

_REPO = Path(__file__).resolve().parent.parent


@lru_cache(maxsize=None)
def grammar_text(name: str) -> str:
    """Text of ``grammars/NAME`` (e.g. ``"formula.lark"``)."""
    try:
        return resources.files("normform.grammars").joinpath(name).read_text("utf-8")
    except (ModuleNotFoundError, FileNotFoundError):
        return (_REPO / "grammars" / name).read_text("utf-8")


def data_path(name: str) -> Path:
    """Filesystem path of ``normform/data/NAME``."""
    return Path(str(resources.files("normform.data").joinpath(name)))
