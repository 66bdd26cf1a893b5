"""``dimcheck serve`` driven by a client over its stdin and stdout, as an editor would."""

from __future__ import annotations

import time
from pathlib import Path

import pytest

pytest.importorskip("pygls")

from .lsp_client import LspClient  # noqa: E402

# An invented hydraulics helper with one planted bug: a head (m) plus a pressure (Pa).
BUGGY = '''\
from typing import Annotated


def pressure_head(p: Annotated[float, "Pa"], rho: Annotated[float, "kg/m^3"],
                  g: Annotated[float, "m/s^2"]) -> Annotated[float, "m"]:
    return p / (rho * g) + p
'''
FIXED = BUGGY.replace(" + p\n", "\n")
BUG_LINE = 5


@pytest.fixture(scope="module")
def workspace(tmp_path_factory) -> Path:
    return tmp_path_factory.mktemp("lsp-workspace")


@pytest.fixture(scope="module")
def client(workspace):
    lsp = LspClient(workspace)
    try:
        result = lsp.initialize(workspace)
        capabilities = result["capabilities"]
        assert capabilities["hoverProvider"]
        assert capabilities["codeActionProvider"]
        assert capabilities["textDocumentSync"]["change"] == 1  # the whole text on each change
        yield lsp
    finally:
        lsp.close()


def _write(folder: Path, name: str, text: str) -> Path:
    path = folder / name
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text, encoding="utf-8")
    return path


def test_open_publishes_the_finding_with_its_range_code_and_severity(client, workspace):
    path = _write(workspace, "open_buggy.py", FIXED)  # the disk holds the fixed text...
    uri = client.open(path, BUGGY)                    # ...the editor's buffer the buggy one
    [diagnostic] = client.diagnostics(uri, version=1)
    line = BUGGY.splitlines()[BUG_LINE]
    assert diagnostic["range"] == {
        "start": {"line": BUG_LINE, "character": line.index("p / (rho")},
        "end": {"line": BUG_LINE, "character": len(line)}}
    assert diagnostic["code"] == "DIM101"
    assert diagnostic["severity"] == 1  # Error
    assert diagnostic["source"] == "dimcheck"
    assert "Pa" in diagnostic["message"] and "m [L]" in diagnostic["message"]


def test_change_that_fixes_the_bug_clears_the_diagnostics(client, workspace):
    path = _write(workspace, "change_fix.py", BUGGY)
    uri = client.open(path, BUGGY)
    assert [d["code"] for d in client.diagnostics(uri, version=1)] == ["DIM101"]
    client.change(uri, 2, FIXED)
    assert client.diagnostics(uri, version=2) == []


def test_only_the_latest_of_quick_changes_is_checked(client, workspace):
    path = _write(workspace, "debounce.py", BUGGY)
    uri = client.open(path, BUGGY)
    client.diagnostics(uri, version=1)
    for version, text in ((2, FIXED), (3, BUGGY), (4, BUGGY.replace("+ p", "+ p + p"))):
        client.change(uri, version, text)
    diagnostics = client.diagnostics(uri, version=4)
    assert [d["code"] for d in diagnostics] == ["DIM101"]
    versions = [params.get("version") for params in client.notifications("textDocument/publishDiagnostics")
                if params["uri"] == uri]
    assert versions == [1, 4]


def test_hover_over_a_declared_name_shows_its_unit_and_origin(client, workspace):
    path = _write(workspace, "hover.py", FIXED)
    uri = client.open(path, FIXED)
    client.diagnostics(uri, version=1)
    line = FIXED.splitlines()[BUG_LINE]
    character = line.index("rho")
    result = client.request("textDocument/hover", {
        "textDocument": {"uri": uri}, "position": {"line": BUG_LINE, "character": character + 1}})
    text = result["contents"]["value"]
    assert "kg/m^3" in text and "[M L^-3]" in text and "density" in text
    assert "declared by annotation at hover.py:4" in text
    assert result["range"]["start"] == {"line": BUG_LINE, "character": character}
    assert result["range"]["end"] == {"line": BUG_LINE, "character": character + 3}


def test_hover_over_an_expression_shows_the_inferred_unit(client, workspace):
    path = _write(workspace, "hover_expr.py", FIXED)
    uri = client.open(path, FIXED)
    line = FIXED.splitlines()[BUG_LINE]
    result = client.request("textDocument/hover", {
        "textDocument": {"uri": uri}, "position": {"line": BUG_LINE, "character": line.index("/")}})
    assert result["contents"]["value"].startswith("`p / (rho * g)`: m [L] length")


