"""User configuration: the ``[tool.normform]`` table.

Searched upward from a start directory (default: the working directory); in
each directory ``normform.toml`` (the whole file is the table) wins over
``pyproject.toml`` (only its ``[tool.normform]`` table; a pyproject without
one is skipped).  Commands read their own sub-tables, e.g. ``links``::

    [tool.normform.links]
    mr = "https://reviews.example.org/mr/{id}"
"""

from __future__ import annotations

import re
import tomllib
from pathlib import Path

from normform.errors import PositionedError


class ConfigError(PositionedError):
    """A configuration file that is not valid TOML or has a wrong value type."""


def _read(path: Path) -> dict:
    text = path.read_text("utf-8")
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        m = re.search(r"\(at line (\d+), column (\d+)\)", str(exc))
        line, column = (int(m.group(1)), int(m.group(2))) if m else (1, 1)
        message = re.sub(r"\s*\(at line \d+, column \d+\)", "", str(exc))
        raise ConfigError(f"invalid TOML: {message}", line=line, column=column,
                          source=text, path=str(path)) from None


def find_config(start: Path | str | None = None) -> Path | None:
    """The nearest file holding normform settings, or None."""
    here = Path(start) if start is not None else Path.cwd()
    here = here.resolve()
    if here.is_file():
        here = here.parent
    for folder in (here, *here.parents):
        own = folder / "normform.toml"
        if own.is_file():
            return own
        project = folder / "pyproject.toml"
        if project.is_file() and "normform" in project.read_text("utf-8", errors="replace"):
            table = _read(project).get("tool", {}).get("normform")
            if isinstance(table, dict):
                return project
    return None


def load_config(start: Path | str | None = None) -> dict:
    """The ``[tool.normform]`` table of the nearest configuration file; ``{}`` when none."""
    path = find_config(start)
    if path is None:
        return {}
    data = _read(path)
    if path.name == "pyproject.toml":
        data = data.get("tool", {}).get("normform", {})
    if not isinstance(data, dict):
        raise ConfigError("[tool.normform] must be a table", path=str(path))
    links = data.get("links")
    if links is not None and not (isinstance(links, dict) and all(isinstance(v, str) for v in links.values())):
        raise ConfigError("[tool.normform.links] must map scheme names to template strings",
                          path=str(path), expected=('mr = "https://...{id}"',))
    return data


__all__ = ["ConfigError", "find_config", "load_config"]
