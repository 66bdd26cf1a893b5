"""What a module declares: functions, classes, aliases, declared globals and imports.

This pass reads the syntax tree once, with no inference: it records *where* units
are declared (as ``UnitText``/``AliasRef``) and leaves parsing them to the resolver,
which knows the unit table and the other modules.
"""

from __future__ import annotations

import ast
import re
from collections import deque
from collections.abc import Iterator
from dataclasses import dataclass, field
from functools import lru_cache

from .annotations import AliasRef, SourceSpan, TupleSpec, UnitText, read_annotation
from .comments import CommentUnit

UnitSpec = UnitText | AliasRef | TupleSpec | None


def _position(node) -> tuple[int, int, int, int]:
    """(line, column) where a definition stands, then its first line (decorators included)
    and its last: what is known of it while its module's tree is released."""
    decorators = getattr(node, "decorator_list", None)
    first = min(node.lineno, *(item.lineno for item in decorators)) if decorators else node.lineno
    return node.lineno, node.col_offset, first, getattr(node, "end_lineno", None) or node.lineno


def _where(info) -> tuple[int, int]:
    """(line, column) of a definition: how ``restore_tree`` finds its new node."""
    return info.position[:2]


def _lines(info) -> tuple[int, int]:
    """The first (decorators included) and the last line of a definition."""
    return info.position[2:]


def _restored_node(holder, module: "ModuleSymbols | None", name: str):
    """Only reached for an empty slot: after ``release_tree`` a definition's or a
    parameter's ``node`` is gone until its module parses its source again."""
    if name != "node" or module is None:
        raise AttributeError(name)
    module.restore_tree()
    return object.__getattribute__(holder, "node")


@dataclass(slots=True)
class ParamInfo:
    name: str
    kind: str  # "positional", "vararg", "keyword", "varkw"
    spec: UnitSpec
    default: ast.expr | None
    node: ast.arg
    positional_only: bool = False
    # kept when the module releases its tree: the dotted name the annotation gives, if
    # any (it may be a class, whose instance the parameter holds), and the function
    annotated_name: tuple[str, ...] | None = None
    function: "FunctionInfo | None" = field(init=False, default=None)

    def __getattr__(self, name: str):
        return _restored_node(self, self.function.module if self.function else None, name)


@dataclass(eq=False, slots=True)
class FunctionInfo:
    name: str
    qualname: str
    node: ast.FunctionDef | ast.AsyncFunctionDef | ast.Lambda
    module: "ModuleSymbols"
    params: list[ParamInfo]
    return_spec: UnitSpec
    owner: "ClassInfo | None" = None
    decorators: frozenset[str] = frozenset()
    pint_wrapper: str | None = None  # "wraps" or "check": pint's decorators declare the units
    # Kept apart from ``node``, which the module may release (see ModuleSymbols.release_tree):
    # where the definition stands (see _position), and the dotted name its return
    # annotation gives, if any.
    position: tuple[int, int, int, int] = field(init=False, default=(0, 0, 0, 0))
    returns_name: tuple[str, ...] | None = None
    call_signature: tuple | None = field(init=False, default=None)  # see engine.bind_arguments

    def __post_init__(self) -> None:
        self.position = _position(self.node)
        for param in self.params:
            param.function = self

    def __getattr__(self, name: str):
        return _restored_node(self, self.module, name)

    @property
    def is_static(self) -> bool:
        return "staticmethod" in self.decorators

    @property
    def is_classmethod(self) -> bool:
        return "classmethod" in self.decorators

    @property
    def is_property(self) -> bool:
        return "property" in self.decorators or "cached_property" in self.decorators

    @property
    def line(self) -> int:
        return self.position[0]

    where = property(_where)
    lines = property(_lines)


