"""Whole-program inference: module environments, calls (with per-call-site analysis of
unannotated helpers), attributes and classes; declarations come from ``resolver.py``.

One ``Engine`` serves one run over a project. It memoises everything it computes
(declarations, module environments, function results) so each piece is done once,
and it guards every recursive path (import cycles, recursive functions, long call
chains) so that inference always terminates.
"""

from __future__ import annotations

import ast
import sys
from collections import defaultdict
from dataclasses import dataclass, field
from typing import Any

from ..declarations.symbols import (
    ClassInfo, FunctionInfo, ImportRef, ModuleSymbols, ParamInfo, bound_only_by_definition,
    bound_only_by_import, make_function,
)
from ..rules import checks
from ..rules.checks import Problem
from ..rules.finding import display_path
from .evaluator import MAX_EXPRESSION_DEPTH, STAR, Located, ScopeEvaluator, element_of, merge_values
from .generic import GenericUnit
from .pint_support import PintSupport, is_pint_stub
from .project import Project
from .resolver import DeclarationResolver
from .values import (
    RECURSION, UNKNOWN, Bare, ClassValue, FunctionValue, InstanceValue, IterableValue, ModuleValue,
    PintFactoryValue, PintMethodValue, PintRegistryValue, Quantity, TupleValue, Unknown,
)

MAX_CALL_DEPTH = 6
_ARRAY_ATTRIBUTES = {"T", "real", "imag", "flat", "mT"}


_NO_PROBLEMS: list = []  # never appended to: results are read, or replaced whole


@dataclass(slots=True)
class FunctionResult:
    value: Any
    problems: list[Located] = field(default_factory=list)


def _value_key(value: Any) -> tuple:
    if isinstance(value, Quantity):
        return ("q", value.dimension, value.scales, value.offset)
    if isinstance(value, Bare):
        return ("b", value.value)
    if isinstance(value, TupleValue):
        return ("t",) + tuple(_value_key(item) for item in value.items)
    if isinstance(value, (InstanceValue, ClassValue)):
        return ("c", id(value.info))
    if isinstance(value, FunctionValue):
        return ("f", id(value.function))
    return ("u",)


def _informative(value: Any) -> bool:
    """Whether an argument can teach a helper anything about units."""
    if isinstance(value, TupleValue):
        return any(_informative(item) for item in value.items)
    return isinstance(value, (Quantity, InstanceValue, FunctionValue, ClassValue))


def merge_returns(values: list[Any]) -> Any:
    if len(values) == 1 and values[0].__class__ is Quantity:
        return values[0]  # the usual case
    known = [v for v in values if not (isinstance(v, Bare) and v.is_zero) and v is not RECURSION]
    if not known:
        return UNKNOWN
    result = known[0]
    for value in known[1:]:
        result = merge_values(result, value)
    return _as_returned(result)


def _as_returned(value: Any) -> Any:
    """What a caller gets: a bare number returned without a declaration is unknown to it
    (contract, section 2), also inside a returned tuple."""
    if isinstance(value, Bare):
        return Unknown()
    if isinstance(value, TupleValue):
        return TupleValue(tuple(_as_returned(item) for item in value.items))
    return value


