"""``dimcheck annotate``: write the units dimcheck infers back into the source.

Two passes. The *plan* runs the usual inference (nothing is imported or executed) with an
observer that records the value of every assignment's right-hand side and every ``return``
expression, and picks the bindings whose unit is certain:

* a simple assignment ``name = expr`` (one plain name, no annotation, no ``# [..]``
  comment) at module, class or function level, where the name is bound nowhere else in
  its scope, and the value is a quantity with exactly one candidate scale;
* a function (not a lambda or a generator) with no declared return unit, whose every
  ``return`` gives a quantity of that same unit (a bare number may take it too).

The unit is printed from the value's label, and kept only when that label parses back to
the same dimension, scale and offset: a compound label that does not read as a unit is
skipped rather than guessed.

The *rewrite* (``rewrite``) applies the plan with libcst, so every other byte of the file
is left as it was, and then proves it: the old text must survive line by line inside the
new one (only insertions), and the new text must parse. libcst is imported only here.
"""

from __future__ import annotations

import ast
import difflib
import math
import os
import re
from dataclasses import dataclass, field
from fractions import Fraction

from ..declarations.comments import read_bracket
from ..inference.labels import si_label
from ..inference.values import Bare, Quantity

STYLES = ("comment", "annotated")

# Comments that other tools read at the very start of a comment; a unit bracket put in
# front of them would switch them off, so such lines are left alone.
_DIRECTIVES = ("type:", "noqa", "pragma", "pylint:", "mypy:", "pyright:", "ruff:", "fmt:",
               "isort:", "nosec", "flake8", "dimcheck:", "yapf:", "black:")
_TYPING_MODULES = ("typing", "typing_extensions")


class AnnotateError(Exception):
    """A one-line problem with one file (it is left untouched)."""


@dataclass(frozen=True)
class Insertion:
    """A unit to write: on the ``ordinal``-th assignment or function definition of a file
    (counted in source order, as both ``ast`` and libcst see them)."""

    kind: str  # "assign" or "return"
    ordinal: int
    line: int
    name: str
    unit: str


@dataclass
class FilePlan:
    path: str
    insertions: list[Insertion] = field(default_factory=list)


@dataclass
class Plan:
    files: list[FilePlan] = field(default_factory=list)
    errors: list[str] = field(default_factory=list)


# == scopes ==================================================================================

_SCOPES = (ast.FunctionDef, ast.AsyncFunctionDef, ast.ClassDef, ast.Lambda)


def _scope_nodes(body: list[ast.stmt]):
    """Every node of a scope, not entering nested functions, classes or lambdas (iterative:
    deep code must not break this)."""
    stack = list(reversed(body))
    while stack:
        node = stack.pop()
        yield node
        if isinstance(node, _SCOPES):
            continue
        stack.extend(reversed(list(ast.iter_child_nodes(node))))


def _bindings(body: list[ast.stmt], params: list[str] = ()) -> tuple[dict[str, int], set[str]]:
    """How often each name is bound in a scope, and the names it shares with another scope
    (``global``/``nonlocal``). Comprehension targets are counted too: that only makes the
    choice more careful."""
    counts: dict[str, int] = {}
    shared: set[str] = set()

    def bound(name: str | None) -> None:
        if name:
            counts[name] = counts.get(name, 0) + 1

    for name in params:
        bound(name)
    for node in _scope_nodes(body):
        if isinstance(node, ast.Name) and isinstance(node.ctx, (ast.Store, ast.Del)):
            bound(node.id)
        elif isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef, ast.ClassDef)):
            bound(node.name)
        elif isinstance(node, (ast.Import, ast.ImportFrom)):
            for alias in node.names:
                bound(alias.asname or alias.name.split(".")[0])
        elif isinstance(node, ast.ExceptHandler):
            bound(node.name)
        elif isinstance(node, (ast.MatchAs, ast.MatchStar)):
            bound(node.name)
        elif isinstance(node, ast.MatchMapping):
            bound(node.rest)
        elif isinstance(node, (ast.Global, ast.Nonlocal)):
            shared.update(node.names)
    return counts, shared


