#!/usr/bin/env python3
"""Time what ``dimcheck serve`` does after each keystroke: re-checking an edited document.

Generates an invented, fully annotated module of about 1,000 lines (pumps, pipes and
tanks: constants with comment units, functions with ``Annotated`` parameters calling
each other, math and numpy), opens it in a server ``Session`` in this process, and makes
N edits, each followed by the check the server runs on ``didChange`` (the document text
from memory, the unit table and the unchanged modules reused). Prints the median and
the spread of the re-check time, the cold first check, and a hover.

This is a script, not a test: timings depend on the machine, so nothing asserts a limit.

    python bench/bench_server.py [--edits N] [--lines N] [--json]
"""

from __future__ import annotations

import argparse
import gc
import json
import os
import statistics
import sys
import tempfile
import time
from pathlib import Path

HEADER = '''\
"""An invented plant model for timing the language server."""
from typing import Annotated
import math

import numpy as np

Length = Annotated[float, "m"]
Pressure = Annotated[float, "Pa"]
Flow = Annotated[float, "m^3/s"]

g = 9.80665  # [m/s^2] standard gravity
rho_water = 998.0  # [kg/m^3]
mu_water = 1.0e-3  # [Pa*s]
atmosphere = 101325.0  # [Pa]
'''

BLOCK = '''

def pipe_velocity_{i}(q: Flow, d: Length) -> Annotated[float, "m/s"]:
    area = math.pi * d**2 / 4
    return q / area


def reynolds_{i}(q: Flow, d: Length) -> Annotated[float, "1"]:
    u = pipe_velocity_{i}(q, d)
    return rho_water * u * d / mu_water


def friction_loss_{i}(q: Flow, d: Length, length: Length,
                      f: Annotated[float, "1"]) -> Pressure:
    u = pipe_velocity_{i}(q, d)
    dynamic = 0.5 * rho_water * u**2
    return f * length / d * dynamic


def tank_level_{i}(p_bottom: Pressure, level_offset: Length) -> Length:
    gauge = p_bottom - atmosphere
    head = gauge / (rho_water * g)
    return head + level_offset


def pump_power_{i}(q: Flow, dp: Pressure, efficiency: Annotated[float, "1"]) -> Annotated[float, "W"]:
    hydraulic = q * dp
    loss = friction_loss_{i}(q, 0.1, 25.0, 0.02)
    return (hydraulic + q * loss) / efficiency


def spread_{i}(levels: Annotated[np.ndarray, "m"], rate: Annotated[float, "1/s"],
               t: Annotated[float, "s"]) -> Annotated[np.ndarray, "m"]:
    decay = np.exp(-rate * t)
    return levels * decay + np.sqrt(levels**2) * (1 - decay)
'''


def make_module(lines: int) -> str:
    parts = [HEADER]
    index = 0
    while sum(part.count("\n") for part in parts) < lines:
        parts.append(BLOCK.format(i=index))
        index += 1
    return "".join(parts)


def edits(text: str, count: int):
    """Each edit changes one number in one function, as typing does; every other edit
    plants a bug (a pressure added to a length) and the next one removes it again."""
    anchor = "    return head + level_offset\n"
    positions = [i for i in range(len(text)) if text.startswith(anchor, i)]
    for n in range(count):
        at = positions[(n // 2) % len(positions)]
        line = "    return head + level_offset + gauge\n" if n % 2 == 0 else anchor
        yield text[:at] + line + text[at + len(anchor):]


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--edits", type=int, default=40)
    parser.add_argument("--lines", type=int, default=1000)
    parser.add_argument("--json", action="store_true")
    args = parser.parse_args()

    sys.path.insert(0, str(Path(__file__).resolve().parent.parent))
    from dimcheck.server.session import Session

    with tempfile.TemporaryDirectory() as folder:
        path = os.path.join(folder, "plant_model.py")
        text = make_module(args.lines)
        Path(path).write_text(text, encoding="utf-8")
        session = Session()

        started = time.perf_counter()
        session.set_documents({path: text})
        first = session.check(path)
        cold = time.perf_counter() - started
        if first:
            print(f"unexpected findings in the generated module: {first[:3]}", file=sys.stderr)
            return 1

        times = []
        collect_times = []
        cpu_times = []  # CPU time of this process: what the wall time would be on an idle machine
        findings = []
        parses_before = session.store.parses
        for edited in edits(text, args.edits):
            started, cpu_started = time.perf_counter(), time.process_time()
            session.set_documents({path: edited})
            issues = session.check(path)
            times.append(time.perf_counter() - started)
            cpu_times.append(time.process_time() - cpu_started)
            started = time.perf_counter()
            gc.collect()  # as the server does after publishing, outside the edit-to-diagnostics path
            collect_times.append(time.perf_counter() - started)
            findings.append(len(issues))
        parses = session.store.parses - parses_before
        if findings[0::2] != [1] * len(findings[0::2]) or any(findings[1::2]):
            print(f"the planted bugs were not found as expected: {findings}", file=sys.stderr)
            return 1

        hover_line = next(i for i, line in enumerate(text.splitlines()) if "head = gauge" in line)
        started = time.perf_counter()
        hover = session.hover(path, hover_line, len("    head = ga"))
        hover_time = time.perf_counter() - started

    result = {
        "lines": text.count("\n"),
        "edits": args.edits,
        "cold_first_check_ms": round(cold * 1000, 1),
        "recheck_median_ms": round(statistics.median(times) * 1000, 1),
        "recheck_min_ms": round(min(times) * 1000, 1),
        "recheck_max_ms": round(max(times) * 1000, 1),
        "recheck_cpu_median_ms": round(statistics.median(cpu_times) * 1000, 1),
        "collect_after_median_ms": round(statistics.median(collect_times) * 1000, 1),
        "modules_parsed_during_edits": parses,
        "hover_ms": round(hover_time * 1000, 1),
        "hover": hover.markdown if hover else None,
    }
    if args.json:
        print(json.dumps(result, indent=2))
    else:
        print(f"{result['lines']}-line annotated module, {args.edits} edits")
        print(f"  first check (cold):  {result['cold_first_check_ms']} ms")
        print(f"  re-check after edit: median {result['recheck_median_ms']} ms "
              f"(min {result['recheck_min_ms']}, max {result['recheck_max_ms']}); "
              f"CPU time median {result['recheck_cpu_median_ms']} ms")
        print(f"  garbage collection after each check (off the critical path): median "
              f"{result['collect_after_median_ms']} ms")
        print(f"  modules parsed during the edits: {parses} (the edited document, once per edit)")
        print(f"  hover: {result['hover_ms']} ms -> {result['hover']!r}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
