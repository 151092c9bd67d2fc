"""``clean()``: read, process, checkpoint, cluster, summarise, report.

The Python API behind ``normform clean``::

    from normform.batch.runner import clean
    result = clean(["legacy.txt"], "cleaned/")
    result.records, result.needs_review, result.clusters
"""

from __future__ import annotations

import dataclasses
import itertools
import json
import os
import sys
import time
from dataclasses import dataclass
from pathlib import Path
from typing import Iterator, TextIO

from normform.batch import clusters as clustering
from normform.batch import engines, inputs, stats
from normform.batch.process import Settings, dumps
from normform.batch.store import Store, atomic_write
from normform.safety import same_file

OUTPUTS = ("records.jsonl", "references.bib", "needs-review.jsonl", "clusters.jsonl",
           "summary.json", "report.html")
# part file -> final name (the three streamed outputs are renamed into place)
_RENAMED = {"records": "records.jsonl", "bib": "references.bib", "review": "needs-review.jsonl"}


class CleanError(Exception):
    """Bad arguments or inputs (reported with exit code 2)."""


@dataclass
class CleanResult:
    lines_in: int
    blank: int
    references_read: int
    records: int
    needs_review: int
    clusters: int
    seconds: float
    resumed: bool
    problems: list[str]
    entry_files: int = 0
    unreadable: list[str] = dataclasses.field(default_factory=list)   # entry files nothing could be read from

    @property
    def ok(self) -> bool:
        return self.records == self.references_read


def _chunks(items: Iterator, size: int, first_seq: int, counter: dict) -> Iterator[tuple[list, int]]:
    seq = first_seq
    while True:
        chunk = list(itertools.islice(items, size))
        if not chunk:
            return
        counter["items"] += len(chunk)
        yield chunk, seq
        seq += sum(1 for item in chunk if item.what == "ref")


def _check_outdir(paths_in: list[str], outdir: Path) -> None:
    """OUTDIR must be a directory of its own: not an input file, not an input directory."""
    for name in paths_in:
        if same_file(Path(name), outdir):
            raise CleanError(f"-o {outdir} is the input {name}; the inputs are never written to, "
                             "choose another output directory")
    if outdir.exists() and not outdir.is_dir():
        raise CleanError(f"-o {outdir} is a file, not a directory; choose an output directory")


def _check_outputs_do_not_clobber(paths: list[Path], outdir: Path) -> None:
    for path in paths:
        for name in OUTPUTS:
            if same_file(path, outdir / name):
                raise CleanError(f"input {path} is also an output ({outdir / name}); choose another -o")
        if outdir.resolve() / ".normform-work" in path.resolve().parents:
            raise CleanError(f"input {path} is inside the work directory of {outdir}")


def _check_library(against: str | None, outdir: Path) -> None:
    """The --against library is an input too: no output may be it (``--against OUT/references.bib``)."""
    if against is None:
        return
    for name in OUTPUTS:
        if same_file(Path(against), outdir / name):
            raise CleanError(f"--against {against} is also an output ({outdir / name}); the library is "
                             "never written to: choose another -o or copy the library elsewhere")


