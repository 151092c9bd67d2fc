"""Run :func:`normform.batch.process.process_chunk` over a stream of chunks.

Every engine yields results in input order and keeps only a bounded number
of chunks in flight, so reading stays streaming (``Pool.imap`` would read
the whole input ahead) and memory stays flat.

* ``local``, 1 job: in this process.
* ``local``, N jobs: a :class:`~concurrent.futures.ProcessPoolExecutor`.
* ``dask``: futures on an existing ``dask.distributed`` scheduler; dask is
  imported only here and only when chosen.
"""

from __future__ import annotations

import collections
import contextlib
import logging
import os
from typing import Iterable, Iterator

from normform.batch.process import Settings, process_chunk

Chunk = tuple[list, int]   # (items, first record number)


class EngineError(Exception):
    """The chosen engine cannot run (dask not installed, scheduler unreachable) or broke mid-run.

    ``started`` says whether the run had begun (its checkpoint can be resumed)
    or stopped before anything was written.
    """

    def __init__(self, message: str, *, started: bool = True) -> None:
        super().__init__(message)
        self.started = started


def default_jobs() -> int:
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # pragma: no cover - not Linux
        return max(1, os.cpu_count() or 1)


def _ordered(submit, chunks: Iterable[Chunk], window: int, result) -> Iterator[tuple[Chunk, list]]:
    pending: collections.deque = collections.deque()
    for chunk in chunks:
        pending.append((chunk, submit(chunk)))
        if len(pending) >= window:
            done, future = pending.popleft()
            yield done, result(future)
    while pending:
        done, future = pending.popleft()
        yield done, result(future)


def _worker_init() -> None:
    """Workers leave Ctrl-C to the main process, and die with it.

    A main process killed outright (SIGKILL) cannot stop its pool; on Linux
    the kernel then sends each worker SIGTERM (``PR_SET_PDEATHSIG``), so no
    orphan keeps waiting on a queue nobody writes to.
    """
    import signal

    signal.signal(signal.SIGINT, signal.SIG_IGN)
    # fork copied the main process's SIGTERM handler (stop like Ctrl-C); in a
    # worker that would only raise inside a task and leave it waiting for more
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    try:
        import ctypes

        libc = ctypes.CDLL(None, use_errno=True)
        PR_SET_PDEATHSIG = 1
        libc.prctl(PR_SET_PDEATHSIG, signal.SIGTERM)
        if os.getppid() == 1:        # the main process died before prctl took effect
            os._exit(1)
    except (OSError, AttributeError):  # pragma: no cover - not Linux
        pass


def run_local(chunks: Iterable[Chunk], settings: Settings, jobs: int) -> Iterator[tuple[Chunk, list]]:
    if jobs <= 1:
        for chunk in chunks:
            yield chunk, process_chunk(chunk[0], chunk[1], settings)
        return
    import multiprocessing
    from concurrent.futures import ProcessPoolExecutor

    # fork: workers start fast and inherit what is already imported.
    context = multiprocessing.get_context("fork")
    executor = ProcessPoolExecutor(max_workers=jobs, mp_context=context, initializer=_worker_init)
    from concurrent.futures.process import BrokenProcessPool

    def submit(chunk: Chunk):
        try:
            return executor.submit(process_chunk, chunk[0], chunk[1], settings)
        except BrokenProcessPool as exc:
            raise EngineError(f"a worker process died ({exc})") from exc

    def result(future):
        try:
            return future.result()
        except BrokenProcessPool as exc:   # killed from outside, or by the kernel when out of memory
            raise EngineError("a worker process died (killed from outside or out of memory)") from exc

    try:
        yield from _ordered(submit, chunks, 3 * jobs, result)
    finally:
        executor.shutdown(wait=True, cancel_futures=True)


def _one_line(exc: BaseException) -> str:
    return " ".join(str(exc).split())


