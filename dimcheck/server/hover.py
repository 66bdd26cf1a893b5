"""What a hover shows: the unit, dimension and kind of the innermost expression under the
cursor, and where a declared unit came from.

The values come from an observer on the inference pass (as for ``dimcheck explain``).
Places that bind rather than evaluate (an assignment's target, a parameter, a ``def``
line) are answered from their declaration, or from the value bound there.
"""

from __future__ import annotations

import ast
import os
from dataclasses import dataclass

from ..analysis.explain import describe_value
from ..declarations.symbols import FunctionInfo, comment_spec, read_annotation
from ..inference.values import Bare, FunctionValue, Quantity, TupleValue

Point = tuple[int, int]  # (1-based line, UTF-8 byte column), as ast counts


@dataclass(frozen=True)
class HoverText:
    markdown: str
    node: ast.AST | None  # the expression (or binding) described, for the highlighted range


def contains(node: ast.AST, point: Point) -> bool:
    start = (node.lineno, node.col_offset)
    end = (node.end_lineno or node.lineno, node.end_col_offset if node.end_col_offset is not None
           else node.col_offset)
    return start <= point < end


def _located_children(node: ast.AST):
    if node.__class__ is ast.JoinedStr:
        # an f-string: before Python 3.12 its text and field nodes all claim the whole
        # string's span, so go straight to each field's expression, which has its own
        for part in node.values:
            if part.__class__ is ast.FormattedValue:
                yield part.value
        return
    for child in ast.iter_child_nodes(node):
        if hasattr(child, "lineno"):
            yield child
        else:  # arguments, comprehension, operators: look through them
            yield from _located_children(child)


def enclosing_chain(tree: ast.Module, point: Point) -> list[ast.AST]:
    """The nodes around ``point``, outermost first (a loop: deep code cannot break it)."""
    chain: list[ast.AST] = []
    node: ast.AST = tree
    while True:
        inner = next((child for child in _located_children(node) if contains(child, point)), None)
        if inner is None:
            return chain
        chain.append(inner)
        node = inner


def statement_lines(tree: ast.Module, point: Point) -> tuple[int, int]:
    """The lines of the innermost statement at ``point`` (the point's line if none)."""
    statements = [node for node in enclosing_chain(tree, point) if isinstance(node, ast.stmt)]
    if not statements:
        return point[0], point[0]
    innermost = statements[-1]
    return innermost.lineno, innermost.end_lineno or innermost.lineno


def hover_text(engine, module, point: Point, seen: dict[int, object]) -> HoverText | None:
    """The hover for ``point`` from the values ``seen`` by the observer (keyed by node id)."""
    chain = enclosing_chain(module.tree, point)
    base = os.path.dirname(os.path.abspath(module.path))
    for depth in range(len(chain) - 1, -1, -1):
        node = chain[depth]
        parent = chain[depth - 1] if depth else None
        if isinstance(node, ast.stmt):
            if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)) and point[0] == node.lineno:
                function = _function_info(module, node)
                if function is not None:
                    return HoverText(f"```text\n{signature(engine, function)}\n```", None)
            return None  # between expressions: nothing under the cursor
        if isinstance(node, ast.arg):
            text = _parameter(engine, module, node, parent, base)
        elif isinstance(getattr(node, "ctx", None), ast.Store):
            text = _binding(engine, module, node, parent, seen, base)
        elif id(node) in seen:
            text = _value_text(engine, seen[id(node)], base)
        else:
            continue
        if text is None:
            return None
        return HoverText(f"`{_snippet(module.source, node)}`: {text}", node)
    return None


def _value_text(engine, value, base: str) -> str | None:
    if isinstance(value, FunctionValue):
        return f"\n```text\n{signature(engine, value.function)}\n```"
    if not isinstance(value, (Quantity, Bare, TupleValue)):
        return None  # unknown, modules, classes: nothing about units to say
    text = describe_value(value)
    origin = getattr(value, "origin", None)
    if origin is not None:
        text += f"  \ndeclared by {origin.kind} at {_where(origin, base)}"
    return text


def _where(origin, base: str) -> str:
    if origin.kind == "stub":
        return f"{os.path.basename(origin.path)}:{origin.line}"
    relative = os.path.relpath(origin.path, base)
    return f"{origin.path if relative.startswith('..') else relative}:{origin.line}"


def _declared_text(engine, module, spec, base: str) -> str | None:
    value = engine.declared(module, spec)
    if isinstance(value, Quantity):
        return _value_text(engine, value, base)
    return None


def _binding(engine, module, node, statement, seen, base: str) -> str | None:
    """The unit a name gets where it is assigned: its declaration, or the value bound."""
    if isinstance(statement, ast.AnnAssign) and statement.target is node:
        spec = read_annotation(statement.annotation) or comment_spec(
            module, statement.lineno, statement.end_lineno or statement.lineno)
    elif isinstance(statement, ast.Assign) and node in statement.targets:
        spec = comment_spec(module, statement.lineno, statement.end_lineno or statement.lineno)
    else:
        return None
    if spec is not None:
        declared = _declared_text(engine, module, spec, base)
        if declared is not None:
            return declared
    value_node = statement.value
    if value_node is not None and id(value_node) in seen:
        return _value_text(engine, seen[id(value_node)], base)
    return None


def _parameter(engine, module, node: ast.arg, function_node, base: str) -> str | None:
    function = _function_info(module, function_node) if function_node is not None else None
    if function is None:
        return None
    for param in function.params:
        if param.node is node:
            return _declared_text(engine, module, param.spec, base)
    return None


def _function_info(module, node) -> FunctionInfo | None:
    return next((info for info in module.all_functions if info.node is node), None)


def signature(engine, function: FunctionInfo) -> str:
    """``drag(rho: kg/m^3, u: m/s) -> N``: the declared units of a function."""
    def unit(spec) -> str:
        value = engine.declared(function.module, spec)
        if isinstance(value, Quantity):
            return value.display_unit()
        if isinstance(value, TupleValue):  # tuple[Annotated[...], ...]
            return "(" + ", ".join(item.display_unit() if isinstance(item, Quantity) else "?"
                                   for item in value.items) + ")"
        text = getattr(value, "text", None)  # a stub's unit variable, "$X"
        return text if text is not None else "?"

    params = []
    for param in function.params:
        star = "*" if param.kind == "vararg" else "**" if param.kind == "varkw" else ""
        params.append(f"{star}{param.name}" + (f": {unit(param.spec)}" if param.spec is not None else ""))
    returns = f" -> {unit(function.return_spec)}" if function.return_spec is not None else ""
    return f"{function.qualname}({', '.join(params)}){returns}"


def _snippet(source: str, node: ast.AST) -> str:
    if isinstance(node, ast.arg):
        return node.arg
    text = " ".join((ast.get_source_segment(source, node) or type(node).__name__).split())
    text = text.replace("`", "'")
    return text if len(text) <= 60 else text[:57] + "..."
