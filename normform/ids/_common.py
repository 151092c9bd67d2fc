"""Shared pieces of the identifier modules: the error type and small helpers."""

from __future__ import annotations

from normform.errors import PositionedError


class InvalidIdentifier(PositionedError):
    """An identifier that fails its scheme's syntax or check digit.

    ``column`` is 1-based within the text given to ``validate``; ``scheme``
    names the scheme (``"isbn"``, ``"doi"`` ...).
    """

    def __init__(self, message: str, *, scheme: str, raw: str, column: int = 1,
                 expected: tuple[str, ...] = ()) -> None:
        self.scheme = scheme
        self.raw = raw
        super().__init__(message, line=1, column=column, source=raw,
                         expected=expected, offending=raw)


def passes(validate, text: str) -> bool:
    """True when ``validate(text)`` accepts it: the body of every scheme's ``is_valid``."""
    try:
        validate(text)
    except InvalidIdentifier:
        return False
    return True


def strip_prefix(text: str, prefixes: tuple[str, ...]) -> str:
    """Remove the first matching prefix, compared case-insensitively."""
    low = text.lower()
    for prefix in prefixes:
        if low.startswith(prefix):
            return text[len(prefix):]
    return text


def link_from_config(scheme: str, value: str, config: dict | None) -> str | None:
    """Fill the user's ``[tool.normform.links]`` template for ``scheme``."""
    if not config:
        return None
    links = config.get("links", config)
    template = links.get(scheme) if isinstance(links, dict) else None
    if not isinstance(template, str) or "{id}" not in template:
        return None
    return template.replace("{id}", value)


InvalidIdentifier.__module__ = "normform.ids"  # its public home
