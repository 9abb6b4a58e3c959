"""Running one statement so that a Ctrl-C or an error leaves the Session as it was.

The Session's values are immutable (states, expressions, parameters), so a
shallow copy of its fields before a statement is a complete snapshot; on a
KeyboardInterrupt, an InputError or a bug, every field is put back.
"""

from __future__ import annotations

import copy
from dataclasses import fields
from typing import Callable, TypeVar

T = TypeVar("T")


def snapshot(session) -> dict[str, object]:
    return {f.name: copy.copy(getattr(session, f.name)) for f in fields(session)}


def restore(session, saved: dict[str, object]) -> None:
    for name, value in saved.items():
        setattr(session, name, value)


def guarded(session, action: Callable[[], T]) -> T:
    """``action()``; if it raises anything (Ctrl-C included), the session is rolled back."""
    saved = snapshot(session)
    try:
        return action()
    except BaseException:
        restore(session, saved)
        raise
