"""dimcheck: static checking of unit and dimension consistency in Python engineering code.

The public surface is small: ``check_paths`` and ``check_source`` run the pipeline and
return findings; everything else is internal and may change.
"""

from __future__ import annotations

__version__ = "0.1.0"

__all__ = ["__version__", "Unit", "check_paths", "check_source"]


class Unit:
    """A unit in ``Annotated`` metadata: ``Annotated[float, Unit("m/s")]``, the same as the
    plain string ``"m/s"``. It only holds the text at run time: dimcheck reads the unit
    from the source and never imports or runs the code it checks."""

    __slots__ = ("text",)

    def __init__(self, text: str):
        self.text = text

    def __repr__(self) -> str:
        return f"Unit({self.text!r})"

    def __eq__(self, other: object) -> bool:
        return isinstance(other, Unit) and other.text == self.text

    def __hash__(self) -> int:
        return hash(("dimcheck.Unit", self.text))


def check_paths(paths, config=None, select=None, ignore=None):
    """Check files and folders; returns a ``Report`` (files_checked, findings, errors)."""
    from .runner import check_paths as run

    return run(list(paths), config, select, ignore)


def check_source(source: str, filename: str = "snippet.py", config=None, select=None, ignore=None):
    """Check one piece of source text as if it were a file; returns the list of findings."""
    import os
    import tempfile

    from .runner import Checker

    with tempfile.TemporaryDirectory(prefix="dimcheck-") as folder:
        path = os.path.join(folder, filename)
        with open(path, "w", encoding="utf-8") as handle:
            handle.write(source)
        findings = Checker(config, select, ignore).check_files([path])
    return [_relabel(finding, filename) for finding in findings]


def _relabel(finding, filename):
    return finding._replace(path=filename)
