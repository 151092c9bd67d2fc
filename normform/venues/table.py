"""Venue tables: the shipped list of journal and series titles, and a collection's own.

A table row is a :class:`Venue`: full title, ISO 4 abbreviation, ISSNs, former
titles and other spellings seen in the wild (``aliases``, e.g. the older
Mathematical Reviews forms ``Trans. Amer. Math. Soc.``).  Lookups go through
:func:`normform.venues.text.key`, so case, accents and punctuation do not matter.

File formats (both for the shipped table and for a user's ``--table FILE``):

* TSV: ``#`` comment lines, then a header row naming the columns; ``full`` and
  ``abbreviation`` (or ``iso4``) are required, ``issn``, ``former``, ``aliases``,
  ``kind``, ``source`` optional.  Multi-valued cells are separated by ``|``.
* JSON: a list of objects with the same keys (lists for multi-valued keys), or
  one object mapping full title to abbreviation.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path
from typing import Iterable, Iterator

from normform.venues.errors import VenueTableError
from normform.venues.text import key

SHIPPED = "venues.tsv"
_MULTI = ("issn", "former", "aliases")


@dataclass(frozen=True, slots=True)
class Venue:
    """One journal or series."""

    full: str
    abbreviation: str
    issns: tuple[str, ...] = ()
    former: tuple[str, ...] = ()
    aliases: tuple[str, ...] = ()
    kind: str = "journal"              # "journal" or "series"
    source: str = ""                   # where the abbreviation came from


@dataclass(frozen=True, slots=True)
class Hit:
    """A table row found for a name, and which of its spellings matched."""

    venue: Venue
    role: str                          # "full", "abbreviation", "alias", "former", "issn"
    spelling: str                      # the matched spelling as stored


@dataclass
class VenueTable:
    """Rows plus an index from every spelling's key to the rows that carry it."""

    venues: list[Venue] = field(default_factory=list)
    name: str = "table"

    def __post_init__(self) -> None:
        self._index: dict[str, list[Hit]] = {}
        for venue in self.venues:
            self._add(venue)

    def _add(self, venue: Venue) -> None:
        spellings = [("full", venue.full), ("abbreviation", venue.abbreviation)]
        spellings += [("alias", a) for a in venue.aliases]
        spellings += [("former", f) for f in venue.former]
        spellings += [("issn", i) for i in venue.issns]
        for role, text in spellings:
            k = key(text)
            if not k:
                continue
            bucket = self._index.setdefault(k, [])
            if not any(h.venue is venue and h.role == role for h in bucket):
                bucket.append(Hit(venue, role, text))

    def __len__(self) -> int:
        return len(self.venues)

    def __iter__(self) -> Iterator[Venue]:
        return iter(self.venues)

    def lookup(self, name: str) -> list[Hit]:
        """Every row one of whose spellings has the same key as ``name``."""
        return list(self._index.get(key(name), ()))

    def venues_for(self, name: str) -> list[Venue]:
        """Distinct rows for ``name`` (a current title, abbreviation or alias; not former)."""
        out: list[Venue] = []
        for hit in self.lookup(name):
            if hit.role != "former" and hit.venue not in out:
                out.append(hit.venue)
        return out

    def overridden_by(self, other: "VenueTable") -> "VenueTable":
        """This table with ``other``'s rows winning wherever a spelling collides."""
        claimed = {key(s) for v in other.venues for s in (v.full, v.abbreviation, *v.aliases)}
        kept = [v for v in self.venues
                if key(v.full) not in claimed and key(v.abbreviation) not in claimed]
        return VenueTable(list(other.venues) + kept, name=f"{other.name}+{self.name}")


def _split(cell: str) -> tuple[str, ...]:
    return tuple(p.strip() for p in cell.split("|") if p.strip())


