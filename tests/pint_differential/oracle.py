"""The reference verdict: run a program WE generated (or wrote by hand) with pint.

pint is the reference library: the line where pint raises a dimensionality or offset error
at run time is where dimcheck must report an error, and a program pint runs cleanly must
get no error from dimcheck (contract section 8).

Only programs written by this test package are ever executed here, never user code and
never the code dimcheck checks in a real run; dimcheck itself never executes anything.

Each top-level statement is compiled and executed on its own, in a fresh namespace, with
numpy floating-point problems and warnings turned into exceptions. The first statement
that raises stops the run (later lines depend on it). What it raised is classified:

- ``DimensionalityError`` (pint.errors): incompatible dimensions, also what pint raises
  for ``math.*`` of a dimensional quantity (it converts to float) and for ``q + 1``;
- ``OffsetUnitCalculusError`` (pint.errors; not a subclass of DimensionalityError):
  ambiguous arithmetic on offset temperatures such as degC;
- ``ValueError`` raised inside pint itself: pint 0.25.3 raises ``ValueError("Cannot
  compare PlainQuantity and <class 'int'>")`` for an ordering comparison (``<``, ``max``)
  of a dimensional quantity with a non-zero plain number, and ``@ureg.wraps`` with
  ``strict=True`` raises ValueError for a plain number. Only ValueErrors whose innermost
  frame is in pint's package count; ``math.sqrt(-1)``'s ValueError does not.

Anything else (ZeroDivisionError, FloatingPointError from overflow or sqrt of a negative,
a warning turned error, ...) makes the program *unusable*: the bench and test discard it.
So are programs whose verdict depends on a value rather than on units: pint lets a
quantity be added to or compared with a plain number that happens to be 0 or NaN at run
time, which no static checker can know, so a program that binds a computed plain number
equal to 0, or any non-finite value, is discarded too.
"""

from __future__ import annotations

import ast
import math
import os
import traceback
import warnings
from dataclasses import dataclass

import numpy as np
import pint

PINT_PACKAGE = os.path.dirname(pint.__file__) + os.sep

# The names under which a failing statement is reported.
DIMENSIONALITY = "DimensionalityError"
OFFSET = "OffsetUnitCalculusError"
PINT_VALUE_ERROR = "ValueError(pint)"


@dataclass(frozen=True)
class PintOutcome:
    """``line`` is the 1-based line of the first statement pint rejected (None: clean run);
    ``error`` its classification; ``message`` pint's message. ``unusable`` is a reason to
    discard the program (then ``line`` is None)."""

    line: int | None = None
    error: str | None = None
    message: str = ""
    unusable: str | None = None

    @property
    def raised(self) -> bool:
        return self.line is not None


def _raised_in_pint(exc: BaseException) -> bool:
    frames = traceback.extract_tb(exc.__traceback__)
    return bool(frames) and frames[-1].filename.startswith(PINT_PACKAGE)


def classify(exc: BaseException) -> str | None:
    """The pint error class name for an exception pint raised, or None if it is not one."""
    if isinstance(exc, pint.OffsetUnitCalculusError):
        return OFFSET
    if isinstance(exc, pint.DimensionalityError):
        return DIMENSIONALITY
    if type(exc) is ValueError and _raised_in_pint(exc):
        return PINT_VALUE_ERROR
    return None


def _value_dependent(value) -> str | None:
    """Why a bound value would make pint's verdict depend on numbers, or None."""
    if isinstance(value, bool):
        return None
    if isinstance(value, (int, float, np.integer, np.floating)):
        if not math.isfinite(float(value)):
            return "non-finite plain number"
        if value == 0:
            return "computed plain number equal to 0"
        return None
    if isinstance(value, pint.Quantity):
        magnitude = np.asarray(value.magnitude, dtype=float)
        if not np.all(np.isfinite(magnitude)):
            return "non-finite quantity"
    return None


def run_with_pint(source: str, filename: str = "<pint-differential>", namespace: dict | None = None) -> PintOutcome:
    """Execute ``source`` (a program this package wrote) statement by statement with pint.

    ``namespace``, when given, must be an empty dict: it receives the program's names, so a
    test can look at the values pint computed."""
    module = ast.parse(source, filename)
    if namespace is None:
        namespace = {}
    namespace["__name__"] = "pint_differential_program"
    for statement in module.body:
        code = compile(ast.Module(body=[statement], type_ignores=[]), filename, "exec")
        before = set(namespace)
        try:
            with warnings.catch_warnings(), np.errstate(all="raise"):
                warnings.simplefilter("error")
                exec(code, namespace)  # noqa: S102 - our own generated program, by design
        except Exception as exc:  # classified below; anything unexpected discards the program
            kind = classify(exc)
            if kind is None:
                return PintOutcome(unusable=f"{type(exc).__name__}: {exc}")
            return PintOutcome(line=statement.lineno, error=kind, message=str(exc))
        for name in set(namespace) - before | _targets(statement):
            reason = _value_dependent(namespace.get(name))
            if reason is not None:
                return PintOutcome(unusable=f"{reason} ({name}, line {statement.lineno})")
    return PintOutcome()


def _targets(statement: ast.stmt) -> set[str]:
    if isinstance(statement, ast.Assign):
        return {t.id for t in statement.targets if isinstance(t, ast.Name)}
    return set()
