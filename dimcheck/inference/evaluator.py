"""The inference pass over one scope (a module body, class body or function body).

``ScopeEvaluator`` walks statements in order, keeps an environment of abstract values
(``values.py``), and computes the value of every expression. Where two values meet
(a sum, a binding to a declaration, a call argument, a power) it asks the rule checks
in ``rules/checks.py`` and records any problem at the node's location.

Deep code never breaks it: chains such as ``a + a + ... + a`` are walked iteratively
along their left spine, and anything nested deeper than a fixed budget is left unknown.
"""

from __future__ import annotations

import ast
import math
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from ..declarations.annotations import AliasRef
from ..declarations.symbols import (
    FunctionInfo, bound_only_by_definition, bound_only_by_import, comment_spec, imported_names, make_function,
    name_spec, read_annotation, record_import,
)
from ..rules import checks
from ..units.dimension import DIMENSIONLESS, Dimension
from ..rules.checks import Problem
from .generic import raise_quantity
from .values import (
    UNKNOWN, Bare, ClassValue, FunctionValue, InstanceValue, IterableValue, ModuleValue, Quantity,
    TupleValue, Unknown, exact_exponent, intersect_scales, literal_tolerance, quantity_product,
    scale_by_bare,
)

if TYPE_CHECKING:
    from .engine import Engine
    from ..declarations.symbols import ModuleSymbols

# Nesting budgets: deeper code is left unknown rather than risk the interpreter's stack.
# The expression budget shrinks with a low recursion limit (see ScopeEvaluator.expr).
MAX_EXPRESSION_DEPTH = 1000
MAX_BLOCK_DEPTH = 200


@dataclass(frozen=True, slots=True)
class Located:
    """A problem at a place in a file; ``chain`` names the helpers it came through."""

    problem: Problem
    path: str
    line: int
    column: int  # 0-based, as in ast
    end_line: int
    end_column: int
    chain: tuple[str, ...] = ()

    @property
    def key(self) -> tuple:
        return (self.path, self.line, self.column, self.problem.code)


_COMPARISON_SKIP = (ast.Is, ast.IsNot, ast.In, ast.NotIn)


def merge_values(a: Any, b: Any) -> Any:
    """The value of a name after two branches of control flow meet."""
    if a is b:
        return a
    if isinstance(a, Quantity) and isinstance(b, Quantity):
        if a.dimension != b.dimension:
            return UNKNOWN
        return a if a.scales == b.scales else a.replace(
            scales=intersect_scales(a.scales, b.scales), tolerance=max(a.tolerance, b.tolerance))
    if isinstance(a, Quantity) and isinstance(b, Bare) and b.is_zero:
        return a
    if isinstance(b, Quantity) and isinstance(a, Bare) and a.is_zero:
        return b
    if isinstance(a, TupleValue) and isinstance(b, TupleValue) and len(a.items) == len(b.items):
        return TupleValue(tuple(merge_values(x, y) for x, y in zip(a.items, b.items)))
    if isinstance(a, Bare) and isinstance(b, Bare) and a.value == b.value:
        return a
    if type(a) is type(b) and isinstance(a, (FunctionValue, ClassValue, InstanceValue, ModuleValue)):
        return a if a == b else UNKNOWN
    return UNKNOWN


def merge_envs(base: dict, branches: list[dict]) -> dict:
    merged = dict(base)
    names = set()
    for branch in branches:
        names.update(branch)
    for name in names:
        values = [branch[name] for branch in branches if name in branch]
        if len(values) < len(branches) and name in base:
            values.append(base[name])
        result = values[0]
        for value in values[1:]:
            result = merge_values(result, value)
        merged[name] = result
    return merged


def element_of(value: Any) -> Any:
    """The value of one element when iterating: arrays carry their unit per element."""
    if isinstance(value, Quantity):
        return value
    if value.__class__ is IterableValue:  # zip(...), enumerate(...)
        return value.element
    if isinstance(value, TupleValue) and value.items:
        result = value.items[0]
        for item in value.items[1:]:
            result = merge_values(result, item)
        return result
    return UNKNOWN


def _as_factor(value: Any) -> Any:
    if isinstance(value, Unknown) and value.const is not None and isinstance(value.const, (int, float)):
        return Bare(value.const)
    return value


def as_binding_value(value: Any) -> Any:
    """A bare number bound to an undeclared name is unknown (keeping its value for powers)."""
    if isinstance(value, Bare):
        return Unknown(value.value)
    return value


