"""The Language Server Protocol side of ``dimcheck serve`` (pygls 2).

Every check and hover runs on one worker thread, one at a time, so the session's caches
need no locks and the event loop stays free to read the editor's messages. A change is
checked 300 ms after the last keystroke; a newer change cancels the wait, and a result
computed for a version that is no longer current is dropped rather than published.
"""

from __future__ import annotations

import asyncio
import gc
import logging
import os
import threading
from concurrent.futures import ThreadPoolExecutor
from urllib.parse import unquote

from lsprotocol import types
from pygls.lsp.server import LanguageServer
from pygls.uris import to_fs_path

from .. import __version__
from ..cli.config import ConfigError
from .actions import suppression_edit
from .positions import UTF8, UTF16, UTF32, from_client, split_lines, to_client
from .session import Issue, Session

CHANGE_DELAY = 0.3  # seconds of quiet typing before a changed document is checked
SOURCE = "dimcheck"
SUFFIXES = (".py", ".pyi")

logger = logging.getLogger("dimcheck.server")

_SEVERITY = {"error": types.DiagnosticSeverity.Error, "warning": types.DiagnosticSeverity.Warning}


class DimcheckServer(LanguageServer):
    def __init__(self, session: Session | None = None, change_delay: float = CHANGE_DELAY):
        super().__init__("dimcheck", __version__,
                         text_document_sync_kind=types.TextDocumentSyncKind.Full)
        # Full, not incremental: pygls applies incremental edits splitting lines as
        # str.splitlines does (at form feeds and U+2028 too), while LSP counts only \n,
        # \r\n and \r, so an edit after a form feed would land on the wrong text.
        self.session = session or Session()
        self.change_delay = change_delay
        # deep syntax trees recurse deeply; a worker thread's default stack is too small
        old_size = threading.stack_size(64 * 1024 * 1024)
        try:
            self.worker = ThreadPoolExecutor(max_workers=1, thread_name_prefix="dimcheck-check")
            self.worker.submit(lambda: None).result()  # start the thread with that stack now
        finally:
            threading.stack_size(old_size)
        self._pending: dict[str, asyncio.Task] = {}
        self._wanted: dict[str, int | None] = {}  # uri -> the version the next check is for
        self._reported_config_errors: set[str] = set()

    # -- documents the session sees --------------------------------------------------------
    def encoding(self) -> str:
        chosen = str(self.workspace.position_encoding or UTF16)
        return {"utf-8": UTF8, "utf-32": UTF32}.get(chosen, UTF16)

    def is_open(self, uri: str) -> bool:
        """Whether the editor has ``uri`` open (pygls keys documents by the decoded URI,
        while editors send ``my%20project/flow.py``)."""
        return unquote(uri) in self.workspace.text_documents

    def open_uris(self) -> list[str]:
        """The URIs of the open documents, as the editor sent them."""
        return [document.uri for document in self.workspace.text_documents.values()]

    def open_texts(self) -> dict[str, str]:
        texts = {}
        for document in self.workspace.text_documents.values():
            path = to_fs_path(document.uri)
            if path is not None and path.endswith(SUFFIXES):
                texts[path] = document.source
        return texts

    # -- diagnostics ------------------------------------------------------------------------------
    def schedule(self, uri: str, delay: float) -> None:
        """Check ``uri`` after ``delay`` seconds, replacing any check still waiting."""
        previous = self._pending.pop(uri, None)
        if previous is not None:
            previous.cancel()
        document = self.workspace.get_text_document(uri)
        self._wanted[uri] = document.version
        self._pending[uri] = asyncio.get_running_loop().create_task(self._check_later(uri, delay))

    async def _check_later(self, uri: str, delay: float) -> None:
        try:
            if delay:
                await asyncio.sleep(delay)
            path = to_fs_path(uri)
            if path is None or not path.endswith(SUFFIXES):
                return
            document = self.workspace.get_text_document(uri)
            version = document.version
            texts = self.open_texts()
            loop = asyncio.get_running_loop()
            issues = await loop.run_in_executor(self.worker, self._check_job, uri, version, path, texts)
        except asyncio.CancelledError:
            return
        finally:
            if self._pending.get(uri) is asyncio.current_task():
                del self._pending[uri]
        if issues is None or not self.is_open(uri):
            return
        document = self.workspace.get_text_document(uri)
        if document.version != version:
            return  # typed over while we checked; the newer version has its own check
        lines = split_lines(document.source)
        diagnostics = [self.diagnostic(issue, lines) for issue in issues]
        self.text_document_publish_diagnostics(
            types.PublishDiagnosticsParams(uri=uri, version=version, diagnostics=diagnostics))
        self.collect_garbage()

    def collect_garbage(self) -> None:
        """Checks run with the cyclic collector paused (as the runner does); each leaves a
        syntax tree and an engine behind. Collect now, after publishing, on the worker:
        left to the automatic collector it would pause a later check by a few hundred ms."""
        try:
            asyncio.get_running_loop().run_in_executor(self.worker, gc.collect)
        except RuntimeError:
            pass  # shutting down

    def _check_job(self, uri: str, version, path: str, texts: dict[str, str]) -> list[Issue] | None:
        """On the worker thread. None: nothing to publish (stale, or a problem told elsewhere)."""
        if self._wanted.get(uri, version) != version:
            return None  # a newer version is already queued
        try:
            self.session.set_documents(texts)
            return self.session.check(path)
        except ConfigError as error:
            self.config_error(str(error))
            return []
        except Exception as error:  # a bug of ours must not take the editor's server down
            logger.exception("dimcheck: internal error while checking %s", path)
            self.window_log_message(types.LogMessageParams(
                type=types.MessageType.Error, message=f"dimcheck: internal error checking {path}: "
                                         f"{type(error).__name__}: {error}"))
            return None

    def config_error(self, message: str) -> None:
        if message not in self._reported_config_errors:  # once, not on every keystroke
            self._reported_config_errors.add(message)
            self.window_show_message(types.ShowMessageParams(type=types.MessageType.Error,
                                                             message=f"dimcheck: {message}"))

    def diagnostic(self, issue: Issue, lines: list[str]) -> types.Diagnostic:
        encoding = self.encoding()

        def position(line: int, character: int) -> types.Position:
            text = lines[line] if 0 <= line < len(lines) else ""
            return types.Position(line=line, character=to_client(text, character, encoding))

        return types.Diagnostic(
            range=types.Range(start=position(issue.line, issue.character),
                              end=position(issue.end_line, issue.end_character)),
            message=issue.message, severity=_SEVERITY.get(issue.severity, types.DiagnosticSeverity.Warning),
            code=issue.code, source=SOURCE)

    def clear(self, uri: str) -> None:
        pending = self._pending.pop(uri, None)
        if pending is not None:
            pending.cancel()
        self._wanted.pop(uri, None)
        self.text_document_publish_diagnostics(types.PublishDiagnosticsParams(uri=uri, diagnostics=[]))

    # -- hover ------------------------------------------------------------------------------------
    async def hover(self, params: types.HoverParams) -> types.Hover | None:
        uri = params.text_document.uri
        path = to_fs_path(uri)
        if path is None or not path.endswith(SUFFIXES) or not self.is_open(uri):
            return None
        document = self.workspace.get_text_document(uri)
        lines = split_lines(document.source)
        line = params.position.line
        if not 0 <= line < len(lines):
            return None
        encoding = self.encoding()
        character = from_client(lines[line], params.position.character, encoding)
        texts = self.open_texts()

        def job():
            try:
                self.session.set_documents(texts)
                return self.session.hover(path, line, character)
            except ConfigError as error:
                self.config_error(str(error))
            except Exception:
                logger.exception("dimcheck: internal error in hover at %s:%s", path, line + 1)
            return None

        found = await asyncio.get_running_loop().run_in_executor(self.worker, job)
        if found is None:
            return None
        contents = types.MarkupContent(kind=types.MarkupKind.Markdown, value=found.markdown)
        if found.line is None:
            return types.Hover(contents=contents)

        def position(line_number: int, index: int) -> types.Position:
            text = lines[line_number] if 0 <= line_number < len(lines) else ""
            return types.Position(line=line_number, character=to_client(text, index, encoding))

        return types.Hover(contents=contents, range=types.Range(
            start=position(found.line, found.character), end=position(found.end_line, found.end_character)))

    # -- code actions --------------------------------------------------------------------------------
    def code_actions(self, params: types.CodeActionParams) -> list[types.CodeAction]:
        uri = params.text_document.uri
        if not self.is_open(uri):
            return []
        lines = split_lines(self.workspace.get_text_document(uri).source)
        encoding = self.encoding()
        actions = []
        done: set[tuple[int, str]] = set()
        for diagnostic in params.context.diagnostics:
            code = str(diagnostic.code) if diagnostic.code is not None else ""
            line = diagnostic.range.start.line
            # (an unreadable file is not silenced by a comment: no fix to offer for DIM902)
            if diagnostic.source != SOURCE or not code or code == "DIM902" or not 0 <= line < len(lines) \
                    or (line, code) in done:
                continue
            done.add((line, code))
            edit = suppression_edit(lines[line], code)
            if edit is None:
                continue
            text = lines[line]
            replaced = types.Range(
                start=types.Position(line=line, character=to_client(text, edit.start, encoding)),
                end=types.Position(line=line, character=to_client(text, edit.end, encoding)))
            actions.append(types.CodeAction(
                title=f"Suppress {code} on this line", kind=types.CodeActionKind.QuickFix,
                diagnostics=[diagnostic],
                edit=types.WorkspaceEdit(changes={uri: [types.TextEdit(range=replaced, new_text=edit.text)]})))
        return actions


