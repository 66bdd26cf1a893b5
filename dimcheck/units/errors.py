"""The one error of the units package (its own module: cheap to import anywhere)."""


class UnitError(ValueError):
    """A unit expression that cannot be parsed or names an unknown unit.

    The message is one line meant for the user (it becomes a DIM901 finding), for
    example ``unknown unit 'metr' in 'metr/s' (did you mean: meter, metre?)``.
    """

    # the configuration key an error in building the unit table comes from
    setting = "units"


def base_dimension_error(message: str) -> UnitError:
    """A UnitError about an extra base dimension (the ``base-dimensions`` setting)."""
    error = UnitError(message)
    error.setting = "base-dimensions"
    return error
