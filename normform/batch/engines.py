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
import os
from typing import Iterable, Iterator

from normform.batch.process import Settings, process_chunk

Chunk = tuple[list, int]   # (items, first record number)


class EngineError(Exception):
    """The chosen engine cannot run (dask not installed, scheduler unreachable)."""


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
    try:
        yield from _ordered(lambda c: executor.submit(process_chunk, c[0], c[1], settings),
                            chunks, 3 * jobs, lambda f: f.result())
    finally:
        executor.shutdown(wait=True, cancel_futures=True)


def run_dask(chunks: Iterable[Chunk], settings: Settings, scheduler: str,
             connect_timeout: float = 20.0) -> Iterator[tuple[Chunk, list]]:
    try:
        from distributed import Client
    except ImportError as exc:  # optional extra
        raise EngineError("--engine dask needs the optional extra: pip install 'normform[dask]'") from exc
    try:
        client = Client(scheduler, set_as_default=False, timeout=f"{connect_timeout}s")
    except (OSError, ValueError) as exc:
        raise EngineError(f"cannot reach the Dask scheduler at {scheduler}: {exc}") from exc
    try:
        threads = sum(client.nthreads().values()) or 1
        yield from _ordered(lambda c: client.submit(process_chunk, c[0], c[1], settings, pure=False),
                            chunks, 2 * threads + 1, lambda f: f.result())
    finally:
        client.close()
