"""dimcheck against pint, the reference library, on pint-using code (contract section 8).

Two parts:

1. Generated programs (``generator.programs``): pint runs each one statement at a time
   (``oracle.run_with_pint``; only programs this test wrote are ever executed) and dimcheck
   reads the same text; the verdicts must agree (``compare.compare``).
2. Hand-written cases, one or more per bullet of contract section 8. Each first asserts
   what pint really does (so the test documents pint 0.25.3's behaviour and fails loudly if
   a pint release changes it), then dimcheck's expected verdict.

Both halves must hold: dimcheck's verdict agrees with what pint does at run time.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import pytest
from hypothesis import HealthCheck, Phase, assume, given, note, settings

from .compare import compare, dimcheck_findings
from .generator import FORMS, HEADER, HEADER_LINES, programs
from .oracle import DIMENSIONALITY, OFFSET, PINT_VALUE_ERROR, run_with_pint



# ---------------------------------------------------------------------------------------
# Generated programs
# ---------------------------------------------------------------------------------------

# No shrinking: the programs are 2-5 lines already and a failing one is printed whole
# (with both verdicts) through note(); shrinking would only slow the xfail run down.
@settings(max_examples=60, deadline=None, derandomize=True, database=None,
          phases=[Phase.explicit, Phase.generate],
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much, HealthCheck.data_too_large])
@given(programs())
def test_generated_program_agrees_with_pint(program):
    outcome = run_with_pint(program.source)
    assume(not outcome.unusable)
    verdict = compare(program.source, outcome)
    note(program.source)
    note(f"pint: {outcome}")
    note("dimcheck: " + "; ".join(f"{f.line}: {f.code} {f.message}" for f in verdict.findings))
    assert verdict.agree, verdict.reason


@settings(max_examples=40, deadline=None, derandomize=True, database=None,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
@given(programs())
def test_generator_writes_one_statement_a_line(program):
    """Not about pint support: the generator's promises, and dimcheck reads every program."""
    lines = program.source.splitlines()
    assert program.source.startswith(HEADER)
    assert 2 <= len(program.statements) <= 5
    assert len(program.forms) == len(program.statements)
    assert all(form in FORMS for form in program.forms)
    for index, statement in enumerate(program.statements, 1):
        assert statement.startswith(f"v{index} = ")
        compile(statement, "<statement>", "exec")  # each line is a whole statement
    assert len(lines) == HEADER_LINES + len(program.statements)
    findings = dimcheck_findings(program.source)
    assert not [f for f in findings if f.code == "DIM902"], findings


def test_oracle_discards_errors_that_are_not_about_units():
    # ZeroDivisionError and math's domain error are not pint verdicts.
    assert run_with_pint(HEADER + 'v1 = Q_(3.0, "m")\nv2 = v1 / 0\n').unusable
    assert run_with_pint(HEADER + 'v1 = Q_(-4.0, "dimensionless")\nv2 = math.sqrt(v1)\n').unusable
    # A computed plain number equal to 0: pint's verdict on `v1 + v3` depends on the value.
    assert run_with_pint(HEADER + 'v1 = Q_(3.0, "m")\nv2 = v1 - v1\nv3 = v2.magnitude * 2.0\n').unusable


# ---------------------------------------------------------------------------------------
# Hand-written cases, one or more per bullet of contract section 8
# ---------------------------------------------------------------------------------------

@dataclass(frozen=True)
class Case:
    id: str
    bullet: str  # the claim of contract section 8 this case pins down
    body: str  # statements after HEADER
    line: int | None  # 1-based line in the BODY where pint raises (None: runs cleanly)
    error: str | None = None
    values: tuple = ()  # (name, expected repr-ish check) pairs, pint's computed values
    codes_at_line: tuple[str, ...] = ()  # dimcheck codes required on the failing line
    forbidden_codes: tuple[str, ...] = ()  # dimcheck codes that must not appear at all

    @property
    def source(self) -> str:
        return HEADER + self.body

    @property
    def absolute_line(self) -> int | None:
        return None if self.line is None else HEADER_LINES + self.line


