#!/usr/bin/env python3
"""Where one cold check spends its time, phase by phase, beside the ``ast.parse`` floor.

Runs ``dimcheck check --no-cache --jobs 1`` in this process on the given files, with a
timer around each stage of the pipeline (reading, parsing, collecting declarations,
finding module names, inference and rules), and prints each stage's own time (time spent
in a nested stage is counted there, not twice). It also times two references on the same
files: reading and parsing them (the floor ``bench_check.py`` compares against) and a
do-nothing Python visit of every expression and statement inside a function body, which
is what any checker written in Python pays before it works out a single unit.

    python bench/make_corpus.py /tmp/corpus
    python bench/phases.py /tmp/corpus/corpus [--repeat 3]

The timers add a little to each stage; use ``bench_check.py`` for the figures to report.
"""

from __future__ import annotations

import argparse
import ast
import gc
import io
import sys
import time
from contextlib import redirect_stdout
from pathlib import Path

REPO = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(REPO))

from bench_check import collect as list_files  # noqa: E402  (the main benchmark's file list)


def timed_stages() -> dict[str, float]:
    """Wrap each pipeline stage in a timer; returns the dict the times accumulate in."""
    from dimcheck.inference import engine, project

    totals: dict[str, float] = {}
    nested: list[float] = []

    def wrap(owner, name: str, label: str) -> None:
        original = getattr(owner, name)

        def timed(*args, **kwargs):
            start = time.perf_counter()
            nested.append(0.0)
            try:
                return original(*args, **kwargs)
            finally:
                elapsed = time.perf_counter() - start
                inner = nested.pop()
                totals[label] = totals.get(label, 0.0) + elapsed - inner
                if nested:
                    nested[-1] += elapsed

        setattr(owner, name, timed)

    wrap(project, "read_source", "read files")
    wrap(project, "parse_source", "parse (ast.parse)")
    wrap(project, "collect_symbols", "collect declarations")
    wrap(project, "trailing_comment_units", "find comment units")
    wrap(project, "module_name_for", "module names")
    wrap(engine.Engine, "check_module", "inference and rules")
    return totals


def check_once(files: list[str]) -> float:
    from dimcheck import runner
    from dimcheck.cli.main import main

    runner.KEEP_ALIVE = []  # as the command line does: trees are not freed one by one at the end
    start = time.perf_counter()
    with redirect_stdout(io.StringIO()):
        try:
            main(["check", "--no-cache", "--jobs", "1", "--format", "json", *files])
        except SystemExit:
            pass
    return time.perf_counter() - start


def floor(files: list[str]) -> float:
    start = time.perf_counter()
    for path in files:
        try:
            ast.parse(Path(path).read_bytes(), filename=path)
        except (SyntaxError, ValueError, RecursionError, MemoryError):
            pass
    return time.perf_counter() - start


def bare_visit(files: list[str]) -> tuple[float, int, int]:
    """Seconds to visit every node inside function bodies doing nothing, functions, nodes."""
    bodies = []
    for path in files:
        try:
            tree = ast.parse(Path(path).read_bytes(), filename=path)
        except (SyntaxError, ValueError, RecursionError, MemoryError):
            continue
        bodies += [node.body for node in ast.walk(tree) if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef))]
    # the child fields of each node class, without the context and operator markers
    # (Load, Add, ...): the fastest visit, so that the reference is not a straw man
    fields = {cls: tuple(name for name in cls._fields if name not in ("ctx", "op", "ops"))
              for cls in vars(ast).values() if isinstance(cls, type) and issubclass(cls, ast.AST)}
    count = 0

    def visit(node) -> None:
        nonlocal count
        count += 1
        for name in fields[node.__class__]:
            value = getattr(node, name)
            if value.__class__ is list:
                for item in value:
                    if isinstance(item, ast.AST):
                        visit(item)
            elif isinstance(value, ast.AST):
                visit(value)

    sys.setrecursionlimit(max(sys.getrecursionlimit(), 10000))
    start = time.perf_counter()
    for body in bodies:
        for statement in body:
            visit(statement)
    return time.perf_counter() - start, len(bodies), count


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("paths", nargs="+")
    parser.add_argument("--repeat", type=int, default=1, help="keep the best of N runs of each")
    options = parser.parse_args()
    files = [str(path) for path in list_files([Path(p) for p in options.paths])]
    for path in files:
        Path(path).read_bytes()  # a warm OS file cache for everything below
    gc.disable()  # as dimcheck runs; the references get the same conditions
    parse_floor = min(floor(files) for _ in range(options.repeat))
    visit_time, functions, nodes = min(bare_visit(files) for _ in range(options.repeat))
    gc.enable()
    totals = timed_stages()
    runs = []
    for _ in range(options.repeat):
        totals.clear()
        runs.append((check_once(files), dict(totals)))
    total, stages = min(runs, key=lambda run: run[0])

    print(f"{len(files)} files, {functions} functions, {nodes} nodes in their bodies; best of {options.repeat}")
    print(f"{'stage':32s} {'seconds':>8s} {'x floor':>8s}")
    for label, seconds in sorted(stages.items(), key=lambda item: -item[1]):
        print(f"{label:32s} {seconds:8.3f} {seconds / parse_floor:8.2f}")
    rest = total - sum(stages.values())
    print(f"{'the rest (discovery, reports)':32s} {rest:8.3f} {rest / parse_floor:8.2f}")
    print(f"{'whole check, in-process':32s} {total:8.3f} {total / parse_floor:8.2f}")
    print()
    print(f"{'reference: read + ast.parse':32s} {parse_floor:8.3f} {1.0:8.2f}")
    print(f"{'reference: bare visit of bodies':32s} {visit_time:8.3f} {visit_time / parse_floor:8.2f}")


if __name__ == "__main__":
    main()
