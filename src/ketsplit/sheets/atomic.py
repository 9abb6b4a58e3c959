"""Writing a file so that a crash or a full disk leaves either the old file or the new one.

The text goes to a temporary file in the same directory (so that the final
rename stays on one file system), is flushed and fsynced, and then replaces
the target with ``os.replace``, which is atomic.  On any failure the
temporary file is removed and the target is untouched.
"""

from __future__ import annotations

import contextlib
import os
import tempfile
from pathlib import Path


def write_atomic(path: str | Path, text: str) -> None:
    """Write ``text`` (UTF-8) to ``path`` atomically; OSError when it cannot be written."""
    target = Path(path)
    directory = target.parent
    handle, temporary = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".part", dir=directory)
    try:
        with os.fdopen(handle, "w", encoding="utf-8", newline="\n") as out:
            out.write(text)
            out.flush()
            os.fsync(out.fileno())
        os.chmod(temporary, file_mode(target))
        os.replace(temporary, target)
    except BaseException:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(temporary)
        raise
    sync_directory(directory)


def file_mode(target: Path) -> int:
    """The target's present permissions, or those a new file gets (mkstemp's are 0600)."""
    try:
        return target.stat().st_mode & 0o777
    except OSError:
        mask = os.umask(0)
        os.umask(mask)
        return 0o666 & ~mask


def sync_directory(directory: Path) -> None:
    """Make the rename itself durable where the system allows it."""
    try:
        fd = os.open(directory, os.O_RDONLY)
    except OSError:
        return
    with contextlib.suppress(OSError):
        os.fsync(fd)
    os.close(fd)
