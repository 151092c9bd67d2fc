"""Checks of issue #7's promises found wrong in a QA pass, each on invented Quillfeather Society data."""

from __future__ import annotations

import io
import json
import sys
import time
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent / "fixtures" / "batch"))
from batch_helpers import FAKE, records, write_lines  # noqa: E402

from normform.batch import command, engines  # noqa: E402
from normform.batch.engines import EngineError  # noqa: E402
from normform.batch.progress import Progress  # noqa: E402
from normform.batch.runner import CleanError, clean  # noqa: E402


def _entry(path: Path, ident: str, refs_toml: bytes) -> Path:
    path.write_bytes(b'id = "' + ident.encode() + b'"\ntitle = "Invented entry"\nreferences = [\n' + refs_toml + b"]\n")
    return path


def test_invalid_utf8_inside_an_entry_file_is_flagged_with_its_byte_offset(tmp_path):
    entries = tmp_path / "entries"
    entries.mkdir()
    # a Latin-1 "u with diaeresis" (0xfc) in the second reference, on line 5
    path = _entry(entries / "Q000204.toml", "Q000204",
                  b'  "Farrowdale, Counting words, 1990",\n  "M\xfchlbauer, Zahlprobleme, 1980",\n')
    offset = path.read_bytes().index(b"\xfc")
    result = clean([str(entries)], tmp_path / "out", toolkit=FAKE, jobs=1, quiet=True)
    assert result.references_read == result.records == 2
    first, second = records(tmp_path / "out")
    assert "flags" not in first or "invalid_utf8" not in first["flags"]
    assert second["origin"]["line"] == 5 and second["flags"]["invalid_utf8"] == offset
    assert f"invalid UTF-8 at byte offset {offset} (decoded with replacement)" in second["reasons"]
    summary = json.loads((tmp_path / "out" / "summary.json").read_text())
    assert summary["invalid_utf8"] == [{"file": str(path), "line": 5, "byte_offset": offset}]
    assert summary["invalid_utf8_lines"] == 1


def test_output_equal_to_an_input_file_is_refused_clearly(tmp_path, capsys):
    src = write_lines(tmp_path / "legacy.txt", 3)
    before = src.read_bytes()
    assert command.main([str(src), "-o", str(src), "--quiet"], toolkit=FAKE) == 2
    err = capsys.readouterr().err
    assert f"-o {src} is the input {src}" in err and "Errno" not in err
    assert src.read_bytes() == before


def test_output_equal_to_an_input_directory_is_refused(tmp_path, capsys):
    entries = tmp_path / "entries"
    entries.mkdir()
    _entry(entries / "Q000301.toml", "Q000301", b'  "Inkwell, Tableaux, 1990",\n')
    with pytest.raises(CleanError, match="is the input"):
        clean([str(entries)], entries, toolkit=FAKE, jobs=1, quiet=True)
    assert sorted(p.name for p in entries.iterdir()) == ["Q000301.toml"]


def test_an_output_directory_inside_an_input_directory_is_not_read_back(tmp_path):
    entries = tmp_path / "entries"
    entries.mkdir()
    _entry(entries / "Q000302.toml", "Q000302", b'  "Inkwell, Trees, 1991",\n')
    out = entries / "cleaned"
    clean([str(entries)], out, toolkit=FAKE, jobs=1, quiet=True)
    again = clean([str(entries)], out, toolkit=FAKE, jobs=1, quiet=True)   # summary.json is there now
    assert again.entry_files == 1 and again.records == 1 and not again.unreadable


def test_quiet_run_names_the_unreadable_entry_file(tmp_path, capsys):
    entries = tmp_path / "entries"
    entries.mkdir()
    _entry(entries / "Q000303.toml", "Q000303", b'  "Inkwell, Trees, 1991",\n')
    (entries / "Q000304.toml").write_text('id = "Q000304"\nreferences = [\n  oops\n]\n')
    assert command.main([str(entries), "-o", str(tmp_path / "out"), "--quiet"], toolkit=FAKE) == 1
    err = capsys.readouterr().err
    assert "see above" not in err and str(entries / "Q000304.toml") in err


def test_ctrl_c_through_the_normform_command_names_resume(tmp_path, capsys, monkeypatch):
    from normform import cli
    from normform.batch import runner

    def interrupted(*args, **kwargs):
        raise KeyboardInterrupt

    monkeypatch.setattr(runner, "clean", interrupted)
    src = write_lines(tmp_path / "legacy.txt", 3)
    assert cli.main(["clean", str(src), "-o", str(tmp_path / "out")]) == 130
    assert "--resume" in capsys.readouterr().err


def test_a_worker_that_dies_is_a_clear_error_and_the_checkpoint_stands(tmp_path):
    src = write_lines(tmp_path / "legacy.txt", 400, extra=[b"Quillby, WORKER DIES HERE, 1999"])
    with pytest.raises(EngineError, match="a worker process died") as info:
        clean([str(src)], tmp_path / "out", toolkit="batch_dying_toolkit:TOOLKIT", jobs=2,
              quiet=True, chunk_size=50)
    assert info.value.started
    assert (tmp_path / "out" / ".normform-work" / "state.sqlite").exists()


class _LostFuture:
    def result(self):
        raise RuntimeError("scheduler-connection-lost.\nClient lost the connection")


