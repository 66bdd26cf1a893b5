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
    match = _IGNORE.search(line_text)
    if match is None:
        return None
    if match.group(1) is None:
        return ALL_CODES
    return frozenset(code.strip().upper() for code in match.group(1).split(",") if code.strip())


def is_suppressed(code: str, line_text: str) -> bool:
    codes = ignored_codes(line_text)
    return codes is not None and (codes is ALL_CODES or code in codes)
