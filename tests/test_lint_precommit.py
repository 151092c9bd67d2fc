"""The pre-commit hook definition, run the way pre-commit runs it, on a temporary git repository."""

from __future__ import annotations

import re
import shlex
import shutil
import stat
import subprocess
import sys

import pytest
import yaml

from lint_support import BASE, CLI, REPO

GOOD = BASE.replace("[1, 1, 2, 3, 5, 8, 13, 21, 34, 55, 89]", "[1, 2, 3, 4, 5, 6, 7, 8, 9, 10]")
BAD = GOOD.replace('"Test entry"', '"Test\\u0007 entry"')


def hook() -> dict:
    hooks = yaml.safe_load((REPO / ".pre-commit-hooks.yaml").read_text("utf-8"))
    (only,) = [h for h in hooks if h["id"] == "normform-lint"]
    return only


def test_hook_definition_is_well_formed():
    h = hook()
    assert {"id", "name", "entry", "language", "files"} <= set(h)
    assert h["entry"].split()[:2] == ["normform", "lint"]
    pattern = re.compile(h["files"])
    assert pattern.search("entries/Q000001.toml") and pattern.search("cat/entries/Q000002.json")
    assert not pattern.search("pyproject.toml") and not pattern.search("entries/notes.md")


def _git(repo, *args):
    return subprocess.run(["git", "-C", str(repo), *args], capture_output=True, text=True, timeout=60)


@pytest.mark.skipif(shutil.which("git") is None, reason="git is not installed")
def test_hook_blocks_a_commit_with_a_bad_entry(tmp_path):
    repo = tmp_path / "catalogue"
    (repo / "entries").mkdir(parents=True)
    assert _git(repo, "init", "-q").returncode == 0
    _git(repo, "config", "user.email", "editor@qsem.invalid")
    _git(repo, "config", "user.name", "QSEM editor")
    h = hook()
    # A git pre-commit hook that does what pre-commit does: the hook's entry, with the staged
    # files that match its `files` pattern appended.  `normform` is this interpreter's CLI.
    entry = shlex.split(h["entry"])
    command = " ".join(shlex.quote(a) for a in CLI + entry[1:])
    script = repo / ".git" / "hooks" / "pre-commit"
    script.write_text(
        "#!/bin/sh\n"
        f"files=$(git diff --cached --name-only --diff-filter=ACM | {shlex.quote(sys.executable)} -c "
        f"{shlex.quote('import re,sys; p=re.compile(sys.argv[1]); print(chr(10).join(l.strip() for l in sys.stdin if p.search(l.strip())))')}"
        f" {shlex.quote(h['files'])})\n"
        '[ -z "$files" ] && exit 0\n'
        f"exec {command} $files\n", "utf-8")
    script.chmod(script.stat().st_mode | stat.S_IEXEC)

    (repo / "entries" / "Q000100.toml").write_text(GOOD, "utf-8")
    (repo / "README.md").write_text("catalogue\n", "utf-8")
    _git(repo, "add", ".")
    done = _git(repo, "commit", "-q", "-m", "first entry")
    assert done.returncode == 0, done.stdout + done.stderr

    (repo / "entries" / "Q000101.toml").write_text(BAD.replace("Q000100", "Q000101"), "utf-8")
    _git(repo, "add", ".")
    done = _git(repo, "commit", "-q", "-m", "second entry")
    assert done.returncode != 0
    output = done.stdout + done.stderr                # git shows hook output on stderr
    assert "entries/Q000101.toml:2:14: error control-character" in output
    assert "Q000100.toml" not in output               # only staged files are linted
    assert _git(repo, "log", "--oneline").stdout.count("\n") == 1
