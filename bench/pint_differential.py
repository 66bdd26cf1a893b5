#!/usr/bin/env python3
"""Differential check of dimcheck against pint on generated pint-using programs.

pint is the reference library: each program (written by the generator in
``tests/pint_differential/generator.py``, never user code) is executed with pint one
statement at a time; the line where pint raises a dimensionality or offset error is where
dimcheck, reading the same text statically, must report an error, and a program pint runs
cleanly must get no error (contract section 8). dimcheck never executes the programs.

Prints how many programs agree, the disagreements grouped by the form of the statement
pint rejected (or of the statement dimcheck flagged when pint ran cleanly), the reasons
programs were discarded, and saves every disagreeing program with a comment block giving
both verdicts.

    python bench/pint_differential.py                       # 500 programs, seed 0
    python bench/pint_differential.py --count 2000 --seed 7 --out /tmp/pint-diff
"""

from __future__ import annotations

import argparse
import collections
import shutil
import sys
import tempfile
import time
from pathlib import Path

REPO = Path(__file__).resolve().parent.parent
for entry in (REPO, REPO / "tests"):
    if str(entry) not in sys.path:
        sys.path.insert(0, str(entry))

from hypothesis import HealthCheck, Phase, given, seed, settings  # noqa: E402

from pint_differential.compare import compare, dimcheck_findings  # noqa: E402
from pint_differential.generator import Program, programs  # noqa: E402
from pint_differential.oracle import run_with_pint  # noqa: E402


def run(count: int, seed_value: int) -> tuple[list, collections.Counter]:
    """``count`` usable programs (hypothesis keeps drawing until that many pass ``assume``)."""
    results: list = []
    discarded: collections.Counter = collections.Counter()

    @seed(seed_value)
    @settings(max_examples=count, database=None, deadline=None, phases=[Phase.generate],
              suppress_health_check=list(HealthCheck))
    @given(programs())
    def one(program: Program) -> None:
        from hypothesis import assume

        outcome = run_with_pint(program.source)
        if outcome.unusable:
            discarded[outcome.unusable.split(":")[0].split(" (")[0]] += 1
        assume(not outcome.unusable)
        findings = dimcheck_findings(program.source)
        results.append((program, compare(program.source, outcome, findings)))

    one()
    return results, discarded


def group_of(program: Program, verdict) -> str:
    if verdict.pint.raised:
        return f"{program.form_at(verdict.pint.line)}  [pint: {verdict.pint.error}]"
    first = verdict.error_lines[0] if verdict.error_lines else None
    return f"{program.form_at(first) if first else '?'}  [pint: clean]"


def save(out: Path, index: int, program: Program, verdict) -> Path:
    lines = [
        "# Disagreement between dimcheck and pint (the reference), saved by bench/pint_differential.py",
        f"# pint: {verdict.pint.error or 'clean'}" + (f" at line {verdict.pint.line}: {verdict.pint.message}" if verdict.pint.raised else ""),
        f"# dimcheck: {verdict.reason}",
    ]
    for finding in verdict.findings:
        lines.append(f"#   {finding.line}:{finding.column}: {finding.code} {finding.message}")
    # The comment block goes at the end so the program's own line numbers stay as generated.
    path = out / f"disagreement_{index:04d}.py"
    path.write_text(program.source + "\n" + "\n".join(lines) + "\n", encoding="utf-8")
    return path


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--count", type=int, default=500, help="usable programs to run (default 500)")
    parser.add_argument("--seed", type=int, default=0)
    parser.add_argument("--out", type=Path, default=Path(tempfile.gettempdir()) / "dimcheck-pint-differential",
                        help="folder for disagreeing programs (emptied first)")
    args = parser.parse_args(argv)

    started = time.perf_counter()
    results, discarded = run(args.count, args.seed)
    elapsed = time.perf_counter() - started

    if args.out.exists():
        shutil.rmtree(args.out)
    args.out.mkdir(parents=True)

    agree = [r for r in results if r[1].agree]
    disagree = [r for r in results if not r[1].agree]
    raised = collections.Counter(v.pint.error for _, v in results if v.pint.raised)
    print(f"programs run: {len(results)} (seed {args.seed}, {elapsed:.1f} s); discarded: {sum(discarded.values())}")
    print(f"pint raised in {sum(raised.values())}: " + ", ".join(f"{k} {n}" for k, n in raised.most_common()))
    print(f"agreements: {len(agree)}   disagreements: {len(disagree)}")

    failing_forms = collections.Counter(p.form_at(v.pint.line) for p, v in results if v.pint.raised)
    print("\nstatement forms pint rejected (all programs):")
    for form, n in failing_forms.most_common():
        print(f"  {n:5d}  {form}")

    groups: dict[str, list] = collections.defaultdict(list)
    for index, (program, verdict) in enumerate(disagree, 1):
        groups[group_of(program, verdict)].append((index, program, verdict))
        save(args.out, index, program, verdict)
    if groups:
        print("\ndisagreements by statement form:")
        for group, items in sorted(groups.items(), key=lambda kv: -len(kv[1])):
            reasons = collections.Counter(v.reason.split(";")[-1].strip() for _, _, v in items)
            print(f"  {len(items):5d}  {group}   e.g. disagreement_{items[0][0]:04d}.py")
            for reason, n in reasons.most_common(3):
                print(f"           {n:5d}  {reason}")
    if discarded:
        print("\ndiscarded (not a pint dimension/offset verdict):")
        for reason, n in discarded.most_common():
            print(f"  {n:5d}  {reason}")
    print(f"\ndisagreeing programs saved in {args.out}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
