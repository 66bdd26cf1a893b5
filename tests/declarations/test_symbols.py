"""Shortcuts in reading what a module declares must give what the plain way gives."""

from __future__ import annotations

import ast
import os
import textwrap

import pytest

from dimcheck.declarations.symbols import _statements_within

STDLIB = os.path.dirname(os.__file__)
STDLIB_FILES = sorted(name for name in os.listdir(STDLIB) if name.endswith(".py"))[:80]


def walked_statements(definition: ast.AST) -> list[ast.stmt]:
    """The reference: every statement ``ast.walk`` meets inside the definition."""
    return [node for node in ast.walk(definition) if isinstance(node, ast.stmt) and node is not definition]


def test_statements_within_every_kind_of_block():
    tree = ast.parse(textwrap.dedent('''\
        def method(self):
            self.a = 1
            if flag:
                self.b = 2
            else:
                for item in items:
                    self.c = 3
            try:
                self.d = 4
            except ValueError:
                self.e = 5
            else:
                self.f = 6
            finally:
                self.g = 7
            with context:
                match value:
                    case 1:
                        self.h = 8
            def inner():
                self.i = 9
            return lambda: self.j
        '''))
    method = tree.body[0]
    assert list(_statements_within(method)) == walked_statements(method)


@pytest.mark.parametrize("name", STDLIB_FILES)
def test_statements_within_matches_ast_walk_on_stdlib_files(name):
    # the Python standard library as a body of real code (its own parser is the reference)
    try:
        with open(os.path.join(STDLIB, name), encoding="utf-8") as handle:
            tree = ast.parse(handle.read())
    except (SyntaxError, UnicodeDecodeError):
        pytest.skip("not parseable here")
    for node in ast.walk(tree):
        if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef, ast.ClassDef)):
            assert list(_statements_within(node)) == walked_statements(node), node.lineno