CASES = [
    Case("quantity-plus-nonzero-number",
         "q + non-zero plain number raises when q has a dimension; DIM101, not DIM203",
         'v1 = Q_(3.0, "m")\nv2 = v1 + 2.0\n', 2, DIMENSIONALITY, codes_at_line=("DIM101",)),
    Case("quantity-minus-nonzero-number",
         "q - non-zero plain number raises too (either side)",
         'v1 = Q_(3.0, "kPa")\nv2 = 1.5 - v1\n', 2, DIMENSIONALITY, codes_at_line=("DIM101",)),
    Case("quantity-plus-zero",
         "+ 0 and + 0.0 do not raise; neither does ordering against 0",
         'v1 = Q_(3.0, "m")\nv2 = v1 + 0\nv3 = v1 - 0.0\nv4 = v1 < 0\nv5 = max(v1, 0)\n', None),
    Case("quantity-less-than-nonzero-number",
         "ordering comparisons with a non-zero plain number raise (pint raises ValueError here)",
         'v1 = Q_(3.0, "m")\nv2 = v1 < 2.0\n', 2, PINT_VALUE_ERROR),
    Case("max-with-nonzero-number",
         "max of a dimensional quantity and a non-zero plain number raises (ValueError)",
         'v1 = Q_(3.0, "s")\nv2 = max(v1, 1)\n', 2, PINT_VALUE_ERROR),
    Case("equality-across-dimensions",
         "== and != across dimensions never raise",
         'v1 = Q_(3.0, "m")\nv2 = Q_(1.0, "s")\nv3 = v1 == v2\nv4 = v1 != 1\n', None,
         values=(("v3", False), ("v4", True))),
    Case("math-sqrt-of-dimensional",
         "every math.* function raises on a dimensional quantity; np.sqrt does not",
         'v1 = Q_(4.0, "m**2")\nv2 = np.sqrt(v1)\nv3 = math.sqrt(v1)\n', 3, DIMENSIONALITY),
    Case("math-sin-of-degrees",
         "math.sin of a quantity in degrees is right (pint converts angles): no DIM202",
         'v1 = Q_(90.0, "deg")\nv2 = math.sin(v1)\nv3 = np.sin(v1)\n', None,
         values=(("v2", 1.0),), forbidden_codes=("DIM202",)),
    Case("unreduced-ratio",
         "(Q_(3, 'mm') / Q_(1, 'm')).magnitude is 3.0 while np.exp of it uses 0.003",
         'v1 = Q_(3.0, "mm") / Q_(1.0, "m")\nv2 = v1.magnitude\nv3 = np.exp(v1)\n', None,
         values=(("v2", 3.0), ("v3", math.exp(0.003)))),
    Case("hertz-plus-radian-per-second",
         "Q_(1, 'Hz') + Q_(1, 'rad/s') is 2 Hz (rad has factor 1)",
         'v1 = Q_(1.0, "Hz") + Q_(1.0, "rad/s")\n', None, values=(("v1", 2.0),)),
    Case("offset-built-by-multiplication",
         "only Q_(18.0, 'degC') builds an offset temperature; 3.0 * ureg.degC raises",
         'v1 = Q_(18.0, "degC")\nv2 = 3.0 * ureg.degC\n', 2, OFFSET),
    Case("offset-built-from-string",
         "Q_('18 degC') raises",
         'v1 = Q_("18 degC")\n', 1, OFFSET),
    Case("offset-times-number", "multiplying an offset temperature raises",
         'v1 = Q_(18.0, "degC")\nv2 = v1 * 2\n', 2, OFFSET),
    Case("offset-divided", "dividing an offset temperature raises",
         'v1 = Q_(18.0, "degC")\nv2 = v1 / 2\n', 2, OFFSET),
    Case("offset-squared", "powering an offset temperature raises",
         'v1 = Q_(18.0, "degC")\nv2 = v1 ** 2\n', 2, OFFSET),
    Case("offset-plus-offset", "adding two offset temperatures raises",
         'v1 = Q_(18.0, "degC")\nv2 = Q_(4.0, "degC")\nv3 = v1 + v2\n', 3, OFFSET),
    Case("offset-plus-kelvin", "adding K to an offset temperature raises",
         'v1 = Q_(18.0, "degC")\nv2 = Q_(4.0, "K")\nv3 = v1 + v2\n', 3, OFFSET),
    Case("offset-less-than-zero",
         "comparing an offset temperature with a plain number raises, even with 0",
         'v1 = Q_(18.0, "degC")\nv2 = v1 + 0\nv3 = v1 < 0\n', 3, OFFSET),
    Case("offset-less-than-nonzero",
         "... and with a non-zero number pint raises ValueError, not OffsetUnitCalculusError",
         'v1 = Q_(18.0, "degC")\nv2 = v1 < 20\n', 2, PINT_VALUE_ERROR),
    Case("offset-minus-kelvin", "degC - K is allowed",
         'v1 = Q_(18.0, "degC")\nv2 = Q_(2.0, "K")\nv3 = v1 - v2\nv4 = v1 - Q_(4.0, "degC")\n', None),
    Case("offset-to-delta", ".to('delta_degC') of an offset temperature raises",
         'v1 = Q_(18.0, "degC")\nv2 = v1.to("K")\nv3 = v1.to("delta_degC")\n', 3, DIMENSIONALITY),
    Case("check-decorator-plain-number", "@ureg.check rejects plain numbers",
         '@ureg.check("[length]")\ndef settle(depth):\n    return depth\n\n'
         'v1 = settle(Q_(2.0, "m"))\nv2 = settle(3.0)\n', 6, DIMENSIONALITY),
    Case("wraps-strict-plain-number", "@ureg.wraps with strict=True (default) raises ValueError on plain numbers",
         '@ureg.wraps("m", "m")\ndef settle(depth):\n    return depth\n\n'
         'v1 = settle(Q_(2.0, "m"))\nv2 = settle(3.0)\n', 6, PINT_VALUE_ERROR),
]