def _module_level_assignments(body):
    """Module statements as the declaration reader sees them (into ``if``/``try`` blocks)."""
    for stmt in body:
        if isinstance(stmt, ast.If):
            yield from _module_level_assignments(stmt.body)
            yield from _module_level_assignments(stmt.orelse)
        elif isinstance(stmt, ast.Try) or type(stmt).__name__ == "TryStar":
            for block in (stmt.body, stmt.orelse, stmt.finalbody):
                yield from _module_level_assignments(block)
            for handler in stmt.handlers:
                yield from _module_level_assignments(handler.body)
        elif isinstance(stmt, ast.Assign):
            yield stmt


def _simple_target(stmt: ast.Assign) -> str | None:
    if len(stmt.targets) == 1 and isinstance(stmt.targets[0], ast.Name):
        return stmt.targets[0].id
    return None


def _param_names(node) -> list[str]:
    args = node.args
    every = args.posonlyargs + args.args + args.kwonlyargs + [a for a in (args.vararg, args.kwarg) if a]
    return [arg.arg for arg in every]


def _plain_class(node: ast.ClassDef) -> bool:
    """No decorator, base or keyword that could turn an annotation into a field (dataclass,
    NamedTuple, Enum, ORM models): only there may ``--style annotated`` add one."""
    if node.decorator_list or node.keywords:
        return False
    return all(isinstance(base, ast.Name) and base.id == "object" for base in node.bases)


@dataclass
class _Candidate:
    stmt: ast.Assign
    name: str
    scope: str  # "module", "class", "function"
    plain_class: bool = True


def assignment_candidates(tree: ast.Module) -> list[_Candidate]:
    """Assignments whose name is bound exactly once in its scope and shared with no other."""
    found: list[_Candidate] = []
    shared_anywhere = {name for node in ast.walk(tree) if isinstance(node, ast.Global) for name in node.names}
    counts, _ = _bindings(tree.body)
    for stmt in _module_level_assignments(tree.body):
        name = _simple_target(stmt)
        if name and counts.get(name) == 1 and name not in shared_anywhere:
            found.append(_Candidate(stmt, name, "module"))
    for node in ast.walk(tree):
        if isinstance(node, ast.ClassDef):
            counts, shared = _bindings(node.body)
            stored_attributes = {item.attr for item in ast.walk(node)
                                 if isinstance(item, ast.Attribute) and isinstance(item.ctx, ast.Store)}
            plain = _plain_class(node)
            for stmt in node.body:
                name = _simple_target(stmt) if isinstance(stmt, ast.Assign) else None
                if name and counts.get(name) == 1 and name not in shared and name not in stored_attributes:
                    found.append(_Candidate(stmt, name, "class", plain))
        elif isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
            counts, shared = _bindings(node.body, _param_names(node))
            for stmt in _scope_nodes(node.body):
                name = _simple_target(stmt) if isinstance(stmt, ast.Assign) else None
                if name and counts.get(name) == 1 and name not in shared:
                    found.append(_Candidate(stmt, name, "function"))
    return found


def _own_returns(node) -> tuple[list[ast.Return], bool]:
    """The ``return`` statements of a function itself, and whether it is a generator."""
    returns, generator = [], False
    for item in _scope_nodes(node.body):
        if isinstance(item, ast.Return):
            returns.append(item)
        elif isinstance(item, (ast.Yield, ast.YieldFrom)):
            generator = True
    return returns, generator


# == units ===================================================================================

def printable_unit(value, table) -> str | None:
    """The unit to write for a value, or None when it is not certain or not printable."""
    if not isinstance(value, Quantity) or value.scales is None or len(value.scales) != 1:
        return None
    # candidates: the composed label with its factors cancelled (W/(m^2*K)*m^2 -> W/K), the
    # label dimcheck shows in messages, the composed one, and the coherent SI form when the
    # scale is 1; the one with the fewest unit names (then the shortest) that reads back wins
    shown = value.display_unit().strip()
    composed = (value.label or "").strip()
    texts = [simplify_label(composed), simplify_label(shown), shown, composed]
    if math.isclose(value.scales[0], 1.0, rel_tol=1e-9):
        texts.append(si_label(value.dimension))
    readable = [text for text in dict.fromkeys(texts) if text and _reads_back(text, value, table)]
    if not readable:
        return None
    return min(readable, key=lambda text: (len(_NAME.findall(text)), len(text)))


