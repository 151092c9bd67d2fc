"""The demo catalogue: every deliberate defect is reported where it is; clean entries stay clean."""

from __future__ import annotations

from collections import defaultdict

import pytest

from lint_support import DEMO
from normform.lint.engine import Context, lint
from normform.lint.entry import read_entry
from normform.lint.registry import select_rules
from normform.lint.settings import LintSettings

# file -> rules its comments say it breaks (the formula rules need the formula engine)
DEFECTS = {
    "Q000004.toml": {"formula-disagrees"},
    "Q000005.toml": {"first-index-mismatch"},
    "Q000006.toml": {"trailing-whitespace"},
    "Q000007.toml": {"tex-in-text"},
    "Q000008.toml": {"isbn-check-digit"},
    "Q000010.toml": {"python-syntax"},
    "Q000011.toml": {"not-nfc"},
    "Q000012.toml": {"formula-syntax"},
    "Q000013.toml": {"link-duplicate", "link-repeats-reference"},
    "Q000014.toml": {"too-few-terms", "see-also-missing"},
    "Q000015.toml": {"mixed-dashes"},
    "Q000016.toml": {"duplicate-id", "file-name-mismatch"},
    "Q000017.toml": {"unknown-key", "program-language"},
    "Q000018.json": {"control-character", "term-not-integer"},
    "Q000019.toml": {"arxiv-malformed", "issn-check-digit"},
    "Q000020.toml": {"doi-invalid", "formula-kind-mismatch"},
}
# rules whose answer depends on another area's model quality (reference confidence, house style)
SOFT = {"reference-unparsed", "reference-incomplete", "reference-house-style", "reference-cited-differently",
        "formula-spelling", "formula-unchecked"}


@pytest.fixture(scope="module")
def result():
    entries = [read_entry(str(p)) for p in sorted(DEMO.iterdir())]
    ctx = Context(LintSettings())
    found = lint(entries, select_rules(), ctx)
    assert not ctx.failed, ctx.failed
    by_file = defaultdict(set)
    for f in found:
        by_file[f.path.rsplit("/", 1)[-1]].add(f.slug)
    return by_file, ctx


def test_about_twenty_entries():
    assert 18 <= len(list(DEMO.iterdir())) <= 25


@pytest.mark.parametrize("name", sorted(DEFECTS))
def test_each_deliberate_defect_is_reported(result, name):
    by_file, ctx = result
    expected = {s for s in DEFECTS[name] if s not in ctx.skipped}
    assert expected <= by_file[name], by_file[name]


def test_no_other_hard_findings(result):
    by_file, ctx = result
    for name in sorted(p.name for p in DEMO.iterdir()):
        extra = by_file[name] - DEFECTS.get(name, set()) - SOFT
        assert not extra, (name, extra)
