"""Declarations resolved to values: unit texts parsed (DIM901 when they cannot be),
aliases followed across modules, generic templates read. Each result is memoised."""

from __future__ import annotations

import ast
from collections import defaultdict

from ..declarations.annotations import TupleSpec, UnitText
from ..declarations.symbols import ModuleSymbols
from ..rules.checks import Problem
from ..units import UnitError, parse_unit
from ..units.dimension import DIMENSIONLESS
from .evaluator import Located
from .generic import GenericSyntaxError, GenericUnit, parse_generic
from .project import Project
from .values import UNKNOWN, Origin, Quantity, TupleValue

MAX_ALIAS_DEPTH = 12


class DeclarationResolver:
    def __init__(self, project: Project, table):
        self.project = project
        self.table = table
        self._declared: dict[str, dict] = {}  # module path -> spec -> value
        self.problems: dict[str, dict[tuple, Located]] = defaultdict(dict)  # DIM901 by module path

    def declared(self, module: ModuleSymbols, spec) -> Quantity | GenericUnit | None:
        if spec is None:
            return None
        # per module, then by spec (a spec hashes by its text and position, or an alias by
        # its name): no key tuple to keep for each of many thousands of declarations
        known = self._declared.get(module.path)
        if known is None:
            known = self._declared[module.path] = {}
        elif spec in known:
            return known[spec]
        known[spec] = None  # a cycle of aliases resolves to nothing
        if isinstance(spec, UnitText):
            result = self._unit_text(module, spec)
        elif spec.__class__ is TupleSpec:
            result = self._tuple(module, spec)
        else:
            result = self._alias(module, spec.parts, 0)
        known[spec] = result
        return result

    def _unit_text(self, module: ModuleSymbols, spec: UnitText) -> Quantity | GenericUnit | None:
        text = spec.text.strip()
        declared_by = getattr(spec.node, "declared_by", None)
        kind = "stub" if module.is_stub else (declared_by or "annotation")
        origin = Origin(module.path, getattr(spec.node, "lineno", 0), kind,
                        getattr(spec.node, "declared_name", ""))
        if "$" in text:
            try:
                return parse_generic(text)
            except GenericSyntaxError as error:
                self._declaration_problem(module, spec.node, str(error))
                return None
        if declared_by in ("comment", "docstring") and text in ("", "-"):
            return Quantity(DIMENSIONLESS, (1.0,), "1", origin=origin)
        try:
            unit = parse_unit(text, self.table)
        except UnitError as error:
            self._declaration_problem(module, spec.node, str(error))
            return None
        scales = None if unit.scale is None else (unit.scale,)
        return Quantity(unit.dimension, scales, text, origin=origin, offset=unit.is_offset,
                        pint=spec.quantity_type)

    def _tuple(self, module: ModuleSymbols, spec: TupleSpec) -> TupleValue | None:
        """A tuple of declared members; None when no member resolves to a unit."""
        items = []
        for item in spec.items:
            value = self.declared(module, item) if item is not None else None
            items.append(value if isinstance(value, Quantity) else UNKNOWN)
        return TupleValue(tuple(items)) if any(isinstance(item, Quantity) for item in items) else None

    def _declaration_problem(self, module: ModuleSymbols, node: ast.AST, message: str) -> None:
        located = Located(Problem("DIM901", message), module.path, node.lineno, node.col_offset,
                          getattr(node, "end_lineno", None) or node.lineno,
                          getattr(node, "end_col_offset", None) or node.col_offset)
        self.problems[module.path][located.key] = located

    def _alias(self, module: ModuleSymbols, parts: tuple[str, ...], depth: int):
        if depth > MAX_ALIAS_DEPTH or not parts:
            return None
        name = parts[0]
        if len(parts) == 1:
            if name in module.aliases:
                return self.declared(module, module.aliases[name])
            ref = module.imports.get(name)
            if ref is not None and ref.attr is not None:
                target = self.project.find_from(module, self.project.resolve_import(module, ref))
                if target is not None:
                    return self._alias(target, (ref.attr,), depth + 1)
            return None
        ref = module.imports.get(name)
        if ref is None:
            return None
        base = self.project.resolve_import(module, ref)
        dotted = f"{base}.{ref.attr}" if ref.attr else base
        for middle in parts[1:-1]:
            dotted = f"{dotted}.{middle}"
        target = self.project.find_from(module, dotted)
        return self._alias(target, parts[-1:], depth + 1) if target is not None else None

    def global_declaration(self, module: ModuleSymbols, name: str) -> Quantity | None:
        entry = module.globals_declared.get(name)
        if entry is None:
            return None
        value = self.declared(module, entry[0])
        return value if isinstance(value, Quantity) else None

    def lookup_unit(self, text: str) -> Quantity | None:
        """A concrete unit named inside a generic template (``"$X/s"``)."""
        try:
            unit = parse_unit(text, self.table)
        except UnitError:
            return None
        return Quantity(unit.dimension, None if unit.scale is None else (unit.scale,), text)
