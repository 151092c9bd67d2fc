"""--engine dask on a dask.distributed LocalCluster gives byte-identical outputs."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent / "fixtures" / "batch"))
from batch_helpers import FAKE, outputs, write_lines  # noqa: E402

from normform.batch.runner import clean  # noqa: E402

distributed = pytest.importorskip("distributed", reason="dask is an optional extra: pip install 'normform[dask]'")


def test_dask_engine_matches_local(tmp_path):
    src = write_lines(tmp_path / "in.txt", 1500, extra=[b"", b"Odd \xfe byte, 2001"])
    clean([str(src)], tmp_path / "local", toolkit=FAKE, jobs=1, quiet=True)
    # Loopback only; threads in this process so the test doubles are importable.
    with distributed.LocalCluster(n_workers=1, threads_per_worker=2, processes=False, protocol="tcp",
                                  host="127.0.0.1", dashboard_address=None) as cluster:
        result = clean([str(src)], tmp_path / "dask", toolkit=FAKE, engine="dask",
                       scheduler=cluster.scheduler_address, quiet=True, chunk_size=97)
    assert result.records == 1501
    assert outputs(tmp_path / "dask") == outputs(tmp_path / "local")


def test_dask_is_not_imported_by_the_local_engine(tmp_path):
    import subprocess

    src = write_lines(tmp_path / "in.txt", 20)
    code = ("import sys; sys.path.insert(0, %r); from normform.batch.runner import clean; "
            "clean([%r], %r, toolkit=%r, jobs=1, quiet=True); "
            "print('dask' in sys.modules or 'distributed' in sys.modules)"
            % (str(Path(__file__).parent / "fixtures" / "batch"), str(src), str(tmp_path / "o"), FAKE))
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_unreachable_scheduler_is_a_clear_error(tmp_path):
    import socket

    from normform.batch.engines import EngineError

    with socket.socket() as sock:          # a free loopback port nobody listens on
        sock.bind(("127.0.0.1", 0))
        port = sock.getsockname()[1]
    src = write_lines(tmp_path / "in.txt", 5)
    with pytest.raises(EngineError, match=f"cannot reach the Dask scheduler at tcp://127.0.0.1:{port}"):
        clean([str(src)], tmp_path / "o", toolkit=FAKE, engine="dask", scheduler=f"tcp://127.0.0.1:{port}",
              quiet=True, dask_timeout=2)