class ScopeEvaluator:
    # a fixed set of attributes: one evaluator is made per function analysis, and these
    # are read on every node
    __slots__ = ("engine", "module", "env", "declared", "global_names", "function", "closure",
                 "baseline", "problems", "_seen", "returns", "_block_depth", "_expecting_error",
                 "_stopped", "is_module_scope", "_power_laws")

    def __init__(self, engine: "Engine", module: "ModuleSymbols", env: dict | None = None,
                 function: FunctionInfo | None = None, closure: "ScopeEvaluator | None" = None,
                 baseline: bool = True):
        self.engine = engine
        self.module = module
        self.env: dict[str, Any] = env if env is not None else {}
        self.declared: dict[str, Quantity] = {}
        self.global_names: set[str] = set()
        self.function = function
        self.closure = closure
        self.baseline = baseline
        self.problems: list[Located] = []
        self._seen: set[tuple] = set()
        self.returns: list[Any] = []
        self._block_depth = 0
        self._expecting_error = 0  # inside `with pytest.raises(...)`: the code is meant to fail
        self._stopped = False  # the rest of the block is not reached (return, raise, failing assert)
        self.is_module_scope = function is None and closure is None
        self._power_laws: list = []  # DIM205 waiting for its statement's value (see settle_power_laws)

    # -- reporting --------------------------------------------------------------------
    def report(self, node: ast.AST, problem: Problem | None, chain: tuple[str, ...] = ()) -> None:
        if problem is None or self._expecting_error:
            return
        located = Located(problem, self.module.path, node.lineno, node.col_offset,
                          getattr(node, "end_lineno", None) or node.lineno,
                          getattr(node, "end_col_offset", None) or node.col_offset, chain)
        if located.key not in self._seen:
            self._seen.add(located.key)
            self.problems.append(located)

    # -- declarations -------------------------------------------------------------------
    def declare(self, name: str, spec) -> Quantity | None:
        quantity = self.engine.declared(self.module, spec)
        if isinstance(quantity, Quantity):
            self.declared[name] = quantity
            if self.is_module_scope or name in self.global_names:
                self.env[name] = quantity
            return quantity
        return None

    def declared_for(self, name: str, node: ast.AST | None = None) -> Quantity | None:
        if name in self.declared:
            return self.declared[name]
        if self.is_module_scope or name in self.global_names:
            found = self.engine.global_declaration(self.module, name)
            if found is not None:
                return found
        if node is not None and self.module.options is not None and self.module.options.names is not None:
            spec = name_spec(self.module, name, node.lineno, node.col_offset + 1)
            if spec is not None:
                return self.declare(name, spec)  # a unit from the name's pattern (*_mm, ...)
        return None

    # -- statements ---------------------------------------------------------------------
    def run(self, body: list[ast.stmt]) -> None:
        if self._block_depth > MAX_BLOCK_DEPTH:
            return
        self._block_depth += 1
        try:
            for stmt in body:
                self.statement(stmt)
                if self._stopped:
                    break
        finally:
            self._block_depth -= 1

    def statement(self, node: ast.stmt) -> None:
        handler = _STATEMENT_HANDLERS.get(node.__class__)
        if handler is not None:
            handler(self, node)
        else:
            self._visit_children(node)
        if self._power_laws:
            self.settle_power_laws(None)

    def settle_power_laws(self, value: Any) -> None:
        """Report the DIM205 findings of a statement, unless the value the statement makes
        has whole exponents only: then the fractional powers cancel within the formula
        (a pump's specific speed, omega * sqrt(q) / (g * h) ** 0.75), and no coefficient
        hides a unit."""
        found, self._power_laws = self._power_laws, []
        if isinstance(value, Quantity) and all(power.denominator == 1 for _, power in value.dimension.exponents):
            return
        for node, problem in found:
            self.report(node, problem)

    def _visit_children(self, node: ast.AST) -> None:
        for child in ast.iter_child_nodes(node):
            if isinstance(child, ast.expr):
                self.expr(child)
            elif isinstance(child, ast.stmt):
                self.statement(child)

    def _stmt_Expr(self, node: ast.Expr) -> None:
        self.settle_power_laws(self.expr(node.value))

    def _stmt_Assign(self, node: ast.Assign) -> None:
        value = self.expr(node.value)
        self.settle_power_laws(value)
        spec = comment_spec(self.module, node.lineno, node.end_lineno or node.lineno)
        for target in node.targets:
            if spec is not None and isinstance(target, (ast.Name, ast.Attribute)):
                self._bind_declared_target(target, spec, value, node.value)
            else:
                self.bind(target, value, node.value)

    def _bind_declared_target(self, target, spec, value, value_node) -> None:
        if isinstance(target, ast.Name):
            declared = self.declare(target.id, spec)
            if declared is None:
                self.env[target.id] = as_binding_value(value)
                return
            self.report(value_node, checks.check_binding(f"'{target.id}'", declared, value))
            self.env[target.id] = declared
        else:
            self.bind(target, value, value_node)

    def _stmt_AnnAssign(self, node: ast.AnnAssign) -> None:
        value = self.expr(node.value) if node.value is not None else None
        self.settle_power_laws(value)
        spec = read_annotation(node.annotation)
        if spec is None:
            spec = comment_spec(self.module, node.lineno, node.end_lineno or node.lineno)
        if spec is not None and isinstance(node.target, ast.Name):
            declared = self.declare(node.target.id, spec)
            if declared is None and spec.__class__ is AliasRef:
                # ``x: Scalar = 2.5  # [m]`` with Scalar an alias of no unit: the comment says it
                comment = comment_spec(self.module, node.lineno, node.end_lineno or node.lineno)
                declared = self.declare(node.target.id, comment) if comment is not None else None
            if declared is not None:
                if value is not None:
                    self.report(node.value, checks.check_binding(f"'{node.target.id}'", declared, value))
                self.env[node.target.id] = declared
                return
        if value is not None:
            self.bind(node.target, value, node.value)

    def _stmt_AugAssign(self, node: ast.AugAssign) -> None:
        current = self.expr(node.target)
        operand = self.expr(node.value)
        result = self.binary(node, node.op, current, operand, augmented=True)
        if isinstance(node.op, (ast.Add, ast.Sub)):
            return  # the target keeps its unit; the sum check has been made
        self.bind(node.target, result, node)

    def bind(self, target: ast.expr, value: Any, value_node: ast.AST) -> None:
        if isinstance(target, ast.Name):
            declared = self.declared_for(target.id, target)
            if declared is not None:
                self.report(value_node, checks.check_binding(f"'{target.id}'", declared, value))
                self.env[target.id] = declared
            else:
                self.env[target.id] = as_binding_value(value)
        elif isinstance(target, (ast.Tuple, ast.List)):
            elements = target.elts
            if any(isinstance(e, ast.Starred) for e in elements):
                for element in elements:
                    inner = element.value if isinstance(element, ast.Starred) else element
                    self.bind(inner, UNKNOWN if isinstance(element, ast.Starred) else element_of(value),
                              value_node)
                return
            if isinstance(value, TupleValue) and len(value.items) == len(elements):
                for element, item in zip(elements, value.items):
                    self.bind(element, item, value_node)
            else:
                item = value if isinstance(value, Quantity) else UNKNOWN
                for element in elements:
                    self.bind(element, item, value_node)
        elif isinstance(target, ast.Attribute):
            owner = self.expr(target.value)
            declared = self.engine.attribute_declaration(owner, target.attr, self.module)
            if declared is not None:
                self.report(value_node, checks.check_binding(f"attribute '{target.attr}'", declared, value))
            elif self.baseline and isinstance(owner, InstanceValue):
                self.engine.record_attribute(owner.info, target.attr, value)
        elif isinstance(target, ast.Subscript):
            container = self.expr(target.value)
            self.expr(target.slice)
            if isinstance(container, Quantity) and isinstance(target.value, ast.Name):
                declared = self.declared_for(target.value.id)
                if declared is not None:
                    self.report(value_node, checks.check_binding(
                        f"element of '{target.value.id}'", declared, value))
        elif isinstance(target, ast.Starred):
            self.bind(target.value, UNKNOWN, value_node)

    def _stmt_Return(self, node: ast.Return) -> None:
        value = self.expr(node.value) if node.value is not None else UNKNOWN
        self.settle_power_laws(value)
        if self.function is not None and node.value is not None and self.function.pint_wrapper != "wraps":
            # (under pint's @wraps the declared unit is attached to whatever number comes back)
            declared = self.engine.declared(self.module, self.function.return_spec)
            if isinstance(declared, Quantity):
                self.report(node.value, checks.check_binding(
                    f"return value of {self.function.name}()", declared, value))
            elif isinstance(declared, TupleValue) and isinstance(value, TupleValue) \
                    and len(value.items) == len(declared.items):
                # each member against its own declaration, reported where it is written
                written = node.value.elts if isinstance(node.value, ast.Tuple) else [node.value] * len(value.items)
                for position, (member, wanted, where) in enumerate(zip(value.items, declared.items, written), 1):
                    if isinstance(wanted, Quantity):
                        self.report(where, checks.check_binding(
                            f"return value {position} of {self.function.name}()", wanted, member))
        self.returns.append(value)
        self._stopped = True

    def _branches(self, blocks: list[list[ast.stmt]]) -> None:
        """Alternative blocks; only those that reach their end shape the names after them."""
        base = self.env
        results = []
        for block in blocks:
            self.env = dict(base)
            self._stopped = False
            self.run(block)
            if not self._stopped:
                results.append(self.env)
        self._stopped = not results
        self.env = merge_envs(base, results) if results else base

    def _stmt_If(self, node: ast.If) -> None:
        self.expr(node.test)
        narrowed = self._narrowing(node.test)
        if narrowed is None:
            self._branches([node.body, node.orelse])
            return
        name, value = narrowed  # `if q.check("[length]"):` -- inside, q is a length
        base = self.env
        self.env = dict(base)
        self.env[name] = value
        self._stopped = False
        self.run(node.body)
        body_env, body_stopped = self.env, self._stopped
        self.env, self._stopped = dict(base), False
        self.run(node.orelse)
        live = [env for env, stopped in ((body_env, body_stopped), (self.env, self._stopped)) if not stopped]
        self._stopped = not live
        self.env = merge_envs(base, live) if live else base

    def _narrowing(self, test: ast.expr):
        """A pint ``q.check("[length]")`` guard on a name whose dimension is not yet known."""
        if not (isinstance(test, ast.Call) and isinstance(test.func, ast.Attribute)
                and test.func.attr == "check" and isinstance(test.func.value, ast.Name)
                and len(test.args) == 1 and isinstance(test.args[0], ast.Constant)
                and isinstance(test.args[0].value, str) and test.args[0].value.startswith("[")):
            return None
        name = test.func.value.id
        if isinstance(self.env.get(name), Quantity):
            return None
        quantity = self.engine.pint.dimension_guard(test.args[0].value)
        return (name, quantity) if quantity is not None else None

    def _stmt_For(self, node: ast.For) -> None:
        iterable = self.expr(node.iter)
        base = dict(self.env)
        self.bind(node.target, element_of(iterable), node.iter)
        self.run(node.body)
        self._stopped = False
        after_body = self.env
        self.env = base
        self._branches([[], node.orelse])
        self.env = merge_envs(self.env, [after_body])

    _stmt_AsyncFor = _stmt_For

    def _stmt_While(self, node: ast.While) -> None:
        self.expr(node.test)
        self._branches([node.body, node.orelse])
        self._stopped = False

    def _stmt_Try(self, node) -> None:
        base = dict(self.env)
        self.run(node.body)
        if not self._stopped:
            self.run(node.orelse)
        self._stopped = False
        after = self.env
        branches = [after]
        for handler in node.handlers:
            self.env = dict(base)
            if handler.type is not None:
                self.expr(handler.type)
            self.run(handler.body)
            self._stopped = False
            branches.append(self.env)
        self.env = merge_envs(base, branches)
        self.run(node.finalbody)

    def _stmt_Raise(self, node: ast.Raise) -> None:
        self._visit_children(node)
        self._stopped = True

    def _stmt_Assert(self, node: ast.Assert) -> None:
        """``assert q.dimensionless`` on a quantity that has a dimension fails: what follows
        is not reached for that quantity (a guard in a helper analysed per call)."""
        self.expr(node.test)
        if node.msg is not None:
            self.expr(node.msg)
        test = node.test
        if isinstance(test, ast.Attribute) and test.attr == "dimensionless":
            owner = self.expr(test.value)
            if isinstance(owner, Quantity) and not owner.is_dimensionless:
                self._stopped = True

    _stmt_TryStar = _stmt_Try

    def _stmt_With(self, node) -> None:
        expects_error = False
        for item in node.items:
            value = self.expr(item.context_expr)
            expects_error = expects_error or _expects_error(item.context_expr)
            if item.optional_vars is not None:
                self.bind(item.optional_vars, UNKNOWN if not isinstance(value, Quantity) else value,
                          item.context_expr)
        self._expecting_error += expects_error
        try:
            self.run(node.body)
        finally:
            self._expecting_error -= expects_error

    _stmt_AsyncWith = _stmt_With

    def _stmt_Match(self, node) -> None:
        self.expr(node.subject)
        self._branches([case.body for case in node.cases] + [[]])
        self._stopped = False

    def _stmt_Global(self, node: ast.Global) -> None:
        self.global_names.update(node.names)

    def _stmt_Nonlocal(self, node) -> None:
        pass

    def _stmt_Import(self, node) -> None:
        # A module-level name that only this import binds is resolved on first use
        # (Engine.module_name_value): most imported names are read in annotations only.
        if self.is_module_scope and all(bound_only_by_import(self.module, local) for local in imported_names(node)):
            return
        imports: dict = {}
        record_import(imports, node)
        for local, ref in imports.items():
            if not (self.is_module_scope and bound_only_by_import(self.module, local)):
                self.env[local] = self.engine.import_value(self.module, ref)

    _stmt_ImportFrom = _stmt_Import

    def _stmt_FunctionDef(self, node) -> None:
        for decorator in node.decorator_list:
            self.expr(decorator)
        if self.is_module_scope:
            if bound_only_by_definition(self.module, node.name):
                return  # Engine.module_name_value gives the definition: no value to keep
            info = self.module.functions.get(node.name)
            if info is None or info.node is not node:
                info = make_function(self.module, node, node.name, None)
            self.env[node.name] = FunctionValue(info)
            return
        qualname = f"{self.function.qualname}.{node.name}" if self.function else node.name
        info = self.engine.nested_function(self.module, node, qualname)
        self.env[node.name] = FunctionValue(info, closure=self)
        if self.baseline:
            self.engine.run_nested_baseline(info, self)

    _stmt_AsyncFunctionDef = _stmt_FunctionDef

    def _stmt_ClassDef(self, node: ast.ClassDef) -> None:
        info = self.module.classes.get(node.name)
        if info is not None and info.node is node:
            self.env[node.name] = ClassValue(info)
            if self.is_module_scope:
                self.engine.run_class_body(info, self)
            return
        for child in node.bases + [k.value for k in node.keywords] + node.decorator_list:
            self.expr(child)
        self.env[node.name] = UNKNOWN

    # -- expressions --------------------------------------------------------------------
    def expr(self, node: ast.expr | None) -> Any:
        if node is None:
            return UNKNOWN
        engine = self.engine
        if engine.observer is None:
            # Leaves, more than half of all nodes, without the nesting count or a handler:
            # a local name, and a number (as _expr_Constant reads it)
            node_class = node.__class__
            if node_class is ast.Name:
                found = self.env.get(node.id, _NOT_BOUND)
                if found is not _NOT_BOUND:
                    return found
            elif node_class is ast.Constant:
                value = node.value
                return Bare(value) if value.__class__ is int or value.__class__ is float else UNKNOWN
        if engine.depth > engine.depth_budget:
            return UNKNOWN
        engine.depth += 1
        try:
            handler = _EXPRESSION_HANDLERS.get(node.__class__)
            if handler is None:
                self._visit_children(node)
                value = UNKNOWN
            else:
                value = handler(self, node)
        finally:
            engine.depth -= 1
        if engine.observer is not None and self.baseline:
            engine.observer(self.module, node, value)
        return value

    def _expr_Constant(self, node: ast.Constant) -> Any:
        value = node.value
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            return UNKNOWN
        return Bare(value)

    def _expr_Name(self, node: ast.Name) -> Any:
        name = node.id
        if name in self.env:
            return self.env[name]
        scope = self.closure
        while scope is not None:
            if name in scope.env:
                return scope.env[name]
            scope = scope.closure
        return self.engine.module_name_value(self.module, name)

    def _expr_Attribute(self, node: ast.Attribute) -> Any:
        owner = self.expr(node.value)
        return self.engine.attribute_value(owner, node.attr, self)

    def _expr_BinOp(self, node: ast.BinOp) -> Any:
        spine = []
        current: ast.expr = node
        while isinstance(current, ast.BinOp):
            spine.append(current)
            current = current.left
        value = self.expr(current)
        observer = self.engine.observer if self.baseline else None
        for binop in reversed(spine):
            right = self.expr(binop.right)
            value = self.binary(binop, binop.op, value, right)
            if observer is not None and binop is not node:
                observer(self.module, binop, value)  # the chain's inner links skip expr()
        return value

    def binary(self, node: ast.AST, op: ast.operator, left: Any, right: Any, augmented: bool = False) -> Any:
        # The common cases first: two plain quantities (no pint, no offset temperature), or
        # one times a number. They give what the general path below gives, without its
        # checks (none can apply).
        left_class, right_class = left.__class__, right.__class__
        if left_class is Quantity and right_class is Quantity \
                and not (left.pint or right.pint or left.offset or right.offset):
            op_type = op.__class__
            if op_type is ast.Mult or op_type is ast.Div:
                return quantity_product(left, right, op_type is ast.Div)
            if (op_type is ast.Add or op_type is ast.Sub) and left.scales == right.scales \
                    and left.dimension == right.dimension:
                return left
        elif (left_class is Quantity and right_class is Bare and not (left.pint or left.offset)) \
                or (left_class is Bare and right_class is Quantity and not (right.pint or right.offset)):
            op_type = op.__class__
            if op_type is ast.Mult or op_type is ast.Div:
                return self._product(left, right, op_type is ast.Div)
        if isinstance(op, (ast.Add, ast.Sub)):
            converted = _scale_zero_shift(left, right, isinstance(op, ast.Sub))
            if converted is not None:
                return converted
            verb = "add" if isinstance(op, ast.Add) else "subtract"
            self.report(node, checks.check_combination(verb, left, right)
                        or checks.check_offset_combination(verb, left, right))
            return self._sum_result(left, right, isinstance(op, ast.Sub))
        if isinstance(op, (ast.Mult, ast.Div, ast.FloorDiv, ast.MatMult)):
            # a name bound only to a number is unknown in sums, but in a product it is still a
            # plain number: dimensionless, and possibly a conversion factor
            left, right = _as_factor(left), _as_factor(right)
            self.report(node, checks.check_offset_product(left, right) or checks.check_offset_product(right, left))
            return self._product(left, right, divide=isinstance(op, (ast.Div, ast.FloorDiv)))
        if isinstance(op, ast.Pow):
            return self._power(node, left, right)
        if isinstance(op, ast.Mod):
            if isinstance(left, Bare) and isinstance(right, Bare) and right.value:
                try:
                    return Bare(left.value % right.value)
                except (TypeError, ValueError, OverflowError):
                    return UNKNOWN
            return left if isinstance(left, Quantity) else UNKNOWN
        return UNKNOWN

    @staticmethod
    def _sum_result(left: Any, right: Any, subtract: bool) -> Any:
        if isinstance(left, Bare) and isinstance(right, Bare):
            try:
                return Bare(left.value - right.value if subtract else left.value + right.value)
            except (TypeError, OverflowError):
                return UNKNOWN
        if isinstance(left, Quantity) and isinstance(right, Quantity):
            if left.dimension != right.dimension:
                return UNKNOWN
            if left.pint or right.pint:
                # pint: degC - degC is a difference, degC - K stays a degC temperature
                # (two added are already reported: the sum is not judged again)
                offset = left.offset and not right.offset
                if subtract and left.offset and right.offset:
                    return left.replace(label="delta_" + left.label, derived=False, origin=None,
                                        offset=False, pint=True)
            else:
                offset = left.offset and right.offset and not subtract
            if left.offset == offset and left.scales == right.scales and left.pint == right.pint:
                return left
            return left.replace(scales=intersect_scales(left.scales, right.scales), derived=True, origin=None,
                                offset=offset, tolerance=max(left.tolerance, right.tolerance),
                                pint=left.pint or right.pint)
        quantity, bare = (left, right) if isinstance(left, Quantity) else (right, left)
        if isinstance(quantity, Quantity) and isinstance(bare, Bare):
            if quantity.offset and not bare.is_zero:
                # t_c + 5: the zero is no longer known (t_c + 273.15, a conversion to kelvin,
                # never gets here: see _scale_zero_shift)
                return quantity.replace(derived=True, origin=None, offset=False)
            return quantity
        return UNKNOWN

    @staticmethod
    def _product(left: Any, right: Any, divide: bool) -> Any:
        if isinstance(left, Quantity) and isinstance(right, Quantity) and left.pint != right.pint:
            # a float times a pint quantity: at run time the float is a plain number
            plain = left if right.pint else right
            factor = Bare(1.0)
            return ScopeEvaluator._product(factor if plain is left else left,
                                           factor if plain is right else right, divide)
        if isinstance(left, Quantity) and isinstance(right, Quantity):
            return quantity_product(left, right, divide)
        if isinstance(left, Quantity) and isinstance(right, Bare):
            return Quantity(left.dimension, scale_by_bare(left.scales, right.value, divide), left._label,
                            left.derived, None, left.offset, left.tolerance + literal_tolerance(right.value),
                            left.pint)
        if isinstance(left, Bare) and isinstance(right, Quantity):
            tolerance = right.tolerance + literal_tolerance(left.value)
            if not divide:
                return Quantity(right.dimension, scale_by_bare(right.scales, left.value, False), right._label,
                                right.derived, None, right.offset, tolerance, right.pint)
            inverse = quantity_product(_ONE, right, divide=True)
            return inverse.replace(scales=scale_by_bare(inverse.scales, left.value, False), tolerance=tolerance)
        if isinstance(left, Bare) and isinstance(right, Bare):
            try:
                if divide:
                    return Bare(left.value / right.value) if right.value else UNKNOWN
                return Bare(left.value * right.value)
            except (TypeError, OverflowError):
                return UNKNOWN
        return UNKNOWN

    def _power(self, node: ast.AST, base: Any, exponent: Any) -> Any:
        constant = None
        if isinstance(exponent, Bare):
            constant = exponent.value
        elif isinstance(exponent, Unknown) and exponent.const is not None:
            constant = exponent.const
        problem = checks.check_exponent(base, exponent, constant is not None)
        power_law = checks.check_power_law(base, exponent) if problem is None else None
        if power_law is not None:
            self._power_laws.append((node, power_law))  # the whole formula decides (settle_power_laws)
        else:
            self.report(node, problem or (checks.check_offset_product(base, exponent, power=True)
                                          if constant != 1 else None))
        if isinstance(base, Bare) and isinstance(exponent, Bare):
            try:
                result = base.value ** exponent.value
                return Bare(result) if isinstance(result, (int, float)) and abs(result) < 1e300 else UNKNOWN
            except (OverflowError, ZeroDivisionError, TypeError, ValueError):
                return UNKNOWN
        if not isinstance(base, Quantity):
            return UNKNOWN
        if base.is_dimensionless and isinstance(exponent, (Quantity, Bare, Unknown)):
            return base.replace(scales=None if constant is None else base.scales, derived=True, origin=None)
        if constant is None or not isinstance(constant, (int, float)):
            return UNKNOWN
        fraction = exact_exponent(constant)
        if fraction is None:
            return UNKNOWN
        return raise_quantity(base, fraction)

    def _expr_UnaryOp(self, node: ast.UnaryOp) -> Any:
        operand = self.expr(node.operand)
        if isinstance(node.op, (ast.USub, ast.UAdd)):
            if isinstance(operand, Bare):
                return Bare(-operand.value if isinstance(node.op, ast.USub) else operand.value)
            return operand if isinstance(operand, Quantity) else UNKNOWN
        return UNKNOWN

    def _expr_Compare(self, node: ast.Compare) -> Any:
        left = self.expr(node.left)
        for op, comparator in zip(node.ops, node.comparators):
            right = self.expr(comparator)
            if not isinstance(op, _COMPARISON_SKIP):
                verb = "equal" if isinstance(op, (ast.Eq, ast.NotEq)) else "compare"
                self.report(node, checks.check_combination(verb, left, right))
            left = right
        return UNKNOWN

    def _expr_BoolOp(self, node: ast.BoolOp) -> Any:
        values = [self.expr(value) for value in node.values]
        result = values[0]
        for value in values[1:]:
            result = merge_values(result, value)
        return result

    def _expr_IfExp(self, node: ast.IfExp) -> Any:
        self.expr(node.test)
        body = self.expr(node.body)
        orelse = self.expr(node.orelse)
        self.report(node, checks.check_combination("conditional branches", body, orelse))
        return choose(body, orelse)

    def _expr_NamedExpr(self, node: ast.NamedExpr) -> Any:
        value = self.expr(node.value)
        self.bind(node.target, value, node.value)
        return value

    def _expr_Tuple(self, node: ast.Tuple) -> Any:
        return TupleValue(tuple(self.expr(element) for element in node.elts))

    def _expr_List(self, node) -> Any:
        values = [self.expr(element) for element in node.elts]
        if not values:
            return UNKNOWN
        result = values[0]
        for value in values[1:]:
            result = choose(result, value) if _compatible(result, value) else UNKNOWN
        return result if isinstance(result, Quantity) else UNKNOWN

    _expr_Set = _expr_List

    def _expr_Subscript(self, node: ast.Subscript) -> Any:
        container = self.expr(node.value)
        index = self.expr(node.slice)
        if isinstance(container, Quantity):
            return container
        if isinstance(container, TupleValue) and isinstance(index, Bare) and isinstance(index.value, int):
            if -len(container.items) <= index.value < len(container.items):
                return container.items[index.value]
        return UNKNOWN

    def _expr_Starred(self, node: ast.Starred) -> Any:
        self.expr(node.value)
        return UNKNOWN

    def _comprehension(self, node, element_nodes) -> Any:
        saved = self.env
        self.env = dict(saved)
        try:
            for generator in node.generators:
                iterable = self.expr(generator.iter)
                self.bind(generator.target, element_of(iterable), generator.iter)
                for condition in generator.ifs:
                    self.expr(condition)
            values = [self.expr(element) for element in element_nodes]
        finally:
            self.env = saved
        return values[0] if len(values) == 1 and isinstance(values[0], Quantity) else UNKNOWN

    def _expr_ListComp(self, node) -> Any:
        return self._comprehension(node, [node.elt])

    _expr_SetComp = _expr_ListComp
    _expr_GeneratorExp = _expr_ListComp

    def _expr_DictComp(self, node) -> Any:
        self._comprehension(node, [node.key, node.value])
        return UNKNOWN

    def _expr_Lambda(self, node: ast.Lambda) -> Any:
        info = self.engine.nested_function(self.module, node, "<lambda>")
        return FunctionValue(info, closure=self)

    def _expr_Call(self, node: ast.Call) -> Any:
        callee = self.expr(node.func)
        args = []
        for arg in node.args:
            if isinstance(arg, ast.Starred):
                self.expr(arg.value)
                args.append((_STAR, arg))
            else:
                args.append((self.expr(arg), arg))
        keywords = {}
        for keyword in node.keywords:
            value = self.expr(keyword.value)
            keywords[keyword.arg if keyword.arg is not None else _STAR] = (value, keyword.value)
        return self.engine.call(callee, args, keywords, node, self)


