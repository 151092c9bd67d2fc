"""``normform formula`` command line."""

from __future__ import annotations

import io
import json

from normform.cli import main


def run(capsys, monkeypatch, argv, stdin=None):
    if stdin is not None:
        monkeypatch.setattr("sys.stdin", io.StringIO(stdin))
    code = main(["formula", *argv])
    out, err = capsys.readouterr()
    return code, out, err


def test_ascii_latex_mathml(capsys, monkeypatch):
    assert run(capsys, monkeypatch, ["a(n)=n(n+1)/2"]) == (0, "a(n) = n*(n + 1)/2\n", "")
    code, out, _ = run(capsys, monkeypatch, ["C(2n,n)", "--to", "latex"])
    assert (code, out) == (0, "\\binom{2 n}{n}\n")
    code, out, _ = run(capsys, monkeypatch, ["x^2", "--to", "mathml", "--display", "inline"])
    assert out.startswith('<math xmlns="http://www.w3.org/1998/Math/MathML" display="inline">')


def test_json_lines_from_stdin(capsys, monkeypatch):
    code, out, _ = run(capsys, monkeypatch, ["--to", "json"], stdin="2^n - 1\n\na(n) = (n+1\n")
    rows = [json.loads(line) for line in out.splitlines()]
    assert code == 1 and len(rows) == 3  # the blank line keeps its place
    assert rows[0]["ok"] and rows[0]["kind"] == "expression" and rows[0]["ascii"] == "2^n - 1"
    assert set(rows[0]) >= {"input", "ok", "kind", "ascii", "latex", "mathml", "error"}
    assert rows[1]["ok"] is False and rows[1]["error"]["message"] == "empty line"
    assert rows[2]["ok"] is False
    assert rows[2]["error"]["line"] == 3 and rows[2]["error"]["column"] == 12
    assert "expected ')'" in rows[2]["error"]["message"]


def test_at_prints_exact_values(capsys, monkeypatch):
    code, out, _ = run(capsys, monkeypatch, ["-", "--at", "n=5,k=2"],
                       stdin="binomial(n,k)\nn/k\nsqrt(n)\n")
    lines = out.splitlines()
    assert code == 0 and lines[0] == "10" and lines[1] == "5/2"
    assert lines[2].startswith("2.236067977499789696") and "(approx.)" in lines[2] and "sqrt(5)" in lines[2]


def test_errors_go_to_stderr_with_caret(capsys, monkeypatch):
    code, out, err = run(capsys, monkeypatch, ["n + * 2"])
    assert code == 1 and out == "\n"  # an empty line holds the failed line's place
    assert "line 1, column 5" in err and err.rstrip().endswith("^")


def test_bad_arguments_are_usage_errors(capsys, monkeypatch):
    code, _, err = run(capsys, monkeypatch, ["n", "--at", "n"])
    assert code == 2 and "name=value" in err


def test_terms_option_calls_formula_terms(capsys, monkeypatch):
    code, out, err = run(capsys, monkeypatch, ["a(n) = 2^n - 1", "--terms", "6"])
    assert (code, out) == (0, "0, 1, 3, 7, 15, 31\n"), err
