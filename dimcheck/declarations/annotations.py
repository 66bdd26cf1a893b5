"""Reading unit declarations out of type annotations (PEP 593 ``Annotated``).

``Annotated[float, "kg/m^3"]`` and ``Annotated[float, Unit("kg/m^3")]`` declare a unit.
A bare name (``Density``) or dotted name (``units.Density``) may be an alias of such an
annotation; the caller resolves it against the module's aliases and imports.
``Optional[...]`` and ``X | None`` around a declaration are looked through.
"""

from __future__ import annotations

import ast
from dataclasses import dataclass
from functools import lru_cache


class SourceSpan:
    """Where a piece of source stands: a syntax node's position attributes without the
    node, which a declaration would otherwise keep alive (and its module's tree with it)."""

    __slots__ = ("lineno", "col_offset", "end_lineno", "end_col_offset")

    def __init__(self, node: ast.AST):
        self.lineno = node.lineno
        self.col_offset = node.col_offset
        self.end_lineno = getattr(node, "end_lineno", None)
        self.end_col_offset = getattr(node, "end_col_offset", None)


@dataclass(slots=True, eq=False)
class UnitText:
    """A unit expression written in source, with where it stands. Each is its own
    declaration: equal only to itself (it keys the resolver's memo, hashed per lookup).
    Not frozen, though never changed: a frozen dataclass is three times slower to make,
    and tens of thousands are made."""

    text: str
    # the string literal's position (for a DIM901), or a DeclarationSite for a unit read
    # from a comment, a docstring or a name
    node: "SourceSpan | ast.AST"
    quantity_type: bool = False  # Annotated[pint.Quantity, "m"]: the value is a pint quantity


@dataclass(frozen=True, slots=True, eq=False)
class AliasRef:
    """A name that may refer to an ``Annotated`` alias: ``Density`` or ``units.Density``.
    One object per name (``_alias_ref``), so equal means identical."""

    parts: tuple[str, ...]


# Types that hold numbers but never a unit: ``x: float = 2.5  # [m]`` is declared by its
# comment (an alias such as ``Length`` is looked up instead, and wins when it is a unit).
PLAIN_TYPES = frozenset({"float", "int", "complex", "bool", "Decimal", "Fraction", "ndarray", "NDArray",
                         "ArrayLike", "float64", "float32", "Any"})


class TupleSpec:
    """``tuple[Annotated[float, "m"], Annotated[float, "s"]]``: a declaration for each
    member of a tuple of fixed length (a member may declare nothing: None)."""

    __slots__ = ("items",)

    def __init__(self, items: tuple):
        self.items = items


def _name_of(node: ast.AST) -> str | None:
    if isinstance(node, ast.Name):
        return node.id
    if isinstance(node, ast.Attribute):
        return node.attr
    return None


def dotted_name(node: ast.AST | None) -> tuple[str, ...] | None:
    """``a.b.c`` as ``("a", "b", "c")``; None for anything but a (dotted) name."""
    parts: list[str] = []
    while isinstance(node, ast.Attribute):
        parts.append(node.attr)
        node = node.value
    if isinstance(node, ast.Name):
        parts.append(node.id)
        found = tuple(reversed(parts))
        return _DOTTED_NAMES.setdefault(found, found)  # one tuple per name: thousands repeat
    return None


_DOTTED_NAMES: dict[tuple[str, ...], tuple[str, ...]] = {}


@lru_cache(maxsize=None)
def _alias_ref(parts: tuple[str, ...]) -> AliasRef:
    """One object per name: thousands of parameters repeat the same few aliases."""
    return AliasRef(parts)


def _unit_in_metadata(item: ast.AST) -> UnitText | None:
    if isinstance(item, ast.Constant) and isinstance(item.value, str):
        return UnitText(item.value, SourceSpan(item))
    if (isinstance(item, ast.Call) and _name_of(item.func) == "Unit" and item.args
            and isinstance(item.args[0], ast.Constant) and isinstance(item.args[0].value, str)):
        return UnitText(item.args[0].value, SourceSpan(item.args[0]))
    return None


def read_annotation(node: ast.AST | None, _depth: int = 0) -> UnitText | AliasRef | None:
    """The unit declared by an annotation expression, an alias to resolve, or None."""
    if node is None or _depth > 8:
        return None
    if node.__class__ is ast.Name:  # the usual case, ``rho: Density``: read without the search below
        return None if node.id in PLAIN_TYPES else _alias_ref((node.id,))
    if isinstance(node, ast.Constant) and isinstance(node.value, str):
        # A string annotation (forward reference): parse it as an expression, never run it.
        if len(node.value) > 2000:
            return None
        try:
            inner = ast.parse(node.value, mode="eval").body
        except (SyntaxError, ValueError, RecursionError, MemoryError):
            return None
        return read_annotation(inner, _depth + 1)
    if isinstance(node, ast.Subscript):
        head = _name_of(node.value)
        if head == "Annotated":
            elements = node.slice.elts if isinstance(node.slice, ast.Tuple) else [node.slice]
            for item in elements[1:]:
                found = _unit_in_metadata(item)
                if found is not None:
                    base = elements[0].value if isinstance(elements[0], ast.Subscript) else elements[0]
                    if _name_of(base) == "Quantity":
                        return UnitText(found.text, found.node, quantity_type=True)
                    return found
            return read_annotation(elements[0], _depth + 1) if elements else None
        if head in ("Optional", "Final", "ClassVar"):
            return read_annotation(node.slice, _depth + 1)
        if head in ("tuple", "Tuple") and isinstance(node.slice, ast.Tuple):
            return _tuple_spec(node.slice.elts, _depth)
        if head == "Union" and isinstance(node.slice, ast.Tuple):
            return _first_of_union(node.slice.elts, _depth)
        return None
    if isinstance(node, ast.BinOp) and isinstance(node.op, ast.BitOr):
        return _first_of_union([node.left, node.right], _depth)
    if isinstance(node, (ast.Name, ast.Attribute)):
        parts = dotted_name(node)
        return _alias_ref(parts) if parts and parts[-1] not in PLAIN_TYPES else None
    return None


def _tuple_spec(members, depth: int) -> TupleSpec | None:
    """The members' declarations, when at least one declares something; ``tuple[X, ...]``
    (any length) declares no member."""
    if any(isinstance(m, ast.Constant) and m.value is Ellipsis for m in members):
        return None
    items = tuple(read_annotation(member, depth + 1) for member in members)
    return TupleSpec(items) if any(item is not None for item in items) else None


def _first_of_union(members, depth: int):
    real = [m for m in members if not (isinstance(m, ast.Constant) and m.value is None)
            and not (isinstance(m, ast.Name) and m.id == "None")]
    if len(real) != 1:
        return None
    return read_annotation(real[0], depth + 1)
