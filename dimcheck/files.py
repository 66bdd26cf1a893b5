"""Reading a file the user named without ever blocking: a named pipe or a device called
``flow.py`` must not hang a run (nor a cache lookup), it is only unreadable."""

from __future__ import annotations

import os
from stat import S_ISDIR, S_ISREG

# no waiting for a writer on a pipe; O_BINARY: no newline translation on Windows
_FLAGS = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_BINARY", 0)


class NotRegularFile(OSError):
    """A pipe, socket or device where a source file was expected."""


def read_regular_file(path: str) -> bytes:
    """All the bytes of a regular file. Raises IsADirectoryError, NotRegularFile or another
    OSError; the type is checked on the open descriptor, so a rename cannot slip past it."""
    descriptor = os.open(path, _FLAGS)
    try:
        info = os.fstat(descriptor)
        if S_ISDIR(info.st_mode):
            raise IsADirectoryError(f"is a directory: {path}")
        if not S_ISREG(info.st_mode):
            raise NotRegularFile("not a regular file")
        # one read for the size fstat tells (plus one byte, to see the end), more when a
        # read returns less (over 2 GB at once, a file that grew, a size of 0)
        size = info.st_size + 1 if info.st_size else 1 << 16
        chunks = []
        while chunk := os.read(descriptor, size):
            chunks.append(chunk)
        return b"".join(chunks)
    finally:
        os.close(descriptor)
