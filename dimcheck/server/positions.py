"""Columns in their three currencies.

``ast`` counts UTF-8 bytes, Python strings count code points, and an LSP client counts
UTF-16 code units unless it negotiated UTF-8 or UTF-32. Lines end at ``\\n``, ``\\r\\n`` or
``\\r``, for ``ast`` and for LSP alike.
"""

from __future__ import annotations

import re

_LINE_BREAK = re.compile(r"\r\n|\r|\n")

UTF8, UTF16, UTF32 = "utf-8", "utf-16", "utf-32"


def split_lines(text: str) -> list[str]:
    return _LINE_BREAK.split(text)


def byte_to_char(line: str, byte_column: int) -> int:
    """An ``ast`` column (UTF-8 bytes) as an index into the line's string."""
    if line.isascii():
        return min(byte_column, len(line))
    return len(line.encode("utf-8")[:byte_column].decode("utf-8", errors="ignore"))


def char_to_byte(line: str, column: int) -> int:
    if line.isascii():
        return column
    return len(line[:column].encode("utf-8"))


def to_client(line: str, column: int, encoding: str = UTF16) -> int:
    """A string index as the client counts it."""
    prefix = line[:column]
    if encoding == UTF32 or prefix.isascii():
        return len(prefix)
    if encoding == UTF8:
        return len(prefix.encode("utf-8"))
    return len(prefix.encode("utf-16-le")) // 2


def from_client(line: str, units: int, encoding: str = UTF16) -> int:
    """A client's column as a string index (clamped to the line)."""
    if encoding == UTF32 or line.isascii():
        return max(0, min(units, len(line)))
    counted = 0
    for index, char in enumerate(line):
        if counted >= units:
            return index
        point = ord(char)
        if encoding == UTF8:
            counted += 1 if point < 0x80 else 2 if point < 0x800 else 3 if point < 0x10000 else 4
        else:
            counted += 2 if point >= 0x10000 else 1
    return len(line)
