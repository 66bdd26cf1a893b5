"""Units: dimension vectors, the unit table built from pint, and the unit-expression parser."""

from .dimension import DIMENSIONLESS, Dimension
from .unit import DIMENSIONLESS_UNIT, Unit, UnitError
from .table import UnitTable, load_unit_table


def __getattr__(name: str):
    # The expression parser is imported on first use: a run answered from the result
    # cache loads the unit table (for the cache key) but parses no unit.
    if name == "parse_unit":
        from .expression import parse_unit

        return parse_unit
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


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
