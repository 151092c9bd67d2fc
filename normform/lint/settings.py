"""Lint settings: defaults, overridden by ``[tool.normform.lint]`` (pyproject.toml)
or ``[lint]`` of ``normform.toml``, overridden by command-line options."""

from __future__ import annotations

from dataclasses import dataclass, field, fields
from pathlib import Path

DEFAULT_LANGUAGES = (
    "python", "sage", "pari", "maple", "mathematica", "magma", "gap", "haskell",
    "julia", "c", "cpp", "rust", "scheme", "lisp", "maxima", "r", "javascript",
)


@dataclass
class LintSettings:
    select: list[str] = field(default_factory=list)
    ignore: list[str] = field(default_factory=list)
    fail_on: str = "warning"
    min_terms: int = 10
    id_pattern: str = r"^Q\d{6}$"
    languages: list[str] = field(default_factory=lambda: list(DEFAULT_LANGUAGES))
    min_confidence: float = 0.5          # below: "reference-unparsed"
    style_confidence: float = 0.85       # at or above: the line is compared with the house style
    fix_confidence: float = 0.9          # at or above (and no word lost): the house-style fix is offered
    severity: dict[str, str] = field(default_factory=dict)   # slug -> severity override
    source: str | None = None            # the file the settings came from

    @classmethod
    def from_table(cls, table: dict, source: str | None = None) -> "LintSettings":
        """Settings from a TOML table; unknown keys raise ``ValueError``."""
        names = {f.name for f in fields(cls)} - {"source"}
        out = cls(source=source)
        for key, value in table.items():
            name = key.replace("-", "_")
            if name not in names:
                raise ValueError(f"unknown lint setting {key!r} in {source or 'configuration'}; "
                                 f"known: {', '.join(sorted(n.replace('_', '-') for n in names))}")
            default = getattr(out, name)
            if isinstance(default, list) and isinstance(value, str):
                value = [value]
            if type(default) is float and isinstance(value, int):
                value = float(value)
            if not isinstance(value, type(default)) or isinstance(value, bool) != isinstance(default, bool):
                raise ValueError(f"lint setting {key!r} in {source or 'configuration'} must be "
                                 f"{type(default).__name__}, not {type(value).__name__}")
            setattr(out, name, value)
        return out


def load_settings(start: str | Path | None = None) -> LintSettings:
    """Settings for a run started in ``start`` (default: the working directory)."""
    start = Path(start or ".").resolve()
    table: dict = {}
    source = None
    from normform.config import load_config  # the project-wide reader of [tool.normform]

    table, source = _from_project_config(load_config, start)
    lint = table.get("lint", {}) if isinstance(table, dict) else {}
    if not isinstance(lint, dict):
        raise ValueError(f"[tool.normform.lint] in {source or 'configuration'} must be a table")
    return LintSettings.from_table(lint, source)


def _from_project_config(load_config, start: Path) -> tuple[dict, str | None]:
    config = load_config(start)
    source = getattr(config, "source", None) or getattr(config, "path", None)
    if isinstance(config, dict):
        try:
            from normform.config import find_config

            found = find_config(start)
            source = str(found) if found else None
        except ImportError:
            pass
        return config, source
    for attr in ("data", "table", "raw"):
        value = getattr(config, attr, None)
        if isinstance(value, dict):
            return value, str(source) if source else None
    lint = getattr(config, "lint", None)
    if isinstance(lint, dict):
        return {"lint": lint}, str(source) if source else None
    return {}, None
