"""``dimcheck explain FILE:LINE[:COL]``: how the dimension of each part of a line was found.

The file is checked as usual while an observer records the value of every expression on
the line; the expressions are then printed as a tree, innermost last, each with its unit,
dimension and quantity kind, down to the declarations the names came from.
"""

from __future__ import annotations

import ast
import os
from dataclasses import dataclass

from ..inference.values import Bare, FunctionValue, Quantity, TupleValue, Unknown
from ..rules.kinds import kind_of


@dataclass
class Target:
    path: str
    line: int
    column: int | None


class ExplainError(Exception):
    """A one-line problem with the request (bad location, unreadable file)."""


def parse_target(text: str) -> Target:
    parts = text.rsplit(":", 2)
    numbers = []
    while len(parts) > 1 and parts[-1].isdigit():
        numbers.insert(0, int(parts.pop()))
    if not numbers:
        raise ExplainError(f"expected FILE:LINE or FILE:LINE:COL, got {text!r}")
    path = ":".join(parts)
    if len(numbers) == 1:
        return Target(path, numbers[0], None)
    return Target(path, numbers[0], numbers[1])


def describe_value(value) -> str:
    if isinstance(value, Quantity):
        kind = kind_of(value.dimension)
        text = value.describe() + (f" {kind}" if kind else "")
        if value.offset:
            text += ", absolute temperature"
        if value.scales is not None and len(value.scales) > 1:
            text += f" (scale candidates {', '.join(f'{s:g}' for s in value.scales)})"
        return text
    if isinstance(value, Bare):
        return f"bare number {value.value!r} (takes the unit it meets)"
    if isinstance(value, TupleValue):
        return "(" + ", ".join(describe_value(item) for item in value.items) + ")"
    if isinstance(value, FunctionValue):
        return f"function {value.function.qualname}()"
    if isinstance(value, Unknown):
        return "unknown"
    return type(value).__name__.replace("Value", "").lower()


def _origin(value, base: str) -> str:
    origin = getattr(value, "origin", None)
    if origin is None:
        return ""
    where = os.path.relpath(origin.path, base) if not origin.kind == "stub" else os.path.basename(origin.path)
    return f"  <- declared by {origin.kind} at {where}:{origin.line}"


def explain(target: Target, config=None) -> list[str]:
    from ..runner import Checker
    from ..inference.engine import Engine

    if not os.path.isfile(target.path):
        raise ExplainError(f"file not found: {target.path}")
    checker = Checker(config)
    project = checker.new_project()
    loaded = project.load(target.path)
    if loaded.symbols is None:
        raise ExplainError(f"{target.path}: {loaded.error.message}")
    module = loaded.symbols
    seen: dict[int, object] = {}

    def observe(observed_module, node, value):
        if observed_module is module and getattr(node, "lineno", None) is not None \
                and node.lineno <= target.line <= (node.end_lineno or node.lineno):
            seen.setdefault(id(node), value)

    engine = Engine(project, checker.table)
    engine.observer = observe
    problems = engine.check_module(module)
    if not project.can_have_units(module):
        return [f"{target.path}:{target.line}: nothing here can carry a unit "
                f"(no declaration reaches this module)"]
    roots = _roots_on_line(module.tree, target)
    if not roots:
        raise ExplainError(f"{target.path}:{target.line}: no expression on this line")
    base = os.getcwd()
    lines = []
    for root in roots:
        _render(root, seen, module.source, base, 0, lines)
    from ..runner import finding_message
    for located in problems:
        if located.line == target.line:
            lines.append(f"finding: {located.problem.code} {finding_message(located)}")
    return lines


def _roots_on_line(tree: ast.Module, target: Target) -> list[ast.expr]:
    """The outermost expressions that start on the line (or the innermost one at COL)."""
    candidates = [node for node in ast.walk(tree) if isinstance(node, ast.expr)
                  and node.lineno <= target.line <= (node.end_lineno or node.lineno)
                  and not isinstance(getattr(node, "ctx", None), ast.Store)]
    if target.column is not None:
        column = target.column - 1
        starting = [node for node in candidates if node.lineno == target.line and node.col_offset == column]
        if starting:  # the whole expression a finding points at
            return [max(starting, key=lambda node: (node.end_lineno, node.end_col_offset))]
        at = [node for node in candidates if node.lineno == target.line and node.col_offset <= column
              and (node.end_lineno > target.line or column < node.end_col_offset)]
        if not at:
            return []
        return [min(at, key=lambda node: (node.end_lineno - node.lineno, node.end_col_offset - node.col_offset))]
    inside = {id(child) for node in candidates for child in ast.iter_child_nodes(node)}
    roots = [node for node in candidates if id(node) not in inside]
    return sorted(roots, key=lambda node: (node.lineno, node.col_offset))


_LEAVES = (ast.Name, ast.Constant, ast.Attribute)


def _render(node, seen, source, base, depth, lines) -> None:
    if isinstance(node, (ast.expr_context, ast.operator, ast.cmpop, ast.unaryop, ast.boolop)):
        return
    text = ast.get_source_segment(source, node) or type(node).__name__
    text = " ".join(text.split())
    if len(text) > 60:
        text = text[:57] + "..."
    value = seen.get(id(node))
    described = describe_value(value) if value is not None else "not evaluated"
    lines.append(f"{'  ' * depth}{text}: {described}{_origin(value, base)}")
    if isinstance(node, _LEAVES) and not isinstance(node, ast.Attribute):
        return
    for child in ast.iter_child_nodes(node):
        if isinstance(child, ast.expr) and not (isinstance(node, ast.Call) and child is node.func):
            _render(child, seen, source, base, depth + 1, lines)
        elif isinstance(child, ast.keyword):
            _render(child.value, seen, source, base, depth + 1, lines)