_NAME = re.compile(r"[A-Za-z_][A-Za-z0-9_]*")


def _reads_back(label: str, value: Quantity, table) -> bool:
    """The label parses to the value's dimension, scale and offset, and a comment reads it."""
    from ..units import parse_unit

    if not label or len(label) > 80 or '"' in label or "\\" in label:
        return False
    try:
        unit = parse_unit(label, table)
    except Exception:  # UnitError, or anything odd in a label: skip, never guess
        return False
    if unit.dimension != value.dimension or unit.scale is None or not math.isfinite(unit.scale):
        return False
    if not math.isclose(unit.scale, value.scales[0], rel_tol=1e-9) or unit.is_offset != bool(value.offset):
        return False
    parsed = read_bracket(f"# [{label}]")
    return parsed is not None and parsed[0] == label  # the comment reader must read it back


_TOKEN = re.compile(r"\s*(\*\*|[A-Za-z_][A-Za-z0-9_]*|\d+|[-*/^()])")


def simplify_label(label: str) -> str | None:
    """Cancel and gather the factors of a composed label (``K/(K/h)`` -> ``h``,
    ``m*m/s`` -> ``m^2/s``); None when it holds anything but names, products, quotients,
    parentheses and integer powers, or when nothing cancels."""
    tokens, position = [], 0
    while position < len(label):
        match = _TOKEN.match(label, position)
        if match is None:
            return None
        tokens.append(match.group(1))
        position = match.end()
        if label[position:].strip() == "":
            break
    powers: dict[str, Fraction] = {}
    count = [0]
    index = [0]

    def peek():
        return tokens[index[0]] if index[0] < len(tokens) else None

    def factor(sign: Fraction, depth: int) -> bool:
        token = peek()
        if token is None or depth > 20:
            return False
        index[0] += 1
        if token == "(":
            inner: dict[str, Fraction] = {}
            if not product(inner, depth + 1) or peek() != ")":
                return False
            index[0] += 1
            items = inner
        elif token.isdigit():
            if token != "1":
                return False
            items = {}
        elif token[0].isalpha() or token[0] == "_":
            items = {token: Fraction(1)}
            count[0] += 1
        else:
            return False
        exponent = Fraction(1)
        if peek() in ("^", "**"):
            index[0] += 1
            negative = peek() == "-"
            if negative:
                index[0] += 1
            digits = peek()
            if digits is None or not digits.isdigit():
                return False
            index[0] += 1
            exponent = Fraction(-int(digits) if negative else int(digits))
        for name, power in items.items():
            powers_target[-1][name] = powers_target[-1].get(name, Fraction(0)) + sign * power * exponent
        return True

    powers_target = [powers]

    def product(target: dict, depth: int) -> bool:
        powers_target.append(target)
        try:
            if not factor(Fraction(1), depth):
                return False
            while peek() in ("*", "/"):
                sign = Fraction(1) if tokens[index[0]] == "*" else Fraction(-1)
                index[0] += 1
                if not factor(sign, depth):
                    return False
            return True
        finally:
            powers_target.pop()

    if not product(powers, 0) or index[0] != len(tokens):
        return None
    kept = [(name, power) for name, power in powers.items() if power != 0]
    if len(kept) >= count[0]:
        return None  # nothing cancelled or gathered: keep the label as written
    def show(name: str, power: Fraction) -> str:
        return name if power == 1 else f"{name}^{power.numerator}"
    top = "*".join(show(n, p) for n, p in kept if p > 0) or "1"
    bottom = [show(n, -p) for n, p in kept if p < 0]
    if not bottom:
        return top
    return f"{top}/{bottom[0]}" if len(bottom) == 1 else f"{top}/({'*'.join(bottom)})"


def _same_unit(a: Quantity, b: Quantity) -> bool:
    return (a.dimension == b.dimension and a.scales is not None and b.scales is not None
            and len(a.scales) == len(b.scales) == 1
            and math.isclose(a.scales[0], b.scales[0], rel_tol=1e-9) and bool(a.offset) == bool(b.offset))


