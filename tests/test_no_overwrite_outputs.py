"""The README's promise "normform never overwrites its input", command by command.

Every output path of every command (``-o``, ``--report``, lint's FILE.orig
backups, clean's OUTDIR) is refused, exit 2 before anything is written, when it
is the same file as an input: the same path, a relative spelling of it, a hard
link or a symbolic link.  All data are invented (QSEM scenario).
"""

from __future__ import annotations

import json
import os
import re
from pathlib import Path

import pytest

from normform.cli import main
from normform.errors import UsageError
from normform.safety import refuse_overwrite, same_file
from test_venues_command import QSEM_BIB  # noqa: E402

RECORDS = [
    {"id": "Q000401-1", "type": "article-journal", "title": "Counting lattice paths in a strip",
     "container-title": "Trans. Amer. Math. Soc.", "volume": "312"},
    {"id": "Q000401-2", "type": "article-journal", "title": "Ordered trees in Dovecote",
     "container-title": "Transactions of the American Mathematical Society"},
]

LIBRARY = QSEM_BIB   # the invented curated library of the venues tests


# the first line differs from its library record (a typo, the venue abbreviated, another year):
# its score is not a round number, so the rounding of the written score shows
LINES = ("E. Marrowby and J. Tallowmere, Counting latice paths in a strip, Trans. Amer. Math. Soc. 312 (1990), 1-20.\n"
         "O. Fenwick. Ordered trees and Catalan numbers. Quillfeather Press, 2001.\n")


def _jsonl(path: Path) -> Path:
    path.write_text("".join(json.dumps(r) + "\n" for r in RECORDS), "utf-8")
    return path


def _refused(argv: list[str], capsys, *guarded: Path) -> str:
    """Run ``argv``; it must exit 2 and leave every guarded file byte for byte as it was."""
    before = {p: p.read_bytes() for p in guarded}
    assert main(argv) == 2
    err = capsys.readouterr().err
    for p, data in before.items():
        assert p.read_bytes() == data, f"{p} was overwritten"
    return err


def _links(tmp_path: Path, target: Path) -> dict[str, Path]:
    hard = tmp_path / ("hard-" + target.name)
    os.link(target, hard)
    soft = tmp_path / ("soft-" + target.name)
    soft.symlink_to(target.name)
    return {"same": target, "hard": hard, "soft": soft}


# -- the shared helper --------------------------------------------------------

def test_helper_same_file_by_path_link_and_spelling(tmp_path, monkeypatch):
    src = tmp_path / "in.jsonl"
    src.write_text("{}\n", "utf-8")
    links = _links(tmp_path, src)
    monkeypatch.chdir(tmp_path)
    for spelling in (str(src), "in.jsonl", "./sub/../in.jsonl", str(links["hard"]), str(links["soft"])):
        (tmp_path / "sub").mkdir(exist_ok=True)
        assert same_file(spelling, str(src)), spelling
        with pytest.raises(UsageError) as err:
            refuse_overwrite([("-o", spelling)], [("INPUT", str(src))])
        assert spelling in str(err.value) and str(src) in str(err.value)   # names both paths
    assert not same_file(str(tmp_path / "other.jsonl"), str(src))


def test_helper_allows_new_files_stdout_and_devices(tmp_path):
    src = tmp_path / "in.jsonl"
    src.write_text("{}\n", "utf-8")
    refuse_overwrite([("-o", str(tmp_path / "new.jsonl")), ("--report", None)], [("INPUT", str(src))])
    refuse_overwrite([("-o", "-")], [("INPUT", "-")])
    if os.path.exists(os.devnull):
        refuse_overwrite([("-o", os.devnull), ("--report", os.devnull)], [("INPUT", str(src))])


def test_helper_refuses_two_outputs_in_one_file(tmp_path):
    with pytest.raises(UsageError, match="same file"):
        refuse_overwrite([("-o", str(tmp_path / "a")), ("--report", str(tmp_path / "a"))], [])


# -- venues ---------------------------------------------------------------------

