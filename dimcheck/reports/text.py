"""``path:line:column: CODE message``, one finding a line (``path:cell N:line:column`` in notebooks)."""

from __future__ import annotations

_ESCAPES = {"\n": "\\n", "\r": "\\r", "\t": "\\t"}


def render(report) -> str:
    lines = []
    for finding in report.findings:
        where = f"{finding.path}:cell {finding.cell}" if finding.cell is not None else finding.path
        lines.append(_one_line(f"{where}:{finding.line}:{finding.column}: {finding.code} {finding.message}"))
    return "\n".join(lines) + ("\n" if lines else "")


def _one_line(text: str) -> str:
    """``text`` with its line breaks and other control characters escaped (a newline shows
    as backslash-n), so that a message quoting a unit like "zz\\nqq", or a file name holding
    a newline, still makes one line for grep and for the scripts that read this format."""
    if text.isprintable():  # the usual case: nothing to escape
        return text
    return "".join(_escape(char) for char in text)


def _escape(char: str) -> str:
    if char in _ESCAPES:
        return _ESCAPES[char]
    import unicodedata  # only for a message that needs escaping: most never do

    # control characters and the Unicode line and paragraph separators, which editors and
    # str.splitlines treat as line breaks; other characters (accents, spaces) stay as written
    if unicodedata.category(char) in ("Cc", "Zl", "Zp"):
        return f"\\x{ord(char):02x}" if ord(char) < 0x100 else f"\\u{ord(char):04x}"
    return char