@dataclass(eq=False, slots=True)
class ClassInfo:
    name: str
    node: ast.ClassDef
    module: "ModuleSymbols"
    base_nodes: list[ast.expr]
    attributes: dict[str, tuple[UnitSpec, SourceSpan]] = field(default_factory=dict)
    methods: dict[str, FunctionInfo] = field(default_factory=dict)
    fields: list[tuple[str, UnitSpec, ast.expr | None, SourceSpan]] = field(default_factory=list)
    is_record: bool = False  # dataclass or NamedTuple: fields are the constructor's parameters
    position: tuple[int, int, int, int] = field(init=False, default=(0, 0, 0, 0))  # see _position

    def __post_init__(self) -> None:
        self.position = _position(self.node)

    def __getattr__(self, name: str):
        return _restored_node(self, self.module, name)

    where = property(_where)
    lines = property(_lines)


@dataclass(frozen=True, slots=True, eq=False)
class ImportRef:
    """``local = module`` (attr None) or ``local = module.attr`` (``from module import attr``).
    One object per distinct import (``_import_ref``), so equal means identical."""

    module: str
    attr: str | None
    level: int = 0


@dataclass(eq=False, slots=True)
class ModuleSymbols:
    path: str
    name: str
    tree: ast.Module
    source: str
    comment_units: dict[int, CommentUnit]
    is_package: bool = False
    is_stub: bool = False
    functions: dict[str, FunctionInfo] = field(default_factory=dict)
    classes: dict[str, ClassInfo] = field(default_factory=dict)
    aliases: dict[str, UnitText | AliasRef] = field(default_factory=dict)
    globals_declared: dict[str, tuple[UnitSpec, SourceSpan]] = field(default_factory=dict)
    imports: dict[str, ImportRef] = field(default_factory=dict)
    # every function and method, for the baseline pass; nested ones are found on the way
    all_functions: list[FunctionInfo] = field(default_factory=list)
    comment_specs: dict[int, UnitText] = field(default_factory=dict)
    # in stubs only: ``milli = 1e-3`` names a plain scale factor that acts like a literal
    stub_numbers: dict[str, float] = field(default_factory=dict)
    options: "DeclarationOptions" = None  # set by the project; None means no extra sources
    name_specs: dict[str, UnitText | None] = field(default_factory=dict)
    # (docstring spec, explicit spec, where) pairs that must agree: DIM206 when they do not
    docstring_conflicts: list = field(default_factory=list)
    pint_dynamic: bool | None = None  # defines pint units or contexts at run time (pint_support)
    # a docstring or a name pattern declares something here (the fast path must not skip it)
    declares_from_text: bool = False
    # names of its functions, classes and imports that something else binds too (usually
    # none; set by collect_symbols): see bound_only_by_definition and bound_only_by_import
    bound_again: frozenset[str] = frozenset()
    # called with the module after ``restore_tree`` (the project counts resident trees)
    on_restore: object = None
    # reads the source again after a release (None: the source is kept, as for notebooks)
    read_again: object = None
    tree_released: bool = False

    _lines: list[str] | None = None

    def __getattr__(self, name: str):
        # only reached for an empty slot: see release_tree
        if name == "tree":
            self.restore_tree()
            return object.__getattribute__(self, "tree")
        if name == "source":
            self.source = self.read_again(self.path)
            return self.source
        raise AttributeError(name)

    def release_tree(self) -> None:
        """Drop the syntax tree, the bulk of a module's memory, keeping what it declares.
        Any later use of ``tree`` or of a definition's ``node`` parses the source again
        (``restore_tree``), giving the same definitions their new nodes."""
        if self.tree_released:
            return
        for info in self.all_functions:
            del info.node
            for param in info.params:
                del param.node
                param.default = None  # read only when the module is first collected
        for cls in self.classes.values():
            del cls.node
        del self.tree
        if self.read_again is not None:
            del self.source
        self._lines = None
        self.tree_released = True

    def restore_tree(self) -> None:
        if not self.tree_released:
            return
        try:
            tree = ast.parse(self.source, filename=self.path)  # it parsed before: it parses again
        except (SyntaxError, ValueError, RecursionError, MemoryError):
            tree = ast.Module(body=[], type_ignores=[])  # the file changed during the run
        definitions = {}
        for stmt in _top_level_statements(tree.body):
            if isinstance(stmt, (ast.FunctionDef, ast.AsyncFunctionDef, ast.ClassDef)):
                definitions[(stmt.lineno, stmt.col_offset)] = stmt
            if isinstance(stmt, ast.ClassDef):
                for item in stmt.body:
                    if isinstance(item, (ast.FunctionDef, ast.AsyncFunctionDef)):
                        definitions[(item.lineno, item.col_offset)] = item
        for info in self.all_functions:
            info.node = definitions.get(info.where) or _empty_function(info)
            arguments = _all_arguments(info.node.args)
            for index, param in enumerate(info.params):
                param.node = arguments[index] if index < len(arguments) else ast.arg(param.name)
        for cls in self.classes.values():
            cls.node = definitions.get(cls.where) or ast.ClassDef(
                cls.name, [], [], [], [], lineno=cls.where[0], col_offset=cls.where[1])
        self.tree = tree
        self.tree_released = False
        if self.on_restore is not None:
            self.on_restore(self)

    def line_text(self, line: int) -> str:
        if self._lines is None:  # the line breaks Python counts: not form feeds or U+2028
            self._lines = re.split(r"\r\n|\r|\n", self.source)
        if 1 <= line <= len(self._lines):
            return self._lines[line - 1]
        return ""


