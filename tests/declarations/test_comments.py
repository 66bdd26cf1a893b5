"""Trailing-comment units are found by a regular-expression scan of strings and comments.
These tests hold it to the stdlib tokenizer, which is the reference for what is a comment
and which lines carry code: on tricky hand-written cases and on real source files."""

from __future__ import annotations

import ast
import io
import os
import tokenize

import pytest

from dimcheck.declarations.comments import CommentUnit, read_bracket, trailing_comment_units


def reference_units(source: str) -> dict[int, CommentUnit]:
    """The same question answered with the stdlib tokenizer (slow, in Python, but exact)."""
    source = source.replace("\r\n", "\n").replace("\r", "\n")
    found: dict[int, CommentUnit] = {}
    code_on_line: set[int] = set()
    for token in tokenize.generate_tokens(io.StringIO(source).readline):
        if token.type == tokenize.COMMENT:
            line, col = token.start
            parsed = read_bracket(token.string) if line in code_on_line else None
            if parsed is not None:
                found[line] = CommentUnit(line, col + parsed[1] + 1, parsed[0])
        elif token.type not in (tokenize.NL, tokenize.NEWLINE, tokenize.INDENT, tokenize.DEDENT,
                                tokenize.ENCODING, tokenize.ENDMARKER):
            code_on_line.update(range(token.start[0], token.end[0] + 1))
    return found


TRICKY = {
    "plain": "g = 9.81  # [m/s^2]\n",
    "alone on its line": "# [m]\nx = 1\n",
    "hash in a string": "s = 'a # [m]'\nt = \"# [kg]\"  # [s]\n",
    "docstring with a bracket": 'def f():\n    """x = 1  # [m]\n    """\n    return 1  # [1]\n',
    "end of a triple-quoted string": 's = """one\ntwo"""  # [m]\n',
    "escaped quotes": "s = 'it\\'s # [m]'  # [kg]\nt = \"a\\\"b # [s]\"\n",
    "raw string with a backslash": "p = r'\\d+ # [m]'  # [Pa]\n",
    "bytes and f-strings": "b = b'# [m]'  # [N]\nf = f'{b!r} # [m]'  # [J]\n",
    "continuation in brackets": "x = f(\n    1,  # [m]\n    # [kg]\n    2)  # [s]\n",
    "backslash continuation": "x = 1 + \\\n    2  # [m]\n",
    "lone carriage returns": "a = 1  # [m]\rb = 2  # [s]\r",
    "windows line ends": "a = 1  # [m]\r\nb = 2\r\n",
    "form feed": "\x0ca = 1  # [m]\n",
    "non-ASCII before the comment": "longueur = 'été'  # [m]\n",
    "nested quotes in triple": "s = '''a \"b\" 'c' # [m]'''  # [K]\n",
    "citation, not a unit": "x = 1  # [1]_ Eq. 4\ny = 2  # [3*(1-x)**2, ...]\n",
}


@pytest.mark.parametrize("source", TRICKY.values(), ids=TRICKY.keys())
def test_agrees_with_the_tokenizer_on_tricky_source(source):
    ast.parse(source)  # the scan is only ever run on source that parses
    assert trailing_comment_units(source) == reference_units(source)


def _stdlib_sample(count: int) -> list[str]:
    folder = os.path.dirname(ast.__file__)
    names = sorted(name for name in os.listdir(folder) if name.endswith(".py"))
    return [os.path.join(folder, name) for name in names[:count]]


@pytest.mark.parametrize("path", _stdlib_sample(60), ids=os.path.basename)
def test_agrees_with_the_tokenizer_on_real_files(path):
    # Real code from the standard library: many comments, strings holding '#', brackets.
    with open(path, encoding="utf-8") as handle:
        source = handle.read()
    try:
        ast.parse(source)
    except SyntaxError:
        pytest.skip("does not parse on this Python")
    # give every comment a bracket so that the comparison is not vacuous
    bracketed = source.replace("# ", "# [m] ")
    try:
        expected = reference_units(bracketed)
    except (tokenize.TokenError, SyntaxError):
        pytest.skip("the tokenizer refuses the rewritten file")
    assert trailing_comment_units(bracketed) == expected
