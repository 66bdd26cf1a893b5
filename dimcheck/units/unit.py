"""A parsed unit: its dimension, its scale to SI and, for temperatures, its offset."""

from __future__ import annotations

from dataclasses import dataclass

from .dimension import DIMENSIONLESS, Dimension


@dataclass(frozen=True, slots=True)
class Unit:
    """A unit expression after parsing.

    ``scale`` converts a value in this unit to coherent SI: ``si = value * scale + offset``.
    It is ``None`` for a dimension-only declaration such as ``"[length]/[time]"``,
    which fixes the dimension and leaves the scale open.
    """

    text: str
    dimension: Dimension
    scale: float | None = 1.0
    offset: float = 0.0

    @property
    def is_offset(self) -> bool:
        """True for absolute temperatures on a shifted scale (degC, degF)."""
        return self.offset != 0.0

    @property
    def is_dimensionless(self) -> bool:
        return self.dimension.is_dimensionless


DIMENSIONLESS_UNIT = Unit("1", DIMENSIONLESS, 1.0)