def _empty_function(info: FunctionInfo) -> ast.FunctionDef:
    """A definition whose file changed during the run: no body to analyse."""
    arguments = ast.arguments(posonlyargs=[], args=[], vararg=None, kwonlyargs=[], kw_defaults=[],
                              kwarg=None, defaults=[])
    return ast.FunctionDef(info.name, arguments, [], [], None, lineno=info.where[0],
                           col_offset=info.where[1])


def decorator_names(node) -> frozenset[str]:
    names = set()
    for decorator in getattr(node, "decorator_list", ()):
        target = decorator.func if isinstance(decorator, ast.Call) else decorator
        if isinstance(target, ast.Name):
            names.add(target.id)
        elif isinstance(target, ast.Attribute):
            names.add(target.attr)
    return frozenset(names) if names else _NO_DECORATORS  # an empty frozenset is 216 bytes


_NO_DECORATORS: frozenset[str] = frozenset()


def comment_spec(module: ModuleSymbols, first_line: int, last_line: int) -> UnitText | None:
    """The unit of a trailing comment on any line of a statement (one object per comment)."""
    if not module.comment_units:
        return None
    for line in range(first_line, last_line + 1):
        found = module.comment_units.get(line)
        if found is not None:
            spec = module.comment_specs.get(line)
            if spec is None:
                column, length = found.column, len(found.text)
                text = module.line_text(found.line)
                if not text.isascii():  # positions of declarations count UTF-8 bytes, as the tree does
                    column = len(text[: column - 1].encode("utf-8")) + 1
                    length = len(found.text.encode("utf-8"))
                spec = module.comment_specs[line] = UnitText(
                    found.text, DeclarationSite(found.line, column, length, "comment"))
            return spec
    return None


class DeclarationSite(ast.AST):
    """A stand-in node giving a unit declared outside an annotation (a comment, a docstring,
    a name) its location for DIM901, and saying which of these it was (``declared_by``)."""

    _attributes = ("lineno", "col_offset", "end_lineno", "end_col_offset")

    def __init__(self, line: int, column: int, length: int, declared_by: str, name: str = ""):
        super().__init__()
        self.lineno = line
        self.col_offset = column - 1
        self.end_lineno = line
        self.end_col_offset = column - 1 + length
        self.declared_by = declared_by
        self.declared_name = name


@dataclass(frozen=True)
class DeclarationOptions:
    """Where units may come from besides annotations, comments and stubs (contract, section 6)."""

    docstring_units: bool = True
    is_unit: object = None  # callable(text) -> bool: whether a docstring bracket is a unit
    names: object = None  # a NameUnits, or None when no name pattern applies


NO_EXTRA_SOURCES = DeclarationOptions(docstring_units=False)


