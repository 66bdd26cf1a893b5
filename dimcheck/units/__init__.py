"""Units: dimension vectors, the unit table built from pint, and the unit-expression parser."""

from .dimension import DIMENSIONLESS, Dimension
from .unit import DIMENSIONLESS_UNIT, Unit, UnitError

__all__ = ["DIMENSIONLESS", "DIMENSIONLESS_UNIT", "Dimension", "Unit", "UnitError"]
