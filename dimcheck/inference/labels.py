"""Readable unit labels for derived values (``kg/(m*s)``, or ``Pa`` when it has a name)."""

from __future__ import annotations

from fractions import Fraction

from ..units.dimension import Dimension

_BASE_SYMBOL = {
    "mass": "kg", "length": "m", "time": "s", "temperature": "K",
    "current": "A", "substance": "mol", "luminosity": "cd",
}


def _d(**powers: int) -> Dimension:
    return Dimension((name, Fraction(p)) for name, p in powers.items())


# Coherent derived units with special names (SI Brochure, 9th edition, Table 4),
# used only to name a derived result; hertz and becquerel are left out because
# s^-1 reads better in engineering messages.
_SPECIAL_NAMES = {
    _d(mass=1, length=1, time=-2): "N",
    _d(mass=1, length=-1, time=-2): "Pa",
    _d(mass=1, length=2, time=-2): "J",
    _d(mass=1, length=2, time=-3): "W",
    _d(time=1, current=1): "C",
    _d(mass=1, length=2, time=-3, current=-1): "V",
    _d(mass=-1, length=-2, time=4, current=2): "F",
    _d(mass=1, length=2, time=-3, current=-2): "ohm",
    _d(mass=-1, length=-2, time=3, current=2): "S",
    _d(mass=1, length=2, time=-2, current=-1): "Wb",
    _d(mass=1, time=-2, current=-1): "T",
    _d(mass=1, length=2, time=-2, current=-2): "H",
}


def power_text(symbol: str, power: Fraction) -> str:
    """``m``, ``m^2``, ``m^(1/2)``: a symbol raised to an exact power."""
    if power == 1:
        return symbol
    if power.denominator == 1:
        return f"{symbol}^{power.numerator}"
    return f"{symbol}^({power})"


def si_label(dimension: Dimension) -> str:
    if dimension.is_dimensionless:
        return "1"
    special = _SPECIAL_NAMES.get(dimension)
    if special:
        return special
    numerator = []
    denominator = []
    for name, power in dimension.exponents:
        symbol = _BASE_SYMBOL.get(name, name)
        (numerator if power > 0 else denominator).append(power_text(symbol, abs(power)))
    top = "*".join(numerator) or "1"
    if not denominator:
        return top
    bottom = denominator[0] if len(denominator) == 1 else "(" + "*".join(denominator) + ")"
    return f"{top}/{bottom}"


def _needs_parens(label: str) -> bool:
    return any(ch in label for ch in "*/ ")


def compose_label(left: str, operator: str, right: str) -> str:
    if operator == "/" and _needs_parens(right):
        right = f"({right})"
    return f"{left}{operator}{right}"


def power_label(label: str, exponent: Fraction) -> str:
    if _needs_parens(label) or "^" in label:
        label = f"({label})"
    if exponent.denominator == 1:
        return f"{label}^{exponent.numerator}"
    return f"{label}^({exponent})"