def name_spec(module: "ModuleSymbols", name: str, line: int, column: int) -> UnitText | None:
    """The unit a name pattern gives a name, one spec object per (module, name)."""
    names = module.options.names
    if names is None:
        return None
    spec = module.name_specs.get(name)
    if spec is None and name not in module.name_specs:
        found = names.unit_for(name)
        if found is not None:
            spec = UnitText(found[0], DeclarationSite(line, column, len(name), "name", name))
        module.name_specs[name] = spec
    return spec


def _all_arguments(args: ast.arguments) -> list[ast.arg]:
    """Every parameter in the order ``read_parameters`` lists them."""
    return args.posonlyargs + args.args + ([args.vararg] if args.vararg else []) + \
        args.kwonlyargs + ([args.kwarg] if args.kwarg else [])


def read_parameters(module: ModuleSymbols, node) -> list[ParamInfo]:
    args = node.args
    is_lambda = node.__class__ is ast.Lambda
    # In a signature over several lines, a unit comment declares the parameter that
    # stands alone on its line: count the parameters per line (only if there are comments).
    alone_on_line = None
    if module.comment_units and getattr(node, "end_lineno", node.lineno) != node.lineno:
        per_line: dict[int, int] = {}
        for arg in _all_arguments(args):
            per_line[arg.lineno] = per_line.get(arg.lineno, 0) + 1
        alone_on_line = {line for line, count in per_line.items() if count == 1}

    def parameter(arg: ast.arg, kind: str, default, positional_only: bool = False) -> ParamInfo:
        annotation = None if is_lambda else arg.annotation
        spec = read_annotation(annotation) if annotation is not None else None
        if spec is None and alone_on_line is not None and arg.lineno in alone_on_line:
            spec = comment_spec(module, arg.lineno, arg.lineno)
        return ParamInfo(arg.arg, kind, spec, default, arg, positional_only, _annotated_name(spec, annotation))

    params: list[ParamInfo] = []
    positional = args.posonlyargs + args.args
    defaults = [None] * (len(positional) - len(args.defaults)) + list(args.defaults)
    for index, (arg, default) in enumerate(zip(positional, defaults)):
        params.append(parameter(arg, "positional", default, index < len(args.posonlyargs)))
    if args.vararg:
        params.append(parameter(args.vararg, "vararg", None))
    for arg, default in zip(args.kwonlyargs, args.kw_defaults):
        params.append(parameter(arg, "keyword", default))
    if args.kwarg:
        params.append(parameter(args.kwarg, "varkw", None))
    return params


def _annotated_name(spec: UnitSpec, annotation: ast.expr | None) -> tuple[str, ...] | None:
    """The dotted name an annotation is (``p: Pipe`` may name a class), which
    ``read_annotation`` has already read into ``spec``; None for any other annotation."""
    if spec.__class__ is AliasRef and annotation.__class__ in (ast.Name, ast.Attribute):
        return spec.parts
    return None


def make_function(module: ModuleSymbols, node, qualname: str, owner: ClassInfo | None) -> FunctionInfo:
    returns = None if isinstance(node, ast.Lambda) else read_annotation(node.returns)
    info = FunctionInfo(
        name=getattr(node, "name", "<lambda>"), qualname=qualname, node=node, module=module,
        params=read_parameters(module, node), return_spec=returns, owner=owner,
        decorators=decorator_names(node), returns_name=_annotated_name(returns, getattr(node, "returns", None)),
    )
    if not isinstance(node, ast.Lambda) and node.decorator_list:
        _read_pint_decorators(info, node)
    options = module.options
    if options is not None and not module.is_stub and not isinstance(node, ast.Lambda):
        _add_docstring_units(module, info, options)
        if options.names is not None:
            for param in info.params:
                if param.spec is None:
                    param.spec = name_spec(module, param.name, param.node.lineno, param.node.col_offset + 1)
    return info


def _pint_unit_arguments(node: ast.AST) -> list[ast.AST | None] | None:
    """The units of ``@ureg.wraps``/``@ureg.check``: a string, None, or a tuple of them."""
    if isinstance(node, ast.Constant) and (node.value is None or isinstance(node.value, str)):
        return [node]
    if isinstance(node, (ast.Tuple, ast.List)) and all(
            isinstance(item, ast.Constant) and (item.value is None or isinstance(item.value, str))
            for item in node.elts):
        return list(node.elts)
    return None


