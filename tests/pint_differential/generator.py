"""Hypothesis strategies that write small pint-using programs, one statement a line.

pint is the reference library here: whatever pint does at run time with a generated
program is the verdict dimcheck's static check must reproduce (contract section 8).

Every program is the five-line header ``HEADER`` followed by 2-5 statements, each binding
a fresh name (``v1``, ``v2``, ...) on its own line, so the line of the statement pint
rejects is the line dimcheck must report. The generator never runs anything; it only
writes text. ``tests/pint_differential/oracle.py`` runs the programs it wrote with pint.

The generator keeps a little static bookkeeping per name so that most programs are
meaningful rather than instantly rejected:

- ``kind``: ``"q"`` (surely a pint quantity), ``"f"`` (surely a plain number), ``"qf"``
  (either, e.g. ``max`` of a quantity and a number) or ``"b"`` (a comparison result, never
  reused). Methods (``.to``, ``.magnitude``, ``.m_as`` ...) are only called on ``"q"``.
- ``family``: a rough physical family of the unit the value was built from (length, time,
  temperature ...), used to pick a compatible partner or target unit about half the time.
  It is a hint for variety, not a claim about the value's real unit.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from hypothesis import strategies as st

HEADER = (
    "import math\n"
    "import numpy as np\n"
    "import pint\n"
    "ureg = pint.UnitRegistry()\n"
    "Q_ = ureg.Quantity\n"
)
HEADER_LINES = HEADER.count("\n")  # statements start on line HEADER_LINES + 1

# Unit strings by family. Strings are written into Q_(...), ureg.Quantity(...),
# .to(...) and .m_as(...).
FAMILIES: dict[str, tuple[str, ...]] = {
    "length": ("m", "mm", "km"),
    "time": ("s", "min", "hour"),
    "mass": ("kg", "g"),
    "force": ("N",),
    "pressure": ("Pa", "kPa"),
    "energy": ("J", "N*m"),
    "power": ("W", "J/s"),
    "temperature": ("K", "degC", "delta_degC"),
    "angle": ("rad", "deg", "dimensionless"),
    "frequency": ("Hz", "1/s", "rad/s"),
    "velocity": ("m/s", "km/hour"),
    "acceleration": ("m/s**2",),
    "area": ("m**2",),
    "density": ("kg/m**3",),
}
UNITS: tuple[str, ...] = tuple(unit for units in FAMILIES.values() for unit in units)
FAMILY_OF: dict[str, str] = {unit: family for family, units in FAMILIES.items() for unit in units}

# Units that are valid attribute names of a pint registry (``3.0 * ureg.kPa``).
ATTR_UNITS: tuple[str, ...] = tuple(unit for unit in UNITS if unit.isidentifier())

# Positive, modest, exactly printable numbers: no zero (division), no huge values
# (overflow in ``** 2`` chains or ``np.exp``). Zero is written only by the forms that
# are about zero (``a + 0``, ``a < 0``, ``max(a, 0)``).
NUMBERS: tuple[str, ...] = (
    "0.5", "1.5", "2.0", "2.5", "3.0", "4.0", "7.5", "12.0", "18.0", "25.0", "40.0", "3", "7",
)
ZEROS: tuple[str, ...] = ("0", "0.0")

# Statement forms. The label is what the bench groups disagreements by.
CONSTRUCTORS = ("Q_(num, unit)", "num * ureg.attr", "ureg.Quantity(num, unit)")
BINARY_NAMES = ("a + b", "a - b", "a * b", "a / b", "a < b", "max(a, b)")
WITH_NUMBER = ("a + num", "a - num", "a * num", "a < num", "max(a, num)")
WITH_ZERO = ("a + 0", "a < 0", "max(a, 0)")
UNARY_ANY = ("a ** 2", "math.sqrt(a)", "np.sqrt(a)")
QUANTITY_ONLY = ("a.to(unit)", "a.to_base_units()", "a.magnitude * num", "a.m * num", "a.m_as(unit)")
FORMS: tuple[str, ...] = (
    CONSTRUCTORS + BINARY_NAMES + WITH_NUMBER + WITH_ZERO + UNARY_ANY + ("np.exp(a / b)",) + QUANTITY_ONLY
)


@dataclass
class Name:
    name: str
    kind: str  # "q", "f", "qf" or "b"
    family: str | None


@dataclass
class Program:
    """A generated program: its full text and, per statement, the form that wrote it."""

    source: str
    forms: list[str] = field(default_factory=list)

    @property
    def statements(self) -> list[str]:
        return self.source.splitlines()[HEADER_LINES:]

    def form_at(self, line: int) -> str | None:
        """The form of the statement on 1-based ``line`` (None for the header)."""
        index = line - HEADER_LINES - 1
        return self.forms[index] if 0 <= index < len(self.forms) else None


def _combine(*kinds: str) -> str:
    """Kind of ``a op b`` for + - * / ** and numpy functions: a quantity if either is."""
    if "q" in kinds:
        return "q"
    if all(kind == "f" for kind in kinds):
        return "f"
    return "qf"


@st.composite
def _unit_like(draw, family: str | None) -> str:
    """A unit string; about half the time from ``family`` when one is known."""
    if family is not None and draw(st.booleans()):
        return draw(st.sampled_from(FAMILIES[family]))
    return draw(st.sampled_from(UNITS))


@st.composite
def _partner(draw, names: list[Name], first: Name) -> Name:
    """A second operand: about half the time one of the same family as ``first``."""
    usable = [n for n in names if n.kind != "b"]
    same = [n for n in usable if first.family is not None and n.family == first.family]
    if same and draw(st.booleans()):
        return draw(st.sampled_from(same))
    return draw(st.sampled_from(usable))


@st.composite
def _statement(draw, names: list[Name], target: str) -> tuple[str, str, Name]:
    """One statement binding ``target``; returns (form label, code, bookkeeping)."""
    usable = [n for n in names if n.kind != "b"]
    quantities = [n for n in names if n.kind == "q"]
    if not usable:
        form = draw(st.sampled_from(CONSTRUCTORS))
    else:
        form = draw(st.sampled_from(FORMS))
        if form in QUANTITY_ONLY and not quantities:
            form = draw(st.sampled_from(CONSTRUCTORS))

    if form in CONSTRUCTORS:
        number = draw(st.sampled_from(NUMBERS))
        if form == "num * ureg.attr":
            unit = draw(st.sampled_from(ATTR_UNITS))
            code = f"{number} * ureg.{unit}"
        else:
            unit = draw(st.sampled_from(UNITS))
            callee = "Q_" if form == "Q_(num, unit)" else "ureg.Quantity"
            code = f'{callee}({number}, "{unit}")'
        return form, f"{target} = {code}", Name(target, "q", FAMILY_OF[unit])

    if form in QUANTITY_ONLY:
        a = draw(st.sampled_from(quantities))
        if form == "a.to(unit)":
            unit = draw(_unit_like(a.family))
            return form, f'{target} = {a.name}.to("{unit}")', Name(target, "q", FAMILY_OF[unit])
        if form == "a.to_base_units()":
            return form, f"{target} = {a.name}.to_base_units()", Name(target, "q", a.family)
        if form == "a.m_as(unit)":
            unit = draw(_unit_like(a.family))
            return form, f'{target} = {a.name}.m_as("{unit}")', Name(target, "f", None)
        number = draw(st.sampled_from(NUMBERS))
        attribute = "magnitude" if form == "a.magnitude * num" else "m"
        return form, f"{target} = {a.name}.{attribute} * {number}", Name(target, "f", None)

    a = draw(st.sampled_from(usable))
    if form in BINARY_NAMES or form == "np.exp(a / b)":
        b = draw(_partner(names, a))
        if form == "np.exp(a / b)":
            return form, f"{target} = np.exp({a.name} / {b.name})", Name(target, _combine(a.kind, b.kind), None)
        if form == "a < b":
            return form, f"{target} = {a.name} < {b.name}", Name(target, "b", None)
        if form == "max(a, b)":
            kind = a.kind if a.kind == b.kind else "qf"
            return form, f"{target} = max({a.name}, {b.name})", Name(target, kind, a.family)
        op = form[2]
        family = a.family if op in "+-" else None
        return form, f"{target} = {a.name} {op} {b.name}", Name(target, _combine(a.kind, b.kind), family)

    if form in WITH_NUMBER or form in WITH_ZERO:
        number = draw(st.sampled_from(ZEROS if form in WITH_ZERO else NUMBERS))
        if form.startswith("a <"):
            return form, f"{target} = {a.name} < {number}", Name(target, "b", None)
        if form.startswith("max("):
            # max of a dimensionless quantity and a number may return the plain number.
            kind = "f" if a.kind == "f" else "qf"
            return form, f"{target} = max({a.name}, {number})", Name(target, kind, a.family)
        op = form[2]
        family = a.family if op in "+-" else None
        return form, f"{target} = {a.name} {op} {number}", Name(target, a.kind, family)

    if form == "a ** 2":
        return form, f"{target} = {a.name} ** 2", Name(target, a.kind, None)
    if form == "math.sqrt(a)":
        return form, f"{target} = math.sqrt({a.name})", Name(target, "f", None)
    if form == "np.sqrt(a)":
        return form, f"{target} = np.sqrt({a.name})", Name(target, a.kind, None)
    raise AssertionError(f"unhandled form {form}")  # pragma: no cover


@st.composite
def programs(draw, min_statements: int = 2, max_statements: int = 5) -> Program:
    """A header plus 2-5 statements, each binding a new name on its own line."""
    count = draw(st.integers(min_statements, max_statements))
    names: list[Name] = []
    lines: list[str] = []
    forms: list[str] = []
    for index in range(1, count + 1):
        form, code, bound = draw(_statement(names, f"v{index}"))
        names.append(bound)
        lines.append(code)
        forms.append(form)
    return Program(HEADER + "\n".join(lines) + "\n", forms)
