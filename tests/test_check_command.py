"""The ``normform check TERMS EXPR...`` command."""

from __future__ import annotations

import io
import json

import pytest

from normform.cli import main


def run(capsys, *argv: str) -> tuple[int, str, str]:
    code = main(["check", *argv])
    out, err = capsys.readouterr()
    return code, out, err


def test_all_agree_exit_0(capsys):
    code, out, _ = run(capsys, "0,1,1,2,3,5,8,13", "a(n) = a(n-1) + a(n-2), a(0) = 0, a(1) = 1", "x/(1-x-x^2)")
    assert code == 0
    lines = out.splitlines()
    assert lines[0] == "agrees: a(n) = a(n-1) + a(n-2), a(0) = 0, a(1) = 1"
    assert lines[1] == "    8 terms compared"
    assert lines[2] == "agrees: x/(1-x-x^2)"


def test_any_disagreement_exit_1(capsys):
    code, out, _ = run(capsys, "1,1,2,3,5,8,13", "F(n)", "a(n) = 2a(n-1)")
    assert code == 1
    assert "disagrees: F(n)" in out
    assert "at n = 0: listed 1, formula gives 0" in out


def test_first_index_and_initial(capsys):
    code, out, _ = run(capsys, "--first-index", "1", "--initial", "1,1", "1,1,2,3,5,8", "a(n) = a(n-1) + a(n-2)")
    assert code == 0 and out.startswith("agrees")


def test_cannot_check_exits_0(capsys):
    code, out, _ = run(capsys, "1,2,3", "a(n) = b(n) + 1")
    assert code == 0 and out.startswith("cannot-check: a(n) = b(n) + 1")
    assert "does not define" in out


def test_json_output(capsys):
    code, out, _ = run(capsys, "--format", "json", "1,1,2,6,24,120", "E.g.f.: 1/(1-x)", "a(n) ~ sqrt(2*Pi*n)*(n/e)^n")
    assert code == 0
    rows = [json.loads(line) for line in out.splitlines()]
    assert [r["input"] for r in rows] == ["E.g.f.: 1/(1-x)", "a(n) ~ sqrt(2*Pi*n)*(n/e)^n"]
    assert rows[0]["status"] == "agrees" and rows[0]["kind"] == "egf" and rows[0]["compared"] == 6
    assert rows[1]["label"] == "agrees (trend)" and rows[1]["heuristic"] is True


def test_formulas_from_stdin(capsys, monkeypatch):
    monkeypatch.setattr("sys.stdin", io.StringIO("n^2\n\n(n+1)^2 - 2n - 1\nn^3\n"))
    code, out, _ = run(capsys, "0,1,4,9", "-")
    assert code == 1
    assert [line.split(":")[0] for line in out.splitlines() if not line.startswith(" ")] == \
        ["agrees", "agrees", "disagrees"]


@pytest.mark.parametrize("argv", [["1,x,3", "n"], ["", "n"], ["1,2", "n", "--initial", "a"]])
def test_bad_arguments_exit_2(capsys, argv):
    code, _, err = run(capsys, *argv)
    assert code == 2 and "normform check" in err


def test_malformed_formula_is_a_verdict_not_a_crash(capsys):
    code, out, _ = run(capsys, "1,2,3", "a(n) = (n + 1")
    assert code == 0 and out.startswith("cannot-check") and "cannot read the formula" in out