_PINT_VARIABLE = re.compile(r"[A-Za-z_]\w*")


def _pint_unit_text(text: str) -> str:
    """pint's ``"=A*B"`` (units tied to the arguments') in dimcheck's ``"$A*$B"`` notation."""
    if text.startswith("="):
        return _PINT_VARIABLE.sub(lambda match: "$" + match.group(), text[1:])
    return text


def _read_pint_decorators(info: FunctionInfo, node) -> None:
    """pint's own declaration forms: ``@ureg.wraps(ret, args)`` gives the units the body
    sees as plain numbers; ``@ureg.check("[length]", ...)`` the dimensions of the quantities
    it receives. ``functools.wraps(f)`` and other ``.wraps`` are told apart by their arguments."""
    for decorator in node.decorator_list:
        if not (isinstance(decorator, ast.Call) and isinstance(decorator.func, ast.Attribute)):
            continue
        kind = decorator.func.attr
        if kind == "wraps" and len(decorator.args) >= 2:
            returned = _pint_unit_arguments(decorator.args[0])
            taken = _pint_unit_arguments(decorator.args[1])
            if returned is None or taken is None:
                continue
            _assign_pint_units(info, taken, quantity_type=False)
            if len(returned) == 1 and returned[0].value is not None and info.return_spec is None:
                info.return_spec = UnitText(_pint_unit_text(returned[0].value), SourceSpan(returned[0]))
            info.pint_wrapper = "wraps"
            if _not_strict(decorator):
                info.decorators = info.decorators | {"<pint-lenient>"}
        elif kind == "check" and decorator.args and all(
                isinstance(arg, ast.Constant) and (arg.value is None or
                                                   (isinstance(arg.value, str) and arg.value.startswith("[")))
                for arg in decorator.args):
            _assign_pint_units(info, list(decorator.args), quantity_type=True)
            info.pint_wrapper = "check"


def _not_strict(decorator: ast.Call) -> bool:
    """``@ureg.wraps(ret, args, strict=False)`` (or False as the third argument)."""
    values = [keyword.value for keyword in decorator.keywords if keyword.arg == "strict"]
    values += decorator.args[2:3]
    return any(isinstance(value, ast.Constant) and value.value is False for value in values)


def _assign_pint_units(info: FunctionInfo, units: list, quantity_type: bool) -> None:
    positional = [param for param in info.params if param.kind == "positional"]
    for param, unit in zip(positional, units):
        if unit is not None and unit.value is not None and param.spec is None:
            param.spec = UnitText(_pint_unit_text(unit.value), SourceSpan(unit), quantity_type=quantity_type)


def _returns_tuple(node) -> bool:
    stack = list(node.body)
    while stack:
        item = stack.pop()
        if isinstance(item, ast.Return) and isinstance(item.value, ast.Tuple):
            return True
        if not isinstance(item, (ast.FunctionDef, ast.AsyncFunctionDef, ast.ClassDef, ast.Lambda)):
            stack.extend(child for child in ast.iter_child_nodes(item) if isinstance(child, ast.stmt))
    return False


def _add_docstring_units(module: ModuleSymbols, info: FunctionInfo, options: DeclarationOptions) -> None:
    """Parameter and return units from the docstring: they fill in what has no explicit
    declaration, and must agree with what has one."""
    if not options.docstring_units:
        return
    body = info.node.body
    if not (body and isinstance(body[0], ast.Expr) and isinstance(body[0].value, ast.Constant)
            and isinstance(body[0].value.value, str) and "]" in body[0].value.value):
        return
    from .docstrings import docstring_units

    literal = body[0].value
    params = {param.name: param for param in info.params}
    for found in docstring_units(literal.value, options.is_unit):
        line = literal.lineno + found.line - 1
        column = found.column + (literal.col_offset + 3 if found.line == 1 else 0)
        spec = UnitText(found.text, DeclarationSite(line, column, len(found.text), "docstring", found.name))
        module.declares_from_text = True
        if found.name == "return":
            if _returns_tuple(info.node):
                continue  # the unit documents the first of several returned values
            if info.return_spec is None:
                info.return_spec = spec
            else:
                module.docstring_conflicts.append((spec, info.return_spec, "return value"))
        elif found.name in params:
            param = params[found.name]
            if param.spec is None:
                param.spec = spec
            else:
                module.docstring_conflicts.append((spec, param.spec, f"parameter '{found.name}'"))


