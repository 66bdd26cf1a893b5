"""The rule checks. The inference pass calls these where values meet; each returns a
``Problem`` (rule code and message) or ``None``. Where the problem is in the source is
the caller's business: these functions only decide *whether* and *what to say*.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..inference.labels import si_label
from .kinds import article, kind_of
from ..inference.values import Bare, Quantity, exact_exponent, quantities_share_scale

_DEGREE = math.pi / 180.0


@dataclass(frozen=True, slots=True)
class Problem:
    code: str
    message: str


def _factor_text(value_scale: float, target_scale: float) -> str:
    factor = value_scale / target_scale
    return f"{factor:.12g}"  # enough digits that applying it passes the 1e-9 scale check


def _scale_hint(value: Quantity, target: Quantity) -> str:
    """``multiply by 0.001`` when both sides have one definite scale."""
    if value.scales and target.scales and len(target.scales) == 1:
        # prefer the value's own unit (the first candidate) for the advice
        return f"multiply by {_factor_text(value.scales[0], target.scales[0])}"
    return "convert explicitly"


def _missing_factor(value: Quantity, declared: Quantity) -> str:
    """``; missing a factor of m/s^2 [L T^-2] (an acceleration?)``: what would make them agree."""
    missing = declared.dimension / value.dimension
    if missing.is_dimensionless:
        return ""
    kind = kind_of(missing)
    guess = f" ({article(kind)}?)" if kind else ""
    return f"; missing a factor of {si_label(missing)} [{missing.format()}]{guess}"


def _source_note(quantity: Quantity) -> str:
    origin = quantity.origin
    if origin is not None and origin.kind == "name":
        return f" from the name '{origin.name}'"
    if origin is not None and origin.kind == "docstring":
        return f" from the docstring (line {origin.line})"
    return ""


def unit_with_source(quantity: Quantity) -> str:
    """``mm from the name 'width_mm'``: the unit, and where it came from when not obvious."""
    return quantity.display_unit() + _source_note(quantity)


def described(quantity: Quantity) -> str:
    """``m/s [L T^-1] (velocity)``: unit, dimension and, where it has one, the kind's name;
    and where the unit was read from a name or a docstring, that it was."""
    kind = kind_of(quantity.dimension)
    text = f"{quantity.describe()} ({kind})" if kind else quantity.describe()
    return text + _source_note(quantity)


def check_docstring_agrees(what: str, documented, declared) -> Problem | None:
    """The unit a docstring gives a parameter or return against its explicit declaration."""
    if not (isinstance(documented, Quantity) and isinstance(declared, Quantity)):
        return None
    if documented.dimension != declared.dimension:
        return Problem("DIM206", f"the docstring gives {what} as {documented.describe()} but it is "
                                 f"declared {declared.describe()}")
    if not quantities_share_scale(documented, declared):
        return Problem("DIM206", f"the docstring gives {what} in {documented.display_unit()} but it is "
                                 f"declared {declared.display_unit()} (same dimension, another scale)")
    return None


def _is_degree_to_radian(value: Quantity, target: Quantity) -> bool:
    """A value that may still be in degrees (one of its candidate scales is the degree's and
    none is the radian's) reaching a parameter declared in radians."""
    return (value.is_dimensionless and target.is_dimensionless and value.scales is not None
            and target.scales is not None
            and target.display_unit() in ("rad", "radian", "radians")
            and any(math.isclose(s, _DEGREE, rel_tol=1e-9) for s in value.scales)
            and any(math.isclose(s, 1.0) for s in target.scales))


_SUM_VERBS = {
    "add": "cannot add {right} to {left}",
    "subtract": "cannot subtract {right} from {left}",
    "compare": "cannot compare {left} with {right}",
    "equal": "cannot compare {left} with {right}",
}


def check_combination(verb: str, left, right) -> Problem | None:
    """Two values meeting in a sum, difference, comparison, min/max or branch choice.

    ``verb`` is ``add``, ``subtract``, ``compare`` or a phrase such as
    ``members of max()`` used for the other combinations.
    """
    pint = _is_pint(left) or _is_pint(right)
    if pint:
        found = _pint_combination(verb, left, right)
        if found is not None or verb == "equal":
            return found
    if isinstance(left, Quantity) and isinstance(right, Quantity):
        if left.dimension != right.dimension:
            template = _SUM_VERBS.get(verb, verb + " disagree: {left} and {right}")
            return Problem("DIM101", template.format(left=described(left), right=described(right)))
        if not pint and not quantities_share_scale(left, right):
            return Problem("DIM201", f"{verb}: {unit_with_source(left)} and {unit_with_source(right)} "
                                     f"have the same dimension [{left.dimension.format()}] but different "
                                     f"scales; {_scale_hint(right, left)} to bring the "
                                     f"{right.display_unit()} value to {left.display_unit()}")
        return None
    quantity, bare = (left, right) if isinstance(left, Quantity) else (right, left)
    if isinstance(quantity, Quantity) and isinstance(bare, Bare):
        if verb == "equal" and quantity.origin is not None and quantity.origin.kind == "magnitude":
            return None  # q.to("t").magnitude == 0.123: checking a magnitude against a number
        if not bare.is_zero and not quantity.is_dimensionless:
            action = "compared with" if verb == "compare" else "combined with"
            return Problem("DIM203", f"bare number {_number(bare.value)} {action} "
                                     f"{described(quantity)}; give the number a unit")
    return None


def _number(value) -> str:
    return f"{value:g}" if isinstance(value, float) else str(value)


def check_binding(what: str, declared: Quantity, value) -> Problem | None:
    """A value bound to a declared name, attribute or return (DIM103, DIM201)."""
    if not isinstance(value, Quantity):
        return None
    if value.dimension != declared.dimension:
        return Problem("DIM103", f"{what} is declared {described(declared)} but the value is "
                                 f"{described(value)}{_missing_factor(value, declared)}")
    offset = check_offset_binding(what, declared, value)
    if offset is not None:
        return offset
    if value.pint:
        return None  # pint converts between scales itself
    if not quantities_share_scale(value, declared):
        return Problem("DIM201", f"{what} is declared {unit_with_source(declared)} but the value is in "
                                 f"{unit_with_source(value)} (same dimension [{declared.dimension.format()}]); "
                                 f"{_scale_hint(value, declared)}")
    return None


def check_argument(param: str, function: str, declared: Quantity, value,
                   transcendental: bool = False) -> Problem | None:
    """A call argument against its parameter's declared unit (DIM104, DIM102, DIM201, DIM202)."""
    if not isinstance(value, Quantity):
        return None
    if value.dimension != declared.dimension:
        if transcendental and declared.is_dimensionless:
            return Problem("DIM102", f"argument of {function}() must be dimensionless, "
                                     f"got {described(value)}; form a dimensionless ratio first")
        return Problem("DIM104", f"argument '{param}' of {function}() expects {described(declared)} "
                                 f"but got {described(value)}{_missing_factor(value, declared)}")
    if value.offset != declared.offset:  # (the message is only built when it may be needed)
        offset = check_offset_binding(f"argument '{param}' of {function}()", declared, value)
        if offset is not None:
            return offset
    if value.pint or quantities_share_scale(value, declared):
        return None
    if _is_degree_to_radian(value, declared):
        return Problem("DIM202", f"value in {value.display_unit()} reaches {function}(), which expects "
                                 f"radians; convert with math.radians() or multiply by pi/180")
    if transcendental and declared.is_dimensionless:
        return None  # a ratio of like quantities at mixed scales: too common to flag here
    return Problem("DIM201", f"argument '{param}' of {function}() expects {unit_with_source(declared)} "
                             f"but got {unit_with_source(value)} (same dimension "
                             f"[{declared.dimension.format()}]); {_scale_hint(value, declared)}")


def _is_pint(value) -> bool:
    return isinstance(value, Quantity) and value.pint


def _is_difference(quantity: Quantity) -> bool:
    """A temperature difference (delta_degC, or degC - degC): pint adds it to a degC value."""
    return quantity.label.startswith("delta_")


def _pint_combination(verb: str, left, right) -> Problem | None:
    """What pint itself refuses at run time in a sum or comparison (contract, section 8)."""
    if verb == "equal":
        return None  # == and != never raise in pint: they answer False/True
    quantity, other = (left, right) if _is_pint(left) else (right, left)
    plain_float = isinstance(other, Quantity) and not other.pint  # a float at run time
    if isinstance(other, Bare) or plain_float:
        shown = _number(other.value) if isinstance(other, Bare) else f"{other.display_unit()} value (a plain float)"
        zero = isinstance(other, Bare) and other.is_zero
        if quantity.offset and (not zero or verb != "add"):
            return Problem("DIM107", f"pint refuses to combine an absolute {quantity.display_unit()} "
                                     f"temperature with the plain number {shown}")
        if not quantity.is_dimensionless and not zero:
            return Problem("DIM101", f"pint refuses to {'compare' if verb != 'add' and verb != 'subtract' else 'add'} "
                                     f"the plain number {shown} and {described(quantity)}; "
                                     f"give the number a unit")
        return None
    if isinstance(left, Quantity) and isinstance(right, Quantity) and left.dimension == right.dimension:
        if verb == "add" and (left.offset or right.offset) and not _is_difference(left) \
                and not _is_difference(right):
            both = "two absolute temperatures" if left.offset and right.offset else \
                "an absolute temperature and a kelvin value"
            return Problem("DIM107", f"pint refuses to add {both} ({left.display_unit()} and "
                                     f"{right.display_unit()}); use a delta unit or convert to K")
        if verb == "subtract" and right.offset and not left.offset:
            return Problem("DIM107", f"pint refuses to subtract an absolute {right.display_unit()} "
                                     f"temperature from {left.display_unit()}")
    return None


def check_offset_combination(verb: str, left, right) -> Problem | None:
    """Two absolute temperatures on an offset scale added (DIM204); pint refuses it too."""
    if _is_pint(left) or _is_pint(right):
        return None  # judged by _pint_combination
    if (verb == "add" and isinstance(left, Quantity) and isinstance(right, Quantity)
            and left.offset and right.offset):
        return Problem("DIM204", f"adding two absolute temperatures ({left.display_unit()} and "
                                 f"{right.display_unit()}) has no meaning; subtract them for a "
                                 f"difference, or convert to K")
    return None


def check_offset_product(operand, other=None, power: bool = False) -> Problem | None:
    """An absolute temperature on an offset scale (degC, degF) in a product, quotient or
    power (DIM204): its zero is not zero, so the result depends on the scale. For a pint
    quantity this is an error (DIM107): pint refuses it, even with a plain number."""
    if _is_pint(operand) and operand.offset and other is not None:
        return Problem("DIM107", f"pint refuses to multiply, divide or raise an absolute "
                                 f"{operand.display_unit()} temperature; convert it to K first")
    if isinstance(operand, Quantity) and operand.offset and (power or isinstance(other, Quantity)):
        return Problem("DIM204", f"absolute temperature in {operand.display_unit()} used in a "
                                 f"product, quotient or power; convert it to K first "
                                 f"(add 273.15 for degC)")
    return None


def check_offset_binding(what: str, declared: Quantity, value) -> Problem | None:
    """An absolute offset temperature bound to a kelvin-based declaration, or the reverse."""
    if isinstance(value, Quantity) and value.dimension == declared.dimension \
            and value.offset != declared.offset and value.origin is not None:
        source, target = value.display_unit(), declared.display_unit()
        return Problem("DIM204", f"{what} is declared {target} but the value is an absolute "
                                 f"temperature in {source}; the zero points differ, convert explicitly")
    return None


def check_power_law(base, exponent) -> Problem | None:
    """``0.023 * d**0.8``: a dimensional base raised to an empirical non-integer power
    leaves a fractional dimension that the coefficient must silently cancel (DIM205)."""
    if not (isinstance(base, Quantity) and isinstance(exponent, Bare)) or base.is_dimensionless:
        return None
    value = exponent.value
    if not isinstance(value, (int, float)) or not math.isfinite(value):
        return None
    if isinstance(value, int) or float(value).is_integer() or abs(abs(value) - 0.5) < 1e-12:
        return None
    fraction = exact_exponent(value)
    if fraction is not None and all(power.denominator == 1 for _, power in (base.dimension ** fraction).exponents):
        return None  # vol ** (1/3) is a plain length
    return Problem("DIM205", f"{base.describe()} raised to the empirical power {_number(value)}: "
                             f"the coefficient of such a law carries hidden units; raise a "
                             f"dimensionless group (such as a Reynolds number) instead")


def check_exponent(base, exponent, exponent_is_constant: bool) -> Problem | None:
    """``base ** exponent`` (DIM105)."""
    if isinstance(exponent, Quantity) and not exponent.is_dimensionless:
        return Problem("DIM105", f"exponent must be dimensionless, got {exponent.describe()}")
    if (isinstance(base, Quantity) and not base.is_dimensionless and not exponent_is_constant
            and isinstance(exponent, Quantity)):
        return Problem("DIM105", f"{base.describe()} raised to a power that is not a constant; "
                                 f"the result's dimension would depend on a run-time value")
    return None
