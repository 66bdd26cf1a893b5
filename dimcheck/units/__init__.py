"""Units: dimension vectors, the unit table built from pint, and the unit-expression parser.

The names below are loaded on first use: a run answered from the result cache needs the
unit table's key only, and neither the table, exact fractions nor the parser.
"""

_WHERE = {
    "DIMENSIONLESS": "dimension",
    "Dimension": "dimension",
    "DIMENSIONLESS_UNIT": "unit",
    "Unit": "unit",
    "UnitError": "errors",
    "UnitTable": "table",
    "load_unit_table": "table",
    "unit_table_key": "table_key",
    "parse_unit": "expression",
}


def __getattr__(name: str):
    module = _WHERE.get(name)
    if module is None:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    from importlib import import_module

    value = getattr(import_module(f"{__name__}.{module}"), name)
    globals()[name] = value  # found by plain lookup from now on
    return value


__all__ = sorted(_WHERE)