def _settled(values: list) -> Quantity | None:
    """One quantity when every observation of an expression agrees, else None."""
    if not values or not all(isinstance(v, Quantity) for v in values):
        return None
    first = values[0]
    return first if all(_same_unit(first, other) for other in values[1:]) else None


# == planning ==================================================================================

def plan(paths: list[str], config=None) -> Plan:
    """What to insert in each ``.py`` file under ``paths``."""
    from ..cli.discovery import discover
    from ..declarations.names import NameUnits
    from ..declarations.suppressions import skips_file
    from ..inference.engine import Engine
    from ..rules.finding import display_path
    from ..runner import Checker

    checker = Checker(config)
    config = checker.config
    files, errors = discover(paths, config.exclude, config.exclude_base)
    result = Plan(errors=list(errors))
    project = checker.new_project()
    engine = Engine(project, checker.table)
    name_units = NameUnits(dict(config.name_units), bool(config.suffix_units))

    loaded_modules = []
    watched: dict[int, ast.AST] = {}
    for path in files:
        if not path.endswith(".py"):
            continue  # stubs declare, notebooks are JSON: nothing to write back
        if not os.path.isfile(path):
            result.errors.append(f"{display_path(path)}: not a regular file")
            continue
        loaded = project.load(path)
        if loaded.symbols is None:
            result.errors.append(f"{display_path(path)}: {loaded.error.message}")
            continue
        if loaded.text is not None and skips_file(loaded.text):
            continue
        module = loaded.symbols
        candidates = assignment_candidates(module.tree)
        loaded_modules.append((path, module, candidates))
        for candidate in candidates:
            watched[id(candidate.stmt.value)] = candidate.stmt.value
        for function in module.all_functions:
            if not isinstance(function.node, ast.Lambda):
                for item in _own_returns(function.node)[0]:
                    if item.value is not None:
                        watched[id(item.value)] = item.value

    seen: dict[int, list] = {}

    def observe(_module, node, value):
        if watched.get(id(node)) is node:
            seen.setdefault(id(node), []).append(value)

    engine.observer = observe
    for path, module, candidates in loaded_modules:
        engine.check_module(module)
        file_plan = FilePlan(path)
        file_plan.insertions = _file_insertions(engine, module, candidates, seen, checker.table, name_units)
        if file_plan.insertions:
            result.files.append(file_plan)
    return result


def _file_insertions(engine, module, candidates, seen, table, name_units) -> list[Insertion]:
    if not engine.project.can_have_units(module):
        return []
    assign_order = {id(node): index for index, node in enumerate(_in_source_order(module.tree, ast.Assign))}
    def_order = {id(node): index for index, node in
                 enumerate(_in_source_order(module.tree, (ast.FunctionDef, ast.AsyncFunctionDef)))}
    commented = set(module.comment_units)
    insertions: list[Insertion] = []
    for candidate in candidates:
        stmt = candidate.stmt
        last = stmt.end_lineno or stmt.lineno
        if any(line in commented for line in range(stmt.lineno, last + 1)):
            continue  # a unit comment already declares it
        if name_units.active and name_units.unit_for(candidate.name) is not None:
            continue  # declared by its name; an explicit unit would override that rule
        value = _settled(seen.get(id(stmt.value), []))
        unit = printable_unit(value, table) if value is not None else None
        if unit is None:
            continue
        kind = "assign" if candidate.scope != "class" or candidate.plain_class else "assign-comment-only"
        insertions.append(Insertion(kind, assign_order[id(stmt)], stmt.lineno, candidate.name, unit))
    for function in module.all_functions:
        node = function.node
        if isinstance(node, ast.Lambda) or engine.declared(module, function.return_spec) is not None:
            continue  # (``-> float`` is a spec too, one that declares no unit)
        if _annotated_head(node.returns) or "overload" in function.decorators:
            continue
        returns, generator = _own_returns(node)
        if generator or not returns or any(item.value is None for item in returns):
            continue
        result = engine.baseline(function).value
        unit = printable_unit(result, table)
        if unit is None:
            continue
        agree = True
        for item in returns:
            values = seen.get(id(item.value), [])
            bare = values and all(isinstance(v, Bare) for v in values)
            settled = _settled(values)
            if not bare and (settled is None or not _same_unit(settled, result)):
                agree = False
                break
        if agree:
            insertions.append(Insertion("return", def_order[id(node)], node.lineno, function.name, unit))
    insertions.sort(key=lambda item: (item.line, item.kind))
    return insertions


