"""The result cache gives the same findings as a fresh run, whatever changed in between."""

import json
import subprocess
import sys
import textwrap
from pathlib import Path

import pytest

UNITS = textwrap.dedent("""\
    from typing import Annotated
    Length = Annotated[float, "m"]
    Time = Annotated[float, "s"]
""")
USE = textwrap.dedent("""\
    from units import Length, Time
    def f(h: Length, t: Time):
        return h + t
""")


def check(folder: Path, *extra):
    result = subprocess.run([sys.executable, "-m", "dimcheck", "check", ".", "--format", "json", *extra],
                            cwd=folder, capture_output=True, text=True, timeout=120)
    assert "Traceback" not in result.stderr
    return [(f["path"], f["line"], f["code"]) for f in json.loads(result.stdout)["findings"]]


@pytest.fixture
def tree(tmp_path):
    (tmp_path / "units.py").write_text(UNITS)
    (tmp_path / "use.py").write_text(USE)
    return tmp_path


def test_warm_run_matches_cold_and_uses_the_cache(tree):
    cold = check(tree)
    assert cold == [("use.py", 3, "DIM101")]
    assert (tree / ".dimcheck_cache" / "results.json").is_file()
    assert check(tree) == cold


def test_editing_a_file_rechecks_it(tree):
    check(tree)
    (tree / "use.py").write_text(USE.replace("h + t", "h * t"))
    assert check(tree) == []


def test_editing_an_imported_module_rechecks_its_users(tree):
    check(tree)
    (tree / "units.py").write_text(UNITS.replace('"s"', '"m"'))
    assert check(tree) == []


def test_a_module_appearing_where_an_import_found_none(tmp_path):
    (tmp_path / "use.py").write_text(USE)
    assert check(tmp_path) == []
    (tmp_path / "units.py").write_text(UNITS)
    assert check(tmp_path) == [("use.py", 3, "DIM101")]


def test_configuration_change_starts_afresh(tmp_path):
    (tmp_path / "bridge.py").write_text('from typing import Annotated\nspan: Annotated[float, "smoot"] = 364.4\n')
    assert check(tmp_path) == [("bridge.py", 2, "DIM901")]  # an invented unit, not yet defined
    (tmp_path / "defs.txt").write_text("smoot = 1.7018 * meter\n")
    (tmp_path / "pyproject.toml").write_text('[tool.dimcheck]\nunits = ["defs.txt"]\n')
    assert check(tmp_path) == []


def test_corrupt_cache_is_ignored_and_rebuilt(tree):
    check(tree)
    (tree / ".dimcheck_cache" / "results.json").write_text("{not json")
    assert check(tree) == [("use.py", 3, "DIM101")]
    json.loads((tree / ".dimcheck_cache" / "results.json").read_text())


def test_no_cache_neither_reads_nor_writes(tree):
    assert check(tree, "--no-cache") == [("use.py", 3, "DIM101")]
    assert not (tree / ".dimcheck_cache").exists()


def test_killed_or_concurrent_runs_leave_a_usable_cache(tree):
    # Two runs at once: each writes its cache with an atomic replace, so the file is
    # always one complete run's, and later results are still right.
    runs = [subprocess.Popen([sys.executable, "-m", "dimcheck", "check", "."], cwd=tree,
                             stdout=subprocess.DEVNULL, stderr=subprocess.PIPE) for _ in range(3)]
    for run in runs:
        run.wait(timeout=120)
    # A run killed part-way leaves at most a temporary file, never a half-written cache.
    killed = subprocess.Popen([sys.executable, "-m", "dimcheck", "check", "."], cwd=tree)
    killed.kill()
    killed.wait()
    (tree / "use.py").write_text(USE.replace("h + t", "h * t"))
    assert check(tree) == []
    (tree / "use.py").write_text(USE)
    assert check(tree) == [("use.py", 3, "DIM101")]


def test_parallel_jobs_give_the_same_report_in_the_same_order(tmp_path):
    # 60 modules in 3 packages, enough for two workers; every fifth has a bug.
    for package in ("alpha", "beta", "gamma"):
        (tmp_path / package).mkdir()
        (tmp_path / package / "__init__.py").write_text("")
        (tmp_path / package / "units.py").write_text(UNITS)
        for index in range(20):
            body = USE if index % 5 == 0 else USE.replace("h + t", "h / t")
            (tmp_path / package / f"m{index:02d}.py").write_text(body.replace("from units", "from .units"))
    one = subprocess.run([sys.executable, "-m", "dimcheck", "check", ".", "--jobs", "1", "--no-cache"],
                         cwd=tmp_path, capture_output=True, text=True, timeout=300)
    two = subprocess.run([sys.executable, "-m", "dimcheck", "check", ".", "--jobs", "2", "--no-cache"],
                         cwd=tmp_path, capture_output=True, text=True, timeout=300)
    assert one.returncode == two.returncode == 1
    assert one.stdout == two.stdout and one.stdout.count("DIM101") == 12


