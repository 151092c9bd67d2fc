"""Command-line entry point: ``normform COMMAND ...``.

Each command lives in its own module exposing ``configure(parser)`` and
``run(args) -> int``; only the chosen command's module is imported, which
keeps start-up fast (a pre-commit hook runs us once per commit).

Exit codes, for every command: 0 clean, 1 data errors / findings, 2 usage or I/O errors.
"""

from __future__ import annotations

import argparse
import importlib
import sys

from normform import __version__
from normform.errors import UsageError  # re-exported: commands raise normform.cli.UsageError

# command -> (module, one-line help)
COMMANDS: dict[str, tuple[str, str]] = {
    "clean": ("normform.batch.command", "batch-clean a legacy collection into records, BibTeX and a review report"),
    "convert": ("normform.export.command", "convert BibTeX / CSL-JSON files to BibTeX, CSL-JSON or plain text"),
    "refs": ("normform.refs.command", "parse free-form reference lines, one record per line"),
    "formula": ("normform.formula.command", "parse plain-text formulas; render MathML, LaTeX, ASCII; compute terms"),
    "check": ("normform.formula.check_command", "check that formulas produce the given terms"),
    "lint": ("normform.lint.command", "lint catalogue entries before they are accepted"),
    "venues": ("normform.venues.command", "abbreviate or expand venue names consistently (ISO 4)"),
    "match": ("normform.venues.match_command", "match reference lines against a curated bibliography and enrich them"),
}


def _top_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="normform",
        description="Clean legacy references and plain-text formulas of mathematical collections.",
        formatter_class=argparse.RawDescriptionHelpFormatter,
        epilog="commands:\n" + "\n".join(f"  {name:<9} {text}" for name, (_, text) in COMMANDS.items()),
    )
    parser.add_argument("--version", action="version", version=f"normform {__version__}")
    parser.add_argument("command", nargs="?", help="one of the commands below")
    return parser


def main(argv: list[str] | None = None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    top = _top_parser()
    if not argv or argv[0].startswith("-"):
        top.parse_args(argv)  # handles --help / --version and exits
        top.print_help(sys.stderr)
        return 2
    name, rest = argv[0], argv[1:]
    if name not in COMMANDS:
        top.print_usage(sys.stderr)
        print(f"normform: unknown command {name!r}; choose from {', '.join(COMMANDS)}", file=sys.stderr)
        return 2
    module_name, text = COMMANDS[name]
    module = importlib.import_module(module_name)
    parser = argparse.ArgumentParser(prog=f"normform {name}", description=text)
    module.configure(parser)
    try:
        args = parser.parse_args(rest)
    except SystemExit as exc:  # argparse: 0 for --help, 2 for usage errors
        return int(exc.code or 0)
    try:
        return int(module.run(args) or 0)
    except UsageError as exc:
        print(f"normform {name}: {exc}", file=sys.stderr)
        return 2
    except BrokenPipeError:  # `normform refs big.txt | head` is fine
        return 0
    except KeyboardInterrupt:
        print(f"normform {name}: interrupted", file=sys.stderr)
        return 130


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