def test_code_action_inserts_the_suppression_comment(client, workspace):
    path = _write(workspace, "action.py", BUGGY)
    uri = client.open(path, BUGGY)
    [diagnostic] = client.diagnostics(uri, version=1)
    actions = client.request("textDocument/codeAction", {
        "textDocument": {"uri": uri}, "range": diagnostic["range"],
        "context": {"diagnostics": [diagnostic]}})
    [action] = actions
    assert action["title"] == "Suppress DIM101 on this line"
    assert action["kind"] == "quickfix"
    line = BUGGY.splitlines()[BUG_LINE]
    [edit] = action["edit"]["changes"][uri]
    end = {"line": BUG_LINE, "character": len(line)}
    assert edit == {"range": {"start": end, "end": end}, "newText": " # dimcheck: ignore[DIM101]"}
    # applying it silences the finding, as dimcheck check would
    client.change(uri, 2, BUGGY.replace(line, line + edit["newText"]))
    assert client.diagnostics(uri, version=2) == []


def test_a_document_whose_path_has_spaces_and_accents(client, workspace):
    # editors send such a path percent-encoded (my%20pr%C3%B6ject): it must be the same
    # document for diagnostics, hover, quick fixes and re-checks after a save
    path = _write(workspace, "my pröject/buggy flow.py", BUGGY)
    uri = client.open(path, BUGGY)
    assert "%20" in uri
    [diagnostic] = client.diagnostics(uri, version=1)
    assert diagnostic["code"] == "DIM101"
    line = BUGGY.splitlines()[BUG_LINE]
    hover = client.request("textDocument/hover", {
        "textDocument": {"uri": uri}, "position": {"line": BUG_LINE, "character": line.index("/")}})
    assert hover["contents"]["value"].startswith("`p / (rho * g)`")
    actions = client.request("textDocument/codeAction", {
        "textDocument": {"uri": uri}, "range": diagnostic["range"], "context": {"diagnostics": [diagnostic]}})
    assert [action["title"] for action in actions] == ["Suppress DIM101 on this line"]
    other = client.open(_write(workspace, "my pröject/other.py", "x = 1\n"), "x = 1\n")
    client.notify("textDocument/didSave", {"textDocument": {"uri": other}})
    uris = {params["uri"] for params in client.notifications("textDocument/publishDiagnostics")}
    assert not any(" " in published for published in uris)  # always the URI the editor sent


def test_text_is_synchronised_whole_so_form_feeds_cannot_misplace_an_edit(client, workspace):
    # (incremental edits are applied splitting lines at form feeds too; LSP does not)
    text = 'from typing import Annotated\ndepth: Annotated[float, "m"] = 3.0\n\x0c\n' \
           't: Annotated[float, "s"] = 2.0\nok = depth + depth\n'
    uri = client.open(_write(workspace, "paged.py", text), text)
    assert client.diagnostics(uri, version=1) == []
    client.change(uri, 2, text.replace("depth + depth", "depth + t"))
    assert [d["code"] for d in client.diagnostics(uri, version=2)] == ["DIM101"]


def test_the_configuration_of_the_document_folder_applies(client, workspace):
    project = workspace / "quiet_project"
    _write(project, "pyproject.toml", '[tool.dimcheck]\nignore = ["DIM101"]\n')
    path = _write(project, "flow.py", BUGGY)
    uri = client.open(path, BUGGY)
    assert client.diagnostics(uri, version=1) == []


def test_an_open_module_is_imported_as_typed_not_as_saved(client, workspace):
    package = workspace / "twomods"
    constants = _write(package, "site_constants.py", "g = 9.81\n")  # saved: no unit yet
    user = _write(package, "fall.py", (
        "from typing import Annotated\n"
        "from site_constants import g\n\n\n"
        "def speed(t: Annotated[float, \"s\"]) -> Annotated[float, \"m/s\"]:\n"
        "    return g * t + t\n"))
    uri = client.open(user, user.read_text())
    assert client.diagnostics(uri, version=1) == []
    client.open(constants, "g = 9.81  # [m/s^2]\n")  # typed, not saved
    client.change(uri, 2, user.read_text())
    [diagnostic] = client.diagnostics(uri, version=2)
    assert diagnostic["code"] == "DIM101"


def test_shutdown_and_exit_end_the_process_cleanly(workspace):
    lsp = LspClient(workspace)
    try:
        lsp.initialize(workspace)
        uri = lsp.open(_write(workspace, "last.py", FIXED), FIXED)
        assert lsp.diagnostics(uri, version=1) == []
        started = time.monotonic()
        assert lsp.shutdown() == 0
        assert time.monotonic() - started < 10
    finally:
        lsp.close()


def test_exit_without_shutdown_ends_with_code_1(workspace):
    # LSP: the server exits with 1 when told to exit before a shutdown request
    lsp = LspClient(workspace)
    try:
        lsp.initialize(workspace)
        lsp.notify("exit", None)
        assert lsp.process.wait(30) == 1
    finally:
        lsp.close()
