"""The time budget of a check is per thread.

Checks running in several threads at once (a threaded server, a Dask worker
with threads) each set and restore their own deadline.  With one global
deadline, threads interleaving their save/restore left a finished thread's
deadline behind: two seconds later every cooperative check in the process
ran out of time at once and came back "cannot-check".
"""

from __future__ import annotations

import threading

from normform.formula import terms as T
from normform.formula.check import check_formula

PARTITIONS = [1, 1, 2, 3, 5, 7, 11, 15, 22, 30, 42, 56, 77, 101, 135]   # p(n), common practice


def _many_checks(errors: list[BaseException]) -> None:
    try:
        for _ in range(30):
            assert check_formula("G.f.: Product_{k>=1} 1/(1-x^k)", PARTITIONS).status == "agrees"
    except BaseException as exc:  # noqa: BLE001 - reported by the test
        errors.append(exc)


def test_threads_leave_no_deadline_behind():
    for _ in range(5):
        errors: list[BaseException] = []
        threads = [threading.Thread(target=_many_checks, args=(errors,)) for _ in range(4)]
        for t in threads:
            t.start()
        for t in threads:
            t.join()
        assert not errors
        assert T._deadline() == float("inf")     # this thread has no budget running


def test_a_thread_has_its_own_deadline():
    seen = []

    def inner():
        seen.append(T._deadline())                # no budget in this thread
        with T.budget(5):
            seen.append(T._deadline())

    with T.budget(1):
        outer = T._deadline()
        t = threading.Thread(target=inner)
        t.start()
        t.join()
        assert T._deadline() == outer
    assert seen[0] == float("inf") and seen[1] > outer
    assert T._deadline() == float("inf")
