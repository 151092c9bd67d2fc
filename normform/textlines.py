"""Read line-oriented input byte-exactly: line numbers, byte offsets, UTF-8 problems.

Shared by every command that reads one record per line, so that a BOM, CRLF
line ends and invalid UTF-8 are handled the same way everywhere: invalid
bytes are reported with their offset and the line is kept (decoded with
replacement characters), never dropped.
"""

from __future__ import annotations

from typing import BinaryIO, Iterator


def physical_lines(handle: BinaryIO) -> Iterator[tuple[int, int, bytes]]:
    """(1-based line number, byte offset of the line's text, bytes without EOL)."""
    offset = 0
    for lineno, raw in enumerate(handle, start=1):
        start = offset
        offset += len(raw)
        body = raw.rstrip(b"\n").rstrip(b"\r")
        if lineno == 1 and body.startswith(b"\xef\xbb\xbf"):   # UTF-8 BOM
            body, start = body[3:], start + 3
        yield lineno, start, body


def decode_line(raw: bytes, offset: int) -> tuple[str, int | None]:
    """The line's text and, when it is not valid UTF-8, the byte offset of the first bad byte."""
    try:
        return raw.decode("utf-8"), None
    except UnicodeDecodeError as exc:
        return raw.decode("utf-8", errors="replace"), offset + exc.start
