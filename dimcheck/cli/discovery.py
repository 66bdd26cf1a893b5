"""Which files a check covers: the paths given, walked for ``*.py`` and ``*.pyi``."""

from __future__ import annotations

import fnmatch
import os
from pathlib import Path

SOURCE_SUFFIXES = (".py", ".pyi")
# Folders never worth walking into: version control, virtual environments, build output, caches.
SKIPPED_FOLDERS = frozenset({
    ".git", ".hg", ".svn", ".bzr", "_darcs", ".venv", "venv", ".env", "env", "__pypackages__",
    "__pycache__", ".tox", ".nox", ".mypy_cache", ".pytest_cache", ".ruff_cache", ".hypothesis",
    "build", "dist", "node_modules", "site-packages", ".eggs", ".ipynb_checkpoints",
})


def _excluded(path: str, patterns: list[str]) -> bool:
    if not patterns:
        return False
    normalised = path.replace(os.sep, "/")
    if normalised.startswith("./"):
        normalised = normalised[2:]
    name = os.path.basename(normalised.rstrip("/"))
    return any(fnmatch.fnmatch(normalised, pattern) or fnmatch.fnmatch(name, pattern)
               or fnmatch.fnmatch(normalised, pattern.rstrip("/") + "/*") for pattern in patterns)


def discover(paths: list[str], exclude: list[str]) -> tuple[list[str], list[str]]:
    """Files to check, in a stable order, and one-line errors for paths that do not exist."""
    files: list[str] = []
    errors: list[str] = []
    seen: set[str] = set()

    def add(path: str) -> None:
        key = os.path.normcase(os.path.abspath(path))
        if key not in seen:
            seen.add(key)
            files.append(path)

    for given in paths:
        if os.path.isdir(given):
            for folder, subfolders, names in os.walk(given, followlinks=False):
                subfolders[:] = sorted(
                    name for name in subfolders
                    if name not in SKIPPED_FOLDERS and not name.endswith(".egg-info")
                    and not _excluded(os.path.join(folder, name), exclude))
                for name in sorted(names):
                    full = os.path.join(folder, name)
                    if name.endswith(SOURCE_SUFFIXES) and not _excluded(full, exclude):
                        add(full)
        elif os.path.lexists(given):
            if not _excluded(given, exclude):
                add(given)  # a file named on the command line is checked whatever its suffix
        else:
            errors.append(f"path not found: {given}")
    return files, errors