def _annotated_head(annotation) -> bool:
    if annotation is None:
        return False
    head = annotation.value if isinstance(annotation, ast.Subscript) else annotation
    name = head.attr if isinstance(head, ast.Attribute) else getattr(head, "id", None)
    return name == "Annotated"


def _in_source_order(tree: ast.AST, kinds) -> list[ast.AST]:
    nodes = [node for node in ast.walk(tree) if isinstance(node, kinds)]
    nodes.sort(key=lambda node: (node.lineno, node.col_offset))
    return nodes


# == rewriting ================================================================================

@dataclass
class Rewritten:
    new: bytes
    applied: list[Insertion]


def rewrite(source: bytes, insertions: list[Insertion], style: str = "comment") -> Rewritten:
    """Apply insertions to a file's bytes through libcst; the result is checked to hold
    every old line (only insertions) and to parse. With no insertions the file goes through
    the same path and comes back unchanged. Raises AnnotateError."""
    import libcst as cst

    if style not in STYLES:
        raise AnnotateError(f"unknown style {style!r} (choose {' or '.join(STYLES)})")
    if style == "annotated" and insertions and _defines_annotated(source):
        raise AnnotateError("the module binds its own name 'Annotated'; use --style comment here")
    try:
        module = cst.parse_module(source)
    except Exception as error:  # libcst's parser is stricter than Python's in corners
        raise AnnotateError(f"cannot rewrite: libcst could not parse the file "
                            f"({_first_line(error)})") from None
    transformer = _Inserter(insertions, style, cst)
    updated = module.visit(transformer)
    if insertions and _counts(source) != (transformer.assign_count, transformer.def_count):
        raise AnnotateError("cannot rewrite: libcst and Python read the file's statements differently")
    if transformer.needs_import and not _imports_annotated(updated):
        updated = _add_import(updated, cst)
    new = updated.bytes if transformer.applied else module.bytes
    verify(source, new)
    return Rewritten(new, transformer.applied)


def _first_line(error: Exception) -> str:
    text = str(error).strip().splitlines()
    return text[0] if text else type(error).__name__


def _defines_annotated(source: bytes) -> bool:
    """``Annotated`` bound by something other than an import (a class, an assignment)."""
    for node in ast.walk(ast.parse(source)):
        if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef, ast.ClassDef)) and node.name == "Annotated":
            return True
        if isinstance(node, ast.Name) and node.id == "Annotated" and isinstance(node.ctx, ast.Store):
            return True
    return False


def _counts(source: bytes) -> tuple[int, int]:
    tree = ast.parse(source)
    return (sum(isinstance(node, ast.Assign) for node in ast.walk(tree)),
            sum(isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)) for node in ast.walk(tree)))