def _assert_pint_behaviour(case: Case):
    namespace: dict = {}
    outcome = run_with_pint(case.source, namespace=namespace)
    assert not outcome.unusable, outcome.unusable
    assert (outcome.line, outcome.error) == (case.absolute_line, case.error), outcome
    for name, expected in case.values:
        value = namespace[name]
        value = getattr(value, "magnitude", value)
        if isinstance(expected, bool):
            assert bool(value) is expected
        else:
            assert math.isclose(float(value), expected, rel_tol=1e-12), (name, value, expected)
    return outcome


@pytest.mark.parametrize("case", CASES, ids=[c.id for c in CASES])
def test_pint_behaves_as_contract_section_8_says(case):
    """pint's own behaviour, asserted so the hand-written cases stay honest."""
    _assert_pint_behaviour(case)


@pytest.mark.parametrize("case", CASES, ids=[c.id for c in CASES])
def test_dimcheck_agrees_with_pint_on_section_8_case(case):
    outcome = _assert_pint_behaviour(case)  # pint first: this is the behaviour to match
    verdict = compare(case.source, outcome)
    assert verdict.agree, (verdict.reason, verdict.findings)
    if case.codes_at_line:
        codes = {f.code for f in verdict.findings if f.line == case.absolute_line}
        assert set(case.codes_at_line) <= codes, verdict.findings
        assert "DIM203" not in codes, "pint quantity plus a number is an error (DIM101), not DIM203"
    for code in case.forbidden_codes:
        assert not [f for f in verdict.findings if f.code == code], verdict.findings