@pytest.mark.parametrize("how", ["same", "hard", "soft"])
@pytest.mark.parametrize("option", ["-o", "--report"])
def test_venues_refuses_output_on_input(tmp_path, capsys, option, how):
    src = _jsonl(tmp_path / "q.jsonl")
    target = _links(tmp_path, src)[how]
    other = ["--report", str(tmp_path / "r.txt")] if option == "-o" else ["-o", os.devnull]
    err = _refused(["venues", str(src), "--to", "abbreviated", option, str(target), *other], capsys, src)
    assert str(src) in err and str(target) in err and option in err
    assert not (tmp_path / "r.txt").exists()          # refused before anything is written


def test_venues_refuses_output_on_table_and_settings(tmp_path, capsys, monkeypatch):
    src = _jsonl(tmp_path / "q.jsonl")
    table = tmp_path / "house.tsv"
    table.write_text("full\tabbreviation\nBulletin of the Quillfeather Society\tBull. Quillfeather Soc.\n", "utf-8")
    err = _refused(["venues", str(src), "--to", "full", "--table", str(table), "-o", str(table)], capsys, table)
    assert "--table" in err
    # the settings file (and the table it names) are inputs too
    (tmp_path / "normform.toml").write_text('[venues]\ntable = "house.tsv"\n', "utf-8")
    monkeypatch.chdir(tmp_path)
    _refused(["venues", "q.jsonl", "--to", "full", "--report", "house.tsv"], capsys, table)
    _refused(["venues", "q.jsonl", "--to", "full", "-o", "normform.toml"], capsys, tmp_path / "normform.toml")


def test_venues_refuses_report_and_output_in_one_file(tmp_path, capsys):
    src = _jsonl(tmp_path / "q.jsonl")
    out = tmp_path / "both.txt"
    err = _refused(["venues", str(src), "--to", "full", "-o", str(out), "--report", str(out)], capsys, src)
    assert "-o" in err and "--report" in err and not out.exists()


def test_venues_still_writes_elsewhere_and_counts_in_words(tmp_path, capsys):
    src = _jsonl(tmp_path / "q.jsonl")
    out, report = tmp_path / "out.jsonl", tmp_path / "report.txt"
    assert main(["venues", str(src), "--to", "full", "-o", str(out), "--report", str(report)]) == 0
    text = report.read_text("utf-8")
    # one mapping (Trans. Amer. Math. Soc. -> the full title): "1 mapping", not "1 mappings"
    assert re.search(r"\b1 rewritten by 1 mapping,", text), text
    assert main(["venues", str(out), "--to", "abbreviated", "--report", str(tmp_path / "r2.txt")]) == 0
    assert "2 rewritten by 1 mapping," in (tmp_path / "r2.txt").read_text("utf-8")
    assert main(["venues", str(src), "--to", "full", "-o", os.devnull, "--report", str(tmp_path / "r3.txt")]) == 0
    src.write_text(json.dumps(RECORDS[1]) + "\n", "utf-8")       # nothing to rewrite
    assert main(["venues", str(src), "--to", "full", "-o", os.devnull, "--report", str(tmp_path / "r4.txt")]) == 0
    assert ": 1 record, 1 venue field, 0 rewritten by 0 mappings," in (tmp_path / "r4.txt").read_text("utf-8")


# -- match ------------------------------------------------------------------------

@pytest.mark.parametrize("how", ["same", "hard", "soft"])
@pytest.mark.parametrize("which", ["INPUT", "--against"])
def test_match_refuses_output_on_input_or_library(tmp_path, capsys, which, how):
    lines = tmp_path / "lines.txt"
    lines.write_text(LINES, "utf-8")
    library = tmp_path / "qsem.bib"
    library.write_text(LIBRARY, "utf-8")
    target = _links(tmp_path, lines if which == "INPUT" else library)[how]
    err = _refused(["match", str(lines), "--against", str(library), "-o", str(target)], capsys, lines, library)
    assert which in err and str(target) in err


@pytest.mark.parametrize("to", ["jsonl", "bibtex"])
def test_match_writes_the_score_rounded(tmp_path, capsys, to):
    lines = tmp_path / "lines.txt"
    lines.write_text(LINES, "utf-8")
    library = tmp_path / "qsem.bib"
    library.write_text(LIBRARY, "utf-8")
    out = tmp_path / ("out." + to)
    main(["match", str(lines), "--against", str(library), "--to", to, "-o", str(out)])
    text = out.read_text("utf-8")
    if to == "bibtex":
        scores = [float(s) for s in re.findall(r"normform-confidence = \{([0-9.]+)\}", text)]
    else:
        rows = [json.loads(line) for line in text.splitlines()]
        assert rows[0]["matched"]
        scores = [r["score"] for r in rows] + [r["record"]["custom"]["confidence"] for r in rows]
    assert scores and any(0 < s < 1 for s in scores)       # a score that is not a round number
    for s in scores:
        assert s == round(s, 4) and len(repr(s).split(".")[1]) <= 4, s


