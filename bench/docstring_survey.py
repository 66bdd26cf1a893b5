"""Survey: how many docstring unit declarations do large unannotated packages yield?

Walks the installed sources of scipy, numpy, sympy and pint (never importing or running
them: files are located with ``importlib.util.find_spec`` and read with ``ast``), takes
the docstring of every function and method, applies
``dimcheck.declarations.docstrings.docstring_units`` with a unit filter backed by
``dimcheck.units.parse_unit`` (``""`` and ``"-"`` are dimensionless), and prints the
number of declarations per package and each one as ``file:line name [unit]``.

The contract (section 6) measured 9 declarations for the four packages together.

    python bench/docstring_survey.py [--packages scipy numpy ...] [--quiet]
"""

from __future__ import annotations

import argparse
import ast
import importlib.util
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from dimcheck.declarations.docstrings import docstring_units  # noqa: E402
from dimcheck.units import load_unit_table, parse_unit  # noqa: E402

DEFAULT_PACKAGES = ("scipy", "numpy", "sympy", "pint")


def package_root(name: str) -> Path | None:
    spec = importlib.util.find_spec(name)
    if spec is None or not spec.submodule_search_locations:
        return None
    return Path(list(spec.submodule_search_locations)[0])


def make_is_unit():
    table = load_unit_table()

    def is_unit(text: str) -> bool:
        try:
            parse_unit(text, table)
        except Exception:  # UnitError and anything the parser might raise on odd text
            return False
        return True

    return is_unit


def function_docstrings(tree: ast.AST):
    """(first line of the docstring literal in the file, raw docstring) per function."""
    for node in ast.walk(tree):
        if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
            doc = ast.get_docstring(node, clean=False)
            if doc:
                yield node.body[0].lineno, doc


def survey(name: str, is_unit, root: Path) -> tuple[list[str], int, int]:
    found: list[str] = []
    files = docstrings = 0
    for path in sorted(root.rglob("*.py")):
        try:
            source = path.read_text(encoding="utf-8")
            tree = ast.parse(source, filename=str(path))
        except (SyntaxError, UnicodeDecodeError, ValueError, RecursionError, MemoryError, OSError):
            continue
        files += 1
        for first_line, doc in function_docstrings(tree):
            docstrings += 1
            for unit in docstring_units(doc, is_unit=is_unit):
                relative = path.relative_to(root.parent)
                found.append(f"{relative}:{first_line + unit.line - 1} {unit.name} [{unit.text}]")
    return found, files, docstrings


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--packages", nargs="+", default=list(DEFAULT_PACKAGES))
    parser.add_argument("--quiet", action="store_true", help="print the counts only")
    args = parser.parse_args(argv)
    is_unit = make_is_unit()
    total = 0
    summary = []
    started = time.perf_counter()
    for name in args.packages:
        root = package_root(name)
        if root is None:
            print(f"{name}: not installed")
            continue
        found, files, docstrings = survey(name, is_unit, root)
        total += len(found)
        summary.append(f"{name}: {len(found)} declarations ({files} files, {docstrings} function docstrings)")
        if not args.quiet:
            for item in found:
                print(item)
    for line in summary:
        print(line)
    print(f"total: {total} declarations in {time.perf_counter() - started:.1f} s")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
