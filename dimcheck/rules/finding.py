"""Findings as data: the checker creates them, the reporters turn them into text."""

from __future__ import annotations

import os
from collections import namedtuple

from .registry import RULES


def display_path(path: str) -> str:
    """Paths in reports are relative to the current directory (contract, section 4)."""
    try:
        return os.path.relpath(path)
    except ValueError:  # another drive on Windows: no relative path exists
        return path


class Finding(namedtuple("Finding", "path line column end_line end_column code message cell",
                         defaults=(None,))):
    """One finding: the file, 1-based line and column where it starts, the line and the
    1-based column where it ends (exclusive), the rule code, the message, and the 1-based
    notebook cell when the file is a notebook (else None). See the note in registry.py."""

    __slots__ = ()

    @property
    def name(self) -> str:
        return RULES[self.code].name

    @property
    def severity(self) -> str:
        return RULES[self.code].severity

    def sort_key(self) -> tuple:
        return (self.path, self.cell or 0, self.line, self.column, self.code, self.message)
