"""Which files a check covers: the paths given, walked for ``*.py`` and ``*.pyi``."""

from __future__ import annotations

import fnmatch
import os

SOURCE_SUFFIXES = (".py", ".pyi")
# Folders never worth walking into: version control, virtual environments, build output, caches.
SKIPPED_FOLDERS = frozenset({
    ".git", ".hg", ".svn", ".bzr", "_darcs", ".venv", "venv", ".env", "env", "__pypackages__",
    "__pycache__", ".tox", ".nox", ".mypy_cache", ".pytest_cache", ".ruff_cache", ".hypothesis",
    "build", "dist", "node_modules", "site-packages", ".eggs", ".ipynb_checkpoints",
})
# The file at the top of every virtual environment (PEP 405), whatever its folder is called.
VIRTUAL_ENV_MARKER = "pyvenv.cfg"


def _forms(path: str, base: str | None) -> list[str]:
    """The path as given and relative to the configuration's folder, with ``/`` separators."""
    forms = [path]
    if base is not None:
        try:
            forms.append(os.path.relpath(os.path.abspath(path), base))
        except ValueError:
            pass
    result = []
    for form in forms:
        form = form.replace(os.sep, "/")
        while form.startswith("./"):
            form = form[2:]
        result.append(form)
    return result


def _excluded(path: str, patterns: list[str], base: str | None = None) -> bool:
    """Shell-style patterns match the file or folder name, or its path (as given, or
    relative to the folder of the configuration file); a folder excludes what is below it."""
    if not patterns:
        return False
    forms = _forms(path, base)
    name = os.path.basename(forms[0].rstrip("/"))
    for pattern in patterns:
        below = pattern.rstrip("/") + "/*"
        if fnmatch.fnmatch(name, pattern):
            return True
        if any(fnmatch.fnmatch(form, pattern) or fnmatch.fnmatch(form, below) for form in forms):
            return True
    return False


def discover(paths: list[str], exclude: list[str], base: str | None = None) -> tuple[list[str], list[str]]:
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
                if VIRTUAL_ENV_MARKER in names and folder != given:
                    subfolders[:] = []  # a virtual environment under any name (named itself, it is walked)
                    continue
                subfolders[:] = sorted(
                    name for name in subfolders
                    if name not in SKIPPED_FOLDERS and not name.endswith(".egg-info")
                    and not _excluded(os.path.join(folder, name), exclude, base))
                for name in sorted(names):
                    full = os.path.join(folder, name)
                    if name.endswith(SOURCE_SUFFIXES) and not _excluded(full, exclude, base):
                        add(full)
        elif os.path.lexists(given):
            if not _excluded(given, exclude, base):
                add(given)  # a file named on the command line is checked whatever its suffix
        else:
            errors.append(f"path not found: {given}")
    return files, errors
