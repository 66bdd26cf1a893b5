"""Ask pint (our reference library) what a unit expression means, in our terms."""

from __future__ import annotations

import math

from dimcheck.units import Dimension


def pint_dimension_and_scale(ureg, text: str) -> tuple[Dimension, float]:
    """Dimension and SI scale of ``Quantity(1, text).to_base_units()`` in pint."""
    quantity = ureg.Quantity(1, text).to_base_units()
    return Dimension.from_mapping(dict(quantity.dimensionality)), float(quantity.magnitude)


def same_scale(ours: float, theirs: float, rel: float = 1e-9) -> bool:
    return math.isclose(ours, theirs, rel_tol=rel)
