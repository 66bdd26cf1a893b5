#!/usr/bin/env python3
"""Fuzz dimcheck with generated Python programs (hypothesmith), in process.

Each program is syntactically valid Python produced by hypothesmith from the grammar. A
fraction of them get unit declarations injected (``from typing import Annotated`` and
``x: Annotated[float, "m"] = 1.0`` lines, plus uses of those names) so that the inference
path runs, not only parsing. Every program is written to a temporary file and checked with
``dimcheck.check_paths``; any exception that escapes is a crash. A DIM902 for a generated
program is not a crash (hypothesmith can produce code that compiles differently from how it
parses, and a checker may reject it). The code is never executed.

Crashing programs are saved, one file each, with the traceback in a sibling ``.txt``.

    pip install hypothesmith
    python bench/fuzz.py                           # 1,000 programs
    python bench/fuzz.py --count 5000 --seed 7 --out fuzz-crashes
"""

from __future__ import annotations

import argparse
import os
import random
import sys
import tempfile
import time
import traceback
import warnings
from pathlib import Path

REPO = Path(__file__).resolve().parent.parent
if str(REPO) not in sys.path:
    sys.path.insert(0, str(REPO))

UNITS = ("m", "s", "kg", "m/s", "N", "Pa", "kg/m^3", "1", "rad", "degC", "mm", "K")


def inject_units(source: str, rng: random.Random) -> str:
    """Prefix unit declarations and append sums that mix the declared names with the
    program's own, so the inference path meets the generated code."""
    count = rng.randint(1, 4)
    names = [f"q{i}" for i in range(count)]
    head = ["from typing import Annotated"]
    for name in names:
        head.append(f"{name}: Annotated[float, {rng.choice(UNITS)!r}] = {rng.choice(['1.0', '0', '2.5e3'])}")
    head.append("x: Annotated[float, \"m\"] = 1.0")
    tail = [
        "",
        f"_total = {' + '.join(names)} + x",
        f"def _probe(a: Annotated[float, {rng.choice(UNITS)!r}]) -> Annotated[float, {rng.choice(UNITS)!r}]:",
        f"    return a * {rng.choice(names)} - x",
        f"_probe({rng.choice(names)})",
    ]
    return "\n".join(head) + "\n" + source.rstrip("\n") + "\n" + "\n".join(tail) + "\n"


def generate(count: int, seed: int, node_share: float = 0.5) -> list[str]:
    """``count`` programs from hypothesmith, reproducible for one seed: ``node_share`` of
    them from ``from_node`` (libcst trees, closer to real code), the rest from
    ``from_grammar`` (the grammar's corners)."""
    import hypothesmith

    programs: list[str] = []
    from_node = int(count * node_share)
    programs.extend(_draw(hypothesmith.from_grammar(), count - from_node, seed))
    if from_node:
        programs.extend(_draw(hypothesmith.from_node(), from_node, seed + 1))
    return programs


def _draw(strategy, count: int, seed: int) -> list[str]:
    from hypothesis import HealthCheck, given, seed as fixed_seed, settings

    programs: list[str] = []
    seen: set[str] = set()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        for round_ in range(50):  # hypothesis may stop early; draw again with the next seed
            wanted = count - len(programs)
            if wanted <= 0:
                break

            @fixed_seed(seed * 1000 + round_)
            @settings(max_examples=max(2 * wanted, 20), deadline=None, database=None,
                      suppress_health_check=list(HealthCheck))
            @given(strategy)
            def collect(source):
                if source not in seen and len(programs) < count:
                    seen.add(source)
                    programs.append(source)

            collect()
    return programs[:count]


def check_program(source: str, folder: Path, index: int):
    """Check one program in process: (traceback text of a crash or None, finding codes)."""
    import dimcheck

    path = folder / f"prog_{index}.py"
    path.write_text(source, encoding="utf-8", errors="surrogatepass")
    codes: list[str] = []
    try:
        report = dimcheck.check_paths([str(path)])
        for finding in report.findings:  # touch every field, as a report writer would
            (finding.path, finding.line, finding.column, finding.message)
            codes.append(finding.code)
    except BaseException as error:  # noqa: BLE001 - any escape is a crash
        if isinstance(error, KeyboardInterrupt):
            raise
        return "".join(traceback.format_exception(error)), codes
    finally:
        path.unlink(missing_ok=True)
    return None, codes


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--count", type=int, default=1000, help="programs to generate (default 1000)")
    parser.add_argument("--seed", type=int, default=20240611, help="generation seed")
    parser.add_argument("--inject", type=float, default=0.5,
                        help="fraction of programs that get unit declarations (default 0.5)")
    parser.add_argument("--node-share", type=float, default=0.5,
                        help="fraction drawn from hypothesmith.from_node (default 0.5)")
    parser.add_argument("--out", default="fuzz-crashes", help="folder for crashing programs")
    args = parser.parse_args(argv)

    try:
        import hypothesmith  # noqa: F401  (only: is it there?)
        del hypothesmith
    except ImportError:
        print("hypothesmith is not installed: pip install hypothesmith", file=sys.stderr)
        return 2

    started = time.perf_counter()
    programs = generate(args.count, args.seed, args.node_share)
    generated = time.perf_counter() - started
    rng = random.Random(args.seed)
    out = Path(args.out)
    crashes = injected = 0
    codes: dict[str, int] = {}
    with tempfile.TemporaryDirectory(prefix="dimcheck-fuzz-") as tmp:
        folder = Path(tmp)
        check_started = time.perf_counter()
        for index, program in enumerate(programs):
            if rng.random() < args.inject:
                program = inject_units(program, rng)
                injected += 1
            failure, found = check_program(program, folder, index)
            for code in found:
                codes[code] = codes.get(code, 0) + 1
            if failure is not None:
                crashes += 1
                out.mkdir(parents=True, exist_ok=True)
                (out / f"crash_{index:05d}.py").write_text(program, encoding="utf-8", errors="surrogatepass")
                (out / f"crash_{index:05d}.txt").write_text(failure, encoding="utf-8")
                print(f"crash {index}: {failure.strip().splitlines()[-1]}", file=sys.stderr)
        checked = time.perf_counter() - check_started
    print(f"programs: {len(programs)} ({injected} with injected units), generated in {generated:.1f} s")
    print(f"checked in {checked:.1f} s; findings by code: {dict(sorted(codes.items())) or 'none'}")
    print(f"crashes: {crashes}" + (f" (saved in {out}{os.sep})" if crashes else ""))
    return 1 if crashes else 0


if __name__ == "__main__":
    sys.exit(main())