# -- convert, refs, clean -------------------------------------------------------------

@pytest.mark.parametrize("how", ["same", "hard", "soft"])
def test_convert_refuses_output_on_input(tmp_path, capsys, how):
    src = tmp_path / "lib.bib"
    src.write_text(LIBRARY, "utf-8")
    target = _links(tmp_path, src)[how]
    err = _refused(["convert", str(src), "--to", "csl-json", "-o", str(target)], capsys, src)
    assert "overwrite" in err and str(src) in err


def test_refs_has_no_file_output(tmp_path, capsys):
    """``refs`` writes standard output only: there is no output path that could be its input."""
    src = tmp_path / "lines.txt"
    src.write_text(LINES, "utf-8")
    _refused(["refs", str(src), "-o", str(src)], capsys, src)
    _refused(["refs", str(src), "--output", str(src)], capsys, src)


def test_clean_refuses_outdir_on_input(tmp_path, capsys):
    src = tmp_path / "legacy.txt"
    src.write_text(LINES, "utf-8")
    _refused(["clean", str(src), "-o", str(src), "--quiet", "--jobs", "1"], capsys, src)
    outdir = tmp_path / "out"
    outdir.mkdir()
    inside = outdir / "references.bib"          # an input that clean would write as an output
    inside.write_text(LIBRARY, "utf-8")
    _refused(["clean", str(inside), "-o", str(outdir), "--quiet", "--jobs", "1"], capsys, inside)


def test_clean_refuses_an_output_on_its_against_library(tmp_path, capsys):
    src = tmp_path / "legacy.txt"
    src.write_text(LINES, "utf-8")
    outdir = tmp_path / "out"
    outdir.mkdir()
    library = outdir / "references.bib"         # the curated library, where clean writes its BibTeX
    library.write_text(LIBRARY, "utf-8")
    err = _refused(["clean", str(src), "-o", str(outdir), "--against", str(library), "--quiet", "--jobs", "1"],
                   capsys, library)
    assert "--against" in err and str(library) in err


# -- lint --fix ------------------------------------------------------------------------

ENTRY = 'id = "{id}"\ntitle = "{title}"\nterms = [{terms}]\nformulas = ["{formula}"]\n'


def _entries(tmp_path: Path) -> tuple[Path, Path]:
    fixable = tmp_path / "Q000401.toml"       # the quoted term "1" is fixed to 1
    fixable.write_text(ENTRY.format(id="Q000401", title="Ones", terms='1, 1, 1, "1", 1, 1, 1, 1, 1, 1',
                                    formula="a(n) = 1"), "utf-8")
    clean = tmp_path / "Q000402.toml"
    clean.write_text(ENTRY.format(id="Q000402", title="Counting numbers", terms="1, 2, 3, 4, 5, 6, 7, 8, 9, 10",
                                  formula="a(n) = n + 1"), "utf-8")
    return fixable, clean


def test_lint_fix_writes_its_backup_beside_the_file(tmp_path, capsys):
    fixable, clean = _entries(tmp_path)
    original = fixable.read_text("utf-8")
    main(["lint", "--fix", str(fixable), str(clean)])
    assert (tmp_path / "Q000401.toml.orig").read_text("utf-8") == original
    assert '"1"' not in fixable.read_text("utf-8")


@pytest.mark.parametrize("how", ["soft", "named"])
def test_lint_fix_backup_never_overwrites_another_input(tmp_path, capsys, how):
    fixable, clean = _entries(tmp_path)
    backup = tmp_path / "Q000401.toml.orig"
    if how == "soft":        # the backup path is a link to another linted file
        backup.symlink_to(clean.name)
        guarded = clean
    else:                    # the backup path is itself a linted file
        backup.write_text(clean.read_text("utf-8"), "utf-8")
        guarded = backup
    err = _refused(["lint", "--fix", str(fixable), str(clean), *([str(backup)] if how == "named" else [])],
                   capsys, guarded, fixable)
    assert str(backup) in err
