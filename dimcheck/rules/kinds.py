"""Quantity kinds: names engineers give to dimensions, for fix hints in messages.

Several kinds can share a dimension (energy and torque, both M L^2 T^-2); the hint then
names them all. Dimensions as in SI Brochure (9th edition) Tables 4 and 5, and
engineering common practice for the heat-transfer and fluid-flow kinds.
"""

from __future__ import annotations

from fractions import Fraction

from ..units.dimension import Dimension


def _d(**powers: int) -> Dimension:
    return Dimension((name, Fraction(p)) for name, p in powers.items())


_KINDS: list[tuple[str, Dimension]] = [
    ("length", _d(length=1)),
    ("mass", _d(mass=1)),
    ("time", _d(time=1)),
    ("temperature", _d(temperature=1)),
    ("electric current", _d(current=1)),
    ("amount of substance", _d(substance=1)),
    ("area", _d(length=2)),
    ("volume", _d(length=3)),
    ("velocity", _d(length=1, time=-1)),
    ("acceleration", _d(length=1, time=-2)),
    ("frequency", _d(time=-1)),
    ("force", _d(mass=1, length=1, time=-2)),
    ("pressure", _d(mass=1, length=-1, time=-2)),
    ("stress", _d(mass=1, length=-1, time=-2)),
    ("energy", _d(mass=1, length=2, time=-2)),
    ("torque", _d(mass=1, length=2, time=-2)),
    ("power", _d(mass=1, length=2, time=-3)),
    ("density", _d(mass=1, length=-3)),
    ("dynamic viscosity", _d(mass=1, length=-1, time=-1)),
    ("kinematic viscosity", _d(length=2, time=-1)),
    ("diffusivity", _d(length=2, time=-1)),
    ("volumetric flow rate", _d(length=3, time=-1)),
    ("mass flow rate", _d(mass=1, time=-1)),
    ("momentum", _d(mass=1, length=1, time=-1)),
    ("specific energy", _d(length=2, time=-2)),
    ("specific heat capacity", _d(length=2, time=-2, temperature=-1)),
    ("heat capacity", _d(mass=1, length=2, time=-2, temperature=-1)),
    ("thermal conductivity", _d(mass=1, length=1, time=-3, temperature=-1)),
    ("heat-transfer coefficient", _d(mass=1, time=-3, temperature=-1)),
    ("heat flux", _d(mass=1, time=-3)),
    ("thermal conductance", _d(mass=1, length=2, time=-3, temperature=-1)),
    ("surface tension", _d(mass=1, time=-2)),
    ("stiffness", _d(mass=1, time=-2)),
    ("angular velocity", _d(time=-1)),
    ("mass per length", _d(mass=1, length=-1)),
    ("force per length", _d(mass=1, time=-2)),
    ("electric charge", _d(time=1, current=1)),
    ("voltage", _d(mass=1, length=2, time=-3, current=-1)),
    ("resistance", _d(mass=1, length=2, time=-3, current=-2)),
    ("molar mass", _d(mass=1, substance=-1)),
    ("concentration", _d(substance=1, length=-3)),
    ("mass concentration", _d(mass=1, length=-3)),
    ("thermal expansion coefficient", _d(temperature=-1)),
]

_BY_DIMENSION: dict[Dimension, list[str]] = {}
for _name, _dimension in _KINDS:
    _BY_DIMENSION.setdefault(_dimension, []).append(_name)


def kind_of(dimension: Dimension) -> str | None:
    """``pressure or stress`` for M L^-1 T^-2; None when the dimension has no common name."""
    names = _BY_DIMENSION.get(dimension)
    if not names:
        return None
    return " or ".join(names[:2])


def article(noun: str) -> str:
    return ("an " if noun[:1] in "aeiou" else "a ") + noun
