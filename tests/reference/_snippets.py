"""Helpers for the reference tests: run the checker on a snippet, get (line, code) pairs.

Every snippet gets the same three import lines first, so the snippet's own lines start at 4.
"""

from __future__ import annotations

import textwrap

from dimcheck import check_source

HEADER = "from typing import Annotated\nimport math\nimport numpy as np\n"
FIRST_LINE = 4


def findings(body: str):
    return check_source(HEADER + textwrap.dedent(body), filename="reference_snippet.py")


def codes(body: str) -> list[tuple[int, str]]:
    """(line, code) pairs, in report order."""
    return [(f.line, f.code) for f in findings(body)]


def annotated(unit: str) -> str:
    return f'Annotated[float, "{unit}"]'


def signature(params: dict[str, str]) -> str:
    return ", ".join(f"{name}: {annotated(unit)}" for name, unit in params.items())
