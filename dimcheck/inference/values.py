"""Abstract values: what the inference pass knows about an expression.

* ``UNKNOWN`` (or an ``Unknown`` carrying a constant) - nothing is known about the
  dimension; it absorbs everything and never causes a finding.
* ``Bare`` - a literal number; it takes the unit it is bound to.
* ``Quantity`` - a known dimension, with the candidate scales it may be in.
* ``TupleValue`` and the reference values (functions, classes, modules, instances)
  carry structure so that unpacking, calls and attribute access can be followed.
"""

from __future__ import annotations

import math
from functools import lru_cache
from fractions import Fraction
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

from ..units.dimension import Dimension
from .labels import compose_label, power_label, si_label

if TYPE_CHECKING:
    from ..declarations.symbols import ClassInfo, FunctionInfo

MAX_SCALE_CANDIDATES = 8
SCALE_TOLERANCE = 1e-9


class Unknown:
    """Nothing is known about the dimension. ``const`` keeps a folded numeric value."""

    __slots__ = ("const",)

    def __init__(self, const: float | None = None):
        self.const = const

    def __repr__(self) -> str:
        return "UNKNOWN" if self.const is None else f"Unknown(const={self.const!r})"


UNKNOWN = Unknown()
# The result of a call that is already being analysed (recursion): unknown, but left
# out when a function's returns are merged, so ``return x`` elsewhere still counts.
RECURSION = Unknown()


@dataclass(slots=True, eq=False)
class Origin:
    """Where a unit came from: file, line and the kind of declaration (one per declared
    unit; not frozen, see UnitText)."""

    path: str
    line: int
    kind: str  # "annotation", "comment", "stub", ...
    name: str = ""


class Bare:
    """A numeric literal (or arithmetic of literals) with no unit of its own."""

    __slots__ = ("value",)

    def __init__(self, value: float):
        self.value = value

    @property
    def is_zero(self) -> bool:
        return self.value == 0

    def __repr__(self) -> str:
        return f"Bare({self.value!r})"


class Quantity:
    """A value of known dimension.

    ``scales`` holds the candidate SI factors of the number's unit (more than one
    after multiplying by a bare factor, which may be a coefficient or a conversion);
    ``None`` means the scale is open (a dimension-only declaration).
    """

    __slots__ = ("dimension", "scales", "_label", "derived", "origin", "offset", "tolerance", "pint")

    def __init__(self, dimension: Dimension, scales: tuple[float, ...] | None, label: "str | tuple",
                 derived: bool = False, origin: Origin | None = None, offset: bool = False,
                 tolerance: float = 0.0, pint: bool = False):
        self.dimension = dimension
        self.scales = scales
        # a product's or a power's label is kept as its operands until a message needs it
        self._label = label
        self.derived = derived
        self.origin = origin
        self.offset = offset
        # relative uncertainty of the scale beyond SCALE_TOLERANCE: a conversion typed as
        # a rounded published factor (6894.757 for psi) is only as exact as its digits
        self.tolerance = tolerance
        # a pint quantity at run time: pint converts scales itself and refuses some
        # operations a plain float allows (contract, section 8)
        self.pint = pint

    def __repr__(self) -> str:
        return f"Quantity({self.describe()}, scales={self.scales})"

    @property
    def is_dimensionless(self) -> bool:
        return self.dimension.is_dimensionless

    @property
    def label(self) -> str:
        label = self._label
        if label.__class__ is tuple:
            if len(label) == 2:  # (base, exponent) of a power
                base, exponent = label
                label = power_label(base.display_unit(), exponent)
            else:  # (left, "*" or "/", right) of a product
                left, operator, right = label
                label = compose_label(left.display_unit(), operator, right.display_unit())
            self._label = label
        return label

    def display_unit(self) -> str:
        """The unit as the user wrote it, or a coherent SI form for a derived value."""
        if self.derived and (self.scales is None or any(_close(s, 1.0) for s in self.scales)):
            return si_label(self.dimension)
        return self.label

    def describe(self) -> str:
        """``m/s [L T^-1]``: the unit and the dimension, for messages."""
        return f"{self.display_unit()} [{self.dimension.format()}]"

    def with_label(self, label: str) -> "Quantity":
        return Quantity(self.dimension, self.scales, label, True, None, self.offset, self.tolerance, self.pint)

    def replace(self, **changes) -> "Quantity":
        fields = {"dimension": self.dimension, "scales": self.scales, "label": self._label,
                  "derived": self.derived, "origin": self.origin, "offset": self.offset,
                  "tolerance": self.tolerance, "pint": self.pint}
        fields.update(changes)
        return Quantity(**fields)


@dataclass(slots=True)
class TupleValue:
    items: tuple[Any, ...]


class IterableValue:
    """What ``zip(...)`` or ``enumerate(...)`` gives: an iterator whose every item holds
    ``element`` (a tuple of the members' elements), for loops and comprehensions."""

    __slots__ = ("element",)

    def __init__(self, element: Any):
        self.element = element


@dataclass(slots=True)
class FunctionValue:
    function: "FunctionInfo"
    bound_self: Any = None  # the instance (or class) a method is bound to
    closure: Any = None  # the enclosing scope of a nested function or lambda


