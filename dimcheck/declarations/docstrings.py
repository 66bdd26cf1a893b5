"""Units declared in docstrings (contract, section 6, ``docstring-units``).

Two docstring styles are read, and only their parameter and return sections:

* numpydoc: a ``Parameters``, ``Other Parameters`` or ``Returns`` header underlined with
  dashes; entries such as ``rho : float``, ``x, y : float``, ``**kwargs`` or (in
  ``Returns``) a bare type such as ``float``, each followed by an indented description::

      rho : float
          Fluid density [kg/m^3].

* Google: an ``Args:``, ``Arguments:``, ``Parameters:``, ``Params:``, ``Returns:`` or
  ``Return:`` header with indented entries such as ``rho (float): fluid density [kg/m^3].``, the description possibly continued on
  more deeply indented lines. A Google ``Returns:`` section is one free-text description.

A bracket declares the unit of the entry only when it ENDS the first paragraph of the
entry's description: nothing but ``.``, ``,``, ``;``, ``:`` or whitespace may follow it
(``Density, [kg/m^3]`` is read; ``Matrix [A] of coefficients.`` is not, nor is a bracket
at the end of a second paragraph). The bracket must be preceded by whitespace (or start
its line), so indexing such as ``x[k]`` is never read. ``[-]`` and ``[]`` mean
dimensionless. A bare number (``[1]``, ``[12]``) is a citation. A bracket holding a
character that no unit expression uses (a comma, ``=``, quotes, ``...``, ``;``, ``:``,
``+``, ``#``, braces, ``<``, ``>`` and a few more) is prose. A description line that
itself looks like an entry (``speed: ...``, ``a (float): ...``) starts a nested list and
ends the paragraph, so a unit inside such a list never becomes the outer entry's unit.

Sphinx field lists (``:param rho: density [kg/m^3]``) and every other section
(``Attributes``, ``Yields``, ``Raises``, ``Notes``...) are deliberately NOT read: the
contract names numpydoc and Google parameter and return sections only.

The function is pure, uses only ``re``, and returns at once for the many docstrings that
hold no candidate bracket at all. Whether the text parses as a unit is the caller's
question: pass ``is_unit`` (for instance a guarded call of ``dimcheck.units.parse_unit``)
to drop brackets that are prose; ``""`` and ``"-"`` are always dimensionless and are not
passed to it.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from typing import Callable

__all__ = ["DocUnit", "docstring_units"]


@dataclass(frozen=True)
class DocUnit:
    name: str  # parameter name (stars stripped), or "return" for the first returned value
    text: str  # the bracket's content, stripped; "" or "-" mean dimensionless
    line: int  # 1-based line inside the docstring where the bracket is
    column: int  # 1-based column of the unit text on that line


# Cheap pre-filter: some line ends with "]" followed only by . , ; : or whitespace.
_CANDIDATE = re.compile(r"\][.,;: \t]*$", re.M)
# The bracket ending a line: preceded by whitespace or the start of the line.
_END_BRACKET = re.compile(r"(?<!\S)\[([^\[\]]*)\][.,;:\s]*$")
# Characters that never appear in a unit expression; a bracket holding one is prose.
_NOT_UNIT_CHARS = re.compile(r"[,=;:+#'\"`{}<>!?@&|\\$]|\.\.\.")
_NUMBER = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?")

_NUMPYDOC_SECTIONS = {"Parameters": "params", "Other Parameters": "params", "Returns": "returns"}
_GOOGLE_SECTIONS = {"Args:": "params", "Arguments:": "params", "Parameters:": "params", "Params:": "params",
                    "Returns:": "returns", "Return:": "returns"}
_UNDERLINE = re.compile(r"-{3,}")
# numpydoc entry: "x, y : float", "rho: float", "rho" (no type).
_NUMPYDOC_ENTRY = re.compile(r"(\*{0,2}[A-Za-z_]\w*(?:\s*,\s*\*{0,2}[A-Za-z_]\w*)*)\s*(?::.*)?")
# Google entry head: "rho (float): ", "*args: "; group 1 is the name.
_GOOGLE_ENTRY = re.compile(r"(\*{0,2}[A-Za-z_]\w*)\s*(?:\([^()]*(?:\([^()]*\)[^()]*)*\))?\s*:(?:\s|$)")
# A line that looks like a nested entry ("speed: ...", "a (float): ...", "x, y : ...").
_NESTED_ENTRY = re.compile(
    r"\s*\*{0,2}[A-Za-z_]\w*(?:\s*,\s*\*{0,2}[A-Za-z_]\w*)*\s*(?:\([^()]*\))?\s*:(?:\s|$)"
)


def docstring_units(docstring: str, is_unit: Callable[[str], bool] | None = None) -> list[DocUnit]:
    """The units declared in ``docstring``'s parameter and return sections, in order.

    Works on raw or cleaned docstrings (indentation is compared line to line, tabs
    expanded to 8 columns for that comparison only; columns count characters).
    A numpydoc ``Returns`` section contributes its first entry only, a Google
    ``Returns:`` section its first paragraph; both are named ``"return"``. A name
    documented twice is listed twice; the caller decides (first wins, or conflict).
    """
    if not docstring or "[" not in docstring or not _CANDIDATE.search(docstring):
        return []
    lines = docstring.splitlines()
    indents = [_indent(line) for line in lines]
    found: list[DocUnit] = []
    index = 0
    count = len(lines)
    while index < count:
        stripped = lines[index].strip()
        kind = _NUMPYDOC_SECTIONS.get(stripped)
        if (
            kind is not None
            and index + 1 < count
            and _UNDERLINE.fullmatch(lines[index + 1].strip())
            and indents[index + 1] == indents[index]
        ):
            index = _numpydoc_section(lines, indents, index, kind, is_unit, found)
            continue
        kind = _GOOGLE_SECTIONS.get(stripped)
        if kind is not None:
            index = _google_section(lines, indents, index, kind, is_unit, found)
            continue
        index += 1
    return found


def _indent(line: str) -> int:
    """Width of the leading whitespace, tabs to multiples of 8; -1 for a blank line."""
    stripped = line.lstrip()
    if not stripped:
        return -1
    lead = line[: len(line) - len(stripped)]
    return len(lead.expandtabs(8)) if "\t" in lead else len(lead)


def _is_section_header(lines: list[str], indents: list[int], index: int) -> bool:
    """A numpydoc header of any section: a line underlined by dashes at its own indent."""
    return (
        index + 1 < len(lines)
        and indents[index] >= 0
        and not _UNDERLINE.fullmatch(lines[index].strip())
        and _UNDERLINE.fullmatch(lines[index + 1].strip()) is not None
        and indents[index + 1] == indents[index]
    )


def _numpydoc_section(lines, indents, header: int, kind: str, is_unit, found) -> int:
    """Read one numpydoc section; return the index of the first line after it."""
    header_indent = indents[header]
    index = header + 2
    count = len(lines)
    entry_indent = None
    first_return = True
    while index < count:
        indent = indents[index]
        if indent < 0:
            index += 1
            continue
        if (indent < header_indent or _is_section_header(lines, indents, index)
                or (indent == header_indent and lines[index].strip() in _GOOGLE_SECTIONS)):
            break
        if entry_indent is None:
            entry_indent = indent
        if indent > entry_indent:
            index += 1  # a description line of an entry that was not read
            continue
        if indent < entry_indent:
            break  # weird indentation (shallower than the first entry): stop here
        # An entry line.
        entry = lines[index].strip()
        description_start = index + 1
        # The description: following lines deeper than the entry.
        end = description_start
        while end < count and (indents[end] < 0 or indents[end] > indent):
            end += 1
        if kind == "returns":
            if first_return:
                first_return = False
                names = ["return"]
            else:
                names = []
        else:
            match = _NUMPYDOC_ENTRY.fullmatch(entry)
            names = [name.strip().lstrip("*") for name in match.group(1).split(",")] if match else []
        if names:
            unit = _paragraph_unit(lines, indents, description_start, end, entry_line=False,
                                   same_indent_continues=True, is_unit=is_unit)
            if unit is not None:
                text, line, column = unit
                found.extend(DocUnit(name, text, line + 1, column) for name in names)
        index = end
    return index


def _google_section(lines, indents, header: int, kind: str, is_unit, found) -> int:
    """Read one Google section; return the index of the first line after it."""
    header_indent = indents[header]
    index = header + 1
    count = len(lines)
    end = index
    while end < count and (indents[end] < 0 or indents[end] > header_indent):
        end += 1
    # Trailing blank lines are not part of the section body.
    while end > index and indents[end - 1] < 0:
        end -= 1
    body = [i for i in range(index, end) if indents[i] >= 0]
    if not body:
        return max(end, index)
    entry_indent = indents[body[0]]
    if kind == "returns":
        first = body[0]
        unit = _paragraph_unit(lines, indents, first, end, entry_line=True,
                               same_indent_continues=True, is_unit=is_unit)
        if unit is not None:
            text, line, column = unit
            found.append(DocUnit("return", text, line + 1, column))
        return end
    position = body[0]
    while position < end:
        if indents[position] < 0:
            position += 1
            continue
        entry_end = position + 1
        while entry_end < end and (indents[entry_end] < 0 or indents[entry_end] > entry_indent):
            entry_end += 1
        match = _GOOGLE_ENTRY.match(lines[position].lstrip())
        if match is not None and indents[position] == entry_indent:
            unit = _paragraph_unit(lines, indents, position, entry_end, entry_line=True,
                                   same_indent_continues=False, is_unit=is_unit)
            if unit is not None:
                text, line, column = unit
                found.append(DocUnit(match.group(1).lstrip("*"), text, line + 1, column))
        position = entry_end
    return end


def _paragraph_unit(lines, indents, start: int, end: int, *, entry_line: bool,
                    same_indent_continues: bool, is_unit) -> tuple[str, int, int] | None:
    """The unit ending the first paragraph of ``lines[start:end]``, as (text, index, column).

    The paragraph starts at ``start`` (the Google entry line when ``entry_line``, else the
    first description line) and stops before the first blank line, a line less indented
    than its first line, a line that looks like a nested entry, or ``end``. A line exactly
    as indented as the first one continues the paragraph only if ``same_indent_continues``
    (numpydoc descriptions, Google ``Returns:``); in Google ``Args:`` it is the next entry.
    """
    if start >= end or indents[start] < 0:
        return None
    if not entry_line and _NESTED_ENTRY.match(lines[start]):
        return None
    base = indents[start]
    last = start
    position = start + 1
    while position < end:
        indent = indents[position]
        if indent < 0 or indent < base or (indent == base and not same_indent_continues):
            break
        if _NESTED_ENTRY.match(lines[position]):
            break
        last = position
        position += 1
    line = lines[last]
    match = _END_BRACKET.search(line)
    if match is None:
        return None
    if entry_line and last == start:
        # The bracket must sit in the description, after the entry's "name (type):".
        head = _GOOGLE_ENTRY.match(line.lstrip())
        if head is not None and match.start() < len(line) - len(line.lstrip()) + head.end():
            return None
    raw = match.group(1)
    text = raw.strip()
    if _NOT_UNIT_CHARS.search(text) or _NUMBER.fullmatch(text):
        return None
    if text not in ("", "-") and is_unit is not None and not is_unit(text):
        return None
    column = match.start(1) + (len(raw) - len(raw.lstrip())) + 1
    return text, last, column