def _rows_tsv(text: str, path: str) -> Iterator[tuple[int, dict[str, str]]]:
    header: list[str] | None = None
    for number, line in enumerate(text.splitlines(), start=1):
        if not line.strip() or line.lstrip().startswith("#"):
            continue
        cells = [c.strip() for c in line.split("\t")]
        if header is None:
            header = [c.lower() for c in cells]
            if "iso4" in header and "abbreviation" not in header:
                header[header.index("iso4")] = "abbreviation"
            for need in ("full", "abbreviation"):
                if need not in header:
                    raise VenueTableError(
                        f"header row lacks the column {need!r}", line=number, column=1,
                        source=text, path=path, expected=("full", "abbreviation"))
            continue
        if len(cells) > len(header):
            col = len("\t".join(cells[: len(header)])) + 1
            raise VenueTableError(
                f"{len(cells)} cells but the header names {len(header)} columns",
                line=number, column=col, source=text, path=path)
        yield number, dict(zip(header, cells))


def _rows_json(text: str, path: str) -> Iterator[tuple[int, dict]]:
    try:
        data = json.loads(text)
    except json.JSONDecodeError as exc:
        raise VenueTableError(f"not JSON: {exc.msg}", line=exc.lineno, column=exc.colno,
                              source=text, path=path) from None
    if isinstance(data, dict):
        for n, (full, abbr) in enumerate(data.items(), start=1):
            yield n, {"full": full, "abbreviation": abbr}
    elif isinstance(data, list):
        for n, item in enumerate(data, start=1):
            if not isinstance(item, dict):
                raise VenueTableError(f"item {n} is not an object", line=1, column=1,
                                      path=path, expected=("{\"full\": ..., \"abbreviation\": ...}",))
            yield n, item
    else:
        raise VenueTableError("expected a list of objects or an object of full: abbreviation",
                              line=1, column=1, source=text, path=path)


def _venue(row: dict, number: int, text: str | None, path: str) -> Venue:
    def cell(name: str) -> tuple[str, ...]:
        value = row.get(name) or ()
        if isinstance(value, str):
            return _split(value)
        return tuple(str(v).strip() for v in value if str(v).strip())

    full = str(row.get("full") or "").strip()
    abbr = str(row.get("abbreviation") or row.get("iso4") or "").strip()
    if not full or not abbr:
        missing = "full" if not full else "abbreviation"
        raise VenueTableError(f"row has an empty {missing!r}", line=number, column=1,
                              source=text, path=path, expected=(missing,))
    return Venue(full=full, abbreviation=abbr, issns=cell("issn"), former=cell("former"),
                 aliases=cell("aliases"), kind=str(row.get("kind") or "journal"),
                 source=str(row.get("source") or ""))


def parse_table(text: str, *, path: str = "<table>", fmt: str | None = None) -> VenueTable:
    """Parse a TSV or JSON venue table (``fmt`` ``"tsv"``/``"json"``, else guessed)."""
    if fmt is None:
        fmt = "json" if text.lstrip()[:1] in ("[", "{") else "tsv"
    rows: Iterable[tuple[int, dict]] = _rows_json(text, path) if fmt == "json" else _rows_tsv(text, path)
    src = text if fmt == "tsv" else None
    return VenueTable([_venue(row, n, src, path) for n, row in rows], name=Path(path).name)


def load_table(path: str | Path) -> VenueTable:
    """Read a venue table file; the suffix ``.json`` selects JSON, anything else TSV."""
    p = Path(path)
    try:
        text = p.read_text("utf-8")
    except OSError as exc:
        raise VenueTableError(f"cannot read venue table: {exc.strerror}", path=str(p)) from None
    return parse_table(text, path=str(p), fmt="json" if p.suffix.lower() == ".json" else "tsv")


@lru_cache(maxsize=1)
def shipped_table() -> VenueTable:
    """The table shipped in ``normform/data/venues.tsv`` (read once)."""
    from normform.resources import data_path

    table = load_table(data_path(SHIPPED))
    table.name = "shipped"
    return table