def clean(paths_in: list[str], outdir: str | Path, *, threshold: float = 0.9, jobs: int | None = None,
          engine: str = "local", scheduler: str | None = None, resume: bool = False,
          quiet: bool = False, chunk_size: int = 500, report_rows: int = 20000,
          similarity: float = 90.0, against: str | None = None, toolkit: str | None = None,
          err: TextIO | None = None, progress_interval: float = 5.0,
          dask_timeout: float = 20.0) -> CleanResult:
    err = err or sys.stderr
    outdir = Path(outdir)
    _check_outdir(paths_in, outdir)
    try:
        paths = inputs.expand(paths_in, exclude=outdir)
    except inputs.InputError as exc:
        raise CleanError(str(exc)) from None
    if not paths:
        raise CleanError("no input files (directories hold no .toml/.json entry files)")
    if engine == "dask" and not scheduler:
        raise CleanError("--engine dask needs --scheduler ADDRESS (e.g. tcp://10.0.0.5:8786)")
    if engine not in ("local", "dask"):
        raise CleanError(f"unknown engine {engine!r}; choose local or dask")
    if not 0.0 <= threshold <= 1.0:
        raise CleanError("--threshold must be between 0 and 1")
    if chunk_size < 1:
        raise CleanError("--chunk-size must be at least 1")
    if report_rows < 0:
        raise CleanError("--report-rows must be 0 or more")
    if not 0.0 <= similarity <= 100.0:
        raise CleanError("--similarity must be between 0 and 100")
    if against is not None and not Path(against).exists():
        raise CleanError(f"--against {against}: no such file")
    _check_outputs_do_not_clobber(paths, outdir)
    _check_library(against, outdir)
    # Connect before anything is written: a wrong address leaves no work directory behind.
    client = engines.connect_dask(scheduler, dask_timeout) if engine == "dask" else None
    outdir.mkdir(parents=True, exist_ok=True)

    try:
        settings = Settings(threshold=threshold, report_rows=report_rows,
                            against=str(Path(against).resolve()) if against else None,
                            **({"toolkit": toolkit} if toolkit else {}))
        identity = {"inputs": inputs.fingerprint(paths), "settings": dataclasses.asdict(settings),
                    "similarity": similarity, "code": code_fingerprint(settings.toolkit)}
        from normform.batch.store import ResumeError

        try:
            store, resumed = Store.open(outdir, identity, resume)
        except ResumeError as exc:
            raise CleanError(str(exc)) from None
        if resume and not resumed and not quiet:
            err.write("clean: nothing to resume, starting from the beginning\n")

        state = store.state
        if state["phase"] == "renaming":
            return _complete(store, err, quiet, resumed=True)
        totals = state["totals"] or stats.empty()
        started = time.monotonic()
        earlier = state["seconds"]
        read = inputs.ReadStats()
        counted = {"refs": 0}

        def counting(items):
            for item in items:
                if item.what == "ref":
                    counted["refs"] += 1
                yield item

        stream = counting(inputs.iter_items(paths, read))
        skipped = sum(1 for _ in itertools.islice(stream, state["items_done"]))
        if skipped != state["items_done"]:
            raise CleanError("the inputs are shorter than the checkpoint says; run without --resume")

        total = inputs.count_lines(paths)
        progress = Progress(total, quiet=quiet, stream=err, initial=state["items_done"],
                            interval=progress_interval)
        counter = {"items": 0}
        chunks = _chunks(stream, chunk_size, state["records_done"] + 1, counter)
        if engine == "dask":
            results = engines.run_dask(chunks, settings, client=client)
        else:
            results = engines.run_local(chunks, settings, jobs or engines.default_jobs())
        previous = _terminate_as_interrupt()
        finished = False
        try:
            for (items, _), chunk_results in results:
                store.commit_chunk(chunk_results, len(items), totals,
                                   earlier + time.monotonic() - started)
                progress.update(len(items))
            finished = True
        finally:
            progress.close(finished)
            close = getattr(results, "close", None)
            if close:
                close()
            _restore(previous)

        seconds = earlier + time.monotonic() - started
        result = _finish(store, paths, read, counted["refs"], totals, settings, similarity, seconds, err, quiet,
                         threads=jobs or engines.default_jobs())
        result.resumed = resumed
        return result
    finally:
        if client is not None:
            client.close()   # idempotent; also when the run stopped before its first chunk


def code_fingerprint(toolkit: str | None = None) -> str:
    """Identity of the code and data that make the records (path, size, mtime of each file).

    Kept with the checkpoint: records made by one version of the parser and
    records made by another must not end up in one set of outputs, so a
    resume after an upgrade (or an edit of the code) is refused.  With the
    shipped toolkit that is the whole normform package; with another toolkit
    (test doubles) this package and the toolkit's own module.  Only ``stat``
    calls: a few milliseconds.
    """
    import hashlib
    import importlib.util

    import normform
    from normform.batch.toolkit import DEFAULT

    package = Path(normform.__file__).resolve().parent
    roots = [package]
    if toolkit and toolkit != DEFAULT:
        roots = [package / "batch"]
        spec = importlib.util.find_spec(toolkit.partition(":")[0])
        if spec is not None and spec.origin:
            roots.append(Path(spec.origin).resolve())
    digest = hashlib.blake2b(normform.__version__.encode(), digest_size=12)
    for root in roots:
        files = sorted(root.rglob("*")) if root.is_dir() else [root]
        for path in files:
            if path.suffix == ".pyc" or "__pycache__" in path.parts or not path.is_file():
                continue
            st = path.stat()
            digest.update(f"{path}\0{st.st_size}\0{st.st_mtime_ns}\n".encode())
    return digest.hexdigest()


def _terminate_as_interrupt():
    """SIGTERM stops a run like Ctrl-C does: workers shut down, checkpoint kept."""
    import signal
    import threading

    if threading.current_thread() is not threading.main_thread():
        return None

    def handler(signum, frame):
        raise KeyboardInterrupt

    return signal.signal(signal.SIGTERM, handler)


def _restore(previous) -> None:
    import signal
    import threading

    if previous is not None and threading.current_thread() is threading.main_thread():
        signal.signal(signal.SIGTERM, previous)


