"""Code that uses pint quantities, checked statically; each verdict follows what pint
itself does at run time (pint 0.25 as the reference library, contract section 8)."""

import pytest

from .helpers import codes

HEADER = "import math\nimport numpy as np\nimport pint\nfrom typing import Annotated\nureg = pint.UnitRegistry()\nQ_ = ureg.Quantity\n"


def check(body: str):
    """Findings of a snippet whose first line is line 7 (after the header)."""
    return codes(HEADER + body)


def test_constructors_and_sums():
    assert check(
        'a = Q_(3.0, "m")\n'            # 7
        'b = 2.0 * ureg.second\n'       # 8
        'c = a + b\n'                   # 9: pint raises DimensionalityError
        'd = a + Q_(1, "km")\n'         # 10: pint converts km to m, no error
        'e = ureg("3 m/s") - Q_(1, "m/s")\n'   # 11
        'f = pint.Quantity(2, "kg") + ureg.Quantity(1, "s")\n'  # 12
    ) == [(9, "DIM101"), (12, "DIM101")]


def test_plain_numbers_with_quantities():
    # pint: q + 1 raises for a dimensional q, q + 0 does not; q < 2 raises; == never raises
    assert check(
        'q = Q_(3.0, "m")\n'
        'a = q + 1\n'
        'b = q + 0\n'
        'c = q < 2\n'
        'd = q == 2\n'
        'r = Q_(3.0, "m") / Q_(1.0, "m") + 1\n'
    ) == [(8, "DIM101"), (10, "DIM101")]


def test_conversions():
    assert check(
        'q = Q_(3.0, "m")\n'
        'a = q.to("s")\n'                       # DimensionalityError
        'b = q.to("mm").m_as("km")\n'
        'c = q.m_as("kg")\n'                    # DimensionalityError
        'd = q.to_base_units() + Q_(1, "ft")\n'
    ) == [(8, "DIM106"), (10, "DIM106")]


def test_math_functions_refuse_dimensional_quantities_numpy_does_not():
    assert check(
        'area = Q_(4.0, "m^2")\n'
        'a = math.sqrt(area)\n'           # pint raises: math converts to float
        'b = np.sqrt(area)\n'             # fine: a length
        'c = np.exp(area)\n'              # DimensionalityError
        'd = math.sin(Q_(30.0, "deg"))\n'  # fine: pint converts degrees to radians
        'e = np.sqrt(area) + Q_(1, "s")\n'
    ) == [(8, "DIM104"), (10, "DIM102"), (12, "DIM101")]


def test_offset_temperatures():
    assert check(
        't = Q_(18.0, "degC")\n'          # 7: the one way to build one
        'a = 3.0 * ureg.degC\n'           # 8: OffsetUnitCalculusError
        'b = Q_("18 degC")\n'             # 9: raises
        'c = t * 2\n'                     # 10: raises
        'd = t + t\n'                     # 11: raises
        'e = t - Q_(1.0, "K")\n'          # 12: allowed
        'f = t + Q_(1.0, "K")\n'          # 13: raises
        'g = t.to("delta_degC")\n'        # 14: raises
        'h = t - Q_(10.0, "degC")\n'      # 15: a difference
    ) == [(8, "DIM107"), (9, "DIM107"), (10, "DIM107"), (11, "DIM107"), (13, "DIM107"), (14, "DIM107")]


def test_magnitude_keeps_unit_and_scale():
    assert check(
        'd_km = Q_(3.0, "km")\n'
        'x: Annotated[float, "m"] = d_km.magnitude\n'
        'y: Annotated[float, "m"] = d_km.m_as("m")\n'
        'z: Annotated[float, "m"] = d_km.to("m").m\n'
        'ok = d_km.to("km").magnitude == 3.0\n'
    ) == [(8, "DIM201")]


def test_pint_declaration_forms():
    assert check(
        '@ureg.wraps("m", ("m/s", "s"))\n'                 # 7
        'def travel(speed, time):\n'
        '    return speed * time\n'
        '@ureg.check("[length]", "[time]")\n'             # 10
        'def pace(distance, time):\n'
        '    return time / distance\n'
        'a = travel(Q_(2.0, "m/s"), Q_(3.0, "s"))\n'       # 13
        'b = travel(2.0, Q_(3.0, "s"))\n'                  # 14: strict wraps refuses a number
        'c = pace(Q_(1.0, "s"), Q_(2.0, "s"))\n'           # 15: wrong dimension
        'd = travel(Q_(2.0, "m/s"), Q_(3.0, "s")) + Q_(1, "s")\n'  # 16: the result is in m
        'def typed(x: Annotated[pint.Quantity, "m"]) -> Annotated[pint.Quantity, "m"]:\n'
        '    return x + Q_(1, "mm")\n'
    ) == [(14, "DIM104"), (15, "DIM104"), (16, "DIM101")]


def test_code_expected_to_fail_is_not_reported():
    assert check(
        'import pytest\n'
        'def test_it():\n'
        '    with pytest.raises(pint.DimensionalityError):\n'
        '        Q_(1, "m") + Q_(1, "s")\n'
        '    Q_(1, "m") + Q_(1, "s")\n'
    ) == [(11, "DIM101")]


def test_registries_from_imports_and_application_registry():
    assert codes(
        "from pint import UnitRegistry, get_application_registry\n"
        "ureg = UnitRegistry()\n"
        "app = get_application_registry()\n"
        "a = ureg.meter + app.second\n"
    ) == [(4, "DIM101")]


def test_check_guard_narrows_an_unknown_quantity():
    assert check(
        'def describe(q):\n'                          # 7
        '    if q.check("[length]"):\n'
        '        return q + Q_(1, "s")\n'             # 9: q is a length here
        '    return q + Q_(1, "s")\n'                 # 10: unknown here
    ) == [(9, "DIM101")]



# Each call with how to make it at run time (pint as the reference library raises for each).
MATH_CALLS = {
    "isfinite(q)": lambda math, q: math.isfinite(q),
    "isnan(q)": lambda math, q: math.isnan(q),
    "isinf(q)": lambda math, q: math.isinf(q),
    "frexp(q)": lambda math, q: math.frexp(q),
    "modf(q)": lambda math, q: math.modf(q),
    "ulp(q)": lambda math, q: math.ulp(q),
    "remainder(q, q)": lambda math, q: math.remainder(q, q),
    "nextafter(q, q)": lambda math, q: math.nextafter(q, q),
    "ldexp(q, 2)": lambda math, q: math.ldexp(q, 2),
}


@pytest.mark.parametrize("call", list(MATH_CALLS))
def test_every_math_function_refuses_a_dimensional_quantity(call):
    import math

    import pint

    ureg = pint.UnitRegistry()
    with pytest.raises(pint.DimensionalityError):
        MATH_CALLS[call](math, ureg.Quantity(2.5, "m"))
    assert codes(f'''\
        import math
        import pint
        ureg = pint.UnitRegistry()
        q = ureg.Quantity(2.5, "m")
        result = math.{call}
    ''') == [(5, "DIM104")] * call.count("q")  # each quantity argument is refused
