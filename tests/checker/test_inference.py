"""How dimensions flow: declarations, unknowns, control flow, calls and helpers."""

from .helpers import codes, codes_with_header as check, findings


def test_unannotated_code_gets_no_findings():
    assert check("""\
        def f(a, b):
            return a + b * 2 + math.exp(a) + np.sqrt(b) ** a
        x = f(1, 2) + 3
        y = np.sin(np.degrees(np.arctan2(x, 1)))
    """) == []


def test_unknown_absorbs_everything():
    assert check("""\
        def f(h: Annotated[float, "m"], q):
            a = h + q
            b = (h + q) + h * 3
            return a
    """) == []


def test_name_bound_only_to_bare_number_is_unknown():
    assert check("""\
        OFFSET = 2.0
        def f(h: Annotated[float, "m"]):
            return h + OFFSET
    """) == []


def test_straight_line_rebinding_and_branch_merging():
    assert check("""\
        def f(h: Annotated[float, "m"], t: Annotated[float, "s"], flag: bool):
            x = h
            x = t
            a = x + h
            if flag:
                y = h
            else:
                y = h * 2
            b = y + t
            if flag:
                z = h
            else:
                z = t
            c = z + h
    """) == [(7, "DIM101"), (12, "DIM101")]


def test_tuple_unpacking_and_comprehensions():
    assert check("""\
        def f(h: Annotated[float, "m"], t: Annotated[float, "s"]):
            a, b = h, t
            c = a + b
            doubled = [2 * v for v in [h, h]]
            d = sum(doubled) + t
            e = [v + t for v in np.linspace(0, h, 5)]
    """) == [(6, "DIM101"), (8, "DIM101"), (9, "DIM101")]


def test_return_inference_through_same_module_calls():
    assert check("""\
        def area(w: Annotated[float, "m"], h: Annotated[float, "m"]):
            return w * h
        def volume(w: Annotated[float, "m"], d: Annotated[float, "m"]) -> Annotated[float, "m^3"]:
            return area(w, w) * d
        def wrong(w: Annotated[float, "m"]) -> Annotated[float, "m^3"]:
            return area(w, w)
    """) == [(9, "DIM103")]


def test_helper_mismatch_reported_at_call_with_helper_line():
    found = findings("""\
from typing import Annotated
def combine(a, b):
    return a + b
def use(h: Annotated[float, "m"], t: Annotated[float, "s"]):
    ok = combine(h, h)
    return combine(h, t)
""")
    assert [(f.line, f.code) for f in found] == [(6, "DIM101")]
    assert "combine()" in found[0].message and ":3" in found[0].message


def test_unit_generic_helper_result_follows_arguments():
    assert check("""\
        def twice(x):
            return 2 * x
        def ratio(a, b):
            return a / b
        def f(h: Annotated[float, "m"], t: Annotated[float, "s"]) -> Annotated[float, "m/s"]:
            bad = twice(h) + t
            return ratio(h, t)
    """) == [(9, "DIM101")]


def test_recursion_terminates():
    assert check("""\
        def rec(n, x):
            if n == 0:
                return x
            return rec(n - 1, x)
        def f(h: Annotated[float, "m"], t: Annotated[float, "s"]):
            return rec(3, h) + t
    """) == [(9, "DIM101")]


def test_aliases_and_optional():
    assert check("""\
        from typing import Optional
        Length = Annotated[float, "m"]
        Time = Annotated[float, "s"]
        def f(h: Length, t: Optional[Time] = None, u: "Annotated[float, 'm']" = 1.0) -> Length:
            return t
    """) == [(8, "DIM103")]


def test_unit_marker_call_form():
    assert check("""\
        class Unit:
            def __init__(self, text): ...
        def f(h: Annotated[float, Unit("m")], t: Annotated[float, Unit("s")]):
            return h + t
    """) == [(7, "DIM101")]


def test_multi_line_signature_comment_units():
    assert codes("""\
def settle(d,          # [m]
           mu,         # [Pa*s]
           rho):       # [kg/m^3]
    return rho * d**2 / mu + d
""") == [(4, "DIM101")]


def test_comments_that_are_not_declarations():
    # contract section 1.2: citations and code in brackets are ordinary comments
    assert codes("""\
x = 1.0  # [1]_ Eq. 4
y = [1, 2]  # [3*(1-x)**2, ...]
z = 2  # [a, b]
w = 3  # see [m]
""") == []


def test_deep_expressions_do_not_crash():
    chain = " + ".join(["h"] * 2000)
    source = f"from typing import Annotated\ndef f(h: Annotated[float, 'm'], t: Annotated[float, 's']):\n    return {chain} + t\n"
    assert codes(source) == [(3, "DIM101")]


def test_a_call_reuses_the_baseline_only_for_exactly_what_it_assumed():
    # The baseline of flow() assumes p holds a Pipe instance. Passing an instance reuses it
    # (the m^3/s reaching a metre declaration is reported); passing the class itself must
    # be analysed on its own: Pipe.area is then the property object, not an area.
    assert check('''
        class Pipe:
            @property
            def area(self) -> Annotated[float, "m^2"]:
                return 0.01

        def flow(p: Pipe, v: Annotated[float, "m/s"]):
            return p.area * v

        def use(v: Annotated[float, "m/s"]):
            a: Annotated[float, "m"] = flow(Pipe(), v)
            b: Annotated[float, "m"] = flow(Pipe, v)
        ''') == [(14, "DIM103")]