_RAISES = frozenset({"raises", "assertRaises", "assertRaisesRegex", "assertRaisesRegexp"})


def _expects_error(node: ast.AST) -> bool:
    """``pytest.raises(...)``, ``self.assertRaises(...)``: a test that the code fails."""
    if not isinstance(node, ast.Call):
        return False
    func = node.func
    name = func.attr if isinstance(func, ast.Attribute) else getattr(func, "id", None)
    return name in _RAISES


class _Star:
    """Marks a ``*args`` or ``**kwargs`` at a call site: binding stops there."""


_STAR = _Star()
_NOT_BOUND = object()  # a name the environment does not hold
STAR = _STAR
_ONE = Quantity(DIMENSIONLESS, (1.0,), "1")


_TEMPERATURE = Dimension.from_mapping({"temperature": 1})
# The degree's size (in kelvin) -> the shift between its scale's zero and absolute zero,
# and the units of the absolute and the offset scale of that size.
_ZERO_SHIFTS = {1.0: (273.15, "K", "degC"), round(5 / 9, 12): (459.67, "degR", "degF")}


def _scale_zero_shift(left: Any, right: Any, subtract: bool) -> Quantity | None:
    """``t_c + 273.15`` (now in K) and ``t_k - 273.15`` (now in degC), and the same with
    459.67 between degF and degR: the conversion DIM204 asks for, so no DIM203 for its
    number. None for any other sum."""
    if left.__class__ is Quantity and right.__class__ is Bare:
        quantity, number = left, right.value
    elif left.__class__ is Bare and right.__class__ is Quantity and not subtract:
        quantity, number = right, left.value
    else:
        return None
    if quantity.pint or quantity.dimension is not _TEMPERATURE or not quantity.scales \
            or len(quantity.scales) != 1 or isinstance(number, bool) or not isinstance(number, (int, float)):
        return None
    shift = _ZERO_SHIFTS.get(round(quantity.scales[0], 12))
    if shift is None or not math.isclose(abs(number), shift[0], rel_tol=1e-9):
        return None
    signed = -number if subtract else number
    if quantity.offset and signed > 0:  # to the absolute scale
        return quantity.replace(label=shift[1], derived=False, origin=None, offset=False)
    if not quantity.offset and signed < 0:  # to the offset scale
        return quantity.replace(label=shift[2], derived=False, origin=None, offset=True)
    return None


def _compatible(a: Any, b: Any) -> bool:
    if isinstance(a, Quantity) and isinstance(b, Quantity):
        return a.dimension == b.dimension
    return isinstance(a, (Quantity, Bare)) and isinstance(b, (Quantity, Bare))


def choose(a: Any, b: Any) -> Any:
    """The value of ``a if c else b``: the known side when the other is a bare number."""
    if isinstance(a, Quantity) and isinstance(b, Quantity):
        return a if a.dimension == b.dimension else UNKNOWN
    if isinstance(a, Quantity) and isinstance(b, Bare):
        return a
    if isinstance(b, Quantity) and isinstance(a, Bare):
        return b
    return merge_values(a, b)


# The method for each node type, looked up once rather than by name per node: None for a
# type without one (its children are visited), and for anything that is no Python node.
def _handlers(base: type, prefix: str) -> dict[type, object]:
    return {node_type: getattr(ScopeEvaluator, prefix + node_type.__name__, None)
            for node_type in base.__subclasses__()}


_STATEMENT_HANDLERS = _handlers(ast.stmt, "_stmt_")
_EXPRESSION_HANDLERS = _handlers(ast.expr, "_expr_")