def _Inserter(insertions, style, cst):
    """A libcst transformer, built here so that libcst is imported only when needed."""

    class Inserter(cst.CSTTransformer):
        def __init__(self):
            super().__init__()
            self.assigns = {item.ordinal: item for item in insertions if item.kind.startswith("assign")}
            self.returns = {item.ordinal: item for item in insertions if item.kind == "return"}
            self.assign_count = 0
            self.def_count = 0
            self.ordinal_of: dict[int, int] = {}
            self.applied: list[Insertion] = []
            self.needs_import = False

        # -- counting, in source order (pre-order visits) --------------------------------
        def visit_Assign(self, node) -> bool:
            self.ordinal_of[id(node)] = self.assign_count
            self.assign_count += 1
            return True

        def visit_FunctionDef(self, node) -> bool:
            self.ordinal_of[id(node)] = self.def_count
            self.def_count += 1
            return True

        # -- assignments ---------------------------------------------------------------------
        def leave_SimpleStatementLine(self, original, updated):
            if len(original.body) != 1 or not isinstance(original.body[0], cst.Assign):
                return updated
            item = self.assigns.get(self.ordinal_of.get(id(original.body[0]), -1))
            assign = updated.body[0]
            if item is None or len(assign.targets) != 1 or not isinstance(assign.targets[0].target, cst.Name) \
                    or assign.targets[0].target.value != item.name:
                return updated
            comment = updated.trailing_whitespace.comment
            if comment is not None and comment.value[1:].strip().startswith("["):
                return updated  # a bracket opens the comment already: a unit, a citation or code
            if style == "annotated" and item.kind == "assign":
                target = assign.targets[0]
                annotated = cst.AnnAssign(
                    target=target.target,
                    annotation=cst.Annotation(
                        annotation=_annotated_expr(cst, None, item.unit),
                        whitespace_before_indicator=cst.SimpleWhitespace(""),
                        whitespace_after_indicator=cst.SimpleWhitespace(" ")),
                    value=assign.value,
                    equal=cst.AssignEqual(whitespace_before=target.whitespace_before_equal,
                                          whitespace_after=target.whitespace_after_equal),
                    semicolon=assign.semicolon)
                self.applied.append(item)
                self.needs_import = True
                return updated.with_changes(body=[annotated])
            trailing = updated.trailing_whitespace
            if comment is None:
                new_trailing = trailing.with_changes(
                    whitespace=cst.SimpleWhitespace("  "), comment=cst.Comment(f"# [{item.unit}]"))
            else:
                body = comment.value[1:]
                if not _may_prefix(body):
                    return updated
                space = "" if body[:1].isspace() or not body else " "
                new_trailing = trailing.with_changes(comment=cst.Comment(f"# [{item.unit}]{space}{body}"))
            self.applied.append(item)
            return updated.with_changes(trailing_whitespace=new_trailing)

        # -- returns ------------------------------------------------------------------------
        def leave_FunctionDef(self, original, updated):
            item = self.returns.get(self.ordinal_of.get(id(original), -1))
            if item is None or style != "annotated" or updated.name.value != item.name:
                return updated
            existing = updated.returns
            if existing is None:
                annotation = cst.Annotation(annotation=_annotated_expr(cst, None, item.unit),
                                            whitespace_before_indicator=cst.SimpleWhitespace(" "),
                                            whitespace_after_indicator=cst.SimpleWhitespace(" "))
            else:  # keep the user's type inside: -> float becomes -> Annotated[float, "m"]
                annotation = existing.with_changes(
                    annotation=_annotated_expr(cst, existing.annotation, item.unit))
            self.applied.append(item)
            self.needs_import = True
            return updated.with_changes(returns=annotation)

    return Inserter()


def _may_prefix(comment_body: str) -> bool:
    """Whether ``[unit] `` may go in front of an existing comment's text."""
    text = comment_body.strip()
    if text.startswith("["):
        return False  # a bracket already opens it: a unit, a citation or code
    lowered = text.lower()
    return not any(lowered.startswith(directive) for directive in _DIRECTIVES)


def _annotated_expr(cst, inner, unit: str):
    base = inner if inner is not None else cst.Name("float")
    return cst.Subscript(
        value=cst.Name("Annotated"),
        slice=[cst.SubscriptElement(cst.Index(base), comma=cst.Comma(whitespace_after=cst.SimpleWhitespace(" "))),
               cst.SubscriptElement(cst.Index(cst.SimpleString(f'"{unit}"')))])


def _imports_annotated(module) -> bool:
    """``Annotated`` bound by an unconditional top-level import."""
    import libcst as cst

    for statement in module.body:
        if not isinstance(statement, cst.SimpleStatementLine):
            continue
        for small in statement.body:
            if isinstance(small, cst.ImportFrom) and not isinstance(small.names, cst.ImportStar):
                for alias in small.names:
                    bound = alias.asname.name if alias.asname else alias.name
                    if isinstance(bound, cst.Name) and bound.value == "Annotated":
                        return True
    return False