@dataclass(slots=True)
class ClassValue:
    info: "ClassInfo"


@dataclass(slots=True)
class InstanceValue:
    info: "ClassInfo"


@dataclass(slots=True)
class PintRegistryValue:
    """A pint ``UnitRegistry`` (``ureg``): its attributes are units, calling it parses."""


@dataclass(slots=True)
class PintFactoryValue:
    """``ureg.Quantity``, ``Q_``, ``pint.Quantity``: calling it builds a quantity."""


@dataclass(slots=True)
class PintMethodValue:
    """A method of a pint quantity (``q.to``, ``q.m_as``...), bound to the quantity."""

    owner: Any
    name: str


@dataclass(slots=True)
class ModuleValue:
    """A module of the checked tree or a stubbed library module."""

    name: str
    attributes: dict = field(default_factory=dict)


# -- scale arithmetic ---------------------------------------------------------------

def _close(a: float, b: float, tolerance: float = 0.0) -> bool:
    return math.isclose(a, b, rel_tol=SCALE_TOLERANCE + tolerance)


def scales_overlap(a: tuple[float, ...] | None, b: tuple[float, ...] | None,
                   tolerance: float = 0.0) -> bool:
    """True when the two candidate sets share a scale, or either is open."""
    if a is None or b is None:
        return True
    if a == b:  # the usual case, without a closeness test per pair
        return bool(a)
    return any(_close(x, y, tolerance) for x in a for y in b)


def quantities_share_scale(a: "Quantity", b: "Quantity") -> bool:
    return scales_overlap(a.scales, b.scales, a.tolerance + b.tolerance)


@lru_cache(maxsize=10_000, typed=True)  # factors repeat; typed: an int is always exact
def literal_tolerance(value: float) -> float:
    """How exact a typed factor is: 0 for short literals (1000, 0.0254, 3.6e6), else half a
    unit in its last significant digit, relative (6894.757 -> 5e-7)."""
    if isinstance(value, int) or not math.isfinite(value) or value == 0:
        return 0.0
    digits = repr(abs(value)).lower().split("e")[0].replace(".", "").lstrip("0")
    if len(digits) <= 4:
        return 0.0
    return min(5e-5, 0.5 * 10.0 ** (1 - len(digits)))


def _dedupe(values) -> tuple[float, ...] | None:
    result: list[float] = []
    for value in values:
        if not math.isfinite(value) or value == 0:
            return None
        if not any(_close(value, kept) for kept in result):
            result.append(value)
    if len(result) > MAX_SCALE_CANDIDATES:
        return None
    return tuple(result)


def multiply_scales(a, b):
    if a is None or b is None:
        return None
    if len(a) == 1 and len(b) == 1:  # the usual case: one scale each
        return _single_scale(a[0] * b[0])
    return _dedupe(x * y for x in a for y in b)


def divide_scales(a, b):
    if a is None or b is None:
        return None
    if len(a) == 1 and len(b) == 1:
        return _single_scale(a[0] / b[0])
    return _dedupe(x / y for x in a for y in b)


def _single_scale(value: float) -> tuple[float, ...] | None:
    """``_dedupe`` of one value."""
    return (value,) if value != 0 and math.isfinite(value) else None


def power_scales(a, exponent: float):
    if a is None:
        return None
    try:
        return _dedupe(x ** exponent for x in a)
    except (OverflowError, ZeroDivisionError, ValueError):
        return None


def scale_by_bare(scales, factor: float, divide: bool):
    """A value times (or over) a bare factor: still in its unit, or converted by it."""
    if scales is None or factor == 0 or not math.isfinite(factor):
        return scales
    if len(scales) == 1:  # the usual case: (s,) or (s, converted)
        scale = scales[0]
        converted = scale * factor if divide else scale / factor
        if converted == 0 or not math.isfinite(converted) or scale == 0 or not math.isfinite(scale):
            return None
        return scales if _close(converted, scale) else (scale, converted)
    converted = [s * factor if divide else s / factor for s in scales]
    return _dedupe(list(scales) + converted)


def intersect_scales(a, b):
    if a is None:
        return b
    if b is None:
        return a
    common = tuple(x for x in a if any(_close(x, y) for y in b))
    return common or a



def quantity_product(left: Quantity, right: Quantity, divide: bool) -> Quantity:
    dimension = left.dimension / right.dimension if divide else left.dimension * right.dimension
    scales = divide_scales(left.scales, right.scales) if divide else multiply_scales(left.scales, right.scales)
    label = (left, "/" if divide else "*", right)  # composed only if a message shows it
    return Quantity(dimension, scales, label, derived=True, tolerance=left.tolerance + right.tolerance,
                    pint=left.pint or right.pint)


@lru_cache(maxsize=10_000)  # a program uses the same few exponents over and over
def exact_exponent(value: float) -> Fraction | None:
    """A literal exponent as an exact fraction (0.5 -> 1/2, 1/3 -> 1/3), or None."""
    try:
        fraction = Fraction(value).limit_denominator(1000)
    except (OverflowError, ValueError, TypeError):
        return None
    if abs(float(fraction) - value) > 1e-9 * max(1.0, abs(value)) or abs(fraction) > 1000:
        return None
    return fraction
