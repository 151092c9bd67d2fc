"""The ``normform lint`` command: formats, selection, exit codes, configuration, fixes."""

from __future__ import annotations

import json
import os
import shutil
import tomllib

import pytest

from lint_support import BASE, DEMO, REPO, run_cli
from normform.lint.fixing import shape

CLEAN = BASE.replace("[1, 1, 2, 3, 5, 8, 13, 21, 34, 55, 89]", "[1, 2, 3, 4, 5, 6, 7, 8, 9, 10]")
DIRTY = CLEAN.replace('"Test entry"', '"Test entry "') + 'colour = "blue"\n'


@pytest.fixture
def work(tmp_path):
    (tmp_path / "Q000100.toml").write_text(DIRTY, "utf-8")
    return tmp_path


def test_clean_entry_exits_0(tmp_path):
    (tmp_path / "Q000100.toml").write_text(CLEAN, "utf-8")
    done = run_cli("Q000100.toml", cwd=tmp_path)
    assert done.returncode == 0, done.stdout + done.stderr
    assert done.stdout.strip() == "0 errors, 0 warnings, 0 notes in 1 file"


def test_text_output_is_compiler_style_with_caret(work):
    done = run_cli("Q000100.toml", cwd=work)
    assert done.returncode == 1
    lines = done.stdout.splitlines()
    assert lines[0] == "Q000100.toml:2:20: note trailing-whitespace remove the spaces around this value [fixable]"
    assert lines[1] == '  title = "Test entry "'
    assert lines[2] == "  " + " " * 19 + "^"
    assert lines[3].startswith("Q000100.toml:5:1: warning unknown-key unknown key 'colour'")
    assert lines[5] == "  ^~~~~~"
    assert "\033[" not in done.stdout            # not a terminal: no colours


def test_colours_only_on_a_terminal(work):
    pty = pytest.importorskip("pty")
    import subprocess
    import sys

    leader, follower = pty.openpty()
    from lint_support import CLI

    proc = subprocess.run([*CLI, "lint", "Q000100.toml"], cwd=work,
                          stdout=follower, stderr=subprocess.DEVNULL, timeout=60,
                          env={k: v for k, v in os.environ.items() if k != "NO_COLOR"})
    os.close(follower)
    out = b""
    try:
        while chunk := os.read(leader, 65536):
            out += chunk
    except OSError:
        pass
    os.close(leader)
    assert proc.returncode == 1 and b"\033[1;33mwarning\033[0m" in out


def test_fail_on_and_exit_codes(work):
    assert run_cli("Q000100.toml", "--fail-on", "error", cwd=work).returncode == 0
    assert run_cli("Q000100.toml", "--fail-on", "warning", cwd=work).returncode == 1
    assert run_cli("Q000100.toml", "--select", "trailing-whitespace", cwd=work).returncode == 0
    assert run_cli("Q000100.toml", "--select", "trailing-whitespace", "--fail-on", "note", cwd=work).returncode == 1
    assert run_cli("missing.toml", cwd=work).returncode == 2
    assert run_cli("Q000100.toml", "--select", "no-such-rule", cwd=work).returncode == 2
    assert run_cli(cwd=work).returncode == 2


def test_select_and_ignore_by_slug_and_category(work):
    done = run_cli("Q000100.toml", "--format", "json", "--select", "text,entry", "--ignore", "unknown-key", cwd=work)
    rules = [f["rule"] for f in json.loads(done.stdout)["findings"]]
    assert rules == ["trailing-whitespace"]
    done = run_cli("Q000100.toml", "--format", "json", "--ignore", "text", cwd=work)
    assert [f["rule"] for f in json.loads(done.stdout)["findings"]] == ["unknown-key"]


def test_json_output(work):
    done = run_cli("Q000100.toml", "--format", "json", cwd=work)
    data = json.loads(done.stdout)
    assert data["files"] == 1 and data["counts"] == {"error": 0, "warning": 1, "note": 1}
    first = data["findings"][0]
    assert (first["line"], first["column"], first["rule"], first["severity"]) == (2, 20, "trailing-whitespace", "note")
    assert first["fix"]["edits"][0]["text"] == '"Test entry"'


def test_file_syntax_error_is_a_finding(tmp_path):
    (tmp_path / "Q000100.toml").write_text('id = "Q000100"\ntitle = \n', "utf-8")
    done = run_cli("Q000100.toml", cwd=tmp_path)
    assert done.returncode == 1
    assert done.stdout.startswith("Q000100.toml:2:9: error file-syntax not valid TOML")


def test_a_file_that_is_not_utf8_is_a_finding_with_position(tmp_path):
    (tmp_path / "Q000100.toml").write_bytes(b'id = "Q000100"\ntitle = "caf\xe9"\n')
    done = run_cli("Q000100.toml", cwd=tmp_path)
    assert done.returncode == 1
    assert done.stdout.startswith("Q000100.toml:2:13: error file-syntax the file is not UTF-8 (byte 0xe9)")


def test_list_rules():
    done = run_cli("--list-rules")
    assert done.returncode == 0
    from normform.lint.registry import all_rules

    for r in all_rules():
        assert any(line.split()[:2] == [r.slug, r.severity] for line in done.stdout.splitlines()), r.slug