def _is_docstring(statement, cst) -> bool:
    return (isinstance(statement, cst.SimpleStatementLine) and len(statement.body) == 1
            and isinstance(statement.body[0], cst.Expr)
            and isinstance(statement.body[0].value, (cst.SimpleString, cst.ConcatenatedString)))


def _is_future_import(statement, cst) -> bool:
    return (isinstance(statement, cst.SimpleStatementLine) and statement.body
            and all(isinstance(small, cst.ImportFrom) and isinstance(small.module, cst.Name)
                    and small.module.value == "__future__" and not small.relative
                    for small in statement.body))


def _add_import(module, cst):
    """``from typing import Annotated`` after the docstring and the ``__future__`` imports."""
    body = list(module.body)
    index = 0
    if body and _is_docstring(body[0], cst):
        index = 1
    while index < len(body) and _is_future_import(body[index], cst):
        index += 1
    statement = cst.parse_statement("from typing import Annotated\n", config=module.config_for_parsing)
    if index == 1 and _is_docstring(body[0], cst):
        statement = statement.with_changes(leading_lines=[cst.EmptyLine()])  # apart from the docstring
    body.insert(index, statement)
    return module.with_changes(body=body)


# == safety ====================================================================================

def _is_subsequence(small: str, large: str) -> bool:
    position = 0
    for char in small:
        position = large.find(char, position)
        if position < 0:
            return False
        position += 1
    return True


def verify(old: bytes, new: bytes) -> None:
    """Refuse a rewrite that loses any byte of the old text or that does not parse."""
    if old == new:
        return
    old_lines = old.decode("latin-1").splitlines(keepends=True)
    new_lines = new.decode("latin-1").splitlines(keepends=True)
    matcher = difflib.SequenceMatcher(None, old_lines, new_lines, autojunk=False)
    for tag, i1, i2, j1, j2 in matcher.get_opcodes():
        if tag == "delete" or (tag == "replace" and not _is_subsequence(
                "".join(old_lines[i1:i2]), "".join(new_lines[j1:j2]))):
            raise AnnotateError(f"refused: the rewrite would change line {i1 + 1} beyond inserting units")
    try:
        ast.parse(new)
    except (SyntaxError, ValueError, RecursionError, MemoryError) as error:
        raise AnnotateError(f"refused: the rewritten file would not parse ({_first_line(error)})") from None


def unified_diff(old: bytes, new: bytes, shown: str, encoding: str = "utf-8") -> str:
    """A unified diff with ``a/`` and ``b/`` paths; marks a last line with no newline."""
    def lines(data: bytes) -> list[str]:
        text = data.decode(encoding, errors="replace")
        return text.splitlines(keepends=True)

    out = []
    for line in difflib.unified_diff(lines(old), lines(new), f"a/{shown}", f"b/{shown}"):
        out.append(line if line.endswith("\n") else line + "\n\\ No newline at end of file\n")
    return "".join(out)


def source_encoding(data: bytes) -> str:
    """The encoding Python reads a file's bytes in (PEP 263, BOM)."""
    import io
    import tokenize

    try:
        return tokenize.detect_encoding(io.BytesIO(data).readline)[0]
    except (SyntaxError, LookupError):
        return "utf-8"


def write_atomically(path: str, data: bytes, expected_old: bytes) -> None:
    """Replace a file's content in one step, keeping its mode; refuse when the file changed
    since it was read or when anything fails (the file is then untouched)."""
    import shutil
    import tempfile

    real = os.path.realpath(path)  # write through a symlink, never replace the link itself
    with open(real, "rb") as handle:
        if handle.read() != expected_old:
            raise AnnotateError("refused: the file changed while it was being annotated")
    folder = os.path.dirname(real) or "."
    handle = tempfile.NamedTemporaryFile("wb", dir=folder, prefix=f".{os.path.basename(real)}.",
                                         suffix=".dimcheck-tmp", delete=False)
    try:
        with handle:
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())
        shutil.copymode(real, handle.name)
        os.replace(handle.name, real)
    except BaseException:
        try:
            os.unlink(handle.name)
        except OSError:
            pass
        raise
