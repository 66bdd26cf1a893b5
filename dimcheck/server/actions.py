"""The quick fix offered on a finding: a suppression comment on its line.

The comment is the one ``dimcheck check`` honours (``# dimcheck: ignore[DIM101]``): added
at the end of the line, or the code is added to a list the line already has.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from ..declarations.suppressions import is_suppressed, scan_line

# a list of codes, as declarations/suppressions.py reads it: where the edit adds one
_IGNORE_LIST = re.compile(r"#\s*dimcheck:\s*ignore\[([A-Za-z0-9,\s]*)\]")


@dataclass(frozen=True)
class LineEdit:
    """Replace ``line[start:end]`` with ``text`` (string indices on one line)."""

    start: int
    end: int
    text: str


def suppression_edit(line: str, code: str) -> LineEdit | None:
    """The edit that suppresses ``code`` on ``line``, or None when there is nothing to do
    (already suppressed) or no comment can go there (a backslash continues the line, or
    the line ends inside a string literal, where a comment would be text)."""
    if is_suppressed(code, line):
        return None
    comment_start, in_string = scan_line(line)
    if in_string:
        return None
    # only a comment's text counts, never a string's
    listed = _IGNORE_LIST.search(line, comment_start) if comment_start is not None else None
    if listed is not None:
        inside = listed.group(1)
        close = listed.end(1)
        if not any(part.strip() for part in inside.split(",")):  # an empty list: the code is its first
            return LineEdit(listed.start(1), close, code)
        kept = inside.rstrip()
        return LineEdit(listed.start(1) + len(kept), close, f", {code}")
    content = line.rstrip()
    if not content or content.endswith("\\"):
        return None
    return LineEdit(len(content), len(line), f" # dimcheck: ignore[{code}]")
