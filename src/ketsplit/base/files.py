"""Writing a file so that a crash or a full disk leaves either the old file or the new one.

The text goes to a temporary file in the same directory (so that the final
rename stays on one file system), is flushed and fsynced, and then replaces
the target with ``os.replace``, which is atomic: a process killed at any
moment leaves the old file or the new one, never half of either.  On any
failure the temporary file is removed and the target is untouched.

A target that cannot be written (read-only file or directory, full disk,
missing directory) is a :class:`WriteError`: an InputError with a sentence a
person can act on, and also an OSError (``strerror`` holds the short reason),
so that callers catching OSError keep working.

A target that is a symbolic link is written through: the file it points to
gets the new text and the link stays a link (a link to nothing, or a loop of
links, is refused, saying so).  A process killed between writing aside and
the rename leaves its temporary file behind; the next save beside the same
target removes such files, and only those that are provably litter of ours:
named with our marker, this machine's tag and the id of a process that no
longer runs, a plain file owned by this user (see :func:`sweep`).
"""

from __future__ import annotations

import contextlib
import errno
import hashlib
import os
import re
import socket
import stat
import tempfile
from pathlib import Path

from ..base.errors import InputError


class WriteError(InputError, OSError):
    """The file could not be written; the target, if it existed, is unchanged."""

    def __init__(self, path: Path, reason: str, code: int | None = None):
        outcome = "the file was left as it was" if exists(path) else "nothing was written"
        super().__init__(f"cannot write {path}: {reason}; {outcome}")
        self.errno, self.strerror, self.filename = code, reason, str(path)


MARK = "ketsplit"  # in the name of every temporary file we write aside
HOST = hashlib.sha256(socket.gethostname().encode()).hexdigest()[:8]  # this machine's tag
SUFFIX = ".part"
NAME_KEPT = 100  # characters of the target's name kept in a temporary file's name


def write_atomic(path: str | Path, text: str | bytes) -> None:
    """Write ``text`` (UTF-8; or bytes as they are) to ``path`` atomically; WriteError when it
    cannot be written. A symbolic link is written through (the file it points to is replaced)."""
    target = through_links(Path(path))
    refuse_read_only(target)
    sweep(target)
    try:
        handle, temporary = tempfile.mkstemp(prefix=f"{litter_stem(target)}{os.getpid()}-",
                                             suffix=SUFFIX, dir=target.parent)
    except OSError as err:
        raise WriteError(target, reason(err, target), err.errno) from None
    try:
        with (os.fdopen(handle, "wb") if isinstance(text, bytes)
              else os.fdopen(handle, "w", encoding="utf-8", newline="\n")) as out:
            out.write(text)
            out.flush()
            os.fsync(out.fileno())
        os.chmod(temporary, file_mode(target))
        os.replace(temporary, target)
    except BaseException as err:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(temporary)
        if isinstance(err, OSError):
            raise WriteError(target, reason(err, target), err.errno) from None
        raise
    sync_directory(target.parent)


def through_links(path: Path) -> Path:
    """The file a symbolic link points to (following a chain of them); the path itself
    when it is no link.  WriteError for a link to nothing or a loop of links."""
    try:
        if "\x00" in str(path) or not path.is_symlink():
            return path
        return path.resolve(strict=True)
    except FileNotFoundError:
        raise WriteError(path, f"it is a symbolic link to {os.readlink(path)}, which does not "
                               "exist; save to that file by its own name, or remove the link",
                         errno.ENOENT) from None
    except (OSError, RuntimeError) as err:  # a loop of links, a name too long, ...
        raise WriteError(path, f"it is a symbolic link that cannot be followed "
                               f"({getattr(err, 'strerror', None) or err})", errno.ELOOP) from None


def litter_stem(target: Path) -> str:
    """How the names of our temporary files beside ``target`` start (the pid comes next)."""
    return f".{target.name[:NAME_KEPT]}.{MARK}-{HOST}-"


def sweep(target: Path) -> None:
    """Remove temporary files that an interrupted save beside ``target`` left behind:
    those named as ours (the target's name, our marker and this machine's tag) by a
    process that no longer runs, plain files owned by this user.  Nothing else is touched."""
    pattern = re.compile(re.escape(litter_stem(target)) + r"(\d+)-[a-z0-9_]{8}" + re.escape(SUFFIX))
    with contextlib.suppress(OSError):
        with os.scandir(target.parent) as entries:
            for entry in entries:
                found = pattern.fullmatch(entry.name)
                if found and is_our_litter(entry, int(found.group(1))):
                    with contextlib.suppress(OSError):
                        os.unlink(entry.path)


def is_our_litter(entry: os.DirEntry, pid: int) -> bool:
    info = entry.stat(follow_symlinks=False)
    return (stat.S_ISREG(info.st_mode) and info.st_uid == os.getuid() and pid != os.getpid()
            and not running(pid))


def running(pid: int) -> bool:
    """Does a process with this id run now (on this machine)?"""
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except OSError:  # it exists, but belongs to someone else
        return True
    return True


def refuse_read_only(target: Path) -> None:
    """A file marked read-only is not replaced, although its directory would allow it."""
    if "\x00" in str(target):  # the system cannot even be asked about such a name
        raise WriteError(target, "a file name cannot contain a NUL character", errno.EINVAL)
    try:
        if target.is_dir():
            raise WriteError(target, "it is a directory", errno.EISDIR)
        if target.exists() and (not os.access(target, os.W_OK) or not target.stat().st_mode & 0o222):
            raise WriteError(target, "the file is read-only", errno.EACCES)
    except WriteError:
        raise
    except OSError as err:  # a name too long for the system, a loop of links, ...
        raise WriteError(target, err.strerror or str(err), err.errno) from None


def exists(path: Path) -> bool:
    """Whether ``path`` exists; False when the system cannot even look it up."""
    try:
        return path.exists()
    except OSError:
        return False


def reason(err: OSError, target: Path) -> str:
    """What went wrong, in words that say what to do about it."""
    directory = target.parent.resolve()
    if err.errno in (errno.ENOSPC, errno.EDQUOT):
        return "the disk is full (or the quota is used up)"
    if err.errno == errno.EFBIG:
        return "the file would be larger than this process may write"
    if err.errno == errno.EROFS:
        return f"the file system holding {directory} is mounted read-only"
    if err.errno in (errno.EACCES, errno.EPERM):
        return f"the directory {directory} is not writable (permission denied)"
    if err.errno == errno.ENOENT:
        return f"the directory {directory} does not exist"
    if err.errno == errno.ENOTDIR:
        return f"{target.parent} is not a directory"
    return err.strerror or str(err)


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
