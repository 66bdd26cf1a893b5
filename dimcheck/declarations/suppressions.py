"""``# dimcheck: ignore[...]`` and ``# dimcheck: skip-file`` comments."""

from __future__ import annotations

import re

_SKIP_FILE = re.compile(r"#\s*dimcheck:\s*skip-file\b")
_IGNORE = re.compile(r"#\s*dimcheck:\s*ignore(?:\[([A-Za-z0-9,\s]*)\])?")

ALL_CODES = frozenset({"*"})


def skips_file(source: str) -> bool:
    # the substring test first: the pattern would stop at every "#" of every file
    return "skip-file" in source and _SKIP_FILE.search(source) is not None


def ignored_codes(line_text: str) -> frozenset[str] | None:
    """Codes suppressed on a line: None when none, ``ALL_CODES`` for a bare ignore."""
    if "dimcheck" not in line_text:
        return None
    comment_start, _ = scan_line(line_text)  # the same text inside a string suppresses nothing
    match = _IGNORE.search(line_text, comment_start) if comment_start is not None else None
    if match is None:
        return None
    if match.group(1) is None:
        return ALL_CODES
    return frozenset(code.strip().upper() for code in match.group(1).split(",") if code.strip())


def is_suppressed(code: str, line_text: str) -> bool:
    codes = ignored_codes(line_text)
    return codes is not None and (codes is ALL_CODES or _covers(codes, code))


def _covers(codes, code: str) -> bool:
    """Whether a list of codes names ``code``, in full or by a prefix (``DIM2``), as
    ``--ignore`` reads them."""
    return code in codes or any(code.startswith(listed) for listed in codes if listed)


def scan_line(line: str) -> tuple[int | None, bool]:
    """Where the line's comment starts (None without one), and whether the line ends inside
    a string literal that it opens (a triple-quoted one going on to the next line). Strings
    opened on an earlier line are not seen."""
    quote = None
    index = 0
    while index < len(line):
        char = line[index]
        if quote is not None:
            if char == "\\":
                index += 2
                continue
            if line.startswith(quote, index):
                index += len(quote)
                quote = None
                continue
        elif char == "#":
            return index, False
        elif char in "'\"":
            quote = line[index:index + 3] if line[index:index + 3] in ('"""', "'''") else char
            index += len(quote)
            continue
        index += 1
    return None, quote is not None