def check_address(scheduler: str) -> None:
    """Refuse a malformed scheduler address before connecting.

    ``distributed.Client`` given one raises, then its half-built client
    waits 40 s in ``__del__`` and prints a traceback.
    """
    try:
        from distributed.comm.addressing import parse_address, parse_host_port
        from distributed.comm.registry import get_backend
    except ImportError as exc:  # optional extra
        raise EngineError("--engine dask needs the optional extra: pip install 'normform[dask]'",
                          started=False) from exc
    try:
        scheme, location = parse_address(scheduler, strict=False)
        get_backend(scheme)
        if scheme in ("tcp", "tls", "ws", "wss"):
            parse_host_port(location)
    except (ValueError, TypeError) as exc:
        raise EngineError(f"--scheduler {scheduler!r} is not a Dask scheduler address ({exc}); "
                          "expected e.g. tcp://10.0.0.5:8786", started=False) from None


def connect_dask(scheduler: str, connect_timeout: float = 20.0):
    """A ``distributed.Client`` of the scheduler; connected before the run writes anything."""
    check_address(scheduler)
    from distributed import Client

    try:
        return Client(scheduler, set_as_default=False, timeout=f"{connect_timeout}s")
    except (OSError, ValueError) as exc:
        raise EngineError(f"cannot reach the Dask scheduler at {scheduler}: {exc}", started=False) from exc


class _OneLineLogs(logging.Filter):
    """Drop the traceback from a ``distributed`` log record (and the record
    itself when nothing but the traceback was said).

    When the scheduler dies mid-run, the client logs every failed reconnect
    as a bare multi-screen traceback before :func:`run_dask` can raise; our
    own one-line message (with the ``--resume`` hint) already says what
    happened, so the user should not have to scroll past theirs.
    """

    def filter(self, record: logging.LogRecord) -> bool:
        if record.exc_info or record.exc_text:
            record.exc_info = record.exc_text = None
            return bool(record.getMessage().strip())
        return True


@contextlib.contextmanager
def _one_line_dask_logs() -> Iterator[None]:
    # A logger's filters see only its own records, so every distributed
    # logger that exists by now gets one, and so do the handlers of the
    # "distributed" logger (its children's records pass through those).
    quiet = _OneLineLogs()
    names = ["distributed"] + [n for n in logging.root.manager.loggerDict if n.startswith("distributed.")]
    loggers = [logging.getLogger(n) for n in names]
    handlers = [h for h in logging.getLogger("distributed").handlers]
    for target in loggers + handlers:
        target.addFilter(quiet)
    try:
        yield
    finally:
        for target in loggers + handlers:
            target.removeFilter(quiet)


def run_dask(chunks: Iterable[Chunk], settings: Settings, scheduler: str | None = None,
             connect_timeout: float = 20.0, client=None) -> Iterator[tuple[Chunk, list]]:
    """Chunks as futures on a Dask cluster (``client`` from :func:`connect_dask`, or made here)."""
    if client is None:
        client = connect_dask(scheduler, connect_timeout)

    def submit(chunk: Chunk):
        try:
            return client.submit(process_chunk, chunk[0], chunk[1], settings, pure=False)
        except Exception as exc:  # the client has lost its scheduler
            raise EngineError(f"the Dask cluster failed: {type(exc).__name__}: {_one_line(exc)}") from exc

    def result(future):
        try:
            return future.result()
        except Exception as exc:  # scheduler or worker lost, or a task failed on a worker
            raise EngineError(f"the Dask cluster failed: {type(exc).__name__}: {_one_line(exc)}") from exc

    with _one_line_dask_logs():
        try:
            try:
                threads = sum(client.nthreads().values()) or 1
            except Exception as exc:
                raise EngineError(f"the Dask cluster failed: {type(exc).__name__}: {_one_line(exc)}") from exc
            yield from _ordered(submit, chunks, 2 * threads + 1, result)
        finally:
            client.close()
