"""Units declared in trailing comments: ``g = 9.80665  # [m/s^2] standard gravity``.

Strings are matched before comments (the same tokens the stdlib tokenizer reads), so a
``#`` inside a string is never mistaken for a comment. A bracket is a declaration only when it opens the comment, is closed, is
followed by whitespace or the end of the comment, and holds nothing a unit expression
never uses (a comma, ``=``, quotes, ``...``): real code has many comments such as
``# [1]_ Eq. 4`` or ``# [3*(1-x)**2, ...]`` that are citations or code, not units.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

# Characters that never appear in a unit expression; a bracket holding one is prose.
_NOT_UNIT_CHARS = re.compile(r"[,=;:+#'\"`{}<>!?@&|\\]|\.\.\.")


@dataclass(frozen=True, slots=True)
class CommentUnit:
    line: int
    column: int  # 1-based column of the unit text inside the comment
    text: str  # the bracket's content, stripped; "" and "-" mean dimensionless


def read_bracket(comment: str) -> tuple[str, int] | None:
    """The unit text of a comment that starts with a bracketed unit, and its offset."""
    body = comment.lstrip("#")
    stripped = body.lstrip()
    if not stripped.startswith("["):
        return None
    close = stripped.find("]")
    if close < 0:
        return None
    after = stripped[close + 1 : close + 2]
    if after and not after.isspace():
        return None  # "[1]_ Eq. 4": a citation, not a unit
    content = stripped[1:close]
    if "[" in content or _NOT_UNIT_CHARS.search(content):
        return None
    if content.strip().isdigit() and content.strip() != "1":
        return None  # "[4] pg. 220": a reference number, not a unit
    offset = len(comment) - len(stripped) + 1
    return content.strip(), offset


_CANDIDATE_COMMENT = re.compile(r"#\s*\[[^\n#]*")  # a unit never holds "#"


def _has_candidate(source: str) -> bool:
    """A cheap text scan: is there any ``# [...]`` that would read as a unit? Only then
    is the file tokenized (which tells real comments from ``#`` inside strings)."""
    return any(read_bracket(match.group()) is not None for match in _CANDIDATE_COMMENT.finditer(source))


# Strings and comments, in the order they appear: a ``#`` inside a string is matched as
# part of the string, so every "comment" match is a real comment. This reads the same
# tokens as the stdlib tokenizer for source that parses, in C rather than Python.
_STRING_OR_COMMENT = re.compile(r"""
    (?P<string>'\'\'(?:[^\\]|\\.)*?'\'\'|\"\"\"(?:[^\\]|\\.)*?\"\"\"
        |'(?:[^\\'\n]|\\.)*'|"(?:[^\\"\n]|\\.)*")
    |(?P<comment>\#[^\n]*)
""", re.S | re.X)


def trailing_comment_units(source: str) -> dict[int, CommentUnit]:
    """Map line number -> unit declared by a trailing comment on that line.

    Comments alone on their line are ignored: the contract reads only comments that
    trail code (an assignment or a parameter of a multi-line signature).
    """
    if not _has_candidate(source):
        return {}
    source = source.replace("\r\n", "\n").replace("\r", "\n")  # lone \r ends a line too
    found: dict[int, CommentUnit] = {}
    line, line_start, counted = 1, 0, 0
    for match in _STRING_OR_COMMENT.finditer(source):
        if match.lastgroup != "comment":
            continue
        start = match.start()
        line += source.count("\n", counted, start)
        counted = start
        line_start = source.rfind("\n", 0, start) + 1
        if not source[line_start:start].strip():
            continue  # nothing but the comment on its line
        parsed = read_bracket(match.group())
        if parsed is not None:
            text, offset = parsed
            found[line] = CommentUnit(line, start - line_start + offset + 1, text)
    return found
