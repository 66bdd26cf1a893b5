"""A small LSP client for the tests: JSON-RPC over a ``dimcheck serve`` subprocess's pipes.

A reader thread files every message from the server: responses by id, notifications in
arrival order. Requests the server sends to the client are answered with ``null``.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import tempfile
import threading
import time
from pathlib import Path

TIMEOUT = 15.0


def uri_of(path: Path) -> str:
    return path.resolve().as_uri()


class LspClient:
    def __init__(self, cwd: Path):
        self._stderr = tempfile.TemporaryFile()  # a pipe nobody reads could fill and block the server
        self.process = subprocess.Popen(
            [sys.executable, "-m", "dimcheck", "serve"], cwd=cwd, stdin=subprocess.PIPE,
            stdout=subprocess.PIPE, stderr=self._stderr, env=dict(os.environ))
        self._next_id = 0
        self._responses: dict[int, dict] = {}
        self._notifications: list[dict] = []
        self._arrived = threading.Condition()
        self._write_lock = threading.Lock()
        self._reader = threading.Thread(target=self._read, daemon=True)
        self._reader.start()

    # -- the wire ---------------------------------------------------------------------------
    def _send(self, message: dict) -> None:
        body = json.dumps({"jsonrpc": "2.0", **message}).encode("utf-8")
        with self._write_lock:
            self.process.stdin.write(f"Content-Length: {len(body)}\r\n\r\n".encode("ascii") + body)
            self.process.stdin.flush()

    def _read(self) -> None:
        stream = self.process.stdout
        while True:
            length = None
            while True:
                header = stream.readline()
                if not header:
                    return
                header = header.strip()
                if not header:
                    break
                name, _, value = header.decode("ascii").partition(":")
                if name.lower() == "content-length":
                    length = int(value)
            message = json.loads(stream.read(length))
            if "method" in message and "id" in message:  # a request from the server
                self._send({"id": message["id"], "result": None})
                continue
            with self._arrived:
                if "id" in message:
                    self._responses[message["id"]] = message
                else:
                    self._notifications.append(message)
                self._arrived.notify_all()

    def _wait(self, found, timeout: float):
        deadline = time.monotonic() + timeout
        with self._arrived:
            while True:
                result = found()
                if result is not None:
                    return result
                remaining = deadline - time.monotonic()
                if remaining <= 0:
                    raise TimeoutError(f"no answer from the server in {timeout} s; stderr: "
                                       f"{self._stderr_so_far()}")
                self._arrived.wait(remaining)

    def _stderr_so_far(self) -> str:
        self._stderr.seek(0)
        return self._stderr.read().decode("utf-8", "replace")[-2000:] or "(empty)"

    # -- what tests call ------------------------------------------------------------------------
    def request(self, method: str, params, timeout: float = TIMEOUT):
        self._next_id += 1
        ident = self._next_id
        self._send({"id": ident, "method": method, "params": params})
        response = self._wait(lambda: self._responses.pop(ident, None), timeout)
        if "error" in response:
            raise RuntimeError(f"{method}: {response['error']}")
        return response.get("result")

    def notify(self, method: str, params) -> None:
        self._send({"method": method, "params": params})

    def notifications(self, method: str) -> list[dict]:
        with self._arrived:
            return [n["params"] for n in self._notifications if n["method"] == method]

    def diagnostics(self, uri: str, version: int | None = None, timeout: float = TIMEOUT) -> list[dict]:
        """The next diagnostics published for ``uri`` (for ``version``, when given)."""
        def published():
            with_uri = [params for params in self.notifications("textDocument/publishDiagnostics")
                        if params["uri"] == uri and (version is None or params.get("version") == version)]
            return with_uri[-1] if with_uri else None

        return self._wait(published, timeout)["diagnostics"]

    def initialize(self, root: Path) -> dict:
        result = self.request("initialize", {
            "processId": os.getpid(), "rootUri": uri_of(root),
            "capabilities": {"textDocument": {"hover": {"contentFormat": ["markdown", "plaintext"]},
                                              "publishDiagnostics": {"versionSupport": True}}},
            "workspaceFolders": [{"uri": uri_of(root), "name": root.name}]})
        self.notify("initialized", {})
        return result

    def open(self, path: Path, text: str, version: int = 1) -> str:
        uri = uri_of(path)
        self.notify("textDocument/didOpen", {"textDocument": {
            "uri": uri, "languageId": "python", "version": version, "text": text}})
        return uri

    def change(self, uri: str, version: int, text: str) -> None:
        self.notify("textDocument/didChange", {"textDocument": {"uri": uri, "version": version},
                                               "contentChanges": [{"text": text}]})

    def shutdown(self, timeout: float = TIMEOUT) -> int:
        self.request("shutdown", None)
        self.notify("exit", None)
        try:
            return self.process.wait(timeout)
        finally:
            self.close()

    def close(self) -> None:
        if self.process.poll() is None:
            self.process.kill()
            self.process.wait()
        for stream in (self.process.stdin, self.process.stdout, self._stderr):
            stream.close()
