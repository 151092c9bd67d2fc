"""The work directory of a run: append-only part files plus a checkpoint.

Layout (inside ``OUTDIR/.normform-work/``)::

    records.part  bib.part  review.part  rows.part  formulas.part  members.part
    state.sqlite  -- table ``state`` (one JSON checkpoint), table ``keys``
                     (per-record blocking keys, the byte offsets of the record
                     line and of its cluster-member line), table ``ids``

A chunk is done when its part-file bytes are flushed *and* the sqlite
transaction that stores its keys and the new checkpoint (part sizes, item
count, running totals) commits.  A kill at any moment leaves the part files
at or beyond the sizes in the last checkpoint; ``--resume`` truncates them
back and carries on from the next item, so no record is duplicated or lost.
"""

from __future__ import annotations

import json
import os
import shutil
import sqlite3
from pathlib import Path

WORK = ".normform-work"
PARTS = ("records", "bib", "review", "rows", "formulas", "members")
VERSION = 3   # 2: chunks arrive packed; a "members" part (cluster member lines); 3: keys.locator


class ResumeError(Exception):
    """A checkpoint exists but belongs to different inputs or settings."""


class Store:
    def __init__(self, outdir: Path, work: Path, db: sqlite3.Connection, state: dict):
        self.outdir, self.work, self.db, self.state = outdir, work, db, state
        self.files = {}
        self._reader = None
        if state["phase"] != "running":   # killed while moving finished files into place
            return
        for name in PARTS:
            path = self.part(name)
            handle = open(path, "r+b" if path.exists() else "w+b")
            size = state["sizes"][name]
            handle.truncate(size)         # drop bytes written after the last checkpoint
            handle.seek(size)
            self.files[name] = handle
        self.db.execute("DELETE FROM keys WHERE seq > ?", (state["records_done"],))
        self.db.execute("DELETE FROM ids WHERE seq > ?", (state["records_done"],))
        self.db.commit()

    # -- opening ------------------------------------------------------------
    @classmethod
    def open(cls, outdir: Path, identity: dict, resume: bool) -> tuple["Store", bool]:
        """The store, and whether an earlier run is being resumed."""
        work = outdir / WORK
        if resume and (work / "state.sqlite").exists():
            db = _connect(work / "state.sqlite")
            row = db.execute("SELECT v FROM state WHERE k='checkpoint'").fetchone()
            if row is not None:
                state = json.loads(row[0])
                if state.get("version") != VERSION:
                    db.close()
                    raise ResumeError(f"{work} holds a checkpoint of another normform version; "
                                      "run without --resume to start again")
                if state.get("identity") != identity:
                    db.close()
                    before = state.get("identity") or {}
                    changed = [what for key, what in (("inputs", "the inputs (path, size or modification time)"),
                                                      ("settings", "the settings"), ("similarity", "the settings"),
                                                      ("code", "normform itself (upgraded or edited)"))
                               if before.get(key) != identity.get(key)]
                    named = "; ".join(dict.fromkeys(changed)) or "the inputs or settings"
                    raise ResumeError(
                        f"{work} holds a run that cannot be continued: changed since its checkpoint: {named}; "
                        "run without --resume to start again")
                return cls(outdir, work, db, state), True
            db.close()
        if work.exists():
            shutil.rmtree(work)
        work.mkdir(parents=True)
        db = _connect(work / "state.sqlite")
        state = {"version": VERSION, "identity": identity, "items_done": 0, "records_done": 0,
                 "sizes": {name: 0 for name in PARTS}, "totals": None, "seconds": 0.0,
                 "phase": "running"}
        db.execute("INSERT INTO state VALUES ('checkpoint', ?)", (json.dumps(state),))
        db.commit()
        return cls(outdir, work, db, state), False

    def part(self, name: str) -> Path:
        return self.work / f"{name}.part"

    # -- progress -----------------------------------------------------------
    def commit_chunk(self, chunk: dict, items: int, totals: dict, seconds: float) -> None:
        """Append one chunk (packed by ``process_chunk``) and checkpoint it, in that order."""
        from normform.batch import stats

        base_rec = self.files["records"].tell()
        base_mem = self.files["members"].tell()
        for name, blob in chunk["blobs"].items():
            if blob:
                self.files[name].write(blob)
        key_rows = [(seq, author, year, title, prefix, textkey, conf, nfields,
                     base_rec + roff, rlen, base_mem + moff, mlen, locator)
                    for seq, author, year, title, prefix, textkey, conf, nfields, roff, rlen, moff, mlen, locator
                    in chunk["keys"]]
        stats.merge(totals, chunk["totals"])
        for handle in self.files.values():
            handle.flush()
        self.state["records_done"] += chunk["records"]
        self.state["items_done"] += items
        self.state["sizes"] = {n: self.files[n].tell() for n in PARTS}
        self.state["totals"] = totals
        self.state["seconds"] = seconds
        with self.db:
            self.db.executemany("INSERT INTO keys VALUES (?,?,?,?,?,?,?,?,?,?,?,?,?)", key_rows)
            self.db.executemany("INSERT INTO ids VALUES (?,?)", chunk["ids"])
            self._save()

    def _save(self) -> None:
        self.db.execute("UPDATE state SET v=? WHERE k='checkpoint'", (json.dumps(self.state),))

    def set_phase(self, phase: str) -> None:
        self.state["phase"] = phase
        with self.db:
            self._save()

    def close_parts(self) -> None:
        for handle in self.files.values():
            handle.close()
        self.files = {}

    def read_at(self, name: str, offset: int, length: int) -> bytes:
        """``length`` bytes of part ``name`` from ``offset`` (after ``close_parts``)."""
        readers = self._reader if self._reader is not None else {}
        self._reader = readers
        if name not in readers:
            readers[name] = open(self.part(name), "rb")
        readers[name].seek(offset)
        return readers[name].read(length)

    def record_at(self, offset: int, length: int) -> dict:
        return json.loads(self.read_at("records", offset, length))

    def close_reader(self) -> None:
        for handle in (self._reader or {}).values():
            handle.close()
        self._reader = None

    def remove(self) -> None:
        self.close_reader()
        self.close_parts()
        self.db.close()
        shutil.rmtree(self.work, ignore_errors=True)


def _connect(path: Path) -> sqlite3.Connection:
    db = sqlite3.connect(path)
    # WAL + NORMAL: a killed process never loses a committed transaction;
    # only a power cut could, which a re-run from scratch covers.
    db.execute("PRAGMA journal_mode=WAL")
    db.execute("PRAGMA synchronous=NORMAL")
    db.execute("CREATE TABLE IF NOT EXISTS state (k TEXT PRIMARY KEY, v TEXT)")
    db.execute("CREATE TABLE IF NOT EXISTS keys (seq INTEGER PRIMARY KEY, author TEXT, year INTEGER, "
               "title TEXT, prefix TEXT, textkey TEXT, conf REAL, nfields INTEGER, "
               "offset INTEGER, length INTEGER, moff INTEGER, mlen INTEGER, locator TEXT NOT NULL DEFAULT '')")
    db.execute("CREATE TABLE IF NOT EXISTS ids (seq INTEGER, ident TEXT)")
    return db


def atomic_write(path: Path, data: bytes | str) -> None:
    """Write ``path`` via a temp file in the same directory and a rename."""
    if isinstance(data, str):
        data = data.encode("utf-8")
    tmp = path.with_name(f".{path.name}.tmp-{os.getpid()}")
    with open(tmp, "wb") as handle:
        handle.write(data)
        handle.flush()
        os.fsync(handle.fileno())
    os.replace(tmp, path)
