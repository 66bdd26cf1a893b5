"""Helpers that let a test state a snippet and the findings it must give."""

import textwrap

from dimcheck import check_source


def findings(source: str, **options):
    return check_source(textwrap.dedent(source), **options)


def codes(source: str, **options) -> list[tuple[int, str]]:
    """(line, code) pairs, in report order."""
    return [(f.line, f.code) for f in findings(source, **options)]


HEADER = "from typing import Annotated\nimport math\nimport numpy as np\n"


def codes_with_header(body: str, **options) -> list[tuple[int, str]]:
    """Like ``codes`` with the usual imports on lines 1-3, so snippets start at line 4."""
    return codes(HEADER + textwrap.dedent(body), **options)
