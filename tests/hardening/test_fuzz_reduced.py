"""A reduced fuzz run (the full one is bench/fuzz.py): generated, syntactically valid
programs through the in-process API must never raise. Needs hypothesmith; skipped without it.

Half the examples get unit declarations injected so that the inference path runs, not only
the parser. Code is written to a file and read by dimcheck; it is never executed.
"""

from __future__ import annotations

import os
import tempfile
import warnings

import pytest

hypothesmith = pytest.importorskip("hypothesmith")

from hypothesis import HealthCheck, given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

import dimcheck  # noqa: E402

UNITS = ("m", "s", "kg", "m/s", "N", "Pa", "kg/m^3", "1", "rad", "mm")


def _inject(source: str, units: list[str]) -> str:
    head = ["from typing import Annotated", 'x: Annotated[float, "m"] = 1.0']
    head += [f"q{i}: Annotated[float, {unit!r}] = 1.0" for i, unit in enumerate(units)]
    names = " + ".join(f"q{i}" for i in range(len(units))) or "x"
    tail = [f"_total = {names} + x",
            f"def _probe(a: Annotated[float, {units[0] if units else 'm'!r}]):",
            "    return a - x",
            "_probe(x)"]
    return "\n".join(head) + "\n" + source.rstrip("\n") + "\n" + "\n".join(tail) + "\n"


def _check(source: str):
    with tempfile.TemporaryDirectory(prefix="dimcheck-fuzz-") as folder:
        path = os.path.join(folder, "generated.py")
        with open(path, "w", encoding="utf-8", errors="surrogatepass") as handle:
            handle.write(source)
        report = dimcheck.check_paths([path])  # must not raise, whatever the program
    for finding in report.findings:
        assert finding.line >= 1 and finding.column >= 1, finding
        assert finding.code.startswith("DIM"), finding
    return report


SETTINGS = settings(max_examples=25, deadline=None, database=None,
                    suppress_health_check=list(HealthCheck))


@SETTINGS
@given(source=hypothesmith.from_grammar(), inject=st.booleans(),
       units=st.lists(st.sampled_from(UNITS), max_size=3))
def test_generated_programs_from_grammar_never_crash(source, inject, units):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        _check(_inject(source, units) if inject else source)


@SETTINGS
@given(source=hypothesmith.from_node(), inject=st.booleans(),
       units=st.lists(st.sampled_from(UNITS), max_size=3))
def test_generated_programs_from_node_never_crash(source, inject, units):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        _check(_inject(source, units) if inject else source)
