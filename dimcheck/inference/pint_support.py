"""What pint's objects do, read statically: registries, quantity constructors, units as
attributes, and the methods of quantities. Nothing is run and pint is not imported: unit
texts go through dimcheck's own parser, exactly like declarations.

The verdicts follow pint's run-time behaviour (contract, section 8): where pint raises, a
finding; where it converts silently (mm plus m, degrees into math.sin), none.
"""

from __future__ import annotations

import ast
import re
from typing import Any

from ..rules.checks import Problem, described
from ..units import UnitError, parse_unit
from ..units.dimension import DIMENSIONLESS
from .labels import si_label
from .values import (
    UNKNOWN, Bare, ClassValue, FunctionValue, InstanceValue, Origin, PintFactoryValue, PintMethodValue,
    PintRegistryValue, Quantity,
)

REGISTRY_CLASSES = {"UnitRegistry", "ApplicationRegistry", "LazyRegistry"}
_QUANTITY_STRING = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*)$")
_SAME_UNIT_METHODS = {"to_base_units", "to_reduced_units", "to_root_units", "to_compact",
                      "to_preferred", "plus_minus", "copy"}
_METHODS = {"to", "ito", "m_as", "check", "compatible_units", "is_compatible_with"} | _SAME_UNIT_METHODS


def is_pint_stub(value: Any) -> bool:
    """A function, class or instance from pint's stubs (this is asked of every call)."""
    if value.__class__ is FunctionValue:
        module = value.function.module
    elif value.__class__ is ClassValue or value.__class__ is InstanceValue:
        module = value.info.module
    else:
        return False
    return module.is_stub and (module.name == "pint" or module.name.startswith("pint."))


_DYNAMIC_UNITS = re.compile(r"\.define\(|load_definitions\(|\.context\(|enable_contexts\(|"
                            r"add_context\(|with_context\(")
MAGNITUDE = Origin("", 0, "magnitude")


def units_are_dynamic(module) -> bool:
    """A module that defines units or enables contexts at run time: its unit strings may name
    units the static table does not know, or convert across dimensions, so they are left
    unknown there rather than judged."""
    if module.pint_dynamic is None:
        module.pint_dynamic = bool(_DYNAMIC_UNITS.search(module.source))
    return module.pint_dynamic


def pint_quantity(unit, text: str) -> Quantity:
    scales = None if unit.scale is None else (unit.scale,)
    return Quantity(unit.dimension, scales, text, offset=unit.is_offset, pint=True)


