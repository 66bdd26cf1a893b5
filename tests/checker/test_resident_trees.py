"""A batch run keeps only a few syntax trees in memory and parses the others again when
it needs them (runner.RESIDENT_TREES). None of that may change what is found."""

from __future__ import annotations

import ast
import textwrap
from pathlib import Path

import pytest

import dimcheck.runner as runner
from dimcheck import check_paths
from dimcheck.runner import check_paths as run_paths
import dimcheck.declarations.symbols as symbols
import dimcheck.inference.engine as engine
import dimcheck.inference.evaluator as evaluator
from dimcheck.declarations.symbols import (
    ModuleSymbols, bound_only_by_definition, bound_only_by_import, collect_symbols,
)
from dimcheck.inference.project import Project

ROOT = Path(__file__).resolve().parents[2]
FIXTURES = sorted(path for path in (ROOT / "fixtures").iterdir() if path.is_dir())


def _findings(paths: list[str], jobs: int = 1) -> list[tuple]:
    report = run_paths(paths, jobs=jobs)
    return [(f.path, f.line, f.column, f.code, f.message) for f in report.findings]


@pytest.mark.parametrize("fixture", FIXTURES, ids=lambda path: path.name)
def test_one_resident_tree_finds_what_unlimited_trees_find(fixture, monkeypatch):
    monkeypatch.setattr(runner, "RESIDENT_TREES", 10_000)
    everything_kept = _findings([str(fixture)])
    monkeypatch.setattr(runner, "RESIDENT_TREES", 1)
    assert _findings([str(fixture)]) == everything_kept


def test_chain_of_modules_with_bugs_across_them(tmp_path, monkeypatch):
    # Each module calls helpers of the one before; trees are released and parsed again.
    (tmp_path / "pkg").mkdir()
    (tmp_path / "pkg" / "__init__.py").write_text("")
    (tmp_path / "pkg" / "base.py").write_text(textwrap.dedent('''\
        from typing import Annotated
        Length = Annotated[float, "m"]
        Time = Annotated[float, "s"]

        def combine(a, b):
            return a + b
        '''))
    for index in range(8):
        previous = "base" if index == 0 else f"step{index - 1}"
        (tmp_path / "pkg" / f"step{index}.py").write_text(textwrap.dedent(f'''\
            from .base import Length, Time, combine
            from .{previous} import *

            class Leg{index}:
                def __init__(self, distance: Length, duration: Time):
                    self.distance = distance
                    self.duration = duration

                def pace(self):
                    return combine(self.distance, self.duration)

            def walk{index}(d: Length, t: Time) -> Length:
                return combine(d, t)
            '''))
    monkeypatch.setattr(runner, "RESIDENT_TREES", 10_000)
    everything_kept = _findings([str(tmp_path / "pkg")])
    assert len(everything_kept) == 16  # two bugs per step module, each through combine()
    monkeypatch.setattr(runner, "RESIDENT_TREES", 1)
    assert _findings([str(tmp_path / "pkg")]) == everything_kept
    assert _findings([str(tmp_path / "pkg")], jobs=2) == everything_kept


def _loaded(tmp_path: Path, text: str) -> tuple[Project, ModuleSymbols]:
    path = tmp_path / "model.py"
    path.write_text(textwrap.dedent(text))
    project = Project()
    project.max_resident_trees = 0  # every tree may go: the test releases by hand
    return project, project.load(str(path)).symbols


SOURCE = '''\
    from typing import Annotated

    def flow(area: Annotated[float, "m^2"], speed: Annotated[float, "m/s"] = 1.0):
        return area * speed

    class Pump:
        head: Annotated[float, "m"]

        def power(self, rate):
            return rate
    '''


