"""Units: dimension vectors, the unit table built from pint, and the unit-expression parser."""

from .dimension import DIMENSIONLESS, Dimension
from .unit import DIMENSIONLESS_UNIT, Unit, UnitError
from .table import UnitTable, load_unit_table
from .expression import parse_unit

__all__ = [
    "DIMENSIONLESS",
    "DIMENSIONLESS_UNIT",
    "Dimension",
    "Unit",
    "UnitError",
    "UnitTable",
    "load_unit_table",
    "parse_unit",
]