class PintSupport:
    """Called by the engine for calls and attributes that involve pint values."""

    def __init__(self, engine):
        self.engine = engine

    # -- attributes --------------------------------------------------------------------------
    def attribute(self, owner: Any, attr: str, module=None) -> Any:
        if isinstance(owner, PintRegistryValue):
            if module is not None and units_are_dynamic(module):
                return PintFactoryValue() if attr in ("Quantity", "Unit") else UNKNOWN
            if attr in ("Quantity", "Unit", "Measurement"):
                return PintFactoryValue()
            if attr.startswith("_") or attr in ("wraps", "check", "define", "load_definitions"):
                return UNKNOWN
            try:
                unit = parse_unit(attr, self.engine.table)
            except UnitError:
                return UNKNOWN
            return pint_quantity(unit, attr)  # ureg.meter acts as a quantity of magnitude 1
        if isinstance(owner, Quantity) and owner.pint:
            if attr in ("magnitude", "m"):
                # a plain number still in the quantity's unit: (3 mm / 1 m).magnitude is 3
                return owner.replace(pint=False, origin=MAGNITUDE)
            if attr in ("units", "u"):
                return owner
            if attr in _METHODS:
                return PintMethodValue(owner, attr)
            return UNKNOWN
        return None  # not pint's business

    # -- calls -----------------------------------------------------------------------------------
    def call(self, callee: Any, args: list, keywords: dict, node, evaluator) -> Any:
        """The value of a pint call, or None when the callee is not pint's."""
        if isinstance(callee, ClassValue) and is_pint_stub(callee):
            if callee.info.name in REGISTRY_CLASSES:
                return PintRegistryValue()
            if callee.info.name in ("Quantity", "Unit"):
                return self.construct(args, keywords, node, evaluator)
            return UNKNOWN
        if isinstance(callee, FunctionValue) and is_pint_stub(callee):
            if callee.function.name == "get_application_registry":
                return PintRegistryValue()
            return UNKNOWN
        if isinstance(callee, PintFactoryValue):
            return self.construct(args, keywords, node, evaluator)
        if isinstance(callee, PintRegistryValue):  # ureg("3 m")
            return self.construct(args[:1], {}, node, evaluator) if args else UNKNOWN
        if isinstance(callee, PintMethodValue):
            return self.method(callee, args, keywords, node, evaluator)
        return None

    def _unit_of(self, value: Any, arg_node, evaluator) -> tuple[Quantity | None, str]:
        """A unit argument: a literal string, or a unit/quantity value (``ureg.m``, ``q.units``)."""
        if units_are_dynamic(evaluator.module):
            return None, ""
        if isinstance(arg_node, ast.Constant) and isinstance(arg_node.value, str):
            unit = self._parse(arg_node.value)
            return (None, "") if unit is None else (unit, arg_node.value)
        if isinstance(value, Quantity) and value.pint:
            return value, value.display_unit()
        return None, ""

    def construct(self, args: list, keywords: dict, node, evaluator) -> Any:
        """``Q_(3.0, "m")``, ``Q_("3 m")``, ``ureg("3 m")``, ``Q_(3.0, ureg.m)``."""
        value, value_node = args[0] if args else keywords.get("value", (UNKNOWN, None))
        unit_pair = args[1] if len(args) > 1 else keywords.get("units")
        if unit_pair is None:
            if isinstance(value_node, ast.Constant) and isinstance(value_node.value, str):
                return self._from_string(value_node, evaluator)
            if isinstance(value, Quantity) and value.pint:
                return value
            if isinstance(value, (Bare, Quantity)) or value is UNKNOWN:
                return Quantity(DIMENSIONLESS, (1.0,), "1", pint=True)
            return UNKNOWN
        unit, text = self._unit_of(unit_pair[0], unit_pair[1], evaluator)
        if unit is None:
            return UNKNOWN
        if isinstance(value, Quantity) and value.pint:
            evaluator.report(node, self._conversion_problem(value, unit, text))
        return unit.replace(label=text or unit.label, origin=None)

    def _parse(self, text: str) -> Quantity | None:
        """A unit string in pint code. pint knows units the static table leaves out
        (logarithmic ones, units defined at run time), so one that does not parse is left
        unknown rather than reported; pint reads an empty string as dimensionless."""
        text = text.strip()
        if not text:
            return Quantity(DIMENSIONLESS, (1.0,), "1", pint=True)
        try:
            return pint_quantity(parse_unit(text, self.engine.table), text)
        except UnitError:
            return None

    def _from_string(self, literal: ast.Constant, evaluator) -> Any:
        if units_are_dynamic(evaluator.module):
            return UNKNOWN
        match = _QUANTITY_STRING.match(literal.value)
        text = (match.group(2) if match else literal.value).strip().lstrip("*").strip()
        unit = self._parse(text)
        if unit is None:
            return UNKNOWN
        if unit.offset and match:
            evaluator.report(literal, Problem(
                "DIM107", f"pint refuses to build an absolute {text} temperature from a string "
                          f"such as {literal.value!r}; use Q_(value, {text!r})"))
            return UNKNOWN
        return unit

    @staticmethod
    def _conversion_problem(value: Quantity, target: Quantity, text: str) -> Problem | None:
        if value.dimension != target.dimension:
            return Problem("DIM106", f"cannot convert {described(value)} to {text or target.display_unit()} "
                                     f"[{target.dimension.format()}]: pint raises a dimensionality error")
        if value.offset and not target.offset and target.label.startswith("delta_"):
            return Problem("DIM107", f"pint refuses to convert an absolute {value.display_unit()} "
                                     f"temperature to the difference unit {text}")
        return None

    def method(self, bound: PintMethodValue, args: list, keywords: dict, node, evaluator) -> Any:
        owner, name = bound.owner, bound.name
        if name in _SAME_UNIT_METHODS:
            if name == "to_compact":
                return owner.replace(scales=None, origin=None)
            if name == "copy":
                return owner
            return owner.replace(scales=(1.0,), label=si_label(owner.dimension), derived=False,
                                 origin=None, offset=False)
        if name in ("to", "ito", "m_as"):
            pair = args[0] if args else keywords.get("other") or keywords.get("units")
            if pair is None or len(args) > 1:
                return UNKNOWN  # .to(unit, "context"): a context may convert across dimensions
            target, text = self._unit_of(pair[0], pair[1], evaluator)
            if target is None:
                return UNKNOWN
            evaluator.report(node, self._conversion_problem(owner, target, text))
            result = target.replace(label=text or target.label, origin=None)
            if name == "m_as":
                return result.replace(pint=False, origin=MAGNITUDE)  # the magnitude, in that unit
            return result if name == "to" else UNKNOWN
        return UNKNOWN

    def dimension_guard(self, text: str) -> Quantity | None:
        """The quantity a ``.check("[length]")`` guard promises, scale left open."""
        try:
            unit = parse_unit(text, self.engine.table)
        except UnitError:
            return None
        return Quantity(unit.dimension, None, text, pint=True)

    # -- library functions given pint quantities -------------------------------------------------------
    @staticmethod
    def math_refuses(function, bound: dict) -> list[tuple[Problem, Any]]:
        """``math.*`` converts its argument to a float, which pint allows only for a
        dimensionless quantity (``math.sqrt`` of m^2 raises; ``np.sqrt`` does not)."""
        problems = []
        transcendental = "transcendental" in function.decorators
        for values in bound.values():
            for value, arg_node in values:
                if isinstance(value, Quantity) and value.pint and not value.is_dimensionless and arg_node:
                    code = "DIM102" if transcendental else "DIM104"
                    problems.append((Problem(code, f"math.{function.name}() turns its argument into a "
                                                   f"plain float, and pint refuses that for "
                                                   f"{described(value)}; use numpy or .m_as(...)"),
                                     arg_node))
        return problems