def build_server(session: Session | None = None, change_delay: float = CHANGE_DELAY) -> DimcheckServer:
    server = DimcheckServer(session, change_delay)

    @server.feature(types.TEXT_DOCUMENT_DID_OPEN)
    async def did_open(params: types.DidOpenTextDocumentParams) -> None:
        server.schedule(params.text_document.uri, 0)

    @server.feature(types.TEXT_DOCUMENT_DID_CHANGE)
    async def did_change(params: types.DidChangeTextDocumentParams) -> None:
        server.schedule(params.text_document.uri, server.change_delay)

    @server.feature(types.TEXT_DOCUMENT_DID_SAVE)
    async def did_save(params: types.DidSaveTextDocumentParams) -> None:
        server.schedule(params.text_document.uri, 0)
        # other open documents may import the saved one: check them again too
        saved = unquote(params.text_document.uri)
        for uri in server.open_uris():
            if unquote(uri) != saved:
                server.schedule(uri, server.change_delay)

    @server.feature(types.TEXT_DOCUMENT_DID_CLOSE)
    async def did_close(params: types.DidCloseTextDocumentParams) -> None:
        server.clear(params.text_document.uri)

    @server.feature(types.TEXT_DOCUMENT_HOVER)
    async def hover(params: types.HoverParams) -> types.Hover | None:
        return await server.hover(params)

    @server.feature(types.TEXT_DOCUMENT_CODE_ACTION,
                    types.CodeActionOptions(code_action_kinds=[types.CodeActionKind.QuickFix]))
    def code_action(params: types.CodeActionParams) -> list[types.CodeAction]:
        return server.code_actions(params)

    @server.feature(types.SHUTDOWN)
    def shutdown(params) -> None:
        for task in server._pending.values():
            task.cancel()
        server.worker.shutdown(wait=False, cancel_futures=True)

    return server


def serve(config_file: str | None = None) -> int:
    """Speak LSP on stdin/stdout until the editor says exit; the exit code is 0 after a
    shutdown request, 1 when the editor said exit without one (as LSP asks)."""
    logging.basicConfig(level=os.environ.get("DIMCHECK_LOG_LEVEL", "WARNING").upper(),
                        format="dimcheck serve: %(levelname)s: %(message)s")
    server = build_server(Session(config_file))
    server.start_io()
    return 0 if getattr(server.protocol, "_shutdown", True) else 1
