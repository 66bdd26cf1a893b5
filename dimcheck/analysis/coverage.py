"""``dimcheck coverage``: how much of the code dimcheck can see units in.

Two shares, per file and in total: the numeric expressions (arithmetic operations and
their operands) whose dimension is known, and the functions whose signature is fully
declared (every parameter but self/cls, and the return when it returns a value).
"""

from __future__ import annotations

import ast
from dataclasses import dataclass, field

from ..inference.generic import GenericUnit
from ..inference.values import Quantity

_ARITHMETIC = (ast.Add, ast.Sub, ast.Mult, ast.Div, ast.FloorDiv, ast.Mod, ast.Pow, ast.MatMult)


@dataclass
class FileCoverage:
    path: str
    expressions: int = 0
    known: int = 0
    functions: int = 0
    declared_functions: int = 0

    @property
    def expression_share(self) -> float:
        return 100.0 * self.known / self.expressions if self.expressions else 100.0

    @property
    def function_share(self) -> float:
        return 100.0 * self.declared_functions / self.functions if self.functions else 100.0


@dataclass
class CoverageReport:
    files: list[FileCoverage] = field(default_factory=list)
    unreadable: list[str] = field(default_factory=list)

    def total(self) -> FileCoverage:
        total = FileCoverage("TOTAL")
        for item in self.files:
            total.expressions += item.expressions
            total.known += item.known
            total.functions += item.functions
            total.declared_functions += item.declared_functions
        return total


def numeric_expressions(tree: ast.AST) -> list[ast.expr]:
    """Arithmetic operations and their non-literal operands, each once."""
    found: dict[int, ast.expr] = {}
    for node in ast.walk(tree):
        if isinstance(node, ast.BinOp) and isinstance(node.op, _ARITHMETIC):
            for item in (node, node.left, node.right):
                if not isinstance(item, ast.Constant):
                    found.setdefault(id(item), item)
        elif isinstance(node, ast.AugAssign) and isinstance(node.op, _ARITHMETIC):
            if not isinstance(node.value, ast.Constant):
                found.setdefault(id(node.value), node.value)
    return list(found.values())


def _returns_value(function) -> bool:
    node = function.node
    if isinstance(node, ast.Lambda):
        return True
    stack = list(node.body)
    while stack:
        item = stack.pop()
        if isinstance(item, ast.Return) and item.value is not None:
            return True
        if isinstance(item, (ast.FunctionDef, ast.AsyncFunctionDef, ast.ClassDef, ast.Lambda)):
            continue
        stack.extend(ast.iter_child_nodes(item))
    return False


def fully_declared(engine, function) -> bool:
    module = function.module
    for index, param in enumerate(function.params):
        if index == 0 and function.owner is not None and not function.is_static:
            continue  # self or cls
        if not isinstance(engine.declared(module, param.spec), (Quantity, GenericUnit)):
            return False
    if _returns_value(function):
        return isinstance(engine.declared(module, function.return_spec), (Quantity, GenericUnit))
    return True


def measure(paths: list[str], config=None) -> CoverageReport:
    from ..cli.discovery import discover
    from ..inference.engine import Engine
    from ..rules.finding import display_path
    from ..runner import Checker

    checker = Checker(config)
    files, _ = discover(paths, checker.config.exclude, checker.config.exclude_base)
    project = checker.new_project()
    engine = Engine(project, checker.table)
    known: set[int] = set()

    def observe(module, node, value):
        if isinstance(value, Quantity):
            known.add(id(node))

    engine.observer = observe
    report = CoverageReport()
    for path in files:
        loaded = project.load(path)
        if loaded.symbols is None:
            report.unreadable.append(display_path(path))
            continue
        module = loaded.symbols
        engine.check_module(module)
        item = FileCoverage(display_path(path))
        nodes = numeric_expressions(module.tree)
        item.expressions = len(nodes)
        item.known = sum(1 for node in nodes if id(node) in known)
        item.functions = len(module.all_functions)
        item.declared_functions = sum(1 for f in module.all_functions if fully_declared(engine, f))
        report.files.append(item)
    return report