def _age(path: Path, seconds: float) -> None:
    import os
    import time

    then = time.time() - seconds
    os.utime(path, (then, then))


def test_files_stable_since_the_last_run_are_not_read_again(tree, monkeypatch):
    # Size and modification time unchanged, and old when the cache was written: trusted
    # without reading the file. A file just written is always read and hashed.
    from dimcheck import cache as cache_module

    for name in ("units.py", "use.py"):
        _age(tree / name, 60)
    assert check(tree) == [("use.py", 3, "DIM101")]
    key = json.loads((tree / ".dimcheck_cache" / "results.json").read_text())["key"]
    read = []
    real_hash = cache_module.content_hash
    monkeypatch.setattr(cache_module, "content_hash", lambda path: read.append(path) or real_hash(path))
    cached = cache_module.ResultCache(tree / ".dimcheck_cache", key)
    assert cached.lookup(str(tree / "use.py"))[0][4] == "DIM101"
    assert not {str(tree / "units.py"), str(tree / "use.py")} & set(read)  # both were stable

    (tree / "use.py").write_text(USE.replace("h + t", "t + h"))  # same size, new time
    fresh = cache_module.ResultCache(tree / ".dimcheck_cache", key)
    assert fresh.lookup(str(tree / "use.py")) is None
    assert str(tree / "use.py") in read


def test_a_run_answered_from_the_cache_stays_light(tree):
    # Nothing to check: no unit table, inference, unit parser, nor the stdlib modules
    # that only a real check (or a configuration file) needs.
    check(tree)
    script = ("import sys\n"
              "before = set(sys.modules)  # what the interpreter's own start-up loaded\n"
              "from dimcheck.cli.main import main\n"
              "code = main(['check', '.', '--format', 'json', '--jobs', '1'])\n"
              "heavy = ['dimcheck.inference.engine', 'dimcheck.units.table', 'dimcheck.units.expression',\n"
              "         'dataclasses', 'fractions', 'typing', 'shutil', 'tomllib']\n"
              "print('EXIT', code, 'LOADED', [name for name in heavy if name in set(sys.modules) - before])\n")
    result = subprocess.run([sys.executable, "-c", script], cwd=tree, capture_output=True, text=True, timeout=120)
    assert "Traceback" not in result.stderr, result.stderr
    assert '"DIM101"' in result.stdout  # the cached finding is reported
    assert result.stdout.strip().splitlines()[-1] == "EXIT 1 LOADED []"


def test_the_cache_folder_ignores_itself_in_git(tree):
    # a `git add .` after a hook run must not stage the cache (the hook would then fail
    # with "files were modified by this hook")
    check(tree)
    ignore = tree / ".dimcheck_cache" / ".gitignore"
    assert ignore.read_text().splitlines()[-1] == "*"
    subprocess.run(["git", "init", "-q", str(tree)], check=True)
    subprocess.run(["git", "add", "."], cwd=tree, check=True)
    staged = subprocess.run(["git", "diff", "--cached", "--name-only"], cwd=tree, capture_output=True,
                            text=True, check=True).stdout.split()
    assert sorted(staged) == ["units.py", "use.py"]


def _check_file(folder: Path, name: str):
    result = subprocess.run([sys.executable, "-m", "dimcheck", "check", name, "--format", "json"],
                            cwd=folder, capture_output=True, text=True, timeout=120)
    assert "Traceback" not in result.stderr
    return [(f["path"], f["line"], f["code"]) for f in json.loads(result.stdout)["findings"]]


@pytest.mark.parametrize("aged", [False, True])
def test_an_imported_module_back_to_its_earlier_text_is_not_mistaken_for_unchanged(tree, aged):
    # Only use.py is named (as a pre-commit hook names the staged files); units.py, which
    # it imports, changes and then goes back (an undo, a checkout, a stash and restore).
    bug = [("use.py", 3, "DIM101")]
    steps = [(UNITS, bug), (UNITS.replace('"s"', '"m"'), []), (UNITS, bug), (UNITS.replace('"s"', '"m"'), [])]
    for age, (text, expected) in enumerate(steps):
        (tree / "units.py").write_text(text)
        if aged:  # every version older than the cache's two-second window, with its own time
            _age(tree / "units.py", 100 - 10 * age)
            _age(tree / "use.py", 200)
        assert _check_file(tree, "use.py") == expected, f"step {age}"
