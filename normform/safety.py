"""normform never overwrites its input: one check for every command that writes files.

:func:`refuse_overwrite` is called before anything is written.  It refuses
(``UsageError``, exit 2) an output path that is the same file as an input of
the command, or as another output of it: the same path once resolved, or
``os.path.samefile`` when both exist (so hard links and symbolic links count
as the same file).  ``-`` (standard input / output) and ``None`` are skipped,
and so are inputs that are not regular files (``/dev/stdin``, a pipe): those
cannot be overwritten by writing to them.
"""

from __future__ import annotations

import os
import stat
from typing import Iterable, Optional, Tuple

Named = Tuple[str, Optional[str]]   # (how the command names it: "-o", "INPUT", "--against"; the path)


def _regular_or_missing(path: str) -> bool:
    try:
        return stat.S_ISREG(os.stat(path).st_mode)
    except OSError:
        return True     # missing (or unreadable): compared by its resolved path


def same_file(a: str, b: str) -> bool:
    """``a`` and ``b`` name one file: samefile when both exist, else the same resolved path."""
    try:
        if os.path.samefile(a, b):
            return True
    except OSError:
        pass
    return os.path.normcase(os.path.realpath(a)) == os.path.normcase(os.path.realpath(b))


def _given(items: Iterable[Named]) -> list[tuple[str, str]]:
    return [(label, os.fspath(path)) for label, path in items if path is not None and os.fspath(path) != "-"]


def refuse_overwrite(outputs: Iterable[Named], inputs: Iterable[Named]) -> None:
    """Raise :class:`normform.errors.UsageError` when an output would overwrite an input
    (or another output); the message names both paths."""
    from normform.errors import UsageError

    outs, ins = _given(outputs), _given(inputs)
    for out_label, out in outs:
        for in_label, src in ins:
            if _regular_or_missing(src) and same_file(out, src):
                raise UsageError(f"refusing to overwrite the input {in_label} {src} with {out_label} {out}: "
                                 "they are the same file; normform never overwrites its input, "
                                 "choose another output file")
    for i, (label_a, a) in enumerate(outs):
        for label_b, b in outs[i + 1:]:
            if _regular_or_missing(a) and same_file(a, b):
                raise UsageError(f"{label_a} {a} and {label_b} {b} are the same file; "
                                 "give each output its own file")