def _finish(store: Store, paths: list[Path], read: inputs.ReadStats, refs: int, totals: dict,
            settings: Settings, similarity: float, seconds: float, err: TextIO, quiet: bool,
            threads: int = 1) -> CleanResult:
    from normform.batch import report

    finish_started = time.monotonic()
    finish_cpu = time.process_time()
    store.close_parts()
    work, outdir = store.work, store.outdir
    db = store.db
    db.execute("CREATE INDEX IF NOT EXISTS keys_a ON keys(author, title, seq)")
    db.execute("CREATE INDEX IF NOT EXISTS keys_p ON keys(prefix, year, title, seq)")
    db.execute("CREATE INDEX IF NOT EXISTS ids_i ON ids(ident, seq)")
    db.execute("CREATE INDEX IF NOT EXISTS keys_t ON keys(textkey, seq)")
    forest = clustering.link(db, similarity, threads=threads)

    clustered = 0
    number = 0
    cluster_tmp = work / "clusters.part"
    # A small digest of each cluster for the report (the full lines can be huge).
    digest_tmp = work / "clusters-digest.part"
    with open(cluster_tmp, "wb") as handle, open(digest_tmp, "w", encoding="utf-8") as digest:
        for number, members in enumerate(clustering.groups(db, forest), start=1):
            clustered += len(members)
            _, _, _, offset, length, _, _ = clustering.best(members)
            best = store.record_at(offset, length)
            canon = {k: best[k] for k in ("id", "seq", "origin", "text", "house", "csl")}
            # the member lines were rendered by the workers; here they are only copied
            lines = [store.read_at("members", moff, mlen).rstrip(b"\n") for *_, moff, mlen in members]
            handle.write(f'{{"canonical":{dumps(canon)},"cluster":{number},"members":['.encode("utf-8"))
            handle.write(b",".join(lines))
            handle.write(f'],"size":{len(members)}}}\n'.encode("utf-8"))
            shown = lines[:report.MEMBER_LIMIT] if number <= report.CLUSTER_LIMIT else []
            linked = [m[0] for m in members if m[0] <= settings.report_rows]
            digest.write(f'{{"canonical":{dumps({"seq": canon["seq"], "house": canon["house"]})},'
                         f'"cluster":{number},"linked":{dumps(linked)},'
                         f'"members":[{b",".join(shown).decode("utf-8")}],"size":{len(members)}}}\n')
    del forest

    store.close_reader()
    lines_in = read.lines
    summary = stats.summary(totals, lines_in=lines_in, blank=read.blank, clusters=number,
                            clustered=clustered, threshold=settings.threshold,
                            inputs=[str(p) for p in paths], seconds=seconds)
    summary["references_read"] = refs
    summary["entry_files"] = read.entry_files
    summary["problems"] = read.problems
    summary["problem_count"] = read.problem_count
    summary["unreadable_files"] = read.unreadable
    summary["invalid_utf8"] = [{"file": f, "line": ln, "byte_offset": off} for f, ln, off in read.invalid_utf8]
    report_tmp = work / "report.part"
    report.write(report_tmp, summary, rows=store.part("rows"), formulas=store.part("formulas"),
                 clusters=digest_tmp, row_limit=settings.report_rows)
    digest_tmp.unlink()
    # timing last: clustering and the report are part of the run
    finish = time.monotonic() - finish_started
    summary["run"] = stats.run_block(totals["records"], seconds + finish, finish,
                                     time.process_time() - finish_cpu)
    summary_text = json.dumps(summary, ensure_ascii=False, sort_keys=True, indent=2) + "\n"

    atomic_write(work / "summary.part", summary_text)
    store.set_phase("renaming")
    return _complete(store, err, quiet, resumed=False)


def _complete(store: Store, err: TextIO, quiet: bool, resumed: bool) -> CleanResult:
    """Move every finished file into OUTDIR (idempotent: a resume may repeat it)."""
    work, outdir = store.work, store.outdir
    moves = {f"{part}.part": final for part, final in _RENAMED.items()}
    moves.update({"clusters.part": "clusters.jsonl", "report.part": "report.html",
                  "summary.part": "summary.json"})
    for part, final in moves.items():
        if (work / part).exists():
            os.replace(work / part, outdir / final)
    summary = json.loads((outdir / "summary.json").read_text("utf-8"))
    # Lines in == records out, counted again from the file actually written.
    with open(outdir / "records.jsonl", "rb") as handle:
        written = sum(1 for _ in handle)
    store.remove()
    if not quiet:
        for bad in summary["invalid_utf8"]:
            err.write(f"{bad['file']}:{bad['line']}: invalid UTF-8 at byte offset {bad['byte_offset']}; "
                      "kept, decoded with replacement characters, flagged for review\n")
        for problem in summary["problems"]:
            err.write(f"{problem}\n")
    return CleanResult(lines_in=summary["lines_in"], blank=summary["blank_lines"],
                       references_read=summary["references_read"], records=written,
                       needs_review=summary["needs_review"], clusters=summary["clusters"],
                       seconds=summary["run"]["seconds"], resumed=resumed,
                       problems=list(summary["problems"]), entry_files=summary["entry_files"],
                       unreadable=list(summary.get("unreadable_files", [])))


from normform.batch.progress import Progress  # noqa: E402  (kept light: no tqdm import until used)
