"""Rules about ``programs``: a known language tag; Python that compiles."""

from __future__ import annotations

from normform.lint.findings import Fix
from normform.lint.registry import rule


def _programs(entry):
    programs = entry.data.get("programs")
    if isinstance(programs, list):
        for i, item in enumerate(programs):
            if isinstance(item, dict):
                yield i, item


@rule("program-language", "programs", "warning", "a program has no language tag or an unknown one (setting languages)",
      fixable=True)
def program_language(entry, ctx):
    known = [name.lower() for name in ctx.settings.languages]
    for i, item in _programs(entry):
        tag = item.get("language")
        if tag is None:
            yield entry.finding(program_language.rule, "add a language tag, e.g. `language = \"python\"`; "
                                f"known: {', '.join(known)}", ("programs", i))
        elif isinstance(tag, str) and tag not in known:
            path = ("programs", i, "language")
            fixed = tag.strip().lower()
            if fixed in known:
                yield entry.finding(program_language.rule, f"write the language tag as {fixed!r}", path,
                                    fix=Fix("normalise the language tag", (entry.replace_value(path, fixed),)))
            else:
                yield entry.finding(program_language.rule, f"unknown language tag {tag!r}; use one of: "
                                    f"{', '.join(known)} (or add it to the languages setting)", path)


@rule("python-syntax", "programs", "error", "a Python program does not compile (it is parsed, never run)")
def python_syntax(entry, ctx):
    import ast
    import warnings

    for i, item in _programs(entry):
        code = item.get("code")
        if not isinstance(code, str) or str(item.get("language", "")).strip().lower() != "python":
            continue
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")      # e.g. invalid escape sequences in the code
                ast.parse(code, filename="<program>")
        except SyntaxError as exc:
            path = ("programs", i, "code")
            lines = code.split("\n")
            line = min(max(exc.lineno or 1, 1), len(lines))
            index = sum(len(x) + 1 for x in lines[: line - 1]) + max((exc.offset or 1) - 1, 0)
            yield entry.finding(python_syntax.rule, f"this Python code does not compile: {exc.msg} "
                                f"(line {line} of the program)", path, span=entry.string_span(path, min(index, len(code))))
