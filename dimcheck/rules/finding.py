"""Findings as data: the checker creates them, the reporters turn them into text."""

from __future__ import annotations

import os
from typing import NamedTuple

from .registry import RULES


def display_path(path: str) -> str:
    """Paths in reports are relative to the current directory (contract, section 4)."""
    try:
        return os.path.relpath(path)
    except ValueError:  # another drive on Windows: no relative path exists
        return path


class Finding(NamedTuple):
    path: str
    line: int
    column: int  # 1-based
    end_line: int
    end_column: int  # 1-based, exclusive
    code: str
    message: str
    cell: int | None = None  # 1-based notebook cell, when the file is a notebook

    @property
    def name(self) -> str:
        return RULES[self.code].name

    @property
    def severity(self) -> str:
        return RULES[self.code].severity

    def sort_key(self) -> tuple:
        return (self.path, self.cell or 0, self.line, self.column, self.code, self.message)