class _LostClient:
    """A Dask client whose scheduler went away after connecting (no dask needed)."""

    closed = False

    def nthreads(self):
        return {"tcp://127.0.0.1:1": 1}

    def submit(self, *args, **kwargs):
        return _LostFuture()

    def close(self):
        self.closed = True


def test_a_dask_cluster_lost_mid_run_is_an_engine_error():
    from normform.batch.inputs import Item
    from normform.batch.process import Settings

    client = _LostClient()
    chunks = iter([([Item("ref", "Quillby, Paths, 1990", "x.txt", 1)], 1)])
    with pytest.raises(EngineError, match="the Dask cluster failed: RuntimeError: scheduler-connection-lost. Client"):
        list(engines.run_dask(chunks, Settings(toolkit=FAKE), client=client))
    assert client.closed


def test_a_malformed_scheduler_address_is_refused_at_once_and_writes_nothing(tmp_path):
    pytest.importorskip("distributed", reason="dask is an optional extra")
    src = write_lines(tmp_path / "legacy.txt", 3)
    started = time.monotonic()
    for address in ("nonsense", "http://127.0.0.1:8786"):
        with pytest.raises(EngineError, match="is not a Dask scheduler address") as info:
            clean([str(src)], tmp_path / "out", toolkit=FAKE, engine="dask", scheduler=address, quiet=True)
        assert not info.value.started
    assert time.monotonic() - started < 10       # no 40 s wait in a half-built client
    assert not (tmp_path / "out").exists()


class _Terminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_a_finished_progress_bar_ends_at_100_percent():
    # the total is counted from line ends, blank lines included: 10 lines, 8 references
    stream = _Terminal()
    bar = Progress(10, stream=stream)
    bar.update(8)
    bar.close(finished=True)
    assert "100%" in stream.getvalue().split("\r")[-1] and "8/8" in stream.getvalue()


def test_control_bytes_of_a_legacy_line_are_shown_in_the_report_not_written_raw(tmp_path):
    # a NUL and a form feed typed into an invented line (old word-processor debris)
    src = write_lines(tmp_path / "legacy.txt", 2, extra=[b"Quill\x00feather, Lattice\x0c paths, 2005"])
    clean([str(src)], tmp_path / "out", toolkit=FAKE, jobs=1, quiet=True)
    html = (tmp_path / "out" / "report.html").read_text("utf-8")
    body = html[html.index("<body"):]
    # HTML forbids these characters in text (NUL is even replaced on parsing): WHATWG HTML,
    # "control-character-in-input-stream" and "unexpected-null-character" parse errors
    assert not [c for c in body if ord(c) < 32 and c not in "\n\t\r" or ord(c) == 0x7F]
    assert "Quill\u2400feather" in body and "Lattice\u240c" in body     # Unicode Control Pictures block
    rec = records(tmp_path / "out")[-1]
    assert rec["text"] == "Quill\x00feather, Lattice\x0c paths, 2005"   # the record keeps the bytes as typed


def test_a_json_lines_object_with_text_and_references_loses_neither(tmp_path):
    src = tmp_path / "refs.jsonl"
    src.write_text(json.dumps({"id": "Q000401", "text": "Quillby, Lattice paths, 2005",
                               "references": ["Inkwell, Ribbon tableaux, 1991"]}) + "\n", encoding="utf-8")
    result = clean([str(src)], tmp_path / "out", toolkit=FAKE, jobs=1, quiet=True)
    assert [r["text"] for r in records(tmp_path / "out")] == ["Quillby, Lattice paths, 2005",
                                                             "Inkwell, Ribbon tableaux, 1991"]
    assert result.records == result.references_read == 2
    assert any("text" in p and "entry lists" in p for p in result.problems)


def test_resume_is_refused_when_normform_itself_changed_since_the_checkpoint(tmp_path, monkeypatch):
    from normform.batch import runner

    src = write_lines(tmp_path / "legacy.txt", 400, extra=[b"Quillby, WORKER DIES HERE, 1999"])
    dying = "batch_dying_toolkit:TOOLKIT"
    with pytest.raises(EngineError):
        clean([str(src)], tmp_path / "out", toolkit=dying, jobs=2, quiet=True, chunk_size=50)
    # the parser was upgraded (or edited) between the interrupted run and the resume
    monkeypatch.setattr(runner, "code_fingerprint", lambda toolkit=None: "another normform")
    with pytest.raises(CleanError, match=r"changed since its checkpoint: normform itself"):
        clean([str(src)], tmp_path / "out", toolkit=dying, jobs=1, quiet=True, chunk_size=50, resume=True)


@pytest.mark.parametrize("option, value, message", [("--report-rows", "-1", "--report-rows must be 0 or more"),
                                                    ("--similarity", "150", "--similarity must be between 0 and 100")])
def test_out_of_range_options_are_refused(tmp_path, capsys, option, value, message):
    src = write_lines(tmp_path / "legacy.txt", 3)
    assert command.main([str(src), "-o", str(tmp_path / "out"), option, value, "--quiet"], toolkit=FAKE) == 2
    assert message in capsys.readouterr().err
    assert not (tmp_path / "out").exists()


def test_an_output_directory_around_the_input_directory_still_reads_it(tmp_path):
    entries = tmp_path / "entries"
    entries.mkdir()
    _entry(entries / "Q000305.toml", "Q000305", b'  "Inkwell, Trees, 1991",\n')
    result = clean([str(entries)], tmp_path, toolkit=FAKE, jobs=1, quiet=True)   # -o the parent folder
    assert result.entry_files == 1 and result.records == 1