def _is_record_class(node: ast.ClassDef) -> bool:
    if "dataclass" in decorator_names(node):
        return True
    for base in node.bases:
        name = base.attr if isinstance(base, ast.Attribute) else getattr(base, "id", None)
        if name == "NamedTuple":
            return True
    return False


def _self_attribute_declarations(cls: ClassInfo, method: ast.FunctionDef, module: ModuleSymbols) -> None:
    """``self.x: Annotated[...] = ...`` and ``self.x = ...  # [unit]`` inside methods."""
    if not method.args.args:
        return
    self_name = method.args.args[0].arg
    for stmt in _statements_within(method):
        if isinstance(stmt, ast.AnnAssign):
            targets, spec = [stmt.target], read_annotation(stmt.annotation)
        elif isinstance(stmt, ast.Assign):
            targets = stmt.targets
            spec = comment_spec(module, stmt.lineno, stmt.end_lineno or stmt.lineno)
        else:
            continue
        if spec is None:
            continue
        for target in targets:
            if (isinstance(target, ast.Attribute) and isinstance(target.value, ast.Name)
                    and target.value.id == self_name and target.attr not in cls.attributes):
                cls.attributes[target.attr] = (spec, SourceSpan(stmt))


def _statements_within(node) -> Iterator[ast.stmt]:
    """The statements inside a definition at any depth, in ``ast.walk`` order, without
    visiting the expressions between them (declarations are statements)."""
    queue = deque(node.body)
    while queue:
        item = queue.popleft()
        if isinstance(item, ast.stmt):
            yield item
        for name in item._fields:
            value = getattr(item, name, None)
            if value.__class__ is list and value and isinstance(value[0], _BLOCK_ITEMS):
                queue.extend(value)


_BLOCK_ITEMS = (ast.stmt, ast.excepthandler, ast.match_case)


def read_class(module: ModuleSymbols, node: ast.ClassDef, qualname: str) -> ClassInfo:
    cls = ClassInfo(node.name, node, module, list(node.bases), is_record=_is_record_class(node))
    for stmt in node.body:
        if isinstance(stmt, ast.AnnAssign) and isinstance(stmt.target, ast.Name):
            spec = read_annotation(stmt.annotation)
            if spec is None:
                spec = comment_spec(module, stmt.lineno, stmt.end_lineno or stmt.lineno)
            span = SourceSpan(stmt)
            cls.attributes[stmt.target.id] = (spec, span)
            if not _is_classvar(stmt.annotation):
                cls.fields.append((stmt.target.id, spec, stmt.value, span))
        elif isinstance(stmt, ast.Assign):
            spec = comment_spec(module, stmt.lineno, stmt.end_lineno or stmt.lineno)
            if spec is not None:
                for target in stmt.targets:
                    if isinstance(target, ast.Name):
                        cls.attributes[target.id] = (spec, SourceSpan(stmt))
        elif isinstance(stmt, (ast.FunctionDef, ast.AsyncFunctionDef)):
            method = make_function(module, stmt, f"{qualname}.{stmt.name}", cls)
            cls.methods[stmt.name] = method
            module.all_functions.append(method)
    if module.comment_units or "Annotated" in module.source:  # else there is nothing to find
        for method in cls.methods.values():
            _self_attribute_declarations(cls, method.node, module)
    return cls


def _is_classvar(annotation: ast.AST) -> bool:
    head = annotation.value if isinstance(annotation, ast.Subscript) else annotation
    name = head.attr if isinstance(head, ast.Attribute) else getattr(head, "id", None)
    return name == "ClassVar"


