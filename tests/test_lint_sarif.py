"""SARIF 2.1.0 output, validated against the OASIS schema (tests/fixtures/lint/SOURCE.md)."""

from __future__ import annotations

import json

import jsonschema
import pytest

from lint_support import DEMO, FIXTURES, REPO, run_cli


@pytest.fixture(scope="module")
def validator():
    schema = json.loads((FIXTURES / "sarif-schema-2.1.0.json").read_text("utf-8"))
    jsonschema.Draft4Validator.check_schema(schema)       # the file declares draft-04
    return jsonschema.Draft4Validator(schema)


@pytest.fixture(scope="module")
def demo_log():
    done = run_cli("corpus_demo/entries", "--format", "sarif", cwd=REPO)
    assert done.returncode == 1
    return json.loads(done.stdout)


def test_demo_log_is_valid_sarif(validator, demo_log):
    errors = sorted(validator.iter_errors(demo_log), key=str)
    assert not errors, errors[0].message


def test_validator_rejects_a_broken_log(validator, demo_log):
    broken = json.loads(json.dumps(demo_log))
    broken["runs"][0]["results"][0]["level"] = "fatal"          # not a SARIF level
    assert list(validator.iter_errors(broken))
    del broken["version"]
    assert list(validator.iter_errors(broken))


def test_results_carry_rules_regions_and_fixes(demo_log):
    run = demo_log["runs"][0]
    assert demo_log["version"] == "2.1.0" and run["columnKind"] == "unicodeCodePoints"
    rules = run["tool"]["driver"]["rules"]
    for result in run["results"]:
        assert rules[result["ruleIndex"]]["id"] == result["ruleId"]
        region = result["locations"][0]["physicalLocation"]["region"]
        assert region["startLine"] >= 1 and region["startColumn"] >= 1
    by_rule = {r["ruleId"]: r for r in run["results"]}
    ctrl = by_rule["control-character"]
    assert ctrl["locations"][0]["physicalLocation"]["artifactLocation"]["uri"] == "corpus_demo/entries/Q000018.json"
    assert ctrl["locations"][0]["physicalLocation"]["region"]["startLine"] == 3
    fix = ctrl["fixes"][0]["artifactChanges"][0]["replacements"][0]
    text = (DEMO / "Q000018.json").read_text("utf-8").splitlines()
    region = fix["deletedRegion"]
    assert text[region["startLine"] - 1][region["startColumn"] - 1:region["endColumn"] - 1] == \
        '"Central Delannoy numbers\\u0007"'
    assert fix["insertedContent"]["text"] == '"Central Delannoy numbers"'


def test_syntax_errors_and_json_entries_give_valid_sarif(validator, tmp_path):
    (tmp_path / "Q000100.toml").write_text('id = "Q000100"\ntitle = \n', "utf-8")
    (tmp_path / "Q000101.json").write_text('{"id": "Q000101", "title": "t ", "terms": [1, "2"]}', "utf-8")
    done = run_cli(".", "--format", "sarif", cwd=tmp_path)
    log = json.loads(done.stdout)
    assert not list(validator.iter_errors(log))
    rules = sorted(r["ruleId"] for r in log["runs"][0]["results"])
    assert rules == ["file-syntax", "term-not-integer", "too-few-terms", "trailing-whitespace"]


def test_skipped_rules_are_valid_notifications(validator):
    import io

    from normform.lint.entry import parse_entry
    from normform.lint.registry import select_rules
    from normform.lint.report import sarif

    from lint_support import BASE, findings

    found = findings(BASE.replace('"Test entry"', '"Test entry "'), select=["trailing-whitespace"])
    out = io.StringIO()
    entry = parse_entry("Q000100.toml", BASE)
    sarif(found, select_rules(["text"]), out, version="0", sources={"Q000100.toml": entry.where},
          skipped={"formula-syntax": "normform.parse_formula is not available"})
    log = json.loads(out.getvalue())
    assert not list(validator.iter_errors(log))
    note = log["runs"][0]["invocations"][0]["toolExecutionNotifications"][0]
    assert note["descriptor"]["id"] == "formula-syntax"
