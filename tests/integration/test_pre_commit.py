"""The pre-commit hook of .pre-commit-hooks.yaml, run for real by pre-commit.

pre-commit clones the hook repository at a commit and installs it, with its dependencies
from the package index, into a virtual environment of its own; so this test commits a copy
of the current working tree (tracked and new, not ignored, files) to a scratch repository
and points a scratch project at that commit. Installing takes a minute or two.
"""

import os
import shutil
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]

# An invented rain-tank module: a flow in litres per minute added to one in m^3/s.
TANK = textwrap.dedent("""\
    from typing import Annotated

    def overflow(inflow: Annotated[float, "m^3/s"], drain: Annotated[float, "m^3/s"],
                 top_up: Annotated[float, "m^3"]) -> Annotated[float, "m^3/s"]:
        return inflow - drain + top_up
""")
TANK_FIXED = TANK.replace("inflow - drain + top_up", "inflow - drain")

pytestmark = pytest.mark.skipif(shutil.which("git") is None,
                                reason="git is not installed; pre-commit needs it to clone the hook")


def git(*args, cwd, env):
    return subprocess.run(["git", *args], cwd=cwd, env=env, check=True, capture_output=True,
                          text=True).stdout


def commit_working_tree(destination: Path, env) -> str:
    """Copy the working tree into a new repository, commit it, return the commit id."""
    listed = git("ls-files", "-z", "--cached", "--others", "--exclude-standard", cwd=ROOT, env=env)
    for name in filter(None, listed.split("\0")):
        source = ROOT / name
        if source.is_file():  # tracked files deleted in the working tree are left out
            target = destination / name
            target.parent.mkdir(parents=True, exist_ok=True)
            shutil.copy2(source, target)
    git("init", "-q", cwd=destination, env=env)
    git("add", ".", cwd=destination, env=env)
    git("commit", "-q", "--no-verify", "-m", "dimcheck working tree under test",
        cwd=destination, env=env)
    return git("rev-parse", "HEAD", cwd=destination, env=env).strip()


def pre_commit(project: Path, env, timeout):
    return subprocess.run([sys.executable, "-m", "pre_commit", "run", "--all-files", "--color", "never"],
                          cwd=project, env=env, capture_output=True, text=True, timeout=timeout)


@pytest.mark.slow
def test_hook_fails_on_a_unit_bug_and_passes_once_fixed(tmp_path):
    env = dict(os.environ)
    env.update({
        "PRE_COMMIT_HOME": str(tmp_path / "pre-commit-home"),
        "GIT_AUTHOR_NAME": "dimcheck test", "GIT_AUTHOR_EMAIL": "test@example.invalid",
        "GIT_COMMITTER_NAME": "dimcheck test", "GIT_COMMITTER_EMAIL": "test@example.invalid",
        "GIT_CONFIG_GLOBAL": os.devnull, "GIT_CONFIG_NOSYSTEM": "1",
    })
    env.pop("PRE_COMMIT", None)  # set when this suite itself runs under a hook
    hook_repo = tmp_path / "dimcheck-src"
    hook_repo.mkdir()
    rev = commit_working_tree(hook_repo, env)

    project = tmp_path / "rain-tank"
    project.mkdir()
    (project / ".pre-commit-config.yaml").write_text(textwrap.dedent(f"""\
        repos:
          - repo: {hook_repo.as_posix()}
            rev: {rev}
            hooks:
              - id: dimcheck
    """))
    (project / "tank.py").write_text(TANK)
    (project / "README.txt").write_text("not Python, so the hook never sees it\n")
    git("init", "-q", cwd=project, env=env)
    git("add", ".", cwd=project, env=env)

    started = time.monotonic()
    failing = pre_commit(project, env, timeout=900)
    install_and_run = time.monotonic() - started
    output = failing.stdout + failing.stderr
    assert failing.returncode == 1, output
    assert "DIM101" in output and "tank.py:5:" in output, output
    assert "Failed" in output, output

    (project / "tank.py").write_text(TANK_FIXED)
    git("add", "tank.py", cwd=project, env=env)
    started = time.monotonic()
    passing = pre_commit(project, env, timeout=300)
    rerun = time.monotonic() - started
    assert passing.returncode == 0, passing.stdout + passing.stderr
    assert "Passed" in passing.stdout, passing.stdout
    print(f"pre-commit: install and first run {install_and_run:.0f} s, second run {rerun:.1f} s")