def test_configuration_from_pyproject(work):
    (work / "pyproject.toml").write_text('[tool.normform.lint]\nignore = ["unknown-key"]\nfail-on = "note"\n'
                                         'min-terms = 20\n', "utf-8")
    done = run_cli("Q000100.toml", "--format", "json", cwd=work)
    rules = [f["rule"] for f in json.loads(done.stdout)["findings"]]
    assert rules == ["trailing-whitespace", "too-few-terms"] and done.returncode == 1


def test_configuration_from_normform_toml(work):
    (work / "normform.toml").write_text('[lint]\nselect = ["unknown-key"]\n[lint.severity]\nunknown-key = "error"\n',
                                        "utf-8")
    done = run_cli("Q000100.toml", "--format", "json", cwd=work)
    found = json.loads(done.stdout)["findings"]
    assert [(f["rule"], f["severity"]) for f in found] == [("unknown-key", "error")]
    (work / "normform.toml").write_text('[lint]\nmin-terms = "ten"\n', "utf-8")
    done = run_cli("Q000100.toml", cwd=work)
    assert done.returncode == 2 and "min-terms" in done.stderr


def test_diff_changes_nothing(work):
    done = run_cli("Q000100.toml", "--diff", cwd=work)
    assert '-title = "Test entry "' in done.stdout and '+title = "Test entry"' in done.stdout
    assert (work / "Q000100.toml").read_text("utf-8") == DIRTY
    assert not (work / "Q000100.toml.orig").exists()


def _leaves(value, path=()):
    if isinstance(value, dict):
        for k, v in value.items():
            yield from _leaves(v, path + (k,))
    elif isinstance(value, list):
        for i, v in enumerate(value):
            yield from _leaves(v, path + (i,))
    else:
        yield path


def _load(path):
    text = path.read_text("utf-8")
    return json.loads(text) if ".json" in path.name else tomllib.loads(text)


def test_fix_on_the_demo_corpus_is_idempotent_and_keeps_every_field(tmp_path):
    entries = tmp_path / "entries"
    shutil.copytree(DEMO, entries)
    before = {p.name: p.read_text("utf-8") for p in entries.iterdir()}
    first = run_cli("entries", "--fix", cwd=tmp_path)
    assert first.returncode in (0, 1), first.stderr
    changed = [p for p in entries.iterdir() if p.suffix != ".orig" and p.read_text("utf-8") != before[p.name]]
    assert len(changed) >= 5
    for p in changed:
        orig = entries / (p.name + ".orig")
        assert orig.read_text("utf-8") == before[p.name]          # the backup is the original
        old, new = _load(orig), _load(p)
        assert shape(old) == shape(new)                            # no key lost or added
        assert sorted(_leaves(old)) == sorted(_leaves(new))
    after = {p.name: p.read_text("utf-8") for p in entries.iterdir()}
    second = run_cli("entries", "--fix", cwd=tmp_path)
    assert {p.name: p.read_text("utf-8") for p in entries.iterdir()} == after     # idempotent
    assert "fixed" not in second.stderr
    # what --fix repaired is no longer reported
    for slug in ("trailing-whitespace", "control-character", "term-not-integer", "not-nfc", "tex-in-text"):
        assert slug not in second.stdout


def test_fix_no_backup(work):
    done = run_cli("Q000100.toml", "--fix", "--no-backup", cwd=work)
    assert done.returncode == 1        # the unknown key is left for a person
    assert (work / "Q000100.toml").read_text("utf-8") == DIRTY.replace('"Test entry "', '"Test entry"')
    assert not (work / "Q000100.toml.orig").exists()
    assert "unknown-key" in done.stdout and "trailing-whitespace" not in done.stdout


def test_json_entries_are_fixed_as_json(tmp_path):
    entry = {"id": "Q000100", "title": "Delannoy\u0007", "terms": [1, 3, "13", 63, 321, 1683, 8989, 48639, 265729,
                                                                     1462563], "first_index": 0}
    path = tmp_path / "Q000100.json"
    path.write_text(json.dumps(entry, indent=2), "utf-8")
    run_cli("Q000100.json", "--fix", cwd=tmp_path)
    fixed = json.loads(path.read_text("utf-8"))
    assert fixed["title"] == "Delannoy" and fixed["terms"][2] == 13


def test_a_run_imports_only_what_its_rules_need(work):
    import subprocess
    import sys

    probe = ("import sys, contextlib, io\nfrom normform.cli import main\n"
             "with contextlib.redirect_stdout(io.StringIO()):\n    main(sys.argv[1:])\n"
             "print(sorted(m for m in ('normform.formula.parser', 'normform.refs.api', 'lark', 'jsonschema',"
             " 'pylatexenc', 'difflib') if m in sys.modules))")
    done = subprocess.run([sys.executable, "-c", probe, "lint", "Q000100.toml", "--select", "trailing-whitespace"],
                          cwd=work, capture_output=True, text=True, timeout=60)
    assert done.stdout.strip() == "[]", done.stdout + done.stderr
    done = subprocess.run([sys.executable, "-c", probe, "lint", "--list-rules"], cwd=work, capture_output=True,
                          text=True, timeout=60)
    assert done.stdout.strip().splitlines()[-1] == "[]"