def _top_level_statements(body):
    """Module statements, looking into ``if``/``try`` blocks (guarded imports, fallbacks)."""
    for stmt in body:
        if isinstance(stmt, ast.If):
            yield from _top_level_statements(stmt.body)
            yield from _top_level_statements(stmt.orelse)
        elif isinstance(stmt, ast.Try):
            for block in (stmt.body, stmt.orelse, stmt.finalbody):
                yield from _top_level_statements(block)
            for handler in stmt.handlers:
                yield from _top_level_statements(handler.body)
        else:
            yield stmt


def bound_only_by_definition(module: ModuleSymbols, name: str) -> bool:
    """Whether a function or class of the module is bound by its def or class statement
    alone: its value is the definition itself, known without evaluating the module."""
    return (name in module.functions or name in module.classes) and name not in module.bound_again


def bound_only_by_import(module: ModuleSymbols, name: str) -> bool:
    """Whether one import is all that binds a module-level name (the evaluator then
    resolves it on first use)."""
    return name in module.imports and name not in module.bound_again


def _names_bound_again(module: ModuleSymbols) -> frozenset[str]:
    """The module's functions, classes and imports whose name more than one top-level
    statement binds (or one that binds it twice)."""
    bound: set[str] = set()
    again: set[str] = set()

    def bind(name: str) -> None:
        (again if name in bound else bound).add(name)

    # without a walrus anywhere, only targets bind: values and expression statements need
    # no walk (some modules hold large tables or documentation calls at the top level)
    walrus = ":=" in module.source
    for stmt in _top_level_statements(module.tree.body):
        if isinstance(stmt, (ast.FunctionDef, ast.AsyncFunctionDef, ast.ClassDef)):
            bind(stmt.name)
            continue
        if isinstance(stmt, (ast.Import, ast.ImportFrom)):
            for name in imported_names(stmt):
                bind(name)
            continue
        if walrus:
            parts = [stmt]
        elif isinstance(stmt, ast.Assign):
            parts = stmt.targets
        elif isinstance(stmt, (ast.AnnAssign, ast.AugAssign)):
            parts = [stmt.target]
        elif isinstance(stmt, (ast.Expr, ast.Return, ast.Pass, ast.Raise, ast.Assert)):
            continue
        else:  # loops, with-blocks, del, match: walk them whole
            parts = [stmt]
        for part in parts:
            if part.__class__ is ast.Name:  # ``x = ...``: no walk needed
                bind(part.id)
                continue
            for node in ast.walk(part):
                if isinstance(node, ast.Name) and not isinstance(node.ctx, ast.Load):
                    bind(node.id)
                elif isinstance(node, (ast.Import, ast.ImportFrom)):
                    for name in imported_names(node):
                        bind(name)
                elif isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef, ast.ClassDef)):
                    bind(node.name)
    found = {name for name in again if name in module.functions or name in module.classes
             or name in module.imports}
    return frozenset(found) if found else _NO_NAMES  # one shared empty set: most modules


_NO_NAMES: frozenset[str] = frozenset()


def imported_names(stmt: ast.Import | ast.ImportFrom) -> list[str]:
    """The names an import statement binds (``from m import *`` binds none it names)."""
    return [alias.asname or alias.name.split(".")[0] for alias in stmt.names if alias.name != "*"]


def record_import(imports: dict[str, ImportRef], stmt: ast.Import | ast.ImportFrom) -> None:
    if isinstance(stmt, ast.Import):
        for alias in stmt.names:
            if alias.asname:
                imports[alias.asname] = _import_ref(alias.name, None, 0)
            else:
                top = alias.name.split(".")[0]
                imports[top] = _import_ref(top, None, 0)
    else:
        for alias in stmt.names:
            if alias.name == "*":
                continue
            imports[alias.asname or alias.name] = _import_ref(stmt.module or "", alias.name, stmt.level)


@lru_cache(maxsize=200_000)
def _import_ref(module: str, attr: str | None, level: int) -> ImportRef:
    """One object per distinct import: every module of a package imports the same names."""
    return ImportRef(module, attr, level)


