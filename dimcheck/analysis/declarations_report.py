"""``dimcheck declarations``: every unit declared in the code and where it came from.

The adoption report: on a codebase with no annotations it lists what docstrings and name
patterns declare (``--sources docstring,name``; ``--assume-on`` shows what they would
declare if ``docstring-units`` and ``suffix-units`` were on), so a team can turn the
features on knowingly.
"""

from __future__ import annotations

import ast
import dataclasses
from dataclasses import dataclass

from ..inference.generic import GenericUnit
from ..inference.values import Quantity


@dataclass
class Declaration:
    path: str
    line: int
    owner: str  # function, class or module
    name: str  # parameter, return, attribute or variable
    unit: str
    dimension: str
    source: str  # annotation, comment, docstring, name, stub

    def as_dict(self) -> dict:
        return dataclasses.asdict(self)


def _source_of(spec) -> str:
    return getattr(getattr(spec, "node", None), "declared_by", None) or "annotation"


def collect(paths: list[str], config=None, assume_on: bool = False) -> tuple[list[Declaration], list[str]]:
    from ..cli.discovery import discover
    from ..declarations.symbols import name_spec
    from ..inference.engine import Engine
    from ..rules.finding import display_path
    from ..runner import Checker

    if assume_on:
        from ..cli.config import Config
        config = (config or Config()).replace(docstring_units=True, suffix_units=True)
    checker = Checker(config)
    files, errors = discover(paths, checker.config.exclude, checker.config.exclude_base)
    project = checker.new_project()
    engine = Engine(project, checker.table)
    found: list[Declaration] = []

    def add(module, spec, owner: str, name: str, where=None) -> None:
        if spec is None:
            return
        value = engine.declared(module, spec)
        if isinstance(value, Quantity):
            dimension, unit = value.dimension.format(), getattr(spec, "text", None) or value.label
        elif isinstance(value, GenericUnit):
            dimension, unit = "generic", value.text
        else:
            return
        line = getattr(getattr(spec, "node", None), "lineno", None) or getattr(where, "lineno", 0)
        found.append(Declaration(display_path(module.path), line, owner, name, unit.strip(),
                                 dimension, _source_of(spec)))

    for path in files:
        module = project.load(path).symbols
        if module is None:
            errors.append(f"{display_path(path)}: unreadable")
            continue
        for function in module.all_functions:
            for param in function.params:
                add(module, param.spec, function.qualname, param.name, param.node)
            add(module, function.return_spec, function.qualname, "return", function.node)
        for name, (spec, statement) in module.globals_declared.items():
            add(module, spec, "<module>", name, statement)
        for name, spec in module.aliases.items():
            add(module, spec, "<alias>", name)
        for info in module.classes.values():
            for name, (spec, statement) in info.attributes.items():
                add(module, spec, info.name, name, statement)
        if module.options is not None and module.options.names is not None:
            seen = {(d.owner, d.name) for d in found}
            for node in ast.walk(module.tree):
                targets = node.targets if isinstance(node, ast.Assign) else \
                    [node.target] if isinstance(node, (ast.AnnAssign, ast.AugAssign)) else []
                for target in targets:
                    if isinstance(target, ast.Name) and ("<variable>", target.id) not in seen:
                        spec = name_spec(module, target.id, target.lineno, target.col_offset + 1)
                        if spec is not None:
                            seen.add(("<variable>", target.id))
                            add(module, spec, "<variable>", target.id)
    found.sort(key=lambda d: (d.path, d.line, d.owner, d.name))
    return found, errors