class Engine:
    def __init__(self, project: Project, table):
        self.project = project
        self.table = table
        self.depth = 0  # expression nesting across all evaluators, for the recursion budget
        # about three interpreter frames per level of nesting, with room for the rest
        self.depth_budget = min(MAX_EXPRESSION_DEPTH, max(50, (sys.getrecursionlimit() - 300) // 4))
        # called as observer(module, node, value) for every expression evaluated once with
        # declared inputs (not the per-call-site re-analyses); used by explain and coverage
        self.observer = None
        self._call_depth = 0
        self.resolver = DeclarationResolver(project, table)
        self.declared = self.resolver.declared  # the hot path: a bound method, no extra hop
        self.global_declaration = self.resolver.global_declaration
        self._module_envs: dict[str, dict] = {}
        self._module_problems: dict[str, list[Located]] = defaultdict(list)
        # keyed by the FunctionInfo itself: its node may be released and parsed again
        self._baselines: dict[FunctionInfo, FunctionResult] = {}
        self._in_baseline: set[FunctionInfo] = set()
        self._call_results: dict[tuple, FunctionResult] = {}
        self._parameter_declarations: dict[FunctionInfo, tuple] = {}
        self._in_call: set[tuple] = set()
        self._nested: dict[int, FunctionInfo] = {}
        self._constructors: dict[int, FunctionInfo] = {}
        self._bases: dict[int, list[ClassInfo]] = {}
        self._importing: set[tuple] = set()
        self.pint = PintSupport(self)
        self._inferred_attributes: dict[tuple, Any] = {}

    # == modules ===========================================================================
    def module_env(self, module: ModuleSymbols) -> dict:
        env = self._module_envs.get(module.path)
        if env is not None:
            return env
        env = {}
        self._module_envs[module.path] = env  # partial while it runs: import cycles see this
        if module.is_stub or not self.project.can_have_units(module):
            return env  # names then come from the declarations: functions, classes, imports
        evaluator = ScopeEvaluator(self, module, env)
        with self.project.pinned(module):
            evaluator.run(module.tree.body)
        self._module_envs[module.path] = evaluator.env
        self._module_problems[module.path].extend(evaluator.problems)
        return evaluator.env

    def module_name_value(self, module: ModuleSymbols, name: str) -> Any:
        if module.path not in self._module_envs and not module.is_stub \
                and bound_only_by_definition(module, name):
            # a function or class only its definition binds: no need to evaluate the whole
            # module (and, in turn, everything it imports) to know what the name holds
            return FunctionValue(module.functions[name]) if name in module.functions \
                else ClassValue(module.classes[name])
        env = self.module_env(module)
        if name in env:
            return env[name]
        declared = self.global_declaration(module, name)
        if declared is not None:
            return declared
        if name in module.stub_numbers:
            return Bare(module.stub_numbers[name])
        if name in module.functions:
            return FunctionValue(module.functions[name])
        if name in module.classes:
            return ClassValue(module.classes[name])
        if name in module.imports:
            value = self.import_value(module, module.imports[name])
            if bound_only_by_import(module, name):
                env[name] = value  # what evaluating its import statement would have bound
            return value
        if not module.is_stub or module.name != "builtins":
            builtins = self.project.stub_module("builtins")
            if builtins is not None and name in builtins.functions:
                return FunctionValue(builtins.functions[name])
        return UNKNOWN

    def _defines(self, module: ModuleSymbols, name: str) -> bool:
        return (name in module.globals_declared or name in module.functions or name in module.classes
                or name in module.imports or name in module.stub_numbers
                or name in self._module_envs.get(module.path, ()))

    def import_value(self, module: ModuleSymbols, ref: ImportRef) -> Any:
        key = (module.path, ref)
        if key in self._importing:  # re-exports that go round in a circle
            return UNKNOWN
        self._importing.add(key)
        try:
            return self._import_value(module, ref)
        finally:
            self._importing.discard(key)

    def _import_value(self, module: ModuleSymbols, ref: ImportRef) -> Any:
        base = self.project.resolve_import(module, ref)
        if ref.attr is None:
            self.project.find_from(module, base)
            return ModuleValue(base)
        target = self.project.find_from(module, base)
        if target is not None and (self._defines(target, ref.attr) or not target.is_stub):
            if self._defines(target, ref.attr):
                return self.module_name_value(target, ref.attr)
        submodule = f"{base}.{ref.attr}"
        if self.project.find_from(module, submodule) is not None:
            return ModuleValue(submodule)
        if target is not None:
            return self.module_name_value(target, ref.attr)
        return UNKNOWN

    # == attributes ========================================================================
    def attribute_value(self, owner: Any, attr: str, evaluator: ScopeEvaluator | None,
                        requester: ModuleSymbols | None = None) -> Any:
        """``owner.attr``; ``requester`` is the module asking when no evaluator is (a
        module's names are found as that module imports them)."""
        if owner.__class__ is InstanceValue or owner.__class__ is ClassValue:  # the usual case first
            found = self._class_member(owner.info, attr, 0)
            if found is None:
                return self._inferred_attribute(owner.info, attr) if isinstance(owner, InstanceValue) else UNKNOWN
            kind, payload, info = found
            if kind == "attribute":
                value = self.declared(info.module, payload)
                return value if isinstance(value, Quantity) else UNKNOWN
            function: FunctionInfo = payload
            if isinstance(owner, InstanceValue):
                if function.is_property:
                    return self.call_function(FunctionValue(function, owner), [], {}, None, evaluator)
                return FunctionValue(function, None if function.is_static else owner)
            if function.is_classmethod:
                return FunctionValue(function, owner)
            return FunctionValue(function)
        if isinstance(owner, PintRegistryValue) or (isinstance(owner, Quantity) and owner.pint):
            return self.pint.attribute(owner, attr, evaluator.module if evaluator is not None else None)
        if isinstance(owner, ModuleValue):
            requester = evaluator.module if evaluator is not None else requester
            target = self.project.find_from(requester, owner.name)
            if target is not None and self._defines(target, attr):
                return self.module_name_value(target, attr)
            submodule = f"{owner.name}.{attr}"
            if self.project.find_from(requester, submodule) is not None:
                return ModuleValue(submodule)
            return self.module_name_value(target, attr) if target is not None else UNKNOWN
        if isinstance(owner, Quantity):
            if attr in _ARRAY_ATTRIBUTES:
                return owner
            ndarray = self._ndarray_class()
            if ndarray is not None and attr in ndarray.methods:
                return FunctionValue(ndarray.methods[attr], owner)
        return UNKNOWN

    def record_attribute(self, info: ClassInfo, attr: str, value: Any) -> None:
        """``self.x = value`` in a method, with no declaration: remember what x holds."""
        key = (id(info), attr)
        value = UNKNOWN if isinstance(value, Bare) else value
        self._inferred_attributes[key] = (merge_values(self._inferred_attributes[key], value)
                                          if key in self._inferred_attributes else value)

    def _inferred_attribute(self, info: ClassInfo, attr: str) -> Any:
        for cls in [info, *self._base_classes(info)]:
            init = cls.methods.get("__init__")
            if init is not None:
                self.baseline(init)  # its assignments to self are what instances start with
            value = self._inferred_attributes.get((id(cls), attr))
            if value is not None:
                return value
        return UNKNOWN

    def attribute_declaration(self, owner: Any, attr: str, requester: ModuleSymbols | None = None) -> Quantity | None:
        """The unit declared for ``owner.attr`` (a class attribute, or a module's declared
        global as ``requester`` imports that module), or None."""
        if isinstance(owner, (InstanceValue, ClassValue)):
            found = self._class_member(owner.info, attr, 0)
            if found is not None and found[0] == "attribute":
                value = self.declared(found[2].module, found[1])
                return value if isinstance(value, Quantity) else None
        elif isinstance(owner, ModuleValue):
            target = self.project.find_from(requester, owner.name)
            return self.global_declaration(target, attr) if target is not None else None
        return None

    def _ndarray_class(self) -> ClassInfo | None:
        numpy = self.project.stub_module("numpy")
        return numpy.classes.get("ndarray") if numpy is not None else None

    def _class_member(self, info: ClassInfo, attr: str, depth: int):
        if depth > 10:
            return None
        if attr in info.attributes and info.attributes[attr][0] is not None:
            return ("attribute", info.attributes[attr][0], info)
        if attr in info.methods:
            return ("method", info.methods[attr], info)
        for base in self._base_classes(info):
            found = self._class_member(base, attr, depth + 1)
            if found is not None:
                return found
        return None

    def _base_classes(self, info: ClassInfo) -> list[ClassInfo]:
        key = id(info)
        if key not in self._bases:
            self._bases[key] = []
            scratch = ScopeEvaluator(self, info.module, dict(self._module_envs.get(info.module.path, {})),
                                     baseline=False)
            self._bases[key] = [value.info for value in map(scratch.expr, info.base_nodes)
                                if isinstance(value, ClassValue)]
        return self._bases[key]

    # == functions ===========================================================================
    def nested_function(self, module: ModuleSymbols, node, qualname: str) -> FunctionInfo:
        key = id(node)
        if key not in self._nested:
            self._nested[key] = make_function(module, node, qualname, None)
        return self._nested[key]

    def run_nested_baseline(self, info: FunctionInfo, enclosing: ScopeEvaluator) -> None:
        if info in self._baselines or info in self._in_baseline:
            return
        result = self._run_function(info, None, enclosing, baseline=True)
        self._baselines[info] = result
        enclosing.problems.extend(result.problems)

    def run_class_body(self, info: ClassInfo, enclosing: ScopeEvaluator) -> None:
        body = [stmt for stmt in info.node.body
                if not isinstance(stmt, (ast.FunctionDef, ast.AsyncFunctionDef, ast.ClassDef))]
        if all(_declares_only(stmt) for stmt in body):
            return  # a record's field list: nothing to evaluate (read_class read the declarations)
        scope = ScopeEvaluator(self, info.module, {}, closure=enclosing)
        with self.project.pinned(info.module):
            scope.run(body)
        enclosing.problems.extend(scope.problems)

    def baseline(self, function: FunctionInfo) -> FunctionResult:
        """The function analysed once with its declared parameters (others unknown)."""
        result = self._baselines.get(function)
        if result is not None:
            return result
        if function in self._in_baseline:
            return FunctionResult(RECURSION)
        self._in_baseline.add(function)
        try:
            result = self._run_function(function, None, None, baseline=True)
        finally:
            self._in_baseline.discard(function)
        self._baselines[function] = result
        return result

    def _baseline_of(self, function: FunctionInfo, closure: ScopeEvaluator | None) -> FunctionResult:
        """A function's baseline; a nested one has it only once its enclosing scope ran."""
        if closure is None:
            return self.baseline(function)
        return self._baselines.get(function) or FunctionResult(UNKNOWN)

    def _run_function(self, function: FunctionInfo, arguments: dict | None,
                      closure: ScopeEvaluator | None, baseline: bool) -> FunctionResult:
        if function.module.is_stub or "<record>" in function.decorators:
            return FunctionResult(UNKNOWN)
        scope = ScopeEvaluator(self, function.module, {}, function=function, closure=closure,
                               baseline=baseline)
        for index, (param, declared) in enumerate(zip(function.params, self.parameter_declarations(function))):
            if isinstance(declared, Quantity):
                scope.env[param.name] = declared
                scope.declared[param.name] = declared
            elif arguments is not None and param.name in arguments:
                scope.env[param.name] = arguments[param.name]
            else:
                scope.env[param.name] = self._undeclared_parameter(function, index, param)
        with self.project.pinned(function.module):
            node = function.node
            if isinstance(node, ast.Lambda):
                scope.returns.append(scope.expr(node.body))
            else:
                scope.run(node.body)
        value = merge_returns(scope.returns)
        if isinstance(value, (Quantity, TupleValue)):
            # A kept result must not hold the operands a product's label is composed from.
            # Callers of a function with a declared return get the declaration, never this
            # value: keep that instead; otherwise compose the label now.
            declared = self.declared(function.module, function.return_spec)
            if isinstance(declared, (Quantity, TupleValue)):
                value = declared
            elif isinstance(value, Quantity):
                value.label
        # most functions have no problem: share one empty list rather than keep thousands
        return FunctionResult(value, scope.problems or _NO_PROBLEMS)

    def parameter_declarations(self, function: FunctionInfo) -> tuple:
        """What each parameter declares (a Quantity, a GenericUnit or None), resolved once."""
        found = self._parameter_declarations.get(function)
        if found is None:
            module, declared = function.module, self.declared
            found = self._parameter_declarations[function] = tuple(
                [declared(module, param.spec) for param in function.params])
        return found

    def _undeclared_parameter(self, function: FunctionInfo, index: int, param: ParamInfo) -> Any:
        """What a parameter without a unit holds in the baseline: ``self``/``cls``, an
        instance of the class it is annotated with, or unknown."""
        if index == 0 and function.owner is not None and not function.is_static:
            owner = function.owner
            return ClassValue(owner) if function.is_classmethod else InstanceValue(owner)
        return self.instance_of_annotation(function.module, param.annotated_name)

    def _same_as_baseline(self, function: FunctionInfo, arguments: dict) -> bool:
        """Whether a call passes each parameter without a unit just what the baseline
        assumed (``self`` of the method's own class, a ``duct: Duct`` instance): analysing
        the body again would find nothing new."""
        for index, param in enumerate(function.params):
            if param.name not in arguments:
                continue
            given, assumed = arguments[param.name], self._undeclared_parameter(function, index, param)
            # the same kind of value too: a class and an instance of it share a value key
            if type(given) is not type(assumed) or _value_key(given) != _value_key(assumed):
                return False
        return True

    def _call_site_result(self, function: FunctionInfo, arguments: dict,
                          closure: ScopeEvaluator | None) -> FunctionResult:
        key = (function,) + tuple(_value_key(arguments.get(p.name)) for p in function.params)
        cached = self._call_results.get(key)
        if cached is not None:
            return cached
        if key in self._in_call:
            return FunctionResult(RECURSION)
        if self._call_depth >= MAX_CALL_DEPTH:
            return FunctionResult(UNKNOWN)
        self._in_call.add(key)
        self._call_depth += 1
        try:
            result = self._run_function(function, arguments, closure, baseline=False)
            known = {p.key for p in self._baseline_of(function, closure).problems}
            result.problems = [p for p in result.problems if p.key not in known] or _NO_PROBLEMS
        finally:
            self._in_call.discard(key)
            self._call_depth -= 1
        self._call_results[key] = result
        return result

    # == calls ===============================================================================
    def call(self, callee: Any, args: list, keywords: dict, node: ast.Call, evaluator: ScopeEvaluator) -> Any:
        if isinstance(callee, (PintFactoryValue, PintRegistryValue, PintMethodValue)) or is_pint_stub(callee):
            return self.pint.call(callee, args, keywords, node, evaluator)
        if isinstance(callee, FunctionValue):
            return self.call_function(callee, args, keywords, node, evaluator)
        if isinstance(callee, ClassValue):
            return self._construct(callee.info, args, keywords, node, evaluator)
        return UNKNOWN

    def _construct(self, info: ClassInfo, args, keywords, node, evaluator) -> Any:
        instance = InstanceValue(info)
        if info.is_record:
            constructor = self._record_constructor(info)
            self.call_function(FunctionValue(constructor), args, keywords, node, evaluator)
        else:
            found = self._class_member(info, "__init__", 0)
            if found is not None and found[0] == "method":
                self.call_function(FunctionValue(found[1], instance), args, keywords, node, evaluator)
        return instance

    def _record_constructor(self, info: ClassInfo) -> FunctionInfo:
        key = id(info)
        if key not in self._constructors:
            params = [ParamInfo(name, "positional", spec, default, stmt)
                      for name, spec, default, stmt in info.fields]
            # a stand-in node where the class starts: holding the class's own node would keep
            # its whole syntax tree alive after the module releases it
            line, column = info.where
            start = ast.Pass(lineno=line, col_offset=column, end_lineno=line, end_col_offset=column)
            self._constructors[key] = FunctionInfo(info.name, info.name, start, info.module, params,
                                                   None, decorators=frozenset({"<record>"}))
        return self._constructors[key]

    def call_function(self, callee: FunctionValue, args: list, keywords: dict, node,
                      evaluator: ScopeEvaluator) -> Any:
        function = callee.function
        module = function.module
        special = _SPECIAL_CALLS.get((module.name, function.name)) if module.is_stub else None
        if special is not None:
            result = special(evaluator, node, args, keywords)
            if result is not None:  # None: the call is not of the special form
                return result
        bound = bind_arguments(function, callee.bound_self, args, keywords)
        transcendental = "transcendental" in function.decorators
        if module.is_stub and module.name == "math":
            for problem, arg_node in self.pint.math_refuses(function, bound):
                evaluator.report(arg_node, problem)
        if function.pint_wrapper is not None:
            self._pint_decorated_arguments(function, bound, evaluator)
        bindings: dict[str, Any] = {}
        arguments: dict[str, Any] = {}
        declarations = self.parameter_declarations(function)
        generic = False
        for param, declared in zip(function.params, declarations):
            supplied = bound.get(param.name)
            if supplied is None:
                continue
            if declared.__class__ is Quantity:
                for value, arg_node in supplied:
                    if arg_node is not None:
                        evaluator.report(arg_node, checks.check_argument(
                            param.name, function.name, declared, value, transcendental))
            elif isinstance(declared, GenericUnit):
                generic = True
            elif param.kind not in ("vararg", "varkw"):
                value = supplied[0][0]
                arguments[param.name] = Unknown(value.value) if isinstance(value, Bare) else value
        if generic:
            self._check_generic_arguments(function, declarations, bound, bindings, node, evaluator, transcendental)
        result = self._call_result(callee, function, module, bound, bindings, arguments, node, evaluator)
        if (isinstance(result, Quantity) and not result.pint and module.is_stub
                and module.name.split(".")[0] == "numpy" and _any_pint(bound)):
            result = result.replace(pint=True)  # numpy on pint quantities returns quantities
        return result

    def _check_generic_arguments(self, function: FunctionInfo, declarations: tuple, bound: dict,
                                 bindings: dict, node, evaluator: ScopeEvaluator, transcendental: bool) -> None:
        """Parameters declared with a template (``"$X"``, ``"$X^2"``): bind each variable
        to the first argument of known unit, then check the others against it."""
        generic_members: dict[str, list] = defaultdict(list)
        for param, declared in zip(function.params, declarations):
            if isinstance(declared, GenericUnit) and declared.single_variable is not None:
                generic_members[declared.single_variable].extend(bound.get(param.name, ()))
        for variable, members in generic_members.items():
            first = next((value for value, _ in members if isinstance(value, Quantity)), None)
            if first is None:
                continue
            bindings[variable] = first
            for value, arg_node in members:
                if value is not first and arg_node is not None:
                    # the call is where the members are combined (max(h, t), np.where(c, h, t))
                    evaluator.report(node if node is not None else arg_node, checks.check_combination(
                        f"arguments of {function.name}()", first, value))
        for param, declared in zip(function.params, declarations):  # "$X^2": checked after binding
            if isinstance(declared, GenericUnit) and declared.single_variable is None:
                expected = declared.evaluate(bindings, self.resolver.lookup_unit)
                if expected is not None:
                    for value, arg_node in bound.get(param.name, []):
                        if arg_node is not None:
                            evaluator.report(arg_node, checks.check_argument(
                                param.name, function.name, expected, value, transcendental))

    def _call_result(self, callee, function, module, bound, bindings, arguments, node, evaluator) -> Any:
        returned = self.declared(module, function.return_spec)
        if function.pint_wrapper == "wraps" and isinstance(returned, Quantity):
            returned = returned.replace(pint=True, origin=None)  # the caller gets a quantity back
        if isinstance(returned, GenericUnit):
            result = returned.evaluate(bindings, self.resolver.lookup_unit)
            return result if result is not None else UNKNOWN
        if isinstance(returned, TupleValue):
            return returned  # tuple[Annotated[...], ...]: the members as declared
        if module.is_stub or "<record>" in function.decorators:
            # unknown in, unknown out: library calls alone never make a value known
            # a method of a stubbed class is asked of a known object: its instance or class
            any_known = isinstance(callee.bound_self, (InstanceValue, ClassValue)) or any(
                isinstance(value, Quantity) for values in bound.values() for value, _ in values)
            if isinstance(returned, Quantity) and (any_known or not function.params):
                return returned
            return UNKNOWN
        if any(_informative(value) for value in arguments.values()):
            if callee.closure is None and self._same_as_baseline(function, arguments):
                return returned if isinstance(returned, Quantity) else self.baseline(function).value
            outcome = self._call_site_result(function, arguments, callee.closure)
            if node is not None:
                for located in outcome.problems:
                    step = f"{function.qualname}() at {display_path(located.path)}:{located.line}"
                    evaluator.report(node, located.problem, located.chain + (step,))
            return returned if isinstance(returned, Quantity) else outcome.value
        if isinstance(returned, Quantity):
            return returned
        if function.returns_name is not None:
            instance = self.instance_of_annotation(module, function.returns_name)
            if instance is not UNKNOWN:
                return instance
        return self._baseline_of(function, callee.closure).value

    def instance_of_annotation(self, module: ModuleSymbols, name: tuple[str, ...] | None) -> Any:
        """``p: Pipe`` (the annotation's dotted name) where Pipe is a class of the checked
        code: an instance of it."""
        if not name:
            return UNKNOWN
        value = self.module_name_value(module, name[0])
        for attr in name[1:]:
            if not isinstance(value, ModuleValue):
                return UNKNOWN
            value = self.attribute_value(value, attr, None, module)
        return InstanceValue(value.info) if isinstance(value, ClassValue) else UNKNOWN

    def _pint_decorated_arguments(self, function: FunctionInfo, bound: dict, evaluator) -> None:
        """pint's ``@wraps`` (strict, the default) and ``@check`` refuse plain numbers for the
        parameters they give a unit; a quantity of the wrong dimension is caught as usual."""
        if "<pint-lenient>" in function.decorators:
            return  # @ureg.wraps(..., strict=False) takes plain numbers as given in its units
        for param in function.params:
            if param.spec is None:
                continue
            for value, arg_node in bound.get(param.name, []):
                plain = isinstance(value, Bare) or (isinstance(value, Quantity) and not value.pint)
                if plain and arg_node is not None:
                    evaluator.report(arg_node, Problem(
                        "DIM104", f"argument '{param.name}' of {function.name}() must be a pint quantity: "
                                  f"pint's @{function.pint_wrapper} refuses a plain number"))

    # == checking a module ======================================================================
    def check_module(self, module: ModuleSymbols) -> list[Located]:
        if not self.project.can_have_units(module):
            return []
        with self.project.pinned(module):
            return self._check_module(module)

    def _check_module(self, module: ModuleSymbols) -> list[Located]:
        self.module_env(module)
        problems = list(self._module_problems[module.path])
        for function in module.all_functions:
            problems.extend(self.baseline(function).problems)
        self._validate_declarations(module)
        problems.extend(self.resolver.problems[module.path].values())
        problems.extend(self._docstring_conflicts(module))
        unique: dict[tuple, Located] = {}
        for located in problems:
            if located.path == module.path:
                unique.setdefault(located.key + (located.chain,), located)
        return list(unique.values())

    def _docstring_conflicts(self, module: ModuleSymbols) -> list[Located]:
        """A docstring unit that contradicts the explicit declaration it documents (DIM206)."""
        found = []
        for documented, explicit, what in module.docstring_conflicts:
            said, declared = self.declared(module, documented), self.declared(module, explicit)
            problem = checks.check_docstring_agrees(what, said, declared)
            if problem is not None:
                node = documented.node
                found.append(Located(problem, module.path, node.lineno, node.col_offset,
                                     node.end_lineno, node.end_col_offset))
        return found

    def _validate_declarations(self, module: ModuleSymbols) -> None:
        """Parse every declaration of the module, used or not, so bad units are reported."""
        for function in module.all_functions:
            self.parameter_declarations(function)  # resolved once, usually by the baseline already
            self.declared(module, function.return_spec)
        for spec in module.aliases.values():
            self.declared(module, spec)
        for spec, _ in module.globals_declared.values():
            self.declared(module, spec)
        for info in module.classes.values():
            for spec, _ in info.attributes.values():
                self.declared(module, spec)


def _declares_only(stmt: ast.stmt) -> bool:
    """A class-body statement with nothing to evaluate: ``x: Length`` with no value, the
    docstring, ``pass``."""
    if isinstance(stmt, ast.AnnAssign):
        return stmt.value is None and isinstance(stmt.target, ast.Name)
    return isinstance(stmt, ast.Pass) or (isinstance(stmt, ast.Expr) and isinstance(stmt.value, ast.Constant))


def _any_pint(bound: dict) -> bool:
    return any(isinstance(value, Quantity) and value.pint for values in bound.values() for value, _ in values)


def bind_arguments(function: FunctionInfo, bound_self: Any, args: list, keywords: dict) -> dict:
    """Map call arguments to parameter names: name -> [(value, node), ...]."""
    result: dict[str, list] = {}
    signature = function.call_signature
    if signature is None:
        signature = function.call_signature = _call_signature(function)
    positional, vararg, by_keyword = signature
    if bound_self is not None and not function.is_static and positional:
        result[positional[0]] = [(bound_self, None)]
        positional = positional[1:]
    for index, (value, node) in enumerate(args):
        if value is STAR:
            break
        if index < len(positional):
            result[positional[index]] = [(value, node)]
        elif vararg is not None:
            result.setdefault(vararg, []).append((value, node))
    for name, (value, node) in keywords.items():
        if name in by_keyword:  # (the star of **kwargs is no name: never in it)
            result[name] = [(value, node)]
    return result


def _call_signature(function: FunctionInfo) -> tuple:
    """What binding a call needs of a function's parameters, worked out once: the names
    taking positional arguments, the ``*args`` name, the names a keyword may give."""
    positional = tuple(p.name for p in function.params if p.kind == "positional")
    vararg = next((p.name for p in function.params if p.kind == "vararg"), None)
    # tuples, not sets: a few names each, kept for thousands of functions
    by_keyword = tuple(p.name for p in function.params
                       if p.kind in ("positional", "keyword") and not p.positional_only)
    return positional, vararg, by_keyword


def _power_call(evaluator: ScopeEvaluator, node, args, keywords) -> Any:
    if len(args) < 2 or args[0][0] is STAR or args[1][0] is STAR:
        return UNKNOWN
    return evaluator._power(node, args[0][0], args[1][0])


def _members_call(evaluator: ScopeEvaluator, node, args, keywords) -> Any:
    """``min([a, b])``, ``max((a, b))``, ``sum([a, b])``: the members of a literal list,
    tuple or set must agree, as the arguments of ``min(a, b)`` do (reported at the call).
    Any other form (None) takes the general path."""
    if len(args) != 1 or args[0][0] is STAR:
        return None
    value, literal = args[0]
    if not isinstance(literal, (ast.List, ast.Tuple, ast.Set)) or len(literal.elts) < 2 \
            or any(isinstance(element, ast.Starred) for element in literal.elts):
        return None
    # a tuple's value holds its members; a list or set is one merged value, so read them again
    members = value.items if isinstance(value, TupleValue) else [evaluator.expr(e) for e in literal.elts]
    first = next((member for member in members if isinstance(member, Quantity)), None)
    if first is None:
        return UNKNOWN
    name = node.func.attr if isinstance(node.func, ast.Attribute) else getattr(node.func, "id", "min")
    for member in members:
        if member is not first:
            evaluator.report(node, checks.check_combination(f"members of {name}()", first, member))
    return first


def _zip_call(evaluator: ScopeEvaluator, node, args, keywords) -> Any:
    """``zip(a, b)``: each item is a tuple of one element of each (``for x, t in zip(...)``)."""
    if not args or any(value is STAR for value, _ in args):
        return UNKNOWN
    return IterableValue(TupleValue(tuple(element_of(value) for value, _ in args)))


def _enumerate_call(evaluator: ScopeEvaluator, node, args, keywords) -> Any:
    """``enumerate(a)``: each item is (a count, an element of a)."""
    if not args or args[0][0] is STAR:
        return UNKNOWN
    return IterableValue(TupleValue((UNKNOWN, element_of(args[0][0]))))


# Calls whose result the stub notation cannot express: the exponent's value matters,
# the members of one literal argument must agree, or the items of an iterator are tuples.
_SPECIAL_CALLS = {
    ("numpy", "power"): _power_call,
    ("numpy", "float_power"): _power_call,
    ("math", "pow"): _power_call,
    ("builtins", "pow"): _power_call,
    ("builtins", "min"): _members_call,
    ("builtins", "max"): _members_call,
    ("builtins", "sum"): _members_call,
    ("builtins", "zip"): _zip_call,
    ("builtins", "enumerate"): _enumerate_call,
}