def test_release_then_restore_gives_the_same_definitions_new_nodes(tmp_path):
    _, module = _loaded(tmp_path, SOURCE)
    flow, pump = module.functions["flow"], module.classes["Pump"]
    old_node, old_param = flow.node, flow.params[0].node
    module.release_tree()
    assert module.tree_released
    # any use of a node parses the source again and re-attaches it
    assert isinstance(flow.node, ast.FunctionDef) and flow.node is not old_node
    assert not module.tree_released
    assert flow.node.lineno == old_node.lineno and flow.params[0].node.arg == old_param.arg
    assert pump.node.name == "Pump" and pump.methods["power"].node.name == "power"
    assert module.tree.body[1] is flow.node


def test_a_file_changed_on_disk_before_restore_does_not_break_the_run(tmp_path):
    _, module = _loaded(tmp_path, SOURCE)
    flow = module.functions["flow"]
    module.release_tree()
    (tmp_path / "model.py").write_text("def broken(:\n")  # no longer parses
    assert flow.node.body == []  # an empty stand-in: nothing to analyse, no crash
    assert flow.params[1].node.arg == "speed"


def test_definition_only_names_leave_out_names_bound_again():
    tree = ast.parse(textwrap.dedent('''\
        import functools

        def plain(): ...
        def wrapped(): ...
        wrapped = functools.lru_cache(wrapped)
        class Kept: ...
        class Twice: ...
        class Twice: ...
        for looped in range(3):
            def looped(): ...
        if True:
            def guarded(): ...
        '''))
    module = collect_symbols(ModuleSymbols("m.py", "m", tree, "", {}))
    names = ["functools", "plain", "wrapped", "Kept", "Twice", "looped", "guarded"]
    assert [name for name in names if bound_only_by_definition(module, name)] == ["plain", "Kept", "guarded"]


def test_import_only_names_are_those_one_import_binds():
    tree = ast.parse(textwrap.dedent('''\
        import math
        import numpy as np
        import os.path
        import os.environ
        from lib import helper
        try:
            from fast import speed
        except ImportError:
            from slow import speed
        from other import shadowed
        shadowed = 2
        from more import *
        with open("f") as handle:
            from inside import nested
        '''))
    module = collect_symbols(ModuleSymbols("m.py", "m", tree, "", {}))
    names = ["math", "np", "os", "helper", "speed", "shadowed", "nested", "undefined"]
    assert [name for name in names if bound_only_by_import(module, name)] == ["math", "np", "helper"]


@pytest.mark.parametrize("fixture", FIXTURES, ids=lambda path: path.name)
def test_names_left_unbound_at_module_level_find_what_binding_them_finds(fixture, monkeypatch):
    # Names only one import binds are resolved when first read, and functions only their
    # def binds are not kept in the module's environment; binding both gives the same.
    lazy = _findings([str(fixture)])
    for module in (symbols, evaluator, engine):
        monkeypatch.setattr(module, "bound_only_by_import", lambda module, name: False)
        monkeypatch.setattr(module, "bound_only_by_definition", lambda module, name: False)
    assert _findings([str(fixture)]) == lazy


def test_a_function_rebound_at_module_level_is_seen_through_the_rebinding(tmp_path):
    (tmp_path / "lib.py").write_text(textwrap.dedent('''\
        from typing import Annotated

        def to_metres(x: Annotated[float, "mm"]) -> Annotated[float, "m"]:
            return x / 1000

        def to_seconds(x: Annotated[float, "ms"]) -> Annotated[float, "s"]:
            return x / 1000

        to_metres = to_seconds  # a rebinding the importer must see
        '''))
    (tmp_path / "use.py").write_text(textwrap.dedent('''\
        from typing import Annotated
        from lib import to_metres

        def span(x: Annotated[float, "ms"]) -> Annotated[float, "m"]:
            return to_metres(x)
        '''))
    codes = {(Path(f.path).name, f.code) for f in check_paths([str(tmp_path / "use.py")]).findings}
    assert codes == {("use.py", "DIM103")}  # seconds returned as metres
