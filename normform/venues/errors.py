"""Errors of the venues area, all with a position in the offending file."""

from __future__ import annotations

from normform.errors import PositionedError


class VenueTableError(PositionedError):
    """A venue abbreviation table (shipped or the collection's own) is malformed."""


class LibraryError(PositionedError):
    """A curated library given to the matcher cannot be read."""
