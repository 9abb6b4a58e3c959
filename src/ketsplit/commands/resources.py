"""The ``limits`` statement: list the resource limits, or change some of them."""

from __future__ import annotations

from .. import limits
from ..base.document import Note, Report, Table
from ..language.statements import limit_assignments
from .registry import CommandCall, command


@command("limits", "limits [NAME=VALUE ...]",
         "the resource limits (input size, nesting, exponents, parts, dimensions, digits, time); "
         "with NAME=VALUE, change them for this session",
         "limits parts=128 seconds=60", topic="settings")
def run_limits(call: CommandCall) -> Report:
    words = call.words()
    text, changes = words.text(), {}
    for name, value, span in limit_assignments(words):
        try:
            if name not in limits.NAMES:
                raise ValueError(f"expected NAME=VALUE with NAME one of {', '.join(limits.NAMES)}, "
                                 f"found {call.source[span.column - 1:][:span.length]!r}")
            changes[name] = limits.parse_value(name, value)
        except ValueError as err:
            raise call.error(f"limits: {err}", span.column - 1, span.length) from None
    try:
        call.session.limits = limits.changed(call.session.limits, **changes)
    except ValueError as err:
        raise call.error(f"limits: {err}", words.start, len(text)) from None
    now = call.session.limits.as_dict()
    rows = tuple((name, limits.shown(value), limits.MEANINGS[name]) for name, value in now.items())
    return Report("resource limits" if not text else f"limits {text}",
                  (Table(("limit", "value", "bounds"), rows),
                   Note("change with 'limits NAME=VALUE'; the limits hold for this session")),
                  value=call.session.limits)
