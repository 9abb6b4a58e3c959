"""Reading a worksheet's bytes with a bound on every byte and on the wait.

The size a file reports is not trusted: a device (``/dev/zero``), a pipe or a
FIFO reports 0 and never ends, and a file may grow while it is read.  So the
bytes are read in chunks and reading stops at :data:`MAX_BYTES` (a
worksheet is typed text) or at the first NUL byte (a binary file is not a
worksheet).  Opening does not wait for a FIFO's writer, and reading runs
under the statement time limit, so a pipe that never delivers ends in a
:class:`SheetError` that says so instead of a hang.
"""

from __future__ import annotations

import os
import stat
from pathlib import Path

from .. import limits
from ..base.errors import InputError
from ..timebudget import time_limited
from .visible import visible

MAX_BYTES = 64 << 20  # a worksheet is typed text; reading stops past this many bytes
CHUNK = 1 << 16
# never wait for a FIFO's writer to open, never take a terminal as the controlling one
OPEN_FLAGS = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0)


class SheetError(InputError):
    """A file that cannot be read as a worksheet at all (nothing is loaded); the message
    names the file, and the line when one line is the cause."""


def read_bounded(path: str | Path, head: int | None = None) -> bytes:
    """The bytes of ``path`` (only the first ``head`` when given); SheetError past
    MAX_BYTES, at a NUL byte, when the system refuses, or when the statement time limit
    runs out while waiting for the bytes."""
    shown = visible(str(path))
    if "\0" in str(path):
        raise SheetError(f"cannot read {shown}: a file name cannot hold a NUL character")
    seconds = limits.current().seconds
    with time_limited(seconds, lambda: SheetError(f"cannot read {shown}: "
                                                  f"{limits.over_time(seconds).message}")):
        try:
            fd = os.open(path, OPEN_FLAGS)
        except OSError as err:
            raise SheetError(f"cannot read {shown}: {err.strerror or err}") from None
        try:
            return read_chunks(fd, shown, head)
        finally:
            os.close(fd)


def read_chunks(fd: int, shown: str, head: int | None = None) -> bytes:
    """Read until the end, ``head`` bytes, MAX_BYTES or a NUL byte, whichever comes first."""
    mode = os.fstat(fd).st_mode
    if stat.S_ISDIR(mode):
        raise SheetError(f"cannot read {shown}: it is a directory")
    if not stat.S_ISREG(mode):
        os.set_blocking(fd, True)  # opened without waiting for a writer; now wait for data
    most = MAX_BYTES + 1 if head is None else head
    chunks, size = [], 0
    while size < most:
        try:
            chunk = os.read(fd, min(CHUNK, most - size))
        except OSError as err:
            raise SheetError(f"cannot read {shown}: {err.strerror or err}") from None
        if not chunk:
            break
        if head is None and b"\0" in chunk:
            raise SheetError(f"{shown} is a binary file, not a worksheet (a worksheet is UTF-8 "
                             "text)")
        chunks.append(chunk)
        size += len(chunk)
    if size > MAX_BYTES:
        raise SheetError(f"{shown} holds more than {MAX_BYTES} bytes, more than a worksheet may; "
                         "reading stopped there")
    return b"".join(chunks)
