"""Dimension vectors: exact rational exponents over named base dimensions.

A dimension is stored as a sorted tuple of ``(base_name, Fraction)`` pairs with
the zero exponents left out, so two equal dimensions are equal tuples and hash
alike. Base names are pint's without brackets (``length``, ``mass``, ...); the
configuration may add more (``base-dimensions``), which simply appear as new names.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Iterable, Mapping

# SI's seven base dimensions, in the order engineers write them, with their symbols
# (SI Brochure, 9th edition, section 2.3.3).
SI_BASE_DIMENSIONS: tuple[tuple[str, str], ...] = (
    ("mass", "M"),
    ("length", "L"),
    ("time", "T"),
    ("temperature", "Θ"),
    ("current", "I"),
    ("substance", "N"),
    ("luminosity", "J"),
)
_SYMBOL = dict(SI_BASE_DIMENSIONS)
_ORDER = {name: index for index, (name, _) in enumerate(SI_BASE_DIMENSIONS)}


def _sort_key(name: str) -> tuple[int, str]:
    return (_ORDER.get(name, len(_ORDER)), name)


# Every dimension made so far, by exponents: as many as distinct dimensions in the code
# checked, a few hundred at most in practice.
_CANONICAL: dict[tuple, "Dimension"] = {}


class Dimension:
    """An immutable product of base dimensions raised to rational powers.

    Equal dimensions are one object (``__new__`` hands out the one already made), so
    equality and hashing are by identity, done in C: a check compares dimensions at
    every operation, and the results of operations are looked up by their operands.
    """

    __slots__ = ("exponents",)
    exponents: tuple[tuple[str, Fraction], ...]

    def __new__(cls, exponents: Iterable[tuple[str, Fraction]] = ()) -> "Dimension":
        cleaned = {}
        for name, power in exponents:
            power = Fraction(power)
            if power:
                cleaned[name] = cleaned.get(name, Fraction(0)) + power
        key = tuple(sorted(((n, p) for n, p in cleaned.items() if p), key=lambda item: _sort_key(item[0])))
        found = _CANONICAL.get(key)
        if found is None:
            found = _CANONICAL[key] = object.__new__(cls)
            found.exponents = key
        return found

    def __reduce__(self):
        return (Dimension, (self.exponents,))  # unpickled (--jobs) into the canonical object

    @classmethod
    def from_mapping(cls, mapping: Mapping[str, object]) -> "Dimension":
        """Build from ``{"length": 1, "time": -1}``; brackets around names are dropped."""
        return cls((name.strip("[]"), Fraction(str(power))) for name, power in mapping.items())

    @classmethod
    def base(cls, name: str) -> "Dimension":
        return cls(((name, Fraction(1)),))

    # -- algebra -----------------------------------------------------------------
    # Results are memoised: a program combines the same few dimensions over and over,
    # and exact Fraction arithmetic is slow enough to show in a profile.
    def __mul__(self, other: "Dimension") -> "Dimension":
        if not other.exponents:
            return self
        if not self.exponents:
            return other
        key = ("*", self, other)  # hashed by identity, not by the Fractions
        found = _RESULTS.get(key)
        if found is None:
            found = _remember(key, Dimension(self.exponents + other.exponents))
        return found

    def __truediv__(self, other: "Dimension") -> "Dimension":
        if not other.exponents:
            return self
        key = ("/", self, other)
        found = _RESULTS.get(key)
        if found is None:
            found = _remember(key, Dimension(self.exponents + tuple((n, -p) for n, p in other.exponents)))
        return found

    def __pow__(self, power: Fraction | int) -> "Dimension":
        key = ("**", self, power)
        found = _RESULTS.get(key)
        if found is None:
            exponent = Fraction(power)
            found = _remember(key, Dimension((n, p * exponent) for n, p in self.exponents))
        return found

    def inverse(self) -> "Dimension":
        return Dimension((n, -p) for n, p in self.exponents)

    @property
    def is_dimensionless(self) -> bool:
        return not self.exponents

    def as_dict(self) -> dict[str, Fraction]:
        return dict(self.exponents)

    # -- display -------------------------------------------------------------------
    def __repr__(self) -> str:
        return f"Dimension({self.format()})"

    def format(self) -> str:
        """Engineer's notation, such as ``L T^-1`` or ``M L^-1 T^-2``; ``1`` when dimensionless."""
        if not self.exponents:
            return "1"
        parts = []
        for name, power in self.exponents:
            symbol = _SYMBOL.get(name, name)
            if power == 1:
                parts.append(symbol)
            elif power.denominator == 1:
                parts.append(f"{symbol}^{power.numerator}")
            else:
                parts.append(f"{symbol}^({power})")
        return " ".join(parts)

    def to_json(self) -> dict[str, str]:
        return {name: str(power) for name, power in self.exponents}

    @classmethod
    def from_json(cls, data: Mapping[str, str]) -> "Dimension":
        return cls((name, Fraction(power)) for name, power in data.items())


DIMENSIONLESS = Dimension()

_RESULTS: dict[tuple, Dimension] = {}
_MAX_REMEMBERED = 100_000


def _remember(key: tuple, result: Dimension) -> Dimension:
    if len(_RESULTS) >= _MAX_REMEMBERED:
        _RESULTS.clear()
    _RESULTS[key] = result
    return result