_IDENTIFIER = re.compile(r"[A-Za-z_][A-Za-z0-9_]*")


def _names_declare_units(module: ModuleSymbols) -> bool:
    """Whether any identifier in the source gets a unit from a name pattern."""
    names = module.options.names
    return any(names.unit_for(word) is not None for word in set(_IDENTIFIER.findall(module.source)))


def collect_symbols(module: ModuleSymbols) -> ModuleSymbols:
    """Fill in the module's functions, classes, aliases, declared globals and imports."""
    if module.options is not None and module.options.names is not None and not module.is_stub:
        module.declares_from_text = _names_declare_units(module)
    for stmt in _top_level_statements(module.tree.body):
        if isinstance(stmt, (ast.FunctionDef, ast.AsyncFunctionDef)):
            info = make_function(module, stmt, stmt.name, None)
            module.functions[stmt.name] = info
            module.all_functions.append(info)
        elif isinstance(stmt, ast.ClassDef):
            module.classes[stmt.name] = read_class(module, stmt, stmt.name)
        elif isinstance(stmt, (ast.Import, ast.ImportFrom)):
            record_import(module.imports, stmt)
        elif isinstance(stmt, ast.AnnAssign) and isinstance(stmt.target, ast.Name):
            name = stmt.target.id
            if _is_type_alias_annotation(stmt.annotation) and stmt.value is not None:
                spec = read_annotation(stmt.value)
                if spec is not None:
                    module.aliases[name] = spec
                continue
            spec = read_annotation(stmt.annotation)
            if spec is None:
                spec = comment_spec(module, stmt.lineno, stmt.end_lineno or stmt.lineno)
            if spec is not None:
                module.globals_declared[name] = (spec, SourceSpan(stmt))
        elif (module.is_stub and isinstance(stmt, ast.Assign) and len(stmt.targets) == 1
              and isinstance(stmt.targets[0], ast.Name) and _number_literal(stmt.value) is not None):
            module.stub_numbers[stmt.targets[0].id] = _number_literal(stmt.value)
        elif isinstance(stmt, ast.Assign):
            spec = read_annotation(stmt.value) if isinstance(stmt.value, ast.Subscript) else None
            if isinstance(spec, UnitText):
                for target in stmt.targets:
                    if isinstance(target, ast.Name):
                        module.aliases[target.id] = spec
                continue
            alias = _alias_of_alias(module, stmt)
            if alias is not None:
                module.aliases[stmt.targets[0].id] = alias
                continue
            spec = comment_spec(module, stmt.lineno, stmt.end_lineno or stmt.lineno)
            if spec is not None:
                for target in stmt.targets:
                    if isinstance(target, ast.Name):
                        module.globals_declared[target.id] = (spec, SourceSpan(stmt))
    module.bound_again = _names_bound_again(module)
    return module


def _alias_of_alias(module: ModuleSymbols, stmt: ast.Assign) -> AliasRef | None:
    """``Distance = Length`` where Length is an alias defined above or an imported name:
    Distance may then declare a unit too (resolved, or found to be none, later)."""
    if len(stmt.targets) != 1 or stmt.targets[0].__class__ is not ast.Name \
            or stmt.value.__class__ not in (ast.Name, ast.Attribute):
        return None
    spec = read_annotation(stmt.value)
    if spec.__class__ is AliasRef and (spec.parts[0] in module.aliases or spec.parts[0] in module.imports):
        return spec
    return None


def _number_literal(node: ast.AST) -> float | None:
    if isinstance(node, ast.UnaryOp) and isinstance(node.op, ast.USub):
        inner = _number_literal(node.operand)
        return None if inner is None else -inner
    if isinstance(node, ast.Constant) and isinstance(node.value, (int, float)) \
            and not isinstance(node.value, bool):
        return node.value
    return None


def _is_type_alias_annotation(annotation: ast.AST) -> bool:
    name = annotation.attr if isinstance(annotation, ast.Attribute) else getattr(annotation, "id", None)
    return name == "TypeAlias"
